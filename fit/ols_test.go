package fit

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"sync"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// namedDense is a design with column names, for tests.
type namedDense struct {
	*mat.Dense
	names []string
}

func (d namedDense) Name(j int) string { return d.names[j] }

// near reports whether got and want agree to a relative tolerance (absolute
// near zero); two NaNs agree.
func near(got, want, tol float64) bool {
	if math.IsNaN(got) || math.IsNaN(want) {
		return math.IsNaN(got) && math.IsNaN(want)
	}
	if math.IsInf(want, 0) {
		return got == want
	}
	return math.Abs(got-want) <= tol*math.Max(1, math.Abs(want))
}

func panics(f func()) (msg string) {
	defer func() {
		if r := recover(); r != nil {
			msg = fmt.Sprint(r)
		}
	}()
	f()
	return ""
}

// randDesign returns an n×(1+k) design with an intercept and k normal
// columns, and an outcome with heteroskedastic noise.
func randDesign(r *rand.Rand, n, k int) (*mat.Dense, []float64) {
	x := mat.NewDense(n, k+1, nil)
	y := make([]float64, n)
	for i := range n {
		x.Set(i, 0, 1)
		s := 0.5
		for j := 1; j <= k; j++ {
			v := r.NormFloat64()
			x.Set(i, j, v)
			s += float64(j) * 0.3 * v
		}
		y[i] = s + (1+math.Abs(x.At(i, 1)))*r.NormFloat64()
	}
	return x, y
}

// compareModels checks every coefficient, standard error and statistic of
// got against want, mapping want's coefficients through idx (got column j
// is want column idx[j], or -1 for a column that must not be estimable).
func compareModels(t *testing.T, got, want *OLSFit, idx []int, tol float64) {
	t.Helper()
	gc, wc := got.Coefficients(), want.Coefficients()
	gt, wt := got.PValues(nil), want.PValues(nil)
	for j, c := range gc {
		if idx[j] < 0 {
			if c.Estimable || !math.IsNaN(c.Estimate) || !math.IsNaN(c.StdErr) || !math.IsNaN(gt[j]) {
				t.Errorf("%s: got estimable=%v estimate %v SE %v p %v, want not estimable with NaNs", c.Name, c.Estimable, c.Estimate, c.StdErr, gt[j])
			}
			continue
		}
		w := wc[idx[j]]
		if !c.Estimable || !near(c.Estimate, w.Estimate, tol) || !near(c.StdErr, w.StdErr, tol) || !near(gt[j], wt[idx[j]], tol) {
			t.Errorf("%s: got (%v, %v, SE %v, p %v), want (true, %v, SE %v, p %v)", c.Name, c.Estimable, c.Estimate, c.StdErr, gt[j], w.Estimate, w.StdErr, wt[idx[j]])
		}
	}
	gs, ws := got.Statistics(), want.Statistics()
	for _, f := range []struct {
		name      string
		got, want float64
	}{
		{"Rows", gs.Rows, ws.Rows},
		{"Params", float64(gs.Params), float64(ws.Params)},
		{"ResidDF", gs.ResidDF, ws.ResidDF},
		{"ResidSE", gs.ResidSE, ws.ResidSE},
		{"RSquared", gs.RSquared, ws.RSquared},
		{"AdjRSquared", gs.AdjRSquared, ws.AdjRSquared},
		{"F", gs.F, ws.F},
		{"FPValue", gs.FPValue, ws.FPValue},
		{"LogLik", gs.LogLik, ws.LogLik},
		{"AIC", gs.AIC, ws.AIC},
		{"BIC", gs.BIC, ws.BIC},
		{"Deviance", gs.Deviance, ws.Deviance},
	} {
		if !near(f.got, f.want, tol) {
			t.Errorf("%s: got %v, want %v", f.name, f.got, f.want)
		}
	}
}

var allCovKinds = []CovKind{Classical, HC0, HC1, HC2, HC3}

