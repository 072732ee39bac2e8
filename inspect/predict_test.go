package inspect_test

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"github.com/kalends/kalends/inspect"
)

// TestPredictCoverage simulates data sets from a known straight-line trend
// with normal errors and checks that the nominal-95% intervals of Predict
// cover the true mean and a fresh outcome at a new date about 95% of the
// time.
//
// Setup: n = 30 dates every 3 days, y = 10 + 0.1·(day − day₀) + N(0, 2²),
// the new date 30 days after the last, B = 199, sets data sets (seeded).
// With sets = 400 the binomial standard error of a 95% coverage is 1.1
// points; the accepted band [0.89, 0.99] is about ±4 of them around 0.94,
// generous because the basic interval for the mean is known to run a
// little below nominal at small n (Davison & Hinkley 1997, §6.3.3 discuss
// the same effect for the prediction limits).
func TestPredictCoverage(t *testing.T) {
	sets := 400
	if testing.Short() {
		sets = 100
	}
	const n, sigma = 30, 2.0
	start := time.Date(2023, 3, 1, 0, 0, 0, 0, time.UTC)
	dates := make([]time.Time, n)
	for i := range dates {
		dates[i] = start.AddDate(0, 0, 3*i)
	}
	at := []time.Time{dates[n-1].AddDate(0, 0, 30)}
	trueMean := 10 + 0.1*(dayNumber(at[0])-dayNumber(start))
	g := rand.New(rand.NewPCG(2024, 6))
	var coverMean, coverPred int
	fs := calBuilder{cols: []string{"intercept", "trend"}}
	for s := range sets {
		y := make([]float64, n)
		for i, d := range dates {
			y[i] = 10 + 0.1*(dayNumber(d)-dayNumber(start)) + sigma*g.NormFloat64()
		}
		fresh := trueMean + sigma*g.NormFloat64()
		p, err := inspect.Predict(context.Background(), inspect.Data{Dates: dates, Outcome: y}, fs,
			inspect.Data{Dates: at}, inspect.PredictOptions{Fitter: ols{}, B: 199, Seed: uint64(s), Workers: 1})
		if err != nil {
			t.Fatal(err)
		}
		if p.Used != 199 || len(p.Warnings) != 0 {
			t.Fatalf("set %d: %d used, warnings %v", s, p.Used, p.Warnings)
		}
		if !(p.MeanLower[0] < p.Fit[0] && p.Fit[0] < p.MeanUpper[0] && p.Lower[0] < p.MeanLower[0] && p.MeanUpper[0] < p.Upper[0]) {
			t.Fatalf("set %d: intervals not nested around the fit: %v", s, p)
		}
		if p.MeanLower[0] <= trueMean && trueMean <= p.MeanUpper[0] {
			coverMean++
		}
		if p.Lower[0] <= fresh && fresh <= p.Upper[0] {
			coverPred++
		}
	}
	lo, hi := 0.89, 0.99
	if testing.Short() {
		lo, hi = 0.84, 1.0 // 100 sets: binomial SE 2.2 points
	}
	for _, c := range []struct {
		name  string
		cover int
	}{{"mean", coverMean}, {"prediction", coverPred}} {
		got := float64(c.cover) / float64(sets)
		t.Logf("%s interval coverage %.3f over %d sets", c.name, got, sets)
		if got < lo || got > hi {
			t.Errorf("%s interval coverage: got %.3f over %d sets, want in [%.2f, %.2f]", c.name, got, sets, lo, hi)
		}
	}
}

// TestPredictDeterminism checks bit-identical intervals for any number of
// workers.
func TestPredictDeterminism(t *testing.T) {
	d := testData(60)
	fs := calBuilder{cols: allCols}
	at := inspect.Data{Dates: []time.Time{d.Dates[59].AddDate(0, 0, 7), d.Dates[59].AddDate(0, 0, 14)}}
	var want *inspect.Prediction
	for _, w := range []int{1, 8} {
		p, err := inspect.Predict(context.Background(), d, fs, at, inspect.PredictOptions{Fitter: ols{}, B: 99, Seed: 5, Workers: w})
		if err != nil {
			t.Fatal(err)
		}
		if want == nil {
			want = p
			continue
		}
		for k := range 2 {
			if p.Lower[k] != want.Lower[k] || p.Upper[k] != want.Upper[k] || p.MeanLower[k] != want.MeanLower[k] || p.MeanUpper[k] != want.MeanUpper[k] {
				t.Errorf("row %d: Workers 8 gave %v %v, Workers 1 %v %v", k, p.Lower[k], p.Upper[k], want.Lower[k], want.Upper[k])
			}
		}
	}
}

// TestPredictExcludesLeverageOne checks that a row that alone determines a
// coefficient (the only December date) is left out of the residual pool
// and reported, 1-based.
func TestPredictExcludesLeverageOne(t *testing.T) {
	start := time.Date(2023, 11, 1, 0, 0, 0, 0, time.UTC)
	var d inspect.Data
	for i := range 31 { // Nov 1 .. Dec 1: one December row, row 31
		t := start.AddDate(0, 0, i)
		d.Dates = append(d.Dates, t)
		d.Outcome = append(d.Outcome, float64(i%4)+5*calValue("december", t, 0))
	}
	p, err := inspect.Predict(context.Background(), d, calBuilder{cols: []string{"intercept", "trend", "december"}},
		inspect.Data{Dates: d.Dates[:1]}, inspect.PredictOptions{Fitter: ols{}, B: 39})
	if err != nil {
		t.Fatal(err)
	}
	if len(p.Excluded) != 1 || p.Excluded[0] != 31 {
		t.Errorf("Excluded = %v, want [31]", p.Excluded)
	}
	if len(p.Warnings) != 2 {
		t.Errorf("B = 39 at 95%%: warnings %v, want extreme-order warnings at both ends", p.Warnings)
	}
}

func TestPredictErrors(t *testing.T) {
	d := testData(30)
	fs := calBuilder{cols: allCols[:2]}
	o := inspect.PredictOptions{Fitter: ols{}, B: 20}
	w := d
	w.Weights = make([]float64, 30)
	if _, err := inspect.Predict(context.Background(), w, fs, inspect.Data{}, o); err == nil {
		t.Error("case weights: no error")
	}
	bad := o
	bad.Level = 1.5
	if _, err := inspect.Predict(context.Background(), d, fs, inspect.Data{}, bad); !errors.Is(err, inspect.ErrLevel) {
		t.Errorf("level 1.5: got %v, want ErrLevel", err)
	}
	if v := mustPanic(func() { inspect.Predict(context.Background(), d, fs, inspect.Data{}, inspect.PredictOptions{}) }); v != "inspect: Predict: nil PredictOptions.Fitter" {
		t.Errorf("nil fitter: panic %v", v)
	}
	if p, err := inspect.Predict(context.Background(), d, fs, inspect.Data{}, o); err != nil || len(p.Fit) != 0 || math.IsNaN(p.Level) {
		t.Errorf("no new rows: %v, %v", p, err)
	}
}
