package inspect_test

import (
	"errors"
	"math"
	"testing"

	"github.com/kalends/kalends/inspect"
)

// TestEstimate632HandWorked checks the .632 and .632+ estimators (Efron &
// Tibshirani 1997, JASA 92:548–560, eqs. 24 and 27–32) on a case worked
// out by hand, for squared error.
//
//	observed y = 1, 2, 4;  full-data fitted ŷ = 1.5, 2, 3.5
//	apparent err̄ = (0.5² + 0² + 0.5²)/3 = 0.5/3 = 1/6
//	out-of-bag predictions:
//	  replicate 0: row 0 → 2
//	  replicate 1: row 1 → 3, row 2 → 3
//	  replicate 2: row 0 → 3, row 2 → 5
//	per-row OOB loss: row 0: ((1−2)² + (1−3)²)/2 = 5/2
//	                  row 1: (2−3)² = 1
//	                  row 2: ((4−3)² + (4−5)²)/2 = 1
//	Err⁽¹⁾ = (5/2 + 1 + 1)/3 = 3/2
//	γ̂ = (1/9) ΣᵢΣⱼ (yᵢ − ŷⱼ)²:
//	  y=1: 0.25 + 1 + 6.25 = 7.5;  y=2: 0.25 + 0 + 2.25 = 2.5;  y=4: 6.25 + 4 + 0.25 = 10.5
//	  γ̂ = 20.5/9 = 41/18
//	Err⁽¹⁾′ = min(3/2, 41/18) = 3/2
//	R̂′ = (3/2 − 1/6)/(41/18 − 1/6) = (4/3)/(38/18) = 12/19
//	ŵ = .632/(1 − .368·12/19) = .632·19/(19 − 4.416) = 12.008/14.584
//	Err.632  = .368·(1/6) + .632·(3/2) = 0.06133… + 0.948 = 1.00933…
//	Err.632+ = (1 − ŵ)·(1/6) + ŵ·(3/2) = 1/6 + ŵ·(4/3)
func TestEstimate632HandWorked(t *testing.T) {
	y := []float64{1, 2, 4}
	fitted := []float64{1.5, 2, 3.5}
	oob := []inspect.OutOfBag{
		{Rows: []int{0}, Pred: []float64{2}},
		{Rows: []int{1, 2}, Pred: []float64{3, 3}},
		{Rows: []int{0, 2}, Pred: []float64{3, 5}},
	}
	w := 12.008 / 14.584
	want := inspect.Error632{
		Apparent:      1.0 / 6,
		OutOfBag:      1.5,
		NoInformation: 41.0 / 18,
		Overfitting:   12.0 / 19,
		Weight:        w,
		Err632:        .368/6 + .632*1.5,
		Err632Plus:    1.0/6 + w*4/3,
		Rows:          3,
	}
	got, err := inspect.Estimate632(y, fitted, oob)
	if err != nil {
		t.Fatal(err)
	}
	const tol = 1e-14
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"Apparent", got.Apparent, want.Apparent},
		{"OutOfBag", got.OutOfBag, want.OutOfBag},
		{"NoInformation", got.NoInformation, want.NoInformation},
		{"Overfitting", got.Overfitting, want.Overfitting},
		{"Weight", got.Weight, want.Weight},
		{"Err632", got.Err632, want.Err632},
		{"Err632Plus", got.Err632Plus, want.Err632Plus},
	} {
		if relDiff(c.got, c.want) > tol {
			t.Errorf("%s: got %.17g, want %.17g", c.name, c.got, c.want)
		}
	}
	if got.Rows != 3 || got.NeverOut != 0 {
		t.Errorf("got rows %d never out %d, want 3 and 0", got.Rows, got.NeverOut)
	}
}

