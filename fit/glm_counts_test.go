package fit

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// glmCountsCase draws a design (intercept and two normal columns, with a
// column equal to their sum when collinear) and an outcome of the family
// with prior weights of the kind: for Binomial the weights are the trials
// (integers 1–6) and y the observed proportion, for the other families
// precision weights in [0.2, 3.2] or frequency weights 1–3.
func glmCountsCase(r *rand.Rand, fam Family, kind WeightKind, n int, collinear bool) (*mat.Dense, []float64, []float64) {
	p := 3
	if collinear {
		p = 4
	}
	x := mat.NewDense(n, p, nil)
	y := make([]float64, n)
	w := make([]float64, n)
	for i := range n {
		a, b := r.NormFloat64(), r.NormFloat64()
		x.Set(i, 0, 1)
		x.Set(i, 1, a)
		x.Set(i, 2, b)
		if collinear {
			x.Set(i, 3, a+b)
		}
		eta := 0.4 + 0.5*a - 0.3*b
		switch {
		case kind == Frequency:
			w[i] = float64(1 + r.IntN(3))
		case fam == Binomial:
			w[i] = float64(1 + r.IntN(6))
		default:
			w[i] = 0.2 + 3*r.Float64()
		}
		switch fam {
		case Poisson:
			mu := math.Exp(eta)
			k := 0.0
			// Poisson draw by counting unit-rate arrivals before mu.
			for s := r.ExpFloat64(); s < mu; s += r.ExpFloat64() {
				k++
			}
			y[i] = k
		case Binomial:
			pr := 1 / (1 + math.Exp(-eta))
			m := w[i]
			if kind == Frequency {
				m = 1 // a 0/1 outcome standing for w[i] rows
			}
			k := 0.0
			for range int(m) {
				if r.Float64() < pr {
					k++
				}
			}
			y[i] = k / m
		case Gamma:
			// shape 2, mean exp(eta): the sum of two exponentials over 2
			y[i] = math.Exp(eta) * (r.ExpFloat64() + r.ExpFloat64()) / 2
		}
	}
	return x, y, w
}

// compareGLMFits fails t unless got and want agree to tol in
// coefficients, standard errors, covariance, dispersion and every
// statistic, and exactly in Params, Iterations and the intercept.
func compareGLMFits(t *testing.T, got, want *GLMFit, tol float64) {
	t.Helper()
	compareCoefCov(t, got, want, tol)
	if got.Intercept() != want.Intercept() {
		t.Errorf("intercept %d, want %d", got.Intercept(), want.Intercept())
	}
	gs, ws := got.Statistics(), want.Statistics()
	if gs.Params != ws.Params {
		t.Errorf("Params %d, want %d", gs.Params, ws.Params)
	}
	if gs.Iterations != ws.Iterations {
		t.Errorf("Iterations %d, want %d", gs.Iterations, ws.Iterations)
	}
	for _, f := range []struct {
		name      string
		got, want float64
	}{
		{"dispersion", got.Dispersion(), want.Dispersion()},
		{"Rows", gs.Rows, ws.Rows},
		{"ResidDF", gs.ResidDF, ws.ResidDF},
		{"ResidSE", gs.ResidSE, ws.ResidSE},
		{"LogLik", gs.LogLik, ws.LogLik},
		{"AIC", gs.AIC, ws.AIC},
		{"BIC", gs.BIC, ws.BIC},
		{"Deviance", gs.Deviance, ws.Deviance},
		{"NullDeviance", gs.NullDeviance, ws.NullDeviance},
	} {
		if !relNear(f.got, f.want, tol) {
			t.Errorf("%s = %.15g, want %.15g", f.name, f.got, f.want)
		}
	}
}

