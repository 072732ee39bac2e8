package fit

import (
	"errors"
	"fmt"
	"math"
	"math/big"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/kalends/kalends/internal/rng"
	"gonum.org/v1/gonum/mat"
)

// batchDesign is an invented calendar-like data set.
type batchDesign struct {
	name    string
	x       *mat.Dense
	y, w    []float64
	wantAny func(t *testing.T, f *BatchFit) // extra checks
}

// calendarDesign: intercept, year as a number (≈2000–2030), six weekday
// dummies, a rare holiday dummy (few rows, so absent from some replicates),
// a seasonal sine, and optionally a duplicate of a dummy (not estimable on
// the whole data).
func calendarDesign(n int, holidayRows int, seed uint64, dup bool) (*mat.Dense, []float64) {
	rnd := rand.New(rand.NewPCG(seed, 7))
	p := 10
	if dup {
		p++
	}
	x := mat.NewDense(n, p, nil)
	y := make([]float64, n)
	for i := range n {
		year := 2000 + 30*float64(i)/float64(n)
		wd := i % 7
		row := []float64{1, year, 0, 0, 0, 0, 0, 0, 0, math.Sin(2 * math.Pi * float64(i) / 52)}
		if wd > 0 {
			row[1+wd] = 1
		}
		if i%(n/holidayRows) == 3 {
			row[8] = 1
		}
		if dup {
			row = append(row, row[3])
		}
		x.SetRow(i, row)
		y[i] = 500 + 3*(year-2000) + 10*float64(wd) + 40*row[8] + 25*row[9] + 8*rnd.NormFloat64()
	}
	return x, y
}

// polyDesign: intercept, year, year², year³ with raw year numbers, a badly
// conditioned design.
func polyDesign(n int, seed uint64) (*mat.Dense, []float64) {
	rnd := rand.New(rand.NewPCG(seed, 9))
	x := mat.NewDense(n, 4, nil)
	y := make([]float64, n)
	for i := range n {
		t := 2000 + 30*rnd.Float64()
		x.SetRow(i, []float64{1, t, t * t, t * t * t})
		d := t - 2015
		y[i] = 100 + 2*d - 0.05*d*d + 0.002*d*d*d + rnd.NormFloat64()
	}
	return x, y
}

// multinomialCounts returns ordinary-bootstrap counts, replicate r drawn
// from rng.Replicate(seed, r).
func multinomialCounts(n int, seed uint64) CountsFunc {
	return func(r int, dst []int32) {
		clear(dst)
		g := rng.Replicate(seed, r)
		for range n {
			dst[g.IntN(n)]++
		}
	}
}

// materialise returns the replicate's design, outcome and weights with
// every row repeated count times.
func materialise(x *mat.Dense, y, w []float64, c []int32) (*mat.Dense, []float64, []float64) {
	n, p := x.Dims()
	total := 0
	for _, v := range c {
		total += int(v)
	}
	xr := mat.NewDense(total, p, nil)
	var yr, wr []float64
	k := 0
	for i := range n {
		for range c[i] {
			xr.SetRow(k, x.RawRowView(i))
			yr = append(yr, y[i])
			if w != nil {
				wr = append(wr, w[i])
			}
			k++
		}
	}
	return xr, yr, wr
}

// relDiff is |got−want| relative to max(|want|, scale).
func relDiff(got, want, scale float64) float64 {
	return math.Abs(got-want) / max(math.Abs(want), scale)
}