// TestEstimate632Clipping checks the two ends of R̂′ (paper, eq. 31–32):
// Err⁽¹⁾ ≥ γ̂ gives R̂′ = 1, ŵ = 1 and Err.632+ = γ̂; Err⁽¹⁾ ≤ err̄ gives
// R̂′ = 0, ŵ = .632 and Err.632+ = Err.632.
func TestEstimate632Clipping(t *testing.T) {
	y := []float64{1, 2, 4}
	fitted := []float64{1.5, 2, 3.5}
	tests := []struct {
		name         string
		pred         []float64 // OOB prediction for rows 0, 1, 2 in one replicate
		r, w, plus   float64
		neverOutRows int
	}{
		{"worse than no information", []float64{11, -8, 14}, 1, 1, 41.0 / 18, 0},
		{"better than apparent", []float64{1, 2, 4}, 0, .632, .368 / 6, 0},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got, err := inspect.Estimate632(y, fitted, []inspect.OutOfBag{{Rows: []int{0, 1, 2}, Pred: tt.pred}})
			if err != nil {
				t.Fatal(err)
			}
			if got.Overfitting != tt.r || relDiff(got.Weight, tt.w) > 1e-15 || relDiff(got.Err632Plus, tt.plus) > 1e-14 {
				t.Errorf("got R %v w %v Err632+ %v, want %v %v %v", got.Overfitting, got.Weight, got.Err632Plus, tt.r, tt.w, tt.plus)
			}
		})
	}
	// A row never out of bag is counted and left out.
	got, err := inspect.Estimate632(y, fitted, []inspect.OutOfBag{{Rows: []int{1}, Pred: []float64{3}}})
	if err != nil || got.NeverOut != 2 || got.OutOfBag != 1 {
		t.Errorf("got %+v, %v; want NeverOut 2, OutOfBag 1", got, err)
	}
	if _, err := inspect.Estimate632(y, fitted, nil); !errors.Is(err, inspect.ErrNoOutOfBag) {
		t.Errorf("no replicates: got %v, want ErrNoOutOfBag", err)
	}
	if _, err := inspect.Estimate632(y, fitted, []inspect.OutOfBag{{Rows: []int{2}, Pred: []float64{math.NaN()}}}); err == nil {
		t.Error("NaN prediction: got nil error")
	}
}

// TestMeasure checks RMSE, MAE and R² on a case worked by hand:
// y = 1, 2, 3, 6, ŷ = 2, 2, 2, 5: errors −1, 0, 1, 1; SSE = 3, RMSE =
// √(3/4), MAE = 3/4; ȳ = 3, SST = 4 + 1 + 0 + 9 = 14, R² = 1 − 3/14.
func TestMeasure(t *testing.T) {
	m, err := inspect.Measure([]float64{1, 2, 3, 6}, []float64{2, 2, 2, 5})
	if err != nil {
		t.Fatal(err)
	}
	if m.N != 4 || relDiff(m.RMSE, math.Sqrt(0.75)) > 1e-15 || m.MAE != 0.75 || relDiff(m.R2, 1-3.0/14) > 1e-15 {
		t.Errorf("got %+v, want N 4 RMSE %v MAE 0.75 R2 %v", m, math.Sqrt(0.75), 1-3.0/14)
	}
	m, err = inspect.Measure([]float64{2, 2}, []float64{1, 3})
	if !errors.Is(err, inspect.ErrNoVariance) || !math.IsNaN(m.R2) || m.RMSE != 1 {
		t.Errorf("constant observed: got %+v, %v; want RMSE 1, R2 NaN and ErrNoVariance", m, err)
	}
	if _, err := inspect.Measure([]float64{1, math.Inf(1)}, []float64{1, 2}); err == nil || err.Error()[:len("inspect: row 2")] != "inspect: row 2" {
		t.Errorf("got %v, want an error naming row 2", err)
	}
}

func TestMeanOutOfBag(t *testing.T) {
	mean, count := inspect.MeanOutOfBag(3, []inspect.OutOfBag{
		{Rows: []int{0}, Pred: []float64{2}},
		{Rows: []int{0, 2}, Pred: []float64{4, 5}},
	})
	if mean[0] != 3 || !math.IsNaN(mean[1]) || mean[2] != 5 || count[0] != 2 || count[1] != 0 || count[2] != 1 {
		t.Errorf("got means %v counts %v, want [3 NaN 5] [2 0 1]", mean, count)
	}
	if !panics(func() { inspect.MeanOutOfBag(2, []inspect.OutOfBag{{Rows: []int{2}, Pred: []float64{1}}}) }) {
		t.Error("row out of range: no panic")
	}
}
