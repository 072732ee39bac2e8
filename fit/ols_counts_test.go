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

// relNear reports whether got and want agree to tol relative to |want|
// (relative to 1e-6 when |want| is smaller); two NaNs agree.
func relNear(got, want, tol float64) bool {
	if math.IsNaN(got) || math.IsNaN(want) {
		return math.IsNaN(got) && math.IsNaN(want)
	}
	if math.IsInf(want, 0) {
		return got == want
	}
	return math.Abs(got-want) <= tol*math.Max(1e-6, math.Abs(want))
}

// expandRows materialises the data in which row i of x, y and w appears
// counts[i] times (w nil: no weights).
func expandRows(x *mat.Dense, y, w, counts []float64) (*mat.Dense, []float64, []float64) {
	_, p := x.Dims()
	var xe, ye, we []float64
	for i, c := range counts {
		for range int(c) {
			xe = append(xe, x.RawRowView(i)...)
			ye = append(ye, y[i])
			if w != nil {
				we = append(we, w[i])
			}
		}
	}
	return mat.NewDense(len(ye), p, xe), ye, we
}

// inferential is what the count-fit tests compare of a fitted model.
type inferential interface {
	Coefficients
	Covariance
}

// compareCoefCov fails t unless got and want agree to tol in estimable
// flags, coefficients, standard errors and the covariance matrix, whose
// off-diagonal entries (which can be near zero) are compared on the scale
// of the variances.
func compareCoefCov(t *testing.T, got, want inferential, tol float64) {
	t.Helper()
	gc, wc := got.Coefficients(), want.Coefficients()
	for j := range wc {
		if gc[j].Estimable != wc[j].Estimable {
			t.Errorf("%s: estimable %v, want %v", wc[j].Name, gc[j].Estimable, wc[j].Estimable)
		}
		if !relNear(gc[j].Estimate, wc[j].Estimate, tol) {
			t.Errorf("%s: estimate %.15g, want %.15g", wc[j].Name, gc[j].Estimate, wc[j].Estimate)
		}
		if !relNear(gc[j].StdErr, wc[j].StdErr, tol) {
			t.Errorf("%s: SE %.15g, want %.15g", wc[j].Name, gc[j].StdErr, wc[j].StdErr)
		}
	}
	gv, wv := got.CovTo(nil), want.CovTo(nil)
	p := gv.SymmetricDim()
	for i := range p {
		for j := i; j < p; j++ {
			g, w := gv.At(i, j), wv.At(i, j)
			if math.IsNaN(w) || math.IsNaN(g) {
				if math.IsNaN(w) != math.IsNaN(g) {
					t.Errorf("cov[%d,%d] = %g, want %g", i, j, g, w)
				}
				continue
			}
			if scale := math.Sqrt(math.Abs(wv.At(i, i) * wv.At(j, j))); math.Abs(g-w) > tol*scale {
				t.Errorf("cov[%d,%d] = %.15g, want %.15g", i, j, g, w)
			}
		}
	}
}

// compareOLSFits fails t unless got and want agree to tol in coefficients,
// standard errors, covariance, residual df and every statistic.
func compareOLSFits(t *testing.T, got, want *OLSFit, tol float64) {
	t.Helper()
	compareCoefCov(t, got, want, tol)
	gs, ws := got.Statistics(), want.Statistics()
	if gs.Params != ws.Params {
		t.Errorf("Params %d, want %d", gs.Params, ws.Params)
	}
	for _, f := range []struct {
		name      string
		got, want float64
	}{
		{"Rows", gs.Rows, ws.Rows},
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
		{"NullDeviance", gs.NullDeviance, ws.NullDeviance},
	} {
		if !relNear(f.got, f.want, tol) {
			t.Errorf("%s = %.15g, want %.15g", f.name, f.got, f.want)
		}
	}
}

// countsCase builds a design for TestOLSFitCountsExpanded: an intercept
// and k normal columns, or (poly) powers of a shifted trend, which is
// ill-conditioned enough for iterative refinement; collinear appends a
// column equal to the sum of columns 1 and 2.
func countsCase(r *rand.Rand, n, k int, poly, collinear bool) (*mat.Dense, []float64) {
	x, y := randDesign(r, n, k)
	if poly {
		for i := range n {
			u := 10 + 10*r.Float64()
			for j := 1; j <= k; j++ {
				x.Set(i, j, math.Pow(u, float64(j)))
			}
			y[i] = 1 + 0.5*u - 0.01*u*u + r.NormFloat64()
		}
	}
	if collinear {
		_, p := x.Dims()
		xc := mat.NewDense(n, p+1, nil)
		for i := range n {
			for j := range p {
				xc.Set(i, j, x.At(i, j))
			}
			xc.Set(i, p, x.At(i, 1)+x.At(i, 2))
		}
		x = xc
	}
	return x, y
}