func TestOLSNotEstimable(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	base, y := randDesign(r, 40, 3) // 1, a, b, c
	n := 40
	// Design: 1, a, zero, b, const, c, a+2b (collinear), a (duplicate).
	names := []string{"(intercept)", "a", "holiday", "b", "three", "c", "a+2b", "a again"}
	x := mat.NewDense(n, len(names), nil)
	for i := range n {
		a, b, c := base.At(i, 1), base.At(i, 2), base.At(i, 3)
		for j, v := range []float64{1, a, 0, b, 3, c, a + 2*b, a} {
			x.Set(i, j, v)
		}
	}
	idx := []int{0, 1, -1, 2, -1, 3, -1, -1}
	for _, kind := range allCovKinds {
		t.Run(kind.String(), func(t *testing.T) {
			want, err := OLS{Cov: kind}.FitOLS(base, y, nil)
			if err != nil {
				t.Fatal(err)
			}
			got, err := OLS{Cov: kind}.FitOLS(namedDense{x, names}, y, nil)
			if err != nil {
				t.Fatal(err)
			}
			compareModels(t, got, want, idx, 1e-10)
			gotNames := strings.Join(got.NotEstimable(), ", ")
			if wantNames := "holiday, three, a+2b, a again"; gotNames != wantNames {
				t.Errorf("not estimable: got %q, want %q", gotNames, wantNames)
			}
			var cov mat.SymDense
			got.CovTo(&cov)
			if v := cov.At(2, 2); !math.IsNaN(v) {
				t.Errorf("covariance of a not-estimable column: got %v, want NaN", v)
			}
			// Prediction treats the not-estimable columns as zero.
			pg, pw := got.Predict(nil, x), want.Predict(nil, base)
			for i := range pg {
				if !near(pg[i], pw[i], 1e-10) {
					t.Fatalf("row %d: prediction got %v, want %v", i+1, pg[i], pw[i])
				}
			}
		})
	}
}

func TestOLSFrequencyWeights(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	for _, tc := range []struct {
		name string
		n, k int
	}{
		{name: "n30 k2", n: 30, k: 2},
		{name: "n12 k4", n: 12, k: 4},
	} {
		x, y := randDesign(r, tc.n, tc.k)
		w := make([]float64, tc.n)
		var rows [][]float64
		var ey []float64
		for i := range w {
			w[i] = float64(r.IntN(4)) // 0..3, zeros included
			if i < 3 {
				w[i] = float64(i) // make sure 0, 1 and 2 occur
			}
			for range int(w[i]) {
				rows = append(rows, mat.Row(nil, i, x))
				ey = append(ey, y[i])
			}
		}
		ex := mat.NewDense(len(rows), tc.k+1, nil)
		for i, row := range rows {
			ex.SetRow(i, row)
		}
		idx := make([]int, tc.k+1)
		for j := range idx {
			idx[j] = j
		}
		for _, kind := range allCovKinds {
			t.Run(tc.name+" "+kind.String(), func(t *testing.T) {
				want, err := OLS{Cov: kind}.FitOLS(ex, ey, nil)
				if err != nil {
					t.Fatal(err)
				}
				fw := OLS{Cov: kind}.FrequencyWeighted()
				p, err := fw.Fit(x, y, w)
				if err != nil {
					t.Fatal(err)
				}
				got := p.(*OLSFit)
				compareModels(t, got, want, idx, 1e-9)
				var cg, cw mat.SymDense
				got.CovTo(&cg)
				want.CovTo(&cw)
				if !mat.EqualApprox(&cg, &cw, 1e-9) {
					t.Errorf("covariance (-want +got):\n%v\n%v", mat.Formatted(&cw), mat.Formatted(&cg))
				}
			})
		}
	}
}

// Precision weights: zero weights remove rows (R's lm semantics), and a
// constant weight changes no estimate or standard error.
func TestOLSPrecisionWeights(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 8))
	x, y := randDesign(r, 25, 2)
	w := make([]float64, 25)
	var keep []int
	for i := range w {
		w[i] = 0.5 + r.Float64()
		if i%5 == 0 {
			w[i] = 0
		} else {
			keep = append(keep, i)
		}
	}
	sx := mat.NewDense(len(keep), 3, nil)
	sy := make([]float64, len(keep))
	sw := make([]float64, len(keep))
	for k, i := range keep {
		sx.SetRow(k, mat.Row(nil, i, x))
		sy[k], sw[k] = y[i], w[i]
	}
	idx := []int{0, 1, 2}
	for _, kind := range allCovKinds {
		t.Run("zero weights "+kind.String(), func(t *testing.T) {
			got, err := OLS{Cov: kind}.FitOLS(x, y, w)
			if err != nil {
				t.Fatal(err)
			}
			want, err := OLS{Cov: kind}.FitOLS(sx, sy, sw)
			if err != nil {
				t.Fatal(err)
			}
			compareModels(t, got, want, idx, 1e-10)
			if got, want := got.Statistics().ResidDF, float64(len(keep)-3); got != want {
				t.Errorf("residual df: got %v, want %v", got, want)
			}
		})
	}
	t.Run("constant weight", func(t *testing.T) {
		c := make([]float64, 25)
		for i := range c {
			c[i] = 4
		}
		got, err := OLS{}.FitOLS(x, y, c)
		if err != nil {
			t.Fatal(err)
		}
		want, _ := OLS{}.FitOLS(x, y, nil)
		gc, wc := got.Coefficients(), want.Coefficients()
		for j := range gc {
			if !near(gc[j].Estimate, wc[j].Estimate, 1e-12) || !near(gc[j].StdErr, wc[j].StdErr, 1e-12) {
				t.Errorf("%s: got %+v, want %+v", gc[j].Name, gc[j], wc[j])
			}
		}
	})
}

