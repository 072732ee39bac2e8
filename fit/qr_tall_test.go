package fit

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"sync"
	"testing"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
)

// fillTall stores the n×m matrix a (row-major) in f's blocks and factorises
// them in order.
func fillTall(f *tallQR, a []float64, n, m, k int) {
	f.reset(n, m, k, nil)
	for t := range f.blocks() {
		first, rows, blk := f.block(t)
		for r := range rows {
			for j := range m {
				blk[j*rows+r] = a[(first+r)*m+j]
			}
		}
		f.factorBlock(t)
	}
}

func TestTallQR(t *testing.T) {
	const m, k = 7, 6 // six columns reduced, one right-hand side
	b := tallBlockRows(1<<20, m, k)
	for _, tc := range []struct {
		name      string
		n         int
		deficient bool // column 3 zero in every row, column 5 = column 1 + column 2
	}{
		{name: "one block", n: 40},
		{name: "rows equal columns", n: k},
		{name: "two blocks, short last", n: b + 7},
		{name: "exact blocks", n: 3 * b},
		{name: "many blocks", n: 9*b + 1},
		{name: "rank deficient, many blocks", n: 5*b + 3, deficient: true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			r := rand.New(rand.NewPCG(21, uint64(tc.n)))
			n := tc.n
			a := make([]float64, n*m)
			for i := range n {
				for j := range m {
					a[i*m+j] = r.NormFloat64()
				}
				if tc.deficient {
					a[i*m+3] = 0
					a[i*m+5] = a[i*m+1] + a[i*m+2]
				}
			}
			var f tallQR
			fillTall(&f, a, n, m, k)
			scale := math.Sqrt(float64(n))
			const tol = 1e-13

			// A = Q [R; 0], column by column (right-hand side included).
			col := make([]float64, n)
			for j := range m {
				clear(col)
				for i := 0; i <= min(j, k-1); i++ {
					col[i] = f.rAt(i, j)
				}
				if j >= k {
					// Qᵀb keeps its tail in the blocks; rebuild Qᵀb by
					// transforming b and check its head against R's column.
					bb := make([]float64, n)
					for i := range n {
						bb[i] = a[i*m+j]
					}
					f.applyQT(bb)
					for i := range k {
						if math.Abs(bb[i]-f.rAt(i, j)) > tol*scale {
							t.Errorf("(Qᵀb)[%d]: got %v, want %v", i, f.rAt(i, j), bb[i])
						}
					}
					continue
				}
				f.applyQ(col)
				for i := range n {
					if d := math.Abs(col[i] - a[i*m+j]); d > tol*scale {
						t.Fatalf("(QR)[%d][%d]: got %v, want %v", i, j, col[i], a[i*m+j])
					}
				}
			}

			// Q is orthogonal: Qᵀ keeps the norm and Q undoes it.
			v := make([]float64, n)
			for i := range v {
				v[i] = r.NormFloat64()
			}
			w := slices.Clone(v)
			f.applyQT(w)
			if got, want := floats.Norm(w, 2), floats.Norm(v, 2); math.Abs(got-want) > tol*want {
				t.Errorf("‖Qᵀv‖: got %v, want %v", got, want)
			}
			f.applyQ(w)
			for i := range v {
				if math.Abs(w[i]-v[i]) > tol*scale {
					t.Fatalf("(QQᵀv)[%d]: got %v, want %v", i, w[i], v[i])
				}
			}

			// |R_jj| agrees with gonum's Householder QR (LAPACK Dgeqrf), up
			// to the first zero column (after it R is not unique).
			var qr mat.QR
			qr.Factorize(mat.NewDense(n, m, a).Slice(0, n, 0, k))
			var rg mat.Dense
			qr.RTo(&rg)
			last := k
			if tc.deficient {
				last = 3
			}
			for j := range last {
				got, want := math.Abs(f.rAt(j, j)), math.Abs(rg.At(j, j))
				if math.Abs(got-want) > tol*scale {
					t.Errorf("|R[%d][%d]|: got %v, want %v (gonum)", j, j, got, want)
				}
			}
		})
	}
}