// TestBatchAgreesWithQR checks every replicate's coefficients, standard
// errors, residual standard error, rows, rank, not-estimable status and
// out-of-bag errors against OLS (Householder QR) fitted to the
// materialised resample, with precision weights where the data have them.
// Coefficients and standard errors must agree to 1e-9 relative to
// max(|coefficient|, its standard error); the elementwise relative
// difference is logged.
func TestBatchAgreesWithQR(t *testing.T) {
	xc, yc := calendarDesign(420, 2, 1, false)
	xd, yd := calendarDesign(420, 2, 2, true)
	xp, yp := polyDesign(300, 3)
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
		wantFallback bool // some replicate must use the QR path
		allQR        bool // every replicate may use the QR path
		oobTol       float64
	}{
		{name: "calendar", x: xc, y: yc, wantFallback: true},
		{name: "calendar weighted", x: xc, y: yc, w: wc, wantFallback: true},
		{name: "no intercept", x: xn, y: yc},
		{name: "duplicate column", x: xd, y: yd, wantFallback: true},
		// Predictions of a cubic in raw year numbers cancel about 7 digits
		// whatever the method, so the out-of-bag errors of two fits whose
		// coefficients agree to 1e-16 agree to about 1e-9 only.
		{name: "polynomial year", x: xp, y: yp, allQR: true, oobTol: 1e-7},
	}
	const B = 60
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			n, p := tt.x.Dims()
			counts := multinomialCounts(n, 11)
			oobTol := tt.oobTol
			if oobTol == 0 {
				oobTol = 1e-9
			}
			got, err := Batch{OutOfBag: true, Workers: 2}.Fit(tt.x, tt.y, tt.w, B, counts)
			if err != nil {
				t.Fatal(err)
			}
			var maxCoef, maxSE, maxElem float64
			fallbacks := 0
			c := make([]int32, n)
			for r := range B {
				counts(r, c)
				if got.Fallback[r] {
					fallbacks++
				}
				xr, yr, wr := materialise(tt.x, tt.y, tt.w, c)
				want, err := OLS{}.FitOLS(xr, yr, wr)
				if err != nil {
					t.Fatalf("replicate %d: reference fit: %v", r, err)
				}
				if got.Err[r] != nil {
					t.Fatalf("replicate %d: got error %v, want none", r, got.Err[r])
				}
				coefs := want.Coefficients()
				for j, wc := range coefs {
					ge, gs, gok := got.Coef[r*p+j], got.StdErr[r*p+j], got.Estimable[r*p+j]
					if gok != wc.Estimable {
						t.Fatalf("replicate %d column %d: got estimable %v, want %v", r, j, gok, wc.Estimable)
					}
					if !wc.Estimable {
						if !math.IsNaN(ge) || !math.IsNaN(gs) {
							t.Fatalf("replicate %d column %d: got %v (se %v), want NaN", r, j, ge, gs)
						}
						continue
					}
					scale := max(math.Abs(wc.Estimate), wc.StdErr)
					maxCoef = max(maxCoef, math.Abs(ge-wc.Estimate)/scale)
					maxSE = max(maxSE, relDiff(gs, wc.StdErr, 0))
					maxElem = max(maxElem, relDiff(ge, wc.Estimate, 0))
				}
				st := want.Statistics()
				if d := relDiff(got.ResidSE[r], st.ResidSE, 0); d > 1e-9 {
					t.Errorf("replicate %d: residual SE got %v, want %v", r, got.ResidSE[r], st.ResidSE)
				}
				if got.Rows[r] != st.Rows || got.Rank[r] != st.Params {
					t.Errorf("replicate %d: rows, rank got %v, %d, want %v, %d", r, got.Rows[r], got.Rank[r], st.Rows, st.Params)
				}
				// Out-of-bag errors from the reference coefficients.
				var sq, ab, ysum float64
				m := 0
				for i := range n {
					if c[i] != 0 {
						continue
					}
					ysum += tt.y[i]
					pr := 0.0
					for j, wc := range coefs {
						if wc.Estimable {
							pr += wc.Estimate * tt.x.At(i, j)
						}
					}
					d := tt.y[i] - pr
					sq += d * d
					ab += math.Abs(d)
					m++
				}
				if got.OutOfBagRows[r] != m {
					t.Fatalf("replicate %d: out-of-bag rows got %d, want %d", r, got.OutOfBagRows[r], m)
				}
				if d := relDiff(got.OutOfBagRMSE[r], math.Sqrt(sq/float64(m)), 0); d > oobTol {
					t.Errorf("replicate %d: OOB RMSE got %v, want %v", r, got.OutOfBagRMSE[r], math.Sqrt(sq/float64(m)))
				}
				if d := relDiff(got.OutOfBagMAE[r], ab/float64(m), 0); d > oobTol {
					t.Errorf("replicate %d: OOB MAE got %v, want %v", r, got.OutOfBagMAE[r], ab/float64(m))
				}
				// R² about the out-of-bag mean, by two passes.
				var sst float64
				for i := range n {
					if c[i] == 0 {
						d := tt.y[i] - ysum/float64(m)
						sst += d * d
					}
				}
				if d := relDiff(got.OutOfBagR2[r], 1-sq/sst, 0); d > oobTol {
					t.Errorf("replicate %d: OOB R² got %v, want %v", r, got.OutOfBagR2[r], 1-sq/sst)
				}
			}
			t.Logf("%d of %d replicates by QR; max |Δβ|/max(|β|,SE) %.2g, max elementwise rel Δβ %.2g, max rel ΔSE %.2g", fallbacks, B, maxCoef, maxElem, maxSE)
			if maxCoef > 1e-9 || maxSE > 1e-9 {
				t.Errorf("got max coefficient difference %.3g and SE difference %.3g, want ≤ 1e-9", maxCoef, maxSE)
			}
			if tt.wantFallback && fallbacks == 0 {
				t.Errorf("got no replicate on the QR path, want some (rank-deficient replicates)")
			}
			if fallbacks == B && !tt.allQR {
				t.Errorf("got every replicate on the QR path, want the fast path used")
			}
		})
	}
}