// Reference values computed with R 4.2.2 (Debian r-base-core):
// 2*pt(-2, 10), 2*pt(-7.5, 3.5), qt(0.975, 10), qt(0.95, 7.25),
// pf(3.1, 3, 20, lower.tail=FALSE), pf(250, 2, 40, lower.tail=FALSE).
func TestDistributions(t *testing.T) {
	for _, tc := range []struct {
		name      string
		got, want float64
	}{
		{"2*pt(-2,10)", studentTwoSided(2, 10), 0.073388034770740393},
		{"2*pt(-7.5,3.5)", studentTwoSided(-7.5, 3.5), 0.002825445993863866},
		{"qt(.975,10)", studentQuantile(0.975, 10), 2.2281388519862739},
		{"qt(.95,7.25)", studentQuantile(0.95, 7.25), 1.8847957180841028},
		{"pf(3.1,3,20)", fUpper(3.1, 3, 20), 0.04992453304567878},
		{"pf(250,2,40)", fUpper(250, 2, 40), 2.4735724209098699e-23},
	} {
		if math.Abs(tc.got-tc.want) > 1e-12*math.Abs(tc.want) {
			t.Errorf("%s: got %.17g, want %.17g", tc.name, tc.got, tc.want)
		}
	}
}

func TestOLSInference(t *testing.T) {
	r := rand.New(rand.NewPCG(9, 10))
	x, y := randDesign(r, 30, 2)
	m, err := OLS{}.FitOLS(x, y, nil)
	if err != nil {
		t.Fatal(err)
	}
	co := m.Coefficients()
	ts, ps := m.TStats(nil), m.PValues(nil)
	lo, hi := m.ConfInt(nil, nil, 0.9)
	df := m.Statistics().ResidDF
	if df != 27 {
		t.Fatalf("residual df: got %v, want 27", df)
	}
	q := studentQuantile(0.95, df)
	for j, c := range co {
		if !near(ts[j], c.Estimate/c.StdErr, 1e-15) {
			t.Errorf("%s: t got %v, want %v", c.Name, ts[j], c.Estimate/c.StdErr)
		}
		if !near(ps[j], studentTwoSided(ts[j], df), 1e-15) {
			t.Errorf("%s: p got %v, want %v", c.Name, ps[j], studentTwoSided(ts[j], df))
		}
		if !near(lo[j], c.Estimate-q*c.StdErr, 1e-14) || !near(hi[j], c.Estimate+q*c.StdErr, 1e-14) {
			t.Errorf("%s: interval got [%v, %v]", c.Name, lo[j], hi[j])
		}
		// The interval's end is where the two-sided p-value is 1 − level.
		if p := studentTwoSided((c.Estimate-lo[j])/c.StdErr, df); !near(p, 0.1, 1e-10) {
			t.Errorf("%s: p at the interval end got %v, want 0.1", c.Name, p)
		}
	}
	// Residuals and predictions add up to the outcome.
	res, pred := m.Residuals(nil), m.Predict(nil, x)
	for i := range y {
		if !near(res[i]+pred[i], y[i], 1e-13) {
			t.Fatalf("row %d: residual+prediction got %v, want %v", i+1, res[i]+pred[i], y[i])
		}
	}
	if got := m.Intercept(); got != 0 {
		t.Errorf("intercept column: got %d, want 0", got)
	}
}

