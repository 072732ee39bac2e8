package fit_test

import (
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"sync"
	"testing"

	"github.com/google/go-cmp/cmp"
	"gonum.org/v1/gonum/mat"

	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/fit"
)

// panics reports whether f panics, and the message.
func panics(f func()) (ok bool, msg string) {
	defer func() {
		if r := recover(); r != nil {
			ok = true
			msg, _ = r.(string)
		}
	}()
	f()
	return false, ""
}

// misuse is a call that must panic with the package prefix.
type misuse struct {
	name string
	f    func()
}

// checkMisuse runs each call and fails unless it panics with a message
// starting "fit: ".
func checkMisuse(t *testing.T, tests []misuse) {
	t.Helper()
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			ok, msg := panics(tt.f)
			if !ok {
				t.Fatal("got no panic, want one")
			}
			if !strings.HasPrefix(msg, "fit: ") {
				t.Errorf("panic message %q lacks the \"fit: \" prefix", msg)
			}
		})
	}
}

// simple returns an n-row design [1, x] with x = 0, 1, ..., n−1 scaled
// to [−1, 1], named "intercept" and "x".
func simple(n int) namedDense {
	m := mat.NewDense(n, 2, nil)
	for i := range n {
		m.Set(i, 0, 1)
		m.Set(i, 1, -1+2*float64(i)/float64(n-1))
	}
	return namedDense{m, []string{"intercept", "x"}}
}

func TestGLMSeparation(t *testing.T) {
	// Perfect separation: y = 1 exactly when x > 0. Quasi-complete: the
	// same, with rows at x = 0 (the boundary) having both outcomes. In
	// both the maximum-likelihood estimate does not exist.
	n := 40
	x := simple(n)
	complete := make([]float64, n)
	for i := range n {
		if x.At(i, 1) > 0 {
			complete[i] = 1
		}
	}
	xq := mat.NewDense(n+2, 2, nil)
	quasi := make([]float64, n+2)
	for i := range n {
		xq.Set(i, 0, 1)
		xq.Set(i, 1, x.At(i, 1))
		quasi[i] = complete[i]
	}
	xq.Set(n, 0, 1)
	xq.Set(n+1, 0, 1)
	quasi[n] = 1 // x = 0 with y = 1 and y = 0
	// A fit that is fine but has fitted probabilities near 0 and 1 at the
	// extremes: a strong but overlapping effect.
	strong := make([]float64, n)
	r := rand.New(rand.NewPCG(7, 8))
	for i := range n {
		p := 1 / (1 + math.Exp(-8*x.At(i, 1)))
		if r.Float64() < p {
			strong[i] = 1
		}
	}
	tests := []struct {
		name string
		x    mat.Matrix
		y    []float64
		want error
	}{
		{"complete", x, complete, fit.ErrSeparation},
		{"quasi-complete", xq, quasi, fit.ErrSeparation},
		{"strong but overlapping", x, strong, nil},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := fit.GLM{Family: fit.Binomial}.Fit(tt.x, tt.y, nil)
			if !errors.Is(err, tt.want) {
				t.Fatalf("got error %v, want %v", err, tt.want)
			}
			if tt.want != nil && !strings.Contains(err.Error(), "row ") {
				t.Errorf("error %q does not name a row", err)
			}
		})
	}
}