func TestPivQR(t *testing.T) {
	for _, tc := range []struct {
		name       string
		rows, cols int
		rank       int
	}{
		{name: "square", rows: 6, cols: 6, rank: 6},
		{name: "tall", rows: 9, cols: 4, rank: 4},
		{name: "rank 3 of 5", rows: 5, cols: 5, rank: 3},
	} {
		t.Run(tc.name, func(t *testing.T) {
			r := rand.New(rand.NewPCG(31, uint64(tc.rows*100+tc.cols)))
			rows, cols := tc.rows, tc.cols
			a := make([]float64, rows*cols) // column-major
			for j := range cols {
				for i := range rows {
					a[j*rows+i] = r.NormFloat64()
				}
			}
			for j := tc.rank; j < cols; j++ { // later columns: combinations of the first ones
				for i := range rows {
					a[j*rows+i] = a[(j-tc.rank)*rows+i] - 2*a[(j-tc.rank+1)%tc.rank*rows+i]
				}
			}
			var f pivQR
			copy(f.reset(rows, cols), a)
			f.factor()
			if got := f.rank(1e-12); got != tc.rank {
				t.Errorf("rank: got %d, want %d", got, tc.rank)
			}
			for c := 1; c < min(rows, cols); c++ {
				if math.Abs(f.rAt(c, c)) > math.Abs(f.rAt(c-1, c-1))*(1+1e-14) {
					t.Errorf("|R[%d][%d]| = %v > |R[%d][%d]| = %v: pivoting must not let the diagonal grow", c, c, f.rAt(c, c), c-1, c-1, f.rAt(c-1, c-1))
				}
			}
			// A P = Q R, column by column.
			v := make([]float64, rows)
			for c := range cols {
				clear(v)
				for i := 0; i <= min(c, rows-1); i++ {
					v[i] = f.rAt(i, c)
				}
				f.applyQ(v)
				src := a[f.piv[c]*rows : f.piv[c]*rows+rows]
				for i := range v {
					if math.Abs(v[i]-src[i]) > 1e-13 {
						t.Fatalf("(QR)[%d][%d]: got %v, want column %d's %v", i, c, v[i], f.piv[c], src[i])
					}
				}
			}
		})
	}
}