// bigFit is an independent least-squares reference for full-rank
// designs: the normal equations of the materialised replicate formed and
// solved by Gaussian elimination in 512-bit math/big floating point, so
// that rounding is far below float64's even when XᵀX is badly
// conditioned. Its result is rounded to float64.
func bigFit(x *mat.Dense, y []float64) []float64 {
	n, p := x.Dims()
	const prec = 512
	nf := func() *big.Float { return new(big.Float).SetPrec(prec) }
	a := make([][]*big.Float, p)
	for j := range a {
		a[j] = make([]*big.Float, p+1)
		for k := range a[j] {
			a[j][k] = nf()
		}
	}
	t := nf()
	for i := range n {
		for j := range p {
			xj := nf().SetFloat64(x.At(i, j))
			for k := range p {
				a[j][k].Add(a[j][k], t.Mul(xj, nf().SetFloat64(x.At(i, k))))
			}
			a[j][p].Add(a[j][p], t.Mul(xj, nf().SetFloat64(y[i])))
		}
	}
	for c := range p {
		for r := c + 1; r < p; r++ {
			f := nf().Quo(a[r][c], a[c][c])
			for k := c; k <= p; k++ {
				a[r][k].Sub(a[r][k], nf().Mul(f, a[c][k]))
			}
		}
	}
	z := make([]*big.Float, p)
	for i := p - 1; i >= 0; i-- {
		s := nf().Set(a[i][p])
		for j := i + 1; j < p; j++ {
			s.Sub(s, nf().Mul(a[i][j], z[j]))
		}
		z[i] = s.Quo(s, a[i][i])
	}
	beta := make([]float64, p)
	for j := range p {
		beta[j], _ = z[j].Float64()
	}
	return beta
}

// TestBatchAgreesWithBigFloat checks replicates of a year-and-intercept
// design (fast path) and of the badly conditioned cubic-in-year design (QR
// path) against normal equations solved in 512-bit floating point.
func TestBatchAgreesWithBigFloat(t *testing.T) {
	for _, tt := range []struct {
		name string
		cols int
	}{{"year", 2}, {"year squared", 3}, {"year cubed", 4}} {
		t.Run(tt.name, func(t *testing.T) {
			xp, y := polyDesign(300, 5)
			x := mat.DenseCopyOf(xp.Slice(0, 300, 0, tt.cols))
			testBigFloat(t, x, y)
		})
	}
}

func testBigFloat(t *testing.T, x *mat.Dense, y []float64) {
	n, p := x.Dims()
	const B = 20
	counts := multinomialCounts(n, 4)
	got, err := Batch{}.Fit(x, y, nil, B, counts)
	if err != nil {
		t.Fatal(err)
	}
	c := make([]int32, n)
	worst := 0.0
	for r := range B {
		counts(r, c)
		xr, yr, _ := materialise(x, y, nil, c)
		want := bigFit(xr, yr)
		for j := range p {
			d := math.Abs(got.Coef[r*p+j]-want[j]) / max(math.Abs(want[j]), got.StdErr[r*p+j])
			worst = max(worst, d)
		}
	}
	fb := 0
	for _, v := range got.Fallback {
		if v {
			fb++
		}
	}
	t.Logf("%d of %d by QR; max |Δβ|/max(|β|,SE) against 512-bit normal equations: %.2g", fb, B, worst)
	if worst > 1e-9 {
		t.Errorf("got max difference %.3g, want ≤ 1e-9", worst)
	}
}