// TestGLMFitCountsExpanded checks FitCounts against FitGLM (same family
// and weight kind) on the materialised data, each row copied counts[i]
// times with its prior weight (for Binomial its trials), with random
// integer counts 0–3 including zeros, for every family and weight kind,
// a row of weight zero and a rank-deficient design.
func TestGLMFitCountsExpanded(t *testing.T) {
	const tol = 1e-10 // relative; the two fits sum the same terms in different orders
	tests := []struct {
		name       string
		fam        Family
		kind       WeightKind
		n          int
		collinear  bool
		zeroWeight bool
		nilWeights bool
	}{
		{name: "poisson precision", fam: Poisson, n: 40},
		{name: "poisson no weights", fam: Poisson, n: 30, nilWeights: true},
		{name: "poisson frequency", fam: Poisson, kind: Frequency, n: 30},
		{name: "poisson collinear, zero weight", fam: Poisson, n: 40, collinear: true, zeroWeight: true},
		{name: "binomial trials", fam: Binomial, n: 40},
		{name: "binomial 0/1 no weights", fam: Binomial, n: 60, nilWeights: true},
		{name: "binomial frequency", fam: Binomial, kind: Frequency, n: 50},
		{name: "binomial collinear, zero weight", fam: Binomial, n: 40, collinear: true, zeroWeight: true},
		{name: "gamma precision", fam: Gamma, n: 40},
		{name: "gamma no weights", fam: Gamma, n: 30, nilWeights: true},
		{name: "gamma frequency", fam: Gamma, kind: Frequency, n: 30},
		{name: "gamma collinear, zero weight", fam: Gamma, n: 40, collinear: true, zeroWeight: true},
	}
	for ti, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			r := rand.New(rand.NewPCG(uint64(ti+1), 17))
			x, y, w := glmCountsCase(r, tt.fam, tt.kind, tt.n, tt.collinear)
			if tt.nilWeights {
				w = nil
			}
			counts := make([]float64, tt.n)
			for i := range counts {
				counts[i] = float64(r.IntN(4)) // 0 to 3, zeros included
			}
			if tt.zeroWeight {
				w[3], counts[3] = 0, 2 // copies of weight zero take no part
			}
			g := GLM{Family: tt.fam, Weights: tt.kind}
			pr, err := g.FitCounts(x, y, w, counts)
			if err != nil {
				t.Fatal(err)
			}
			got := pr.(*GLMFit)
			xe, ye, we := expandRows(x, y, w, counts)
			want, err := g.FitGLM(xe, ye, we)
			if err != nil {
				t.Fatal(err)
			}
			compareGLMFits(t, got, want, tol)
			if tt.collinear && got.Coefficients()[3].Estimable {
				t.Errorf("collinear column estimable, want not estimable")
			}
			if want.Statistics().Iterations < 3 {
				t.Errorf("expanded fit took %d iterations, want a case with at least 3", want.Statistics().Iterations)
			}
		})
	}
}

// TestGLMFitCountsBinomialStart checks that a binomial FitCounts with
// trials as precision weights starts each row from the mean its copies
// would get, (m·y + ½)/(m + 1) with m the row's trials (not its trials
// times its count): stopped after one iteration, the relative change in
// deviance, which compares the first step with the starting means, equals
// that of the expanded data.
func TestGLMFitCountsBinomialStart(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	x, y, w := glmCountsCase(r, Binomial, Precision, 40, false)
	counts := make([]float64, len(y))
	for i := range counts {
		counts[i] = float64(1 + r.IntN(3))
	}
	g := GLM{Family: Binomial, MaxIter: 1}
	_, err := g.FitCounts(x, y, w, counts)
	var got, want *ConvergenceError
	if !errors.As(err, &got) {
		t.Fatalf("FitCounts: got error %v, want a *ConvergenceError", err)
	}
	xe, ye, we := expandRows(x, y, w, counts)
	_, err = g.FitGLM(xe, ye, we)
	if !errors.As(err, &want) {
		t.Fatalf("FitGLM: got error %v, want a *ConvergenceError", err)
	}
	if !relNear(got.Change, want.Change, 1e-10) {
		t.Errorf("relative change after one iteration %.15g, want %.15g", got.Change, want.Change)
	}
}

// TestGLMFitCountsNil checks that FitCounts with nil counts is bit for
// bit Fit, for each family, with and without weights.
func TestGLMFitCountsNil(t *testing.T) {
	for _, fam := range []Family{Poisson, Binomial, Gamma} {
		for _, kind := range []WeightKind{Precision, Frequency} {
			t.Run(fmt.Sprintf("%v/%v", fam, kind), func(t *testing.T) {
				r := rand.New(rand.NewPCG(uint64(fam), uint64(kind)+3))
				x, y, w := glmCountsCase(r, fam, kind, 30, false)
				g := GLM{Family: fam, Weights: kind}
				for _, weights := range [][]float64{w, nil} {
					pr, err := g.FitCounts(x, y, weights, nil)
					if err != nil {
						t.Fatal(err)
					}
					want, err := g.FitGLM(x, y, weights)
					if err != nil {
						t.Fatal(err)
					}
					if got := pr.(*GLMFit); !sameGLMFit(got, want) {
						t.Errorf("weights nil %v: got %+v %+v, want %+v %+v", weights == nil,
							got.Coefficients(), got.Statistics(), want.Coefficients(), want.Statistics())
					}
				}
			})
		}
	}
}