// TestOLSManyBlocks checks fits that span many row blocks of the tall
// factorisation against gonum's unpivoted QR (LAPACK Dgeqrf) of the
// weighted design without its not-estimable columns, and the classical standard
// errors against (XᵀWX)⁻¹ = R⁻¹R⁻ᵀ from gonum's R.
func TestOLSManyBlocks(t *testing.T) {
	const n = 3000
	r := rand.New(rand.NewPCG(41, 42))
	// Columns: 1, a, b, zero in every row (not estimable), c, a − b
	// (collinear, not estimable), d with a large mean.
	const p = 7
	x := mat.NewDense(n, p, nil)
	y := make([]float64, n)
	for i := range n {
		a, b, c, d := r.NormFloat64(), r.NormFloat64(), r.NormFloat64(), 100+r.NormFloat64()
		for j, v := range []float64{1, a, b, 0, c, a - b, d} {
			x.Set(i, j, v)
		}
		y[i] = 2 + a - 0.5*b + 0.25*c + 0.1*(d-100) + (1+math.Abs(a))*r.NormFloat64()
	}
	keep := []int{0, 1, 2, 4, 6}
	wts := make([]float64, n)
	for i := range wts {
		wts[i] = float64(r.IntN(4)) // about a quarter of the rows get weight zero
	}
	for _, tc := range []struct {
		name string
		w    []float64
		kind WeightKind
	}{
		{name: "unweighted"},
		{name: "precision weights", w: wts, kind: Precision},
		{name: "frequency weights", w: wts, kind: Frequency},
	} {
		t.Run(tc.name, func(t *testing.T) {
			m, err := OLS{Weights: tc.kind}.FitOLS(x, y, tc.w)
			if err != nil {
				t.Fatal(err)
			}
			if got := fmt.Sprint(m.NotEstimable()); got != "[x4 x6]" {
				t.Errorf("not estimable: got %s, want [x4 x6]", got)
			}
			// Reference: weighted design and outcome over the rows used.
			var rows []int
			for i := range n {
				if tc.w == nil || tc.w[i] > 0 {
					rows = append(rows, i)
				}
			}
			xw := mat.NewDense(len(rows), len(keep), nil)
			yw := mat.NewVecDense(len(rows), nil)
			for k, i := range rows {
				sw := 1.0
				if tc.w != nil {
					sw = math.Sqrt(tc.w[i])
				}
				for c, j := range keep {
					xw.Set(k, c, sw*x.At(i, j))
				}
				yw.SetVec(k, sw*y[i])
			}
			var qr mat.QR
			qr.Factorize(xw)
			var want mat.VecDense
			if err := qr.SolveVecTo(&want, false, yw); err != nil {
				t.Fatal(err)
			}
			// (XᵀWX)⁻¹ = R⁻¹R⁻ᵀ from gonum's R.
			var rd mat.Dense
			qr.RTo(&rd)
			q := len(keep)
			rt := mat.NewTriDense(q, mat.Upper, nil)
			for i := range q {
				for j := i; j < q; j++ {
					rt.SetTri(i, j, rd.At(i, j))
				}
			}
			var rinv mat.TriDense
			if err := rinv.InverseTri(rt); err != nil {
				t.Fatal(err)
			}
			var inv mat.Dense
			inv.Mul(&rinv, rinv.T())
			var fitted mat.VecDense
			fitted.MulVec(xw, &want)
			var rss float64
			for k := range rows {
				d := yw.AtVec(k) - fitted.AtVec(k)
				rss += d * d
			}
			nobs := float64(len(rows))
			if tc.kind == Frequency {
				nobs = floats.Sum(tc.w)
			}
			s2 := rss / (nobs - float64(len(keep)))
			coefs := m.Coefficients()
			for c, j := range keep {
				got := coefs[j]
				if !near(got.Estimate, want.AtVec(c), 1e-9) {
					t.Errorf("%s: estimate got %v, want %v (gonum QR)", got.Name, got.Estimate, want.AtVec(c))
				}
				if se := math.Sqrt(s2 * inv.At(c, c)); !near(got.StdErr, se, 1e-8) {
					t.Errorf("%s: SE got %v, want %v (gonum inverse)", got.Name, got.StdErr, se)
				}
			}
			if st := m.Statistics(); !near(st.Deviance, rss, 1e-9) {
				t.Errorf("RSS: got %v, want %v", st.Deviance, rss)
			}
		})
	}
}

// TestOLSPoolReuse fits designs of different sizes on many goroutines and
// checks that every fit is bit-identical to a fit made alone: the pooled
// scratch memory must not leak between fits.
func TestOLSPoolReuse(t *testing.T) {
	r := rand.New(rand.NewPCG(51, 52))
	type job struct {
		x    *mat.Dense
		y, w []float64
		o    OLS
	}
	var jobs []job
	for _, size := range []struct{ n, k int }{{2000, 6}, {30, 2}, {700, 11}, {12, 4}} {
		x, y := randDesign(r, size.n, size.k)
		w := make([]float64, size.n)
		for i := range w {
			w[i] = float64(r.IntN(3))
		}
		jobs = append(jobs, job{x: x, y: y}, job{x: x, y: y, w: w, o: OLS{Cov: HC3}}, job{x: x, y: y, w: w, o: OLS{Weights: Frequency, Cov: HC1}})
	}
	want := make([][]Coefficient, len(jobs))
	for i, jb := range jobs {
		m, err := jb.o.FitOLS(jb.x, jb.y, jb.w)
		if err != nil {
			t.Fatal(err)
		}
		want[i] = m.Coefficients()
	}
	var wg sync.WaitGroup
	errs := make([]string, 4)
	for g := range errs {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for rep := range 3 {
				for i := range jobs {
					jb := jobs[(i+g+rep)%len(jobs)]
					m, err := jb.o.FitOLS(jb.x, jb.y, jb.w)
					if err != nil {
						errs[g] = err.Error()
						return
					}
					if got := m.Coefficients(); !slices.Equal(got, want[(i+g+rep)%len(jobs)]) {
						errs[g] = fmt.Sprintf("job %d: got %+v, want %+v", (i+g+rep)%len(jobs), got, want[(i+g+rep)%len(jobs)])
						return
					}
				}
			}
		}()
	}
	wg.Wait()
	for g, e := range errs {
		if e != "" {
			t.Errorf("goroutine %d: %s", g, e)
		}
	}
}