// TestBatchWorkersIdentical checks that the worker count changes no bit,
// for least squares and for ridge.
func TestBatchWorkersIdentical(t *testing.T) {
	x, y := calendarDesign(700, 5, 8, false)
	n, _ := x.Dims()
	counts := multinomialCounts(n, 3)
	for _, ridge := range []*Ridge{nil, {Lambda: 3}} {
		one, err := Batch{Workers: 1, OutOfBag: true, Ridge: ridge}.Fit(x, y, nil, 37, counts)
		if err != nil {
			t.Fatal(err)
		}
		for _, w := range []int{2, 3, 8} {
			many, err := Batch{Workers: w, OutOfBag: true, Ridge: ridge}.Fit(x, y, nil, 37, counts)
			if err != nil {
				t.Fatal(err)
			}
			for i := range one.Coef {
				if math.Float64bits(one.Coef[i]) != math.Float64bits(many.Coef[i]) || math.Float64bits(one.StdErr[i]) != math.Float64bits(many.StdErr[i]) {
					t.Fatalf("ridge %v, workers %d: coefficient %d got %v (se %v), want %v (se %v)", ridge != nil, w, i, many.Coef[i], many.StdErr[i], one.Coef[i], one.StdErr[i])
				}
			}
			for r := range one.OutOfBagRMSE {
				if math.Float64bits(one.OutOfBagRMSE[r]) != math.Float64bits(many.OutOfBagRMSE[r]) || math.Float64bits(one.OutOfBagR2[r]) != math.Float64bits(many.OutOfBagR2[r]) {
					t.Fatalf("ridge %v, workers %d: OOB RMSE, R² %d got %v, %v, want %v, %v", ridge != nil, w, r, many.OutOfBagRMSE[r], many.OutOfBagR2[r], one.OutOfBagRMSE[r], one.OutOfBagR2[r])
				}
			}
		}
	}
}

// TestBatchErrors checks data errors, per-replicate errors and panics.
func TestBatchErrors(t *testing.T) {
	x, y := calendarDesign(70, 5, 1, false)
	n, _ := x.Dims()
	bad := append([]float64(nil), y...)
	bad[9] = math.NaN()
	_, err := Batch{}.Fit(x, bad, nil, 3, multinomialCounts(n, 1))
	var de *DataError
	if !errors.As(err, &de) || de.Row != 10 || !errors.Is(err, ErrBadValue) {
		t.Errorf("NaN outcome: got %v, want a *DataError for row 10", err)
	}
	// A replicate with only two rows cannot be fitted; the others can.
	counts := func(r int, dst []int32) {
		multinomialCounts(n, 1)(r, dst)
		if r == 1 {
			clear(dst)
			dst[0], dst[1] = 1, 1
		}
	}
	f, err := Batch{}.Fit(x, y, nil, 3, counts)
	if err != nil {
		t.Fatal(err)
	}
	if !errors.Is(f.Err[1], ErrTooFewRows) || !math.IsNaN(f.Coef[1*f.P]) {
		t.Errorf("tiny replicate: got error %v, coefficient %v; want ErrTooFewRows and NaN", f.Err[1], f.Coef[f.P])
	}
	if f.Err[0] != nil || f.Err[2] != nil {
		t.Errorf("got errors %v, %v for ordinary replicates, want none", f.Err[0], f.Err[2])
	}
	for _, tt := range []struct {
		name string
		f    func()
	}{
		{"short y", func() { Batch{}.Fit(x, y[:3], nil, 1, counts) }},
		{"negative B", func() { Batch{}.Fit(x, y, nil, -1, counts) }},
		{"nil counts", func() { Batch{}.Fit(x, y, nil, 1, nil) }},
		{"negative count", func() {
			Batch{Workers: 2}.Fit(x, y, nil, 8, func(r int, dst []int32) { clear(dst); dst[5] = -1 })
		}},
	} {
		t.Run(tt.name, func(t *testing.T) {
			defer func() {
				if recover() == nil {
					t.Errorf("got no panic, want one")
				}
			}()
			tt.f()
		})
	}
}

// TestBatchManyChunks checks a design long enough for several row chunks
// of the cross-product pass (their partial sums are added in chunk order):
// every replicate against frequency-weighted OLS to 1e-9 relative to
// max(|β|, SE), and bit-identical results for 1, 2 and 5 workers.
func TestBatchManyChunks(t *testing.T) {
	n := 3*chunkRows + 517
	x, y := calendarDesign(n, 40, 12, false)
	_, p := x.Dims()
	counts := multinomialCounts(n, 5)
	const B = 9
	var first *BatchFit
	for _, w := range []int{1, 2, 5} {
		got, err := Batch{Workers: w, OutOfBag: true}.Fit(x, y, nil, B, counts)
		if err != nil {
			t.Fatal(err)
		}
		if first == nil {
			first = got
			continue
		}
		for i := range got.Coef {
			if math.Float64bits(got.Coef[i]) != math.Float64bits(first.Coef[i]) {
				t.Fatalf("workers %d: coefficient %d got %v, want %v (workers 1)", w, i, got.Coef[i], first.Coef[i])
			}
		}
	}
	c := make([]int32, n)
	cw := make([]float64, n)
	worst := 0.0
	for r := range B {
		if first.Fallback[r] {
			t.Errorf("replicate %d: on the QR path, want the batched solve", r)
		}
		counts(r, c)
		for i, v := range c {
			cw[i] = float64(v)
		}
		want, err := OLS{Weights: Frequency}.FitOLS(x, y, cw)
		if err != nil {
			t.Fatal(err)
		}
		for j, wc := range want.Coefficients() {
			worst = max(worst, math.Abs(first.Coef[r*p+j]-wc.Estimate)/max(math.Abs(wc.Estimate), wc.StdErr),
				relDiff(first.StdErr[r*p+j], wc.StdErr, 0))
		}
	}
	t.Logf("max relative difference from OLS: %.2g", worst)
	if worst > 1e-9 {
		t.Errorf("got max relative difference %.3g, want ≤ 1e-9", worst)
	}
}

