package fit_test

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"

	"github.com/kalends/kalends/fit"
)

func TestRidgeWeights(t *testing.T) {
	// Integer weights must give the coefficients of the data with rows
	// repeated (the standardisation divides by Σw), and weight 0 must
	// equal leaving the row out. Tolerance 1e-12 relative.
	rd := readTable(t, "ridge.csv")
	cols := []string{"a", "b", "c", "d"}
	n := len(rd["y"])
	w := make([]float64, n)
	exp := table{}
	for i := range n {
		w[i] = float64(i % 3) // 0, 1, 2, ...
		for range int(w[i]) {
			for _, c := range append([]string{"y"}, cols...) {
				exp[c] = append(exp[c], rd[c][i])
			}
		}
	}
	for _, lam := range []float64{0, 0.5, 3, 25} {
		r := fit.Ridge{Lambda: lam}
		mw, err := r.FrequencyWeighted().(fit.Ridge).FitRidge(rd.design(true, cols...), rd["y"], w)
		if err != nil {
			t.Fatal(err)
		}
		me, err := r.FitRidge(exp.design(true, cols...), exp["y"], nil)
		if err != nil {
			t.Fatal(err)
		}
		cw, ce := mw.Coefficients(), me.Coefficients()
		for j := range cw {
			checkClose(t, cw[j].Name, cw[j].Estimate, ce[j].Estimate, 1e-12)
		}
		checkClose(t, "EffectiveDF", mw.EffectiveDF(), me.EffectiveDF(), 1e-12)
		sw, se := mw.Statistics(), me.Statistics()
		checkClose(t, "Rows", sw.Rows, se.Rows, 0)
		checkClose(t, "Deviance", sw.Deviance, se.Deviance, 1e-12)
		checkClose(t, "RSquared", sw.RSquared, se.RSquared, 1e-12)
		// Precision weights: same coefficients, Rows counts rows used.
		mp, err := r.FitRidge(rd.design(true, cols...), rd["y"], w)
		if err != nil {
			t.Fatal(err)
		}
		for j, c := range mp.Coefficients() {
			checkClose(t, "precision "+c.Name, c.Estimate, cw[j].Estimate, 0)
		}
		if got, want := mp.Statistics().Rows, float64(2*n/3); got != want {
			t.Errorf("precision Rows: got %v, want %v", got, want)
		}
	}
}

func TestRidgeShrinkage(t *testing.T) {
	// As Lambda grows the penalised coefficients go to 0, the intercept
	// to the weighted mean of y and the effective df to 1 (the
	// intercept), monotonically.
	rd := readTable(t, "ridge.csv")
	x := rd.design(true, "a", "b", "c", "d")
	prevDF, prevNorm := math.Inf(1), math.Inf(1)
	for _, lam := range []float64{0, 1, 10, 100, 1e4, 1e8} {
		m, err := fit.Ridge{Lambda: lam}.FitRidge(x, rd["y"], rd["w"])
		if err != nil {
			t.Fatal(err)
		}
		std := m.Standardized(nil)
		norm := 0.0
		for _, b := range std[1:] {
			norm += b * b
		}
		if !(m.EffectiveDF() < prevDF) || !(norm < prevNorm) {
			t.Errorf("Lambda %g: effective df %g, squared norm %g; want both below %g, %g", lam, m.EffectiveDF(), norm, prevDF, prevNorm)
		}
		prevDF, prevNorm = m.EffectiveDF(), norm
		if got := m.Lambda(); got != lam {
			t.Errorf("Lambda: got %v, want %v", got, lam)
		}
	}
	m, _ := fit.Ridge{Lambda: 1e12}.FitRidge(x, rd["y"], rd["w"])
	sy, sw := 0.0, 0.0
	for i, v := range rd["y"] {
		sy += rd["w"][i] * v
		sw += rd["w"][i]
	}
	checkClose(t, "intercept at huge Lambda", m.Coefficients()[0].Estimate, sy/sw, 1e-6)
	checkClose(t, "effective df at huge Lambda", m.EffectiveDF(), 1, 1e-6)
}