// sameGLMFit reports whether a and b are bit-identical in coefficients,
// covariance, dispersion and statistics.
func sameGLMFit(a, b *GLMFit) bool {
	same := func(u, v []float64) bool {
		if len(u) != len(v) {
			return false
		}
		for i := range u {
			if math.Float64bits(u[i]) != math.Float64bits(v[i]) {
				return false
			}
		}
		return true
	}
	flat := func(f *GLMFit) []float64 {
		s := f.stats
		v := []float64{s.Rows, float64(s.Params), s.ResidDF, s.ResidSE, s.LogLik, s.AIC, s.BIC,
			s.Deviance, s.NullDeviance, float64(s.Iterations), f.dispersion, f.resDF, float64(f.intercept)}
		for _, c := range f.coefs {
			v = append(v, c.Estimate, c.StdErr)
		}
		return append(v, f.cov.RawSymmetric().Data...)
	}
	return a.family == b.family && same(a.beta, b.beta) && same(flat(a), flat(b))
}

// TestGLMFitCountsErrors checks the errors for bad counts and weights and
// the panic for mismatched lengths.
func TestGLMFitCountsErrors(t *testing.T) {
	x := mat.NewDense(4, 2, []float64{1, 1, 1, 2, 1, 3, 1, 5})
	y := []float64{1, 2, 2, 4}
	w := []float64{1, 2, 1, 1}
	tests := []struct {
		name    string
		w, c    []float64
		row     int
		field   string
		message string
	}{
		{name: "negative count", w: w, c: []float64{1, -1, 1, 1}, row: 2, field: "counts", message: "negative count"},
		{name: "NaN count", w: w, c: []float64{1, 1, math.NaN(), 1}, row: 3, field: "counts", message: "not a number"},
		{name: "infinite count", c: []float64{math.Inf(1), 1, 1, 1}, row: 1, field: "counts", message: "infinite"},
		{name: "negative weight, count zero", w: []float64{1, 1, 1, -2}, c: []float64{1, 1, 1, 0}, row: 4, field: "weights", message: "negative weight"},
		{name: "weight times count overflows", w: []float64{1, 1e300, 1, 1}, c: []float64{1, 1e300, 1, 1}, row: 2, field: "weights", message: "infinite"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := GLM{Family: Poisson}.FitCounts(x, y, tt.w, tt.c)
			var de *DataError
			if !errors.As(err, &de) || !errors.Is(err, ErrBadValue) {
				t.Fatalf("got error %v, want a *DataError wrapping ErrBadValue", err)
			}
			if de.Row != tt.row || de.Name != tt.field || !strings.Contains(err.Error(), tt.message) {
				t.Errorf("got row %d, name %q, message %q; want row %d, name %q, message containing %q",
					de.Row, de.Name, err, tt.row, tt.field, tt.message)
			}
		})
	}
	if _, err := (GLM{Family: Poisson}).FitCounts(x, y, w, []float64{0, 0, 0, 0}); !errors.Is(err, ErrBadValue) {
		t.Errorf("all counts zero: got %v, want an error wrapping ErrBadValue", err)
	}
	// Two distinct rows for three columns: too few, though their copies
	// would be six rows.
	x3 := mat.NewDense(4, 3, []float64{1, 1, 2, 1, 2, 1, 1, 3, 5, 1, 5, 4})
	if _, err := (GLM{Family: Gamma}).FitCounts(x3, y, w, []float64{3, 3, 0, 0}); !errors.Is(err, ErrTooFewRows) {
		t.Errorf("two distinct rows: got %v, want an error wrapping ErrTooFewRows", err)
	}
	if msg := panics(func() { GLM{Family: Poisson}.FitCounts(x, y, w, []float64{1, 1}) }); !strings.HasPrefix(msg, "fit: GLM: len(counts) = 2") {
		t.Errorf("short counts: got panic %q, want one about the counts' length", msg)
	}
}