// TestBatchNamesAsOLS checks that Batch and the accumulators name the
// coefficients as OLS does, including a column whose Namer gives no name.
func TestBatchNamesAsOLS(t *testing.T) {
	n := 12
	x := mat.NewDense(n, 3, nil)
	y := make([]float64, n)
	for i := range n {
		x.Set(i, 0, 1)
		x.Set(i, 1, float64(i))
		x.Set(i, 2, float64(i*i%5))
		y[i] = 2 + 0.5*float64(i) + float64(i%3)
	}
	d := namedDense{Dense: x, names: []string{"intercept", "", "season"}}
	lm, err := OLS{}.FitOLS(d, y, nil)
	if err != nil {
		t.Fatal(err)
	}
	var want []string
	for _, c := range lm.Coefficients() {
		want = append(want, c.Name)
	}
	bf, err := Batch{}.Fit(d, y, nil, 2, func(r int, dst []int32) {
		for i := range dst {
			dst[i] = int32(1 + (i+r)%2)
		}
	})
	if err != nil {
		t.Fatal(err)
	}
	if fmt.Sprint(bf.Names) != fmt.Sprint(want) {
		t.Errorf("Batch names: got %q, want %q (as OLS)", bf.Names, want)
	}
}

// TestBatchDataErrorsAsOLS checks that Batch, LearnStandardization and
// Accumulator.Add report a bad value with the same *DataError as OLS: the
// 1-based row, the column by name and the same reason.
func TestBatchDataErrorsAsOLS(t *testing.T) {
	n := 10
	base := mat.NewDense(n, 3, nil)
	y := make([]float64, n)
	for i := range n {
		base.Set(i, 0, 1)
		base.Set(i, 1, float64(i))
		base.Set(i, 2, float64(i%3))
		y[i] = float64(i * i % 7)
	}
	names := []string{"intercept", "trend", "season"}
	ones := func() []float64 {
		w := make([]float64, n)
		for i := range w {
			w[i] = 1
		}
		return w
	}
	tests := []struct {
		name   string
		set    func(x *mat.Dense, y, w []float64)
		reason string
	}{
		{"NaN in design", func(x *mat.Dense, _, _ []float64) { x.Set(6, 2, math.NaN()) }, "row 7, season"},
		{"Inf in design", func(x *mat.Dense, _, _ []float64) { x.Set(3, 1, math.Inf(-1)) }, "row 4, trend"},
		{"NaN outcome", func(_ *mat.Dense, y, _ []float64) { y[2] = math.NaN() }, "row 3, outcome"},
		{"negative weight", func(_ *mat.Dense, _, w []float64) { w[8] = -1 }, "row 9, weights"},
		{"infinite weight", func(_ *mat.Dense, _, w []float64) { w[0] = math.Inf(1) }, "row 1, weights"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			x := mat.DenseCopyOf(base)
			yy := append([]float64(nil), y...)
			w := ones()
			tt.set(x, yy, w)
			d := namedDense{Dense: x, names: names}
			_, want := OLS{}.FitOLS(d, yy, w)
			if want == nil || !strings.Contains(want.Error(), tt.reason) {
				t.Fatalf("OLS: got %v, want an error naming %q", want, tt.reason)
			}
			_, err := Batch{}.Fit(d, yy, w, 1, func(_ int, c []int32) {
				for i := range c {
					c[i] = 1
				}
			})
			if err == nil || err.Error() != want.Error() {
				t.Errorf("Batch: got %v, want %v", err, want)
			}
			_, err = LearnStandardization(d, yy, w)
			if err == nil || err.Error() != want.Error() {
				t.Errorf("LearnStandardization: got %v, want %v", err, want)
			}
		})
	}
}