func TestGLMBadInput(t *testing.T) {
	x := simple(5)
	tests := []struct {
		name    string
		family  fit.Family
		y, w    []float64
		wantRow int
		wantCol string
	}{
		{"binomial above 1", fit.Binomial, []float64{0, 1, 1.5, 0, 1}, nil, 3, "outcome"},
		{"binomial below 0", fit.Binomial, []float64{0, -0.1, 1, 0, 1}, nil, 2, "outcome"},
		{"poisson negative", fit.Poisson, []float64{0, 1, 2, 3, -1}, nil, 5, "outcome"},
		{"gamma zero", fit.Gamma, []float64{1, 0, 2, 3, 1}, nil, 2, "outcome"},
		{"gamma negative", fit.Gamma, []float64{1, 2, 2, -3, 1}, nil, 4, "outcome"},
		{"NaN outcome", fit.Poisson, []float64{1, 2, math.NaN(), 3, 1}, nil, 3, "outcome"},
		{"negative weight", fit.Poisson, []float64{1, 2, 2, 3, 1}, []float64{1, 1, 1, -1, 1}, 4, "weights"},
		{"infinite weight", fit.Gamma, []float64{1, 2, 2, 3, 1}, []float64{1, math.Inf(1), 1, 1, 1}, 2, "weights"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := fit.GLM{Family: tt.family}.Fit(x, tt.y, tt.w)
			var de *fit.DataError
			if !errors.As(err, &de) || !errors.Is(err, fit.ErrBadValue) {
				t.Fatalf("got %v, want a *DataError wrapping ErrBadValue", err)
			}
			if de.Row != tt.wantRow || de.Name != tt.wantCol {
				t.Errorf("got row %d, %q; want row %d, %q", de.Row, de.Name, tt.wantRow, tt.wantCol)
			}
		})
	}
	t.Run("NaN in design", func(t *testing.T) {
		xd := mat.DenseCopyOf(x)
		xd.Set(3, 1, math.NaN())
		_, err := fit.GLM{Family: fit.Poisson}.Fit(namedDense{xd, x.names}, []float64{1, 2, 3, 4, 5}, nil)
		var de *fit.DataError
		if !errors.As(err, &de) || de.Row != 4 || de.Column != 2 || de.Name != "x" {
			t.Fatalf("got %v, want a *DataError at row 4, column 2 (x)", err)
		}
	})
	t.Run("all weights zero", func(t *testing.T) {
		_, err := fit.GLM{Family: fit.Poisson}.Fit(x, []float64{1, 2, 3, 4, 5}, make([]float64, 5))
		if !errors.Is(err, fit.ErrBadValue) {
			t.Fatalf("got %v, want ErrBadValue", err)
		}
	})
	t.Run("too few rows", func(t *testing.T) {
		// two rows with a positive weight, three columns that vary in them
		x3 := mat.NewDense(5, 3, []float64{1, 0, 0, 1, 1, 1, 1, 2, 4, 1, 3, 9, 1, 4, 16})
		_, err := fit.GLM{Family: fit.Poisson}.Fit(x3, []float64{1, 2, 3, 4, 5}, []float64{0, 1, 0, 1, 0})
		if !errors.Is(err, fit.ErrTooFewRows) {
			t.Fatalf("got %v, want ErrTooFewRows", err)
		}
	})
}

func TestGLMNoConvergence(t *testing.T) {
	// The Poisson data of testdata/poisson.csv need 5 iterations in R
	// (ref_r.csv); stopping after 2 must report non-convergence with the
	// state at the stop.
	po := readTable(t, "poisson.csv")
	x := po.design(true, "warmth", "late", "gap")
	_, err := fit.GLM{Family: fit.Poisson, MaxIter: 2}.Fit(x, po["tally"], po["w"])
	var ce *fit.ConvergenceError
	if !errors.As(err, &ce) || !errors.Is(err, fit.ErrNoConvergence) {
		t.Fatalf("got %v, want a *ConvergenceError", err)
	}
	if ce.Iter != 2 || !(ce.Change > 1e-8) {
		t.Errorf("got Iter %d, Change %g; want 2 and a change above the tolerance", ce.Iter, ce.Change)
	}
	// A loose tolerance stops earlier than the default.
	m, err := fit.GLM{Family: fit.Poisson, Tol: 1e-3}.FitGLM(x, po["tally"], po["w"])
	if err != nil {
		t.Fatal(err)
	}
	if got := m.Statistics().Iterations; got >= 5 {
		t.Errorf("Tol 1e-3: got %d iterations, want fewer than the 5 of Tol 1e-8", got)
	}
}