// TestOLSFitCountsExpanded checks FitCounts against FitOLS on the
// materialised data (rows copied), with random integer counts including
// zeros, random precision weights (some zero), every CovKind, and an
// ill-conditioned and a rank-deficient design.
func TestOLSFitCountsExpanded(t *testing.T) {
	const tol = 1e-10
	tests := []struct {
		name            string
		n, k            int
		poly, collinear bool
		weights         bool
		zeroWeight      bool
		kind            WeightKind
	}{
		{name: "precision", n: 40, k: 3, weights: true},
		{name: "precision with a zero weight", n: 25, k: 2, weights: true, zeroWeight: true},
		{name: "no weights", n: 30, k: 3},
		{name: "ill-conditioned", n: 40, k: 4, poly: true, weights: true},
		{name: "collinear", n: 30, k: 3, collinear: true, weights: true},
		{name: "frequency weights", n: 30, k: 2, weights: true, kind: Frequency},
	}
	for ti, tt := range tests {
		for _, cov := range []CovKind{Classical, HC0, HC1, HC2, HC3} {
			t.Run(fmt.Sprintf("%s/%v", tt.name, cov), func(t *testing.T) {
				r := rand.New(rand.NewPCG(uint64(ti+1), 7))
				x, y := countsCase(r, tt.n, tt.k, tt.poly, tt.collinear)
				counts := make([]float64, tt.n)
				for i := range counts {
					counts[i] = float64(r.IntN(4)) // 0 to 3, zeros included
				}
				var w []float64
				if tt.weights {
					w = make([]float64, tt.n)
					for i := range w {
						w[i] = 0.2 + 3*r.Float64()
						if tt.kind == Frequency {
							w[i] = float64(1 + r.IntN(3))
						}
					}
					if tt.zeroWeight {
						w[3], counts[3] = 0, 2 // copies of weight zero do not count
					}
				}
				o := OLS{Cov: cov, Weights: tt.kind}
				pr, err := o.FitCounts(x, y, w, counts)
				if err != nil {
					t.Fatal(err)
				}
				got := pr.(*OLSFit)
				xe, ye, we := expandRows(x, y, w, counts)
				if tt.kind == Frequency {
					// Frequency weights on the copies: expand again.
					xe, ye, _ = expandRows(xe, ye, nil, we)
					we = nil
				}
				want, err := OLS{Cov: cov}.FitOLS(xe, ye, we)
				if err != nil {
					t.Fatal(err)
				}
				compareOLSFits(t, got, want, tol)
				if got.Condition() > refineCond != tt.poly {
					t.Errorf("condition %g: refinement path %v, want %v", got.Condition(), !tt.poly, tt.poly)
				}
			})
		}
	}
}

// TestOLSFitCountsFrequencyPath checks that FitCounts without weights is
// bit for bit the frequency-weighted fit with the counts as weights, and
// with nil counts bit for bit Fit.
func TestOLSFitCountsFrequencyPath(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	x, y := randDesign(r, 50, 3)
	counts := make([]float64, 50)
	w := make([]float64, 50)
	for i := range counts {
		counts[i] = float64(r.IntN(3))
		w[i] = 0.5 + r.Float64()
	}
	for _, cov := range []CovKind{Classical, HC1, HC3} {
		t.Run(cov.String(), func(t *testing.T) {
			o := OLS{Cov: cov}
			pr, err := o.FitCounts(x, y, nil, counts)
			if err != nil {
				t.Fatal(err)
			}
			want, err := OLS{Cov: cov, Weights: Frequency}.FitOLS(x, y, counts)
			if err != nil {
				t.Fatal(err)
			}
			if got := pr.(*OLSFit); !sameOLSFit(got, want) {
				t.Errorf("counts without weights: got %+v, want %+v", got.Coefficients(), want.Coefficients())
			}
			pr, err = o.FitCounts(x, y, w, nil)
			if err != nil {
				t.Fatal(err)
			}
			want, err = o.FitOLS(x, y, w)
			if err != nil {
				t.Fatal(err)
			}
			if got := pr.(*OLSFit); !sameOLSFit(got, want) {
				t.Errorf("nil counts: got %+v, want %+v", got.Coefficients(), want.Coefficients())
			}
		})
	}
}

// sameOLSFit reports whether a and b are bit-identical in coefficients,
// covariance, residuals and statistics.
func sameOLSFit(a, b *OLSFit) bool {
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
	sa, sb := a.stats, b.stats
	st := []float64{sa.Rows, sa.ResidDF, sa.ResidSE, sa.RSquared, sa.F, sa.LogLik, sa.AIC, sa.BIC, sa.Deviance}
	sn := []float64{sb.Rows, sb.ResidDF, sb.ResidSE, sb.RSquared, sb.F, sb.LogLik, sb.AIC, sb.BIC, sb.Deviance}
	return same(a.coef, b.coef) && same(a.se, b.se) && same(a.cov, b.cov) && same(a.resid, b.resid) && same(st, sn)
}

// TestOLSFitCountsErrors checks the errors for bad counts and weights and
// the panics for mismatched lengths.
func TestOLSFitCountsErrors(t *testing.T) {
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
			_, err := OLS{}.FitCounts(x, y, tt.w, tt.c)
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
	if _, err := (OLS{}).FitCounts(x, y, w, []float64{0, 0, 0, 0}); !errors.Is(err, ErrBadValue) {
		t.Errorf("all counts zero: got %v, want an error wrapping ErrBadValue", err)
	}
	if msg := panics(func() { OLS{}.FitCounts(x, y, w, []float64{1, 1}) }); !strings.HasPrefix(msg, "fit: counts have 2 values") {
		t.Errorf("short counts: got panic %q, want one about the counts' length", msg)
	}
}