func TestRidgeNotEstimable(t *testing.T) {
	// A zero column and a second constant column are not estimable; the
	// other coefficients equal those of the fit without them.
	// Tolerance 1e-12.
	rd := readTable(t, "ridge.csv")
	n := len(rd["y"])
	zeros, twos := make([]float64, n), make([]float64, n)
	for i := range twos {
		twos[i] = 2
	}
	wide := table{"a": rd["a"], "holiday": zeros, "b": rd["b"], "two": twos}
	names := []string{"intercept", "a", "holiday", "b", "two"}
	for _, lam := range []float64{0, 2} {
		mf, err := fit.Ridge{Lambda: lam}.FitRidge(wide.design(true, "a", "holiday", "b", "two"), rd["y"], rd["w"])
		if err != nil {
			t.Fatal(err)
		}
		ms, err := fit.Ridge{Lambda: lam}.FitRidge(rd.design(true, "a", "b"), rd["y"], rd["w"])
		if err != nil {
			t.Fatal(err)
		}
		cf, cs := mf.Coefficients(), ms.Coefficients()
		for _, k := range []int{2, 4} {
			if cf[k].Name != names[k] || cf[k].Estimable || !math.IsNaN(cf[k].Estimate) {
				t.Errorf("Lambda %g: got %+v, want %s not estimable", lam, cf[k], names[k])
			}
		}
		for k, j := range []int{0, 1, 3} {
			checkClose(t, names[j], cf[j].Estimate, cs[k].Estimate, 1e-12)
		}
		if got := mf.Statistics().Params; got != 3 {
			t.Errorf("Params: got %d, want 3", got)
		}
	}
	// With Lambda 0, a column collinear with earlier ones is not
	// estimable either (the later one is dropped).
	sum := make([]float64, n)
	for i := range sum {
		sum[i] = rd["a"][i] + rd["b"][i]
	}
	col := table{"a": rd["a"], "b": rd["b"], "ab": sum}
	m, err := fit.Ridge{}.FitRidge(col.design(true, "a", "b", "ab"), rd["y"], nil)
	if err != nil {
		t.Fatal(err)
	}
	if c := m.Coefficients()[3]; c.Estimable {
		t.Errorf("got %+v, want ab not estimable", c)
	}
}

func TestRidgeBadInput(t *testing.T) {
	x := simple(4)
	tests := []struct {
		name    string
		x       mat.Matrix
		y, w    []float64
		wantRow int
		wantCol string
	}{
		{"NaN outcome", x, []float64{1, math.NaN(), 2, 3}, nil, 2, "outcome"},
		{"infinite outcome", x, []float64{1, 2, math.Inf(-1), 3}, nil, 3, "outcome"},
		{"negative weight", x, []float64{1, 2, 2, 3}, []float64{1, 1, 1, -2}, 4, "weights"},
		{"NaN in design", namedDense{mat.NewDense(4, 2, []float64{1, 0, 1, math.NaN(), 1, 2, 1, 3}), x.names}, []float64{1, 2, 2, 3}, nil, 2, "x"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := fit.Ridge{Lambda: 1}.Fit(tt.x, tt.y, tt.w)
			var de *fit.DataError
			if !errors.As(err, &de) || !errors.Is(err, fit.ErrBadValue) {
				t.Fatalf("got %v, want a *DataError wrapping ErrBadValue", err)
			}
			if de.Row != tt.wantRow || de.Name != tt.wantCol {
				t.Errorf("got row %d, %q; want row %d, %q", de.Row, de.Name, tt.wantRow, tt.wantCol)
			}
		})
	}
	_, err := fit.Ridge{Lambda: 1}.Fit(x, []float64{1, 2, 3, 4}, make([]float64, 4))
	if !errors.Is(err, fit.ErrBadValue) {
		t.Errorf("all-zero weights: got %v, want ErrBadValue", err)
	}
}

func TestRidgePanics(t *testing.T) {
	x := simple(4)
	y := []float64{1, 2, 3, 4}
	tests := []misuse{
		{"negative Lambda", func() { fit.Ridge{Lambda: -1}.Fit(x, y, nil) }},
		{"NaN Lambda", func() { fit.Ridge{Lambda: math.NaN()}.Fit(x, y, nil) }},
		{"infinite Lambda", func() { fit.Ridge{Lambda: math.Inf(1)}.Fit(x, y, nil) }},
		{"bad weight kind", func() { fit.Ridge{Weights: 5}.Fit(x, y, nil) }},
		{"short y", func() { fit.Ridge{}.Fit(x, y[:2], nil) }},
		{"short weights", func() { fit.Ridge{}.Fit(x, y, y[:3]) }},
		{"predict wrong columns", func() {
			m, _ := fit.Ridge{Lambda: 1}.FitRidge(x, y, nil)
			m.Predict(nil, mat.NewDense(1, 5, nil))
		}},
		{"standardized wrong dst", func() {
			m, _ := fit.Ridge{Lambda: 1}.FitRidge(x, y, nil)
			m.Standardized(make([]float64, 1))
		}},
	}
	checkMisuse(t, tests)
}

func TestRidgePredict(t *testing.T) {
	// Predictions are x·β with the reported coefficients, and the
	// residual sum of squares in Statistics matches them.
	rd := readTable(t, "ridge.csv")
	x := rd.design(true, "a", "b", "c", "d")
	m, err := fit.Ridge{Lambda: 3}.FitRidge(x, rd["y"], rd["w"])
	if err != nil {
		t.Fatal(err)
	}
	pred := m.Predict(nil, x)
	coef := m.Coefficients()
	rss := 0.0
	for i := range pred {
		want := 0.0
		for j, c := range coef {
			want += c.Estimate * x.At(i, j)
		}
		checkClose(t, "prediction", pred[i], want, 1e-13)
		e := rd["y"][i] - pred[i]
		rss += rd["w"][i] * e * e
	}
	checkClose(t, "Deviance", m.Statistics().Deviance, rss, 1e-12)
}