func TestGLMNotEstimable(t *testing.T) {
	// A column of zeros (a holiday absent from the rows) and a copy of the
	// intercept are not estimable; the other coefficients and standard
	// errors equal those of the fit without them. Tolerance 1e-12.
	for _, fam := range []fit.Family{fit.Poisson, fit.Binomial, fit.Gamma} {
		t.Run(fam.String(), func(t *testing.T) {
			n := 60
			r := rand.New(rand.NewPCG(3, uint64(fam)))
			full := mat.NewDense(n, 4, nil)
			small := mat.NewDense(n, 2, nil)
			y := make([]float64, n)
			for i := range n {
				v := r.NormFloat64()
				full.Set(i, 0, 1)
				full.Set(i, 1, 0)
				full.Set(i, 2, v)
				full.Set(i, 3, 1)
				small.Set(i, 0, 1)
				small.Set(i, 1, v)
				mu := math.Exp(0.3 + 0.5*v)
				switch fam {
				case fit.Poisson:
					y[i] = math.Floor(mu + r.Float64()*2)
				case fit.Binomial:
					if r.Float64() < mu/(1+mu) {
						y[i] = 1
					}
				case fit.Gamma:
					y[i] = mu * r.ExpFloat64()
				}
			}
			names := []string{"intercept", "holiday", "v", "one"}
			mf, err := fit.GLM{Family: fam}.FitGLM(namedDense{full, names}, y, nil)
			if err != nil {
				t.Fatal(err)
			}
			ms, err := fit.GLM{Family: fam}.FitGLM(small, y, nil)
			if err != nil {
				t.Fatal(err)
			}
			cf, cs := mf.Coefficients(), ms.Coefficients()
			for _, k := range []int{1, 3} {
				if cf[k].Estimable || !math.IsNaN(cf[k].Estimate) || !math.IsNaN(cf[k].StdErr) {
					t.Errorf("%s: got %+v, want not estimable with NaN values", names[k], cf[k])
				}
			}
			for k, j := range []int{0, 2} {
				checkClose(t, names[j]+" estimate", cf[j].Estimate, cs[k].Estimate, 1e-12)
				checkClose(t, names[j]+" stderr", cf[j].StdErr, cs[k].StdErr, 1e-12)
			}
			sf, ss := mf.Statistics(), ms.Statistics()
			if sf.Params != 2 || sf.ResidDF != ss.ResidDF {
				t.Errorf("got Params %d, ResidDF %v; want 2, %v", sf.Params, sf.ResidDF, ss.ResidDF)
			}
			checkClose(t, "deviance", sf.Deviance, ss.Deviance, 1e-12)
			// Predict ignores the columns not estimable.
			pf, ps := mf.Predict(nil, full), ms.Predict(nil, small)
			for i := range pf {
				checkClose(t, "prediction", pf[i], ps[i], 1e-12)
			}
		})
	}
}

func TestGLMFrequencyWeights(t *testing.T) {
	// Frequency weights must reproduce the fit on the data with row i
	// repeated w[i] times: estimates, standard errors, residual df, rows,
	// dispersion, deviance, log-likelihood, AIC and BIC. Tolerance 1e-10
	// relative (the two fits sum in different orders).
	po := readTable(t, "poisson.csv")
	ga := readTable(t, "gamma.csv")
	be := readTable(t, "bernoulli.csv")
	counts := func(n int) []float64 {
		r := rand.New(rand.NewPCG(11, 12))
		w := make([]float64, n)
		for i := range w {
			w[i] = float64(r.IntN(4)) // includes zeros
		}
		return w
	}
	tests := []struct {
		name   string
		family fit.Family
		tb     table
		y      string
		cols   []string
	}{
		{"poisson", fit.Poisson, po, "tally", []string{"warmth", "late", "gap"}},
		{"gamma", fit.Gamma, ga, "spend", []string{"reach", "quiet"}},
		{"binomial", fit.Binomial, be, "seen", []string{"tempo", "dusk"}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			y := tt.tb[tt.y]
			w := counts(len(y))
			exp := table{}
			for i := range y {
				for range int(w[i]) {
					for _, c := range append([]string{tt.y}, tt.cols...) {
						exp[c] = append(exp[c], tt.tb[c][i])
					}
				}
			}
			g := fit.GLM{Family: tt.family}
			mw, err := g.FrequencyWeighted().(fit.GLM).FitGLM(tt.tb.design(true, tt.cols...), y, w)
			if err != nil {
				t.Fatal(err)
			}
			me, err := g.FitGLM(exp.design(true, tt.cols...), exp[tt.y], nil)
			if err != nil {
				t.Fatal(err)
			}
			cw, ce := mw.Coefficients(), me.Coefficients()
			for j := range cw {
				checkClose(t, cw[j].Name+" estimate", cw[j].Estimate, ce[j].Estimate, 1e-10)
				checkClose(t, cw[j].Name+" stderr", cw[j].StdErr, ce[j].StdErr, 1e-10)
			}
			sw, se := mw.Statistics(), me.Statistics()
			for _, q := range []struct {
				name      string
				got, want float64
			}{
				{"Rows", sw.Rows, se.Rows},
				{"ResidDF", sw.ResidDF, se.ResidDF},
				{"dispersion", mw.Dispersion(), me.Dispersion()},
				{"deviance", sw.Deviance, se.Deviance},
				{"null deviance", sw.NullDeviance, se.NullDeviance},
				{"log-likelihood", sw.LogLik, se.LogLik},
				{"AIC", sw.AIC, se.AIC},
				{"BIC", sw.BIC, se.BIC},
			} {
				checkClose(t, q.name, q.got, q.want, 1e-10)
			}
		})
	}
}

