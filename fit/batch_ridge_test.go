package fit

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestBatchRidgeAgreesWithRidge checks every replicate of a ridge Batch
// against Ridge.FitRidge on the materialised replicate (rows repeated):
// coefficients to 1e-9 relative to the largest coefficient magnitude of
// the replicate other than the intercept (elementwise differences are
// logged), the same estimable flags, and out-of-bag errors from the
// reference coefficients to 1e-9 relative.
func TestBatchRidgeAgreesWithRidge(t *testing.T) {
	xc, yc := calendarDesign(420, 2, 1, false)
	xd, yd := calendarDesign(420, 2, 2, true)
	wc := make([]float64, 420)
	for i := range wc {
		wc[i] = 0.5 + float64(i%5)
	}
	wc[17] = 0
	xn := mat.DenseCopyOf(xc.Slice(0, 420, 1, 10)) // no intercept
	tests := []struct {
		name         string
		x            *mat.Dense
		y, w         []float64
		lambda       float64
		wantFallback bool // some replicate must use the QR path
		allQR        bool // every replicate uses the QR path
	}{
		{name: "calendar, lambda 3", x: xc, y: yc, lambda: 3, wantFallback: true},
		{name: "calendar, lambda 400", x: xc, y: yc, lambda: 400, wantFallback: true},
		{name: "calendar, lambda 0", x: xc, y: yc, lambda: 0, wantFallback: true},
		{name: "calendar weighted, lambda 10", x: xc, y: yc, w: wc, lambda: 10, wantFallback: true},
		{name: "duplicate column, lambda 5", x: xd, y: yd, lambda: 5, wantFallback: true},
		{name: "duplicate column, lambda 0", x: xd, y: yd, lambda: 0, allQR: true},
		{name: "no intercept, lambda 2", x: xn, y: yc, lambda: 2, allQR: true},
	}
	const B = 60
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			n, p := tt.x.Dims()
			counts := multinomialCounts(n, 13)
			got, err := Batch{OutOfBag: true, Workers: 2, Ridge: &Ridge{Lambda: tt.lambda}}.Fit(tt.x, tt.y, tt.w, B, counts)
			if err != nil {
				t.Fatal(err)
			}
			var worst, worstElem, worstOOB float64
			fallbacks := 0
			c := make([]int32, n)
			for r := range B {
				counts(r, c)
				if got.Fallback[r] {
					fallbacks++
				}
				if got.Err[r] != nil {
					t.Fatalf("replicate %d: got error %v, want none", r, got.Err[r])
				}
				xr, yr, wr := materialise(tt.x, tt.y, tt.w, c)
				want, err := Ridge{Lambda: tt.lambda}.FitRidge(xr, yr, wr)
				if err != nil {
					t.Fatalf("replicate %d: reference fit: %v", r, err)
				}
				coefs := want.Coefficients()
				scale := 0.0
				for j, wc := range coefs {
					if wc.Estimable && j != want.Intercept() {
						scale = max(scale, math.Abs(wc.Estimate))
					}
				}
				for j, wc := range coefs {
					ge, gok := got.Coef[r*p+j], got.Estimable[r*p+j]
					if gok != wc.Estimable {
						t.Fatalf("replicate %d column %d: got estimable %v, want %v", r, j, gok, wc.Estimable)
					}
					if !math.IsNaN(got.StdErr[r*p+j]) {
						t.Fatalf("replicate %d column %d: got standard error %v, want NaN", r, j, got.StdErr[r*p+j])
					}
					if !wc.Estimable {
						if !math.IsNaN(ge) {
							t.Fatalf("replicate %d column %d: got %v, want NaN", r, j, ge)
						}
						continue
					}
					worst = max(worst, math.Abs(ge-wc.Estimate)/max(math.Abs(wc.Estimate), scale))
					worstElem = max(worstElem, relDiff(ge, wc.Estimate, 0))
				}
				var sq float64
				m := 0
				for i := range n {
					if c[i] != 0 {
						continue
					}
					d := tt.y[i] - want.Predict(nil, tt.x.Slice(i, i+1, 0, p))[0]
					sq += d * d
					m++
				}
				if got.OutOfBagRows[r] != m {
					t.Fatalf("replicate %d: out-of-bag rows got %d, want %d", r, got.OutOfBagRows[r], m)
				}
				worstOOB = max(worstOOB, relDiff(got.OutOfBagRMSE[r], math.Sqrt(sq/float64(m)), 0))
			}
			t.Logf("%d of %d replicates by QR; max |Δβ|/max(|β|, max|β_slope|) %.2g, elementwise %.2g, OOB RMSE %.2g", fallbacks, B, worst, worstElem, worstOOB)
			if worst > 1e-9 || worstOOB > 1e-9 {
				t.Errorf("got max coefficient difference %.3g and OOB RMSE difference %.3g, want ≤ 1e-9", worst, worstOOB)
			}
			if tt.wantFallback && fallbacks == 0 {
				t.Errorf("got no replicate on the QR path, want some (a holiday missing from a replicate)")
			}
			if tt.allQR != (fallbacks == B) {
				t.Errorf("got %d of %d replicates on the QR path; want all: %v", fallbacks, B, tt.allQR)
			}
		})
	}
}