func TestOLSErrors(t *testing.T) {
	x := mat.NewDense(4, 2, []float64{1, 1, 1, 2, 1, 3, 1, 4})
	names := []string{"one", "dose"}
	nx := namedDense{x, names}
	y := []float64{1, 2, 3, 5}
	bad := mat.NewDense(4, 2, []float64{1, 1, 1, math.NaN(), 1, 3, 1, 4})
	for _, tc := range []struct {
		name    string
		x       mat.Matrix
		y, w    []float64
		is      error
		row     int
		inError string
	}{
		{name: "NaN in design", x: namedDense{bad, names}, y: y, is: ErrBadValue, row: 2, inError: "row 2, dose"},
		{name: "NaN in design, unnamed", x: bad, y: y, is: ErrBadValue, row: 2, inError: "row 2, x2"},
		{name: "Inf in outcome", x: nx, y: []float64{1, math.Inf(1), 3, 5}, is: ErrBadValue, row: 2, inError: "row 2, outcome"},
		{name: "negative weight", x: nx, y: y, w: []float64{1, 1, -1, 1}, is: ErrBadValue, row: 3, inError: "row 3, weights"},
		{name: "NaN weight", x: nx, y: y, w: []float64{1, math.NaN(), 1, 1}, is: ErrBadValue, row: 2, inError: "row 2, weights"},
		{name: "all weights zero", x: nx, y: y, w: []float64{0, 0, 0, 0}, is: ErrBadValue, inError: "all 4 weights are zero"},
		{name: "too few rows", x: mat.NewDense(4, 3, []float64{1, 1, 1, 1, 2, 4, 1, 3, 9, 1, 4, 16}), y: y, w: []float64{0, 1, 1, 0}, is: ErrTooFewRows, inError: "2 rows with positive weight, 3 columns"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := OLS{}.FitOLS(tc.x, tc.y, tc.w)
			if !errors.Is(err, tc.is) {
				t.Fatalf("got error %v, want one wrapping %v", err, tc.is)
			}
			if !strings.Contains(err.Error(), tc.inError) || !strings.HasPrefix(err.Error(), "fit: ") {
				t.Errorf("error %q: want the prefix \"fit: \" and %q", err, tc.inError)
			}
			var de *DataError
			if tc.row > 0 && (!errors.As(err, &de) || de.Row != tc.row) {
				t.Errorf("got %#v, want a *DataError for row %d", err, tc.row)
			}
		})
	}
	for _, tc := range []struct {
		name string
		f    func()
	}{
		{"short outcome", func() { OLS{}.Fit(x, y[:3], nil) }},
		{"short weights", func() { OLS{}.Fit(x, y, []float64{1}) }},
		{"bad CovKind", func() { OLS{Cov: 9}.Fit(x, y, nil) }},
		{"bad WeightKind", func() { OLS{Weights: 7}.Fit(x, y, nil) }},
		{"predict columns", func() {
			m, _ := OLS{}.FitOLS(x, y, nil)
			m.Predict(nil, mat.NewDense(2, 3, nil))
		}},
		{"interval level", func() {
			m, _ := OLS{}.FitOLS(x, y, nil)
			m.ConfInt(nil, nil, 95)
		}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if msg := panics(tc.f); !strings.HasPrefix(msg, "fit: ") {
				t.Errorf("got panic %q, want one starting with \"fit: \"", msg)
			}
		})
	}
}

func TestOLSConcurrent(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	x, y := randDesign(r, 50, 3)
	want, err := OLS{Cov: HC3}.FitOLS(x, y, nil)
	if err != nil {
		t.Fatal(err)
	}
	wantC := want.Coefficients()
	var wg sync.WaitGroup
	errs := make([]string, 8)
	for g := range 8 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			m, err := OLS{Cov: HC3}.FitOLS(x, y, nil)
			if err != nil {
				errs[g] = err.Error()
				return
			}
			for j, c := range m.Coefficients() {
				if c != wantC[j] {
					errs[g] = fmt.Sprintf("%s: got %+v, want %+v", c.Name, c, wantC[j])
				}
			}
			_ = want.Predict(nil, x) // concurrent reads of one model
			_ = want.PValues(nil)
		}()
	}
	wg.Wait()
	for g, e := range errs {
		if e != "" {
			t.Errorf("goroutine %d: %s", g, e)
		}
	}
}