func TestGLMPanics(t *testing.T) {
	x := simple(4)
	y := []float64{1, 2, 3, 4}
	tests := []misuse{
		{"zero Family", func() { fit.GLM{}.Fit(x, y, nil) }},
		{"unknown Family", func() { fit.GLM{Family: 99}.Fit(x, y, nil) }},
		{"negative MaxIter", func() { fit.GLM{Family: fit.Poisson, MaxIter: -1}.Fit(x, y, nil) }},
		{"NaN Tol", func() { fit.GLM{Family: fit.Poisson, Tol: math.NaN()}.Fit(x, y, nil) }},
		{"bad weight kind", func() { fit.GLM{Family: fit.Poisson, Weights: 7}.Fit(x, y, nil) }},
		{"short y", func() { fit.GLM{Family: fit.Poisson}.Fit(x, y[:3], nil) }},
		{"short weights", func() { fit.GLM{Family: fit.Poisson}.Fit(x, y, []float64{1}) }},
		{"predict wrong columns", func() {
			m, _ := fit.GLM{Family: fit.Poisson}.FitGLM(x, y, nil)
			m.Predict(nil, mat.NewDense(2, 3, nil))
		}},
		{"predict wrong dst", func() {
			m, _ := fit.GLM{Family: fit.Poisson}.FitGLM(x, y, nil)
			m.Predict(make([]float64, 3), x)
		}},
		{"interval level", func() {
			m, _ := fit.GLM{Family: fit.Poisson}.FitGLM(x, y, nil)
			m.ConfInt(nil, nil, 1)
		}},
	}
	checkMisuse(t, tests)
}

func TestFamilyString(t *testing.T) {
	tests := []struct {
		name string
		f    fit.Family
		want string
	}{
		{"poisson", fit.Poisson, "poisson(log)"},
		{"binomial", fit.Binomial, "binomial(logit)"},
		{"gamma", fit.Gamma, "gamma(log)"},
		{"unknown", fit.Family(0), "Family(0)"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := tt.f.String(); got != tt.want {
				t.Errorf("got %q, want %q", got, tt.want)
			}
		})
	}
}

func TestGLMCovariance(t *testing.T) {
	// CovTo's diagonal gives the squared standard errors; it is
	// symmetric and has NaN rows for columns not estimable.
	ga := readTable(t, "gamma.csv")
	m, err := fit.GLM{Family: fit.Gamma}.FitGLM(ga.design(true, "reach", "quiet"), ga["spend"], ga["w"])
	if err != nil {
		t.Fatal(err)
	}
	cov := m.CovTo(nil)
	for j, c := range m.Coefficients() {
		checkClose(t, c.Name+" variance", cov.At(j, j), c.StdErr*c.StdErr, 1e-14)
	}
	if got := m.Family(); got != fit.Gamma {
		t.Errorf("Family: got %v, want %v", got, fit.Gamma)
	}
	if got := m.Intercept(); got != 0 {
		t.Errorf("Intercept: got %d, want 0", got)
	}
}

func TestGLMConcurrentAndColumnar(t *testing.T) {
	// One GLM value fitted from several goroutines (run with -race) gives
	// the same result as a single fit, and a column-stored design with
	// names (features.Table) gives the same result as a *mat.Dense.
	ga := readTable(t, "gamma.csv")
	x := ga.design(true, "reach", "quiet")
	g := fit.GLM{Family: fit.Gamma}
	want, err := g.FitGLM(x, ga["spend"], ga["w"])
	if err != nil {
		t.Fatal(err)
	}
	tb := features.NewTable(len(ga["spend"]))
	ones := make([]float64, len(ga["spend"]))
	for i := range ones {
		ones[i] = 1
	}
	for _, c := range []struct {
		name string
		v    []float64
	}{{"intercept", ones}, {"reach", ga["reach"]}, {"quiet", ga["quiet"]}} {
		if err := tb.Append(c.name, c.v); err != nil {
			t.Fatal(err)
		}
	}
	const workers = 4
	got := make([][]fit.Coefficient, workers)
	var wg sync.WaitGroup
	for k := range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var design mat.Matrix = x
			if k%2 == 1 {
				design = tb
			}
			m, err := g.FitGLM(design, ga["spend"], ga["w"])
			if err != nil {
				t.Error(err)
				return
			}
			got[k] = m.Coefficients()
		}()
	}
	wg.Wait()
	for k := range workers {
		if diff := cmp.Diff(want.Coefficients(), got[k]); diff != "" {
			t.Errorf("worker %d: coefficients differ (-want +got):\n%s", k, diff)
		}
	}
}

func TestGLMPoissonEmptyLevel(t *testing.T) {
	// A dummy whose rows all have count 0 drives its coefficient towards
	// −∞; like R's glm, the fit stops by the deviance rule with a large
	// negative estimate and a huge standard error instead of failing.
	// Source: R 4.2.2, i <- 0:29; d <- as.numeric(i < 5);
	// y <- ifelse(i < 5, 0, 1 + i %% 4); glm(y ~ d, family = poisson()):
	// estimate −20.2108437, SE 4215.7112161, 17 iterations (printed to 9
	// digits, hence the tolerance 1e-8).
	n := 30
	x := mat.NewDense(n, 2, nil)
	y := make([]float64, n)
	for i := range n {
		x.Set(i, 0, 1)
		if i < 5 {
			x.Set(i, 1, 1) // y = 0 in these rows
		} else {
			y[i] = float64(1 + i%4)
		}
	}
	m, err := fit.GLM{Family: fit.Poisson}.FitGLM(x, y, nil)
	if err != nil {
		t.Fatal(err)
	}
	c := m.Coefficients()[1]
	checkClose(t, "estimate", c.Estimate, -20.2108437, 1e-8)
	checkClose(t, "stderr", c.StdErr, 4215.7112161, 1e-8)
	if got := m.Statistics().Iterations; got != 17 {
		t.Errorf("iterations: got %d, want 17", got)
	}
}

// noColumns is a design of n rows and no columns (mat.Dense cannot be one).
type noColumns int

func (n noColumns) Dims() (int, int)  { return int(n), 0 }
func (noColumns) At(i, j int) float64 { panic("no columns") }
func (n noColumns) T() mat.Matrix     { return mat.Transpose{Matrix: n} }

// TestNoColumnsPanics checks the package doc's promise that a design with
// no columns is a caller bug, met by a "fit: " panic from every estimator.
func TestNoColumnsPanics(t *testing.T) {
	y := []float64{1, 2, 3}
	tests := []struct {
		name string
		f    fit.Fitter
	}{
		{"OLS", fit.OLS{}},
		{"Ridge", fit.Ridge{Lambda: 1}},
		{"GLM", fit.GLM{Family: fit.Poisson}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			ok, msg := panics(func() { tt.f.Fit(noColumns(3), y, nil) })
			if !ok || !strings.HasPrefix(msg, "fit: ") || !strings.Contains(msg, "no columns") {
				t.Errorf("got panic %v with message %q, want a \"fit: ...no columns\" panic", ok, msg)
			}
		})
	}
}
