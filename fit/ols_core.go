package fit

import (
	"fmt"
	"math"
	"sync"

	"gonum.org/v1/gonum/floats"
)

// This file holds the least-squares core shared by OLS and the batched
// paths: a rank-revealing Householder QR with column pivoting of the
// weighted, centred and equilibrated design, with iterative refinement of
// the augmented system (Björck 1967) using residuals accumulated in
// double-double arithmetic when the design is ill-conditioned.
//
// The factorisation is done in two stages (see qr_tall.go): an unpivoted
// blocked Householder QR of the n×q design, A = Q₁R₁, and a Householder
// QR with column pivoting of the q×q triangle, R₁P = Q₂R. Since Q₁ is
// orthogonal this is a column-pivoted QR of A, AP = Q₁·diag(Q₂, I)·R, with
// the pivots, the rank and the column choice of a pivoted QR of A itself.
// Scratch memory comes from solverPool, a sync.Pool of solvers, so that a
// fit allocates little more than its results; a pooled solver keeps no
// reference to the caller's data.

// lsSpec configures leastSquares.
type lsSpec struct {
	Freq bool    // frequency weights (else precision)
	Tol  float64 // rank tolerance; 0 means max(rows, cols)·ε
	Cov  CovKind
	// Refine forces (1) or forbids (-1) iterative refinement; 0 applies it
	// when the equilibrated condition number exceeds refineCond.
	Refine int
}

// refineCond is the condition number (1-norm, equilibrated design) above
// which leastSquares refines its solution and covariance.
const refineCond = 1e3

// refineIters is the most refinement steps taken.
const refineIters = 4

// lsFit is the result of leastSquares. All p-vectors and p×p matrices are
// in design-column order; entries of columns that are not estimable are
// NaN (coefficients, covariances) or false (estimable).
type lsFit struct {
	n, p      int
	coef      []float64
	estimable []bool
	rank      int
	intercept int       // design column detected as the intercept, or -1
	unscaled  []float64 // p×p (XᵀWX)⁻¹ over the estimable columns
	cov       []float64 // p×p coefficient covariance of kind spec.Cov
	resid     []float64 // n residuals y − Xb (unweighted), every row
	rss       float64   // Σ w e²
	tss       float64   // Σ w (y − ȳ)² with an intercept, Σ w y² without
	nobs      float64   // rows used: count of w > 0, Σ w for frequency, Σ c with counts
	sumLogW   float64   // Σ log w (Σ c log a with counts) over rows used (precision weights only)
	cond      float64   // 1-norm condition number of R of the equilibrated estimable design
	refined   bool
}

// leastSquares fits y on the n×p row-major design x with optional weights
// w (nil means all ones) and optional row multiplicities c (nil means every
// row once). With c, row i stands for c[i] copies, each of weight w[i]: the
// fit uses the weights c[i]·w[i], and with precision weights (spec.Freq
// false) counts Σ c over the rows used as observations, sums c[i]·log w[i]
// for the log-likelihood and takes per-copy leverages, so that every
// number is that of the expanded data. With c and w == nil it is the
// frequency-weighted fit with weights c. It validates the data and returns
// a *DataError (Column 1-based, 0 for outcome, weights or counts, Name
// "outcome", "weights" or "counts") for NaN, ±Inf or negative weights or
// counts, an error wrapping ErrBadValue if every weight is zero, and one
// wrapping ErrTooFewRows if fewer rows have a positive weight than there
// are columns that are not constant. It panics on length mismatch. x, y, w
// and c are not modified or retained.
func leastSquares(x []float64, n, p int, y, w, c []float64, spec lsSpec) (*lsFit, error) {
	if len(x) != n*p {
		panic(fmt.Sprintf("fit: design has %d values, want %d×%d", len(x), n, p))
	}
	if len(y) != n {
		panic(fmt.Sprintf("fit: outcome has %d values, design has %d rows", len(y), n))
	}
	if w != nil && len(w) != n {
		panic(fmt.Sprintf("fit: weights have %d values, design has %d rows", len(w), n))
	}
	if c != nil && len(c) != n {
		panic(fmt.Sprintf("fit: counts have %d values, design has %d rows", len(c), n))
	}
	if p == 0 {
		panic("fit: design has no columns")
	}
	if !spec.Cov.valid() {
		panic(fmt.Sprintf("fit: invalid covariance kind %d", int(spec.Cov)))
	}
	s := solverPool.Get().(*lsSolver)
	s.x, s.n, s.p, s.y, s.w, s.spec = x, n, p, y, w, spec
	s.a, s.c, s.copies = nil, nil, false
	switch {
	case c == nil:
	case w == nil:
		s.w, s.c = c, c // frequency weights c
		s.spec.Freq = true
	default:
		// Row i stands for c[i] copies of weight w[i]. Invalid values
		// give an invalid product; checkRow then names the culprit.
		s.wc = growFloats(s.wc, n)
		for i, v := range w {
			s.wc[i] = v * c[i]
		}
		s.w, s.a, s.c = s.wc, w, c
		s.copies = !spec.Freq
	}
	res, err := s.run()
	s.x, s.y, s.w, s.a, s.c = nil, nil, nil, nil, nil
	solverPool.Put(s)
	return res, err
}

// solverPool holds lsSolvers with their scratch memory for reuse. A solver
// is used by one fit at a time; results never alias its memory.
var solverPool = sync.Pool{New: func() any { return new(lsSolver) }}

func badValue(v float64) error {
	if math.IsNaN(v) {
		return fmt.Errorf("not a number: %w", ErrBadValue)
	}
	return fmt.Errorf("infinite value: %w", ErrBadValue)
}

// lsSolver holds the state and scratch memory of one fit.
type lsSolver struct {
	x    []float64
	n, p int
	y, w []float64
	spec lsSpec

	// With row multiplicities, w holds the products a[i]·c[i] of the
	// caller's weights a and counts c (or c itself when a is nil), and
	// copies reports whether the precision-weight statistics count copies.
	a, c   []float64
	wc     []float64 // scratch for the products
	copies bool
	sumC   float64 // Σ c over the rows used, when copies

	nu      int       // rows used (positive weight)
	used    []int     // their indices; unused when w == nil (all rows)
	sw      []float64 // sqrt of the weight of each used row; unused when w == nil
	sumW    float64
	sumLogW float64
	mean    []float64 // column means removed (0 for no intercept, and the intercept)
	scale   []float64 // column norms after weighting and centring
	icpt    int       // intercept column or -1
	icptVal float64   // its constant value
	ybar    float64   // weighted mean of y removed before factorising (0 without intercept)
	cand    []int     // columns not constant: the columns of the tall factorisation
	cols    []int     // estimable design columns, in order
	q0      int       // len(cand)

	qr   tallQR    // A = Q₁R₁ over the candidate columns and the outcome
	r1   []float64 // R₁ (q0×q0, column-major), columns scaled to unit norm
	pq   pivQR     // R₁[:, sel]·P = Q₂R, R column c is cols[piv[c]]
	uy   []float64 // Qᵀ√W(y − ȳ), first q0 values
	rinv []float64 // R⁻¹ (q×q, column-major)

	// scratch
	f0, f1, f2, f3 []float64
	ib             []int
	nc             []bool
}

// piv returns the pivots: R column c is design column cols[piv[c]].
func (s *lsSolver) piv() []int { return s.pq.piv }

// row returns the design row and the square-root weight of the k-th used row.
func (s *lsSolver) row(k int) (i int, sw float64) {
	if s.w == nil {
		return k, 1
	}
	return s.used[k], s.sw[k]
}

// wt returns the weight of the k-th used row.
func (s *lsSolver) wt(k int) float64 {
	if s.w == nil {
		return 1
	}
	return s.w[s.used[k]]
}

func (s *lsSolver) run() (*lsFit, error) {
	n, p := s.n, s.p
	if err := s.scan(); err != nil {
		return nil, err
	}
	nu := s.nu
	res := &lsFit{n: n, p: p, intercept: s.icpt}
	res.nobs = float64(nu)
	if s.w != nil && s.spec.Freq {
		res.nobs = s.sumW
	} else if s.copies {
		res.nobs = s.sumC
	}
	res.sumLogW = s.sumLogW

	tol := s.spec.Tol
	if tol <= 0 {
		tol = float64(max(nu, p)) * epsilon
	}
	s.cand = s.cand[:0]
	for j := range p {
		if s.scale[j] > 0 {
			s.cand = append(s.cand, j)
		}
	}
	s.q0 = len(s.cand)
	if nu < s.q0 || nu == 0 {
		return nil, fmt.Errorf("fit: %d rows with positive weight, %d columns to estimate: %w", nu, s.q0, ErrTooFewRows)
	}
	s.cols = s.cols[:0]
	rank := 0
	if s.q0 > 0 {
		s.factorTall()
		var err error
		if rank, err = s.factorSmall(tol); err != nil {
			return nil, err
		}
	}
	res.rank = rank
	res.estimable = make([]bool, p)
	for _, j := range s.cols {
		res.estimable[j] = true
	}
	if rank > 0 {
		res.cond = s.invertR()
	}

	refine := s.spec.Refine > 0 || (s.spec.Refine == 0 && res.cond > refineCond)
	res.refined = refine

	// Coefficients.
	beta := make([]float64, p)
	if rank > 0 {
		if refine {
			r := make([]float64, nu)
			s.solveAug(s.y, nil, beta, r, refineIters)
		} else {
			s.solveFast(beta)
		}
	}
	res.coef = make([]float64, p)
	for j := range p {
		if res.estimable[j] {
			res.coef[j] = beta[j]
		} else {
			res.coef[j] = math.NaN()
		}
	}

	// Unscaled covariance (XᵀWX)⁻¹.
	res.unscaled = s.unscaledCov(refine)

	// Residuals and sums of squares.
	res.resid = make([]float64, n)
	s.residuals(res, beta, refine)

	// Final covariance.
	res.cov = make([]float64, p*p)
	switch s.spec.Cov {
	case Classical:
		df := res.nobs - float64(rank)
		s2 := res.rss / df
		if df <= 0 {
			s2 = math.NaN()
		}
		for k, v := range res.unscaled {
			res.cov[k] = s2 * v
		}
	default:
		s.sandwich(res)
	}
	return res, nil
}

const epsilon = 0x1p-52

// scan validates x, y and w row by row (design columns, then outcome, then
// weight) and, in the same pass, gathers over the rows used the weight
// sums and, per column, whether it is constant and its weighted sums of
// shifted values and squares (shifted by the first row used, which keeps
// the one-pass variance free of cancellation up to a factor of the number
// of rows; the scaling only needs to be near unit norm, and is made exact
// from R₁ after the factorisation). It then finds the intercept, the column
// means and the column norms.
func (s *lsSolver) scan() error {
	n, p, x, y, w := s.n, s.p, s.x, s.y, s.w
	first := -1
	if w == nil {
		if n > 0 {
			first = 0
		}
	} else {
		for i, v := range w {
			if v > 0 {
				first = i
				break
			}
		}
	}
	s.mean = growFloats(s.mean, p)
	s.scale = growFloats(s.scale, p)
	x0 := growFloats(s.f0, p)
	s1 := growFloats(s.f1, p)
	s2 := growFloats(s.f2, p)
	s.f0, s.f1, s.f2 = x0, s1, s2
	if cap(s.nc) < p {
		s.nc = make([]bool, p)
	}
	nc := s.nc[:p]
	clear(s1)
	clear(s2)
	clear(nc)
	clear(x0)
	var y0 float64
	if first >= 0 {
		copy(x0, x[first*p:first*p+p])
		y0 = y[first]
	}
	s.used = s.used[:0]
	s.sw = s.sw[:0]
	var sumW, sy, sumLogW, sumC float64
	for i := range n {
		row := x[i*p:][:p]
		_, _, _, _ = x0[len(row)-1], s1[len(row)-1], s2[len(row)-1], nc[len(row)-1]
		yi := y[i]
		wi := 1.0
		if w != nil {
			wi = w[i]
		}
		// v·0 is 0 for finite v and NaN otherwise; NaN ≠ 0.
		if bad := yi*0 + wi*0; bad != 0 || wi <= 0 {
			if err := s.checkRow(i); err != nil {
				return err
			}
			if wi == 0 {
				continue
			}
		}
		var bad float64
		if w == nil {
			for j, v := range row {
				d := v - x0[j]
				bad += v * 0
				s1[j] += d
				s2[j] += d * d
				if d != 0 {
					nc[j] = true
				}
			}
			if bad != 0 {
				return s.checkRow(i)
			}
			sumW++
			sy += yi - y0
			continue
		}
		for j, v := range row {
			d := v - x0[j]
			bad += v * 0
			wd := wi * d
			s1[j] += wd
			s2[j] += wd * d
			if d != 0 {
				nc[j] = true
			}
		}
		if bad != 0 {
			return s.checkRow(i)
		}
		s.used = append(s.used, i)
		s.sw = append(s.sw, math.Sqrt(wi))
		if s.copies {
			ci := s.c[i]
			sumLogW += ci * math.Log(s.a[i])
			sumC += ci
		} else if !s.spec.Freq {
			sumLogW += math.Log(wi)
		}
		sumW += wi
		sy += wi * (yi - y0)
	}
	if w == nil {
		s.nu = n
	} else {
		s.nu = len(s.used)
		if s.nu == 0 && n > 0 {
			return fmt.Errorf("fit: weights: all %d weights are zero: %w", n, ErrBadValue)
		}
	}
	s.sumW, s.sumLogW, s.sumC = sumW, sumLogW, sumC
	s.icpt, s.icptVal, s.ybar = -1, 0, 0
	if s.nu == 0 {
		clear(s.mean)
		clear(s.scale)
		return nil
	}
	for j := range p {
		if !nc[j] && x0[j] != 0 {
			s.icpt, s.icptVal = j, x0[j]
			break
		}
	}
	if s.icpt >= 0 {
		s.ybar = y0 + sy/sumW
	}
	for j := range p {
		// Σ w x² from the shifted sums; its relative error is at most
		// about rows·ε, ample for the near-constant test and as a scale.
		rawNorm := math.Sqrt(max(s2[j]+x0[j]*(2*s1[j]+x0[j]*sumW), 0))
		switch {
		case s.icpt < 0 || j == s.icpt:
			s.mean[j], s.scale[j] = 0, rawNorm
		case !nc[j]:
			s.mean[j], s.scale[j] = x0[j], 0 // constant: absorbed by the intercept
		default:
			c := s1[j] / sumW
			s.mean[j] = x0[j] + c
			s.scale[j] = math.Sqrt(max(s2[j]-c*s1[j], 0))
			if s.scale[j] <= 8*epsilon*rawNorm {
				s.scale[j] = 0 // constant up to rounding
			}
		}
	}
	return nil
}

// checkRow returns the error for the first bad value of row i (design
// columns, then outcome, then weight), or nil.
func (s *lsSolver) checkRow(i int) error {
	p := s.p
	for j, v := range s.x[i*p : i*p+p] {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return &DataError{Row: i + 1, Column: j + 1, Value: v, Err: badValue(v)}
		}
	}
	if v := s.y[i]; math.IsNaN(v) || math.IsInf(v, 0) {
		return &DataError{Row: i + 1, Name: "outcome", Value: v, Err: badValue(v)}
	}
	if s.a != nil {
		if err := checkWeight(i, s.a[i], "weights"); err != nil {
			return err
		}
	}
	if s.c != nil {
		if err := checkWeight(i, s.c[i], "counts"); err != nil {
			return err
		}
	}
	if s.w != nil {
		v := s.w[i]
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return &DataError{Row: i + 1, Name: "weights", Value: v, Err: badValue(v)}
		}
		if v < 0 {
			return &DataError{Row: i + 1, Name: "weights", Value: v, Err: fmt.Errorf("negative weight: %w", ErrBadValue)}
		}
	}
	return nil
}

// checkWeight returns the error for a NaN, infinite or negative weight or
// count v of row i, or nil.
func checkWeight(i int, v float64, name string) error {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return &DataError{Row: i + 1, Name: name, Value: v, Err: badValue(v)}
	}
	if v < 0 {
		return &DataError{Row: i + 1, Name: name, Value: v, Err: fmt.Errorf("negative %s: %w", name[:len(name)-1], ErrBadValue)}
	}
	return nil
}

// factorTall fills the weighted, centred, equilibrated candidate columns
// and the weighted, centred outcome into the blocks of s.qr, one block at
// a time, reducing each block while it is in cache. It then copies R₁ and
// the transformed outcome out and rescales the columns of R₁ (and s.scale)
// so that the columns of the factorised design have unit norm to rounding.
func (s *lsSolver) factorTall() {
	nu, p, q0, x, y := s.nu, s.p, s.q0, s.x, s.y
	cand := s.cand
	s.qr.reset(nu, q0+1, q0, s.qr.data)
	inv := growFloats(s.f0, p)
	s.f0 = inv
	for j := range p {
		inv[j] = 0
		if s.scale[j] > 0 {
			inv[j] = 1 / s.scale[j]
		}
	}
	mean, ybar := s.mean[:p], s.ybar
	inv = inv[:p]
	all := q0 == p
	for t := range s.qr.blocks() {
		first, rows, a := s.qr.block(t)
		ya := a[q0*rows : q0*rows+rows]
		for r := range rows {
			i, sw := s.row(first + r)
			row := x[i*p : i*p+p]
			if all {
				row = row[:len(mean)]
				_ = inv[len(row)-1]
				for j, v := range row {
					a[j*rows+r] = (v - mean[j]) * (sw * inv[j])
				}
			} else {
				for c, j := range cand {
					a[c*rows+r] = sw * (row[j] - mean[j]) * inv[j]
				}
			}
			ya[r] = sw * (y[i] - ybar)
		}
		s.qr.factorBlock(t)
	}
	s.r1 = growFloats(s.r1, q0*q0)
	s.uy = growFloats(s.uy, q0)
	clear(s.r1)
	for c := range q0 {
		col := s.r1[c*q0 : c*q0+c+1]
		for i := range col {
			col[i] = s.qr.rAt(i, c)
		}
		nj := nrm2(col)
		floats.Scale(1/nj, col)
		s.scale[cand[c]] *= nj
		s.uy[c] = s.qr.rAt(c, q0)
	}
}

// factorSmall factorises R₁ with column pivoting and returns the numerical
// rank, the number of leading |R_kk| > tol·|R_00|. If that is below the
// number of candidate columns it chooses the estimable columns in design
// order and factorises those alone. It sets s.cols.
func (s *lsSolver) factorSmall(tol float64) (int, error) {
	q0 := s.q0
	copy(s.pq.reset(q0, q0), s.r1)
	s.pq.factor()
	rank := s.pq.rank(tol)
	sel := s.ib[:0]
	if rank < q0 {
		// Prefer dropping later columns: choose the estimable set in
		// design order, then factorise that set alone.
		sel = s.selectInOrder(tol)
		if len(sel) != rank {
			// Rare disagreement on a borderline column: trust the
			// pivoted factorisation.
			sel = append(sel[:0], s.pq.piv[:rank]...)
			sortInts(sel)
		}
		a := s.pq.reset(q0, len(sel))
		for c, k := range sel {
			copy(a[c*q0:c*q0+q0], s.r1[k*q0:k*q0+q0])
		}
		s.pq.factor()
		if r := s.pq.rank(tol); r != len(sel) {
			// Cannot happen in exact arithmetic; keep what is left.
			return 0, &ConditionError{Cond: math.Inf(1)}
		}
		rank = len(sel)
	} else {
		for c := range q0 {
			sel = append(sel, c)
		}
	}
	s.ib = sel
	for _, k := range sel {
		s.cols = append(s.cols, s.cand[k])
	}
	s.pq.applyQT(s.uy)
	return rank, nil
}

// rank returns the number of leading |R_kk| > tol·|R_00|.
func (f *pivQR) rank(tol float64) int {
	r00 := math.Abs(f.rAt(0, 0))
	k := 0
	for c := range min(f.rows, f.cols) {
		if math.Abs(f.rAt(c, c)) > tol*r00 {
			k++
		} else {
			break
		}
	}
	return k
}

// selectInOrder picks, in order, the candidate columns (as indices into
// s.cand) not in the span of the columns kept before them (distance above
// tol, columns having unit norm), by classical Gram–Schmidt with
// reorthogonalisation on the columns of R₁, whose lengths and angles are
// those of the design columns.
func (s *lsSolver) selectInOrder(tol float64) []int {
	q0 := s.q0
	basis := make([]float64, 0, q0*q0)
	var sel []int
	v := make([]float64, q0)
	for c := range q0 {
		copy(v, s.r1[c*q0:c*q0+q0])
		for range 2 {
			for b := 0; b < len(basis); b += q0 {
				u := basis[b : b+q0]
				floats.AddScaled(v, -floats.Dot(u, v), u)
			}
		}
		if nv := nrm2(v); nv > tol {
			for _, x := range v {
				basis = append(basis, x/nv)
			}
			sel = append(sel, c)
		}
	}
	return sel
}

func sortInts(v []int) {
	for i := 1; i < len(v); i++ {
		for k := i; k > 0 && v[k] < v[k-1]; k-- {
			v[k], v[k-1] = v[k-1], v[k]
		}
	}
}

// invertR computes R⁻¹ into s.rinv and returns the 1-norm condition
// number ‖R‖₁‖R⁻¹‖₁.
func (s *lsSolver) invertR() float64 {
	q := len(s.cols)
	s.rinv = growFloats(s.rinv, q*q)
	u := s.rinv
	clear(u)
	var nr, nu float64
	for j := range q {
		var sr float64
		for i := 0; i <= j; i++ {
			sr += math.Abs(s.pq.rAt(i, j))
		}
		nr = max(nr, sr)
		uj := u[j*q : j*q+q]
		uj[j] = 1 / s.pq.rAt(j, j)
		for i := j - 1; i >= 0; i-- {
			var sum float64
			for l := i + 1; l <= j; l++ {
				sum += s.pq.rAt(i, l) * uj[l]
			}
			uj[i] = -sum / s.pq.rAt(i, i)
		}
		var su float64
		for i := 0; i <= j; i++ {
			su += math.Abs(uj[i])
		}
		nu = max(nu, su)
	}
	return nr * nu
}

// solveR overwrites d (length q) with R⁻¹d.
func (s *lsSolver) solveR(d []float64) {
	q := len(s.cols)
	for i := q - 1; i >= 0; i-- {
		v := d[i]
		for j := i + 1; j < q; j++ {
			v -= s.pq.rAt(i, j) * d[j]
		}
		d[i] = v / s.pq.rAt(i, i)
	}
}

// solveRT overwrites h (length q) with R⁻ᵀh.
func (s *lsSolver) solveRT(h []float64) {
	q := len(s.cols)
	for i := range q {
		col := s.pq.a[i*s.pq.rows : i*s.pq.rows+i]
		v := h[i]
		for j, r := range col {
			v -= r * h[j]
		}
		h[i] = v / s.pq.rAt(i, i)
	}
}

// applyQT overwrites v (length nu) with Qᵀv for the whole factorisation.
func (s *lsSolver) applyQT(v []float64) {
	s.qr.applyQT(v)
	s.pq.applyQT(v[:s.q0])
}

// applyQ overwrites v (length nu) with Qv.
func (s *lsSolver) applyQ(v []float64) {
	s.pq.applyQ(v[:s.q0])
	s.qr.applyQ(v)
}

// solveFast writes the coefficients of the plain QR solution into beta
// (design order), from the outcome transformed with the design.
func (s *lsSolver) solveFast(beta []float64) {
	q, p := len(s.cols), s.p
	d := growFloats(s.f1, max(q, p))
	s.f1 = d
	d = d[:q]
	copy(d, s.uy[:q])
	s.solveR(d)
	g := growFloats(s.f2, q)
	s.f2 = g
	for c, k := range s.piv() {
		g[k] = d[c]
	}
	s.tApply(beta, g)
	if s.icpt >= 0 {
		beta[s.icpt] += s.ybar / s.icptVal
	}
}

// tApply maps equilibrated coordinates g (indexed like s.cols) to design
// coordinates: b_j = g_j/s_j, and the intercept absorbs the means.
func (s *lsSolver) tApply(dst []float64, g []float64) {
	for c, j := range s.cols {
		dst[j] = g[c] / s.scale[j]
	}
	if s.icpt >= 0 {
		var sum float64
		for _, j := range s.cols {
			if j != s.icpt {
				sum += s.mean[j] * dst[j]
			}
		}
		dst[s.icpt] -= sum / s.icptVal
	}
}

// tTransApply computes Tᵀg for g in design coordinates, into dst indexed
// like s.cols.
func (s *lsSolver) tTransApply(dst []float64, g []float64) {
	gi := 0.0
	if s.icpt >= 0 {
		gi = g[s.icpt]
	}
	for c, j := range s.cols {
		v := g[j]
		if s.icpt >= 0 && j != s.icpt {
			v -= s.mean[j] * gi / s.icptVal
		}
		dst[c] = v / s.scale[j]
	}
}

// solveAug solves the augmented system [I A; Aᵀ 0][r; b] = [√W·yb; c] for
// the weighted design A = √W·X restricted to the estimable columns, where
// yb may be nil (zero) and c nil (zero) or a p-vector. beta (p, design
// order) and r (weighted residuals of the used rows) must be zero on entry.
// The first step is the plain QR solution; each of up to iters further
// steps computes the residuals of the system in double-double arithmetic
// and solves for the correction with the same factorisation.
func (s *lsSolver) solveAug(yb, c []float64, beta, r []float64, iters int) {
	nu, q, p := s.nu, len(s.cols), s.p
	f := make([]float64, nu)
	g := make([]float64, p)
	gq := make([]float64, q)
	h := make([]float64, q)
	dg := make([]float64, q)
	db := make([]float64, p)
	needR := iters > 0
	for it := 0; it <= iters; it++ {
		if it == 0 {
			for k := range nu {
				i, sw := s.row(k)
				if yb == nil {
					f[k] = 0
				} else {
					f[k] = sw * yb[i]
				}
			}
			for j := range g {
				g[j] = 0
				if c != nil {
					g[j] = c[j]
				}
			}
		} else {
			s.augResidual(yb, c, beta, r, f, g)
		}
		s.tTransApply(gq, g)
		s.corr(f, gq, h, dg, needR)
		for j := range db {
			db[j] = 0
		}
		s.tApply(db, dg)
		var nb, nd float64
		for _, j := range s.cols {
			beta[j] += db[j]
			nb = max(nb, math.Abs(beta[j]))
			nd = max(nd, math.Abs(db[j]))
		}
		if needR {
			for k := range r {
				r[k] += f[k]
			}
		}
		if it > 0 && nd <= epsilon*nb/4 {
			break
		}
	}
}

// corr solves [I A; Aᵀ 0][dr; dg] = [f; gq] with A = Q R P' the current
// factorisation (gq and dg in s.cols order). dr overwrites f when needR.
func (s *lsSolver) corr(f, gq, h, dg []float64, needR bool) {
	q := len(s.cols)
	piv := s.piv()
	// h = R⁻ᵀ P' gq.
	for k := range q {
		h[k] = gq[piv[k]]
	}
	s.solveRT(h)
	// u = Qᵀ f.
	s.applyQT(f)
	// dgp = R⁻¹ (u[:q] − h).
	d := make([]float64, q)
	for k := range q {
		d[k] = f[k] - h[k]
	}
	s.solveR(d)
	for k := range q {
		dg[piv[k]] = d[k]
	}
	if needR {
		copy(f[:q], h)
		s.applyQ(f)
	}
}

// augResidual computes, in double-double arithmetic, f = √W(yb − X b) − r
// and g = c − Xᵀ√W r over the used rows and estimable columns.
func (s *lsSolver) augResidual(yb, c, beta, r, f, g []float64) {
	p := s.p
	gacc := make([]ddAcc, p)
	for _, j := range s.cols {
		if c != nil {
			gacc[j].hi = c[j]
		}
	}
	for k := range s.nu {
		i, sw := s.row(k)
		row := s.x[i*p : i*p+p]
		var e ddAcc
		if yb != nil {
			e.hi = yb[i]
		}
		for _, j := range s.cols {
			e.addProd(-row[j], beta[j])
		}
		rk := r[k]
		if s.w == nil {
			e.add(-rk)
			f[k] = e.hi + e.lo
			for _, j := range s.cols {
				gacc[j].addProd(-row[j], rk)
			}
			continue
		}
		var fw ddAcc
		fw.addProd(sw, e.hi)
		fw.add(sw * e.lo)
		fw.add(-rk)
		f[k] = fw.hi + fw.lo
		// u = sw·r as a double-double.
		uh, ul := twoProd(sw, rk)
		for _, j := range s.cols {
			gacc[j].addProd(-row[j], uh)
			gacc[j].add(-row[j] * ul)
		}
	}
	for j := range g {
		g[j] = gacc[j].hi + gacc[j].lo
	}
}

// residuals writes y − Xβ for every row into res.resid and sets res.rss
// and res.tss. The residuals are accumulated in double-double arithmetic
// when exact, or when the plain ones turn out small next to the outcome
// (cancellation, R² near 1), and with fused multiply-adds otherwise.
// Not-estimable coefficients are zero in beta, so every column can take
// part. The sums of squares are summed in float64 over runs of sumRun
// rows and the run totals in double-double arithmetic.
func (s *lsSolver) residuals(res *lsFit, beta []float64, exact bool) {
	p, x, y, dst := s.p, s.x, s.y, res.resid
	if !exact {
		for i := range s.n {
			row := x[i*p:][:p]
			b := beta[:len(row)]
			e := y[i]
			for j, v := range row {
				e = math.FMA(-v, b[j], e)
			}
			dst[i] = e
		}
		rss, _, yy := s.sums(res)
		exact = rss < 1e-4*yy
	}
	if exact {
		for i := range s.n {
			row := x[i*p:][:p]
			b := beta[:len(row)]
			acc := ddAcc{hi: y[i]}
			for j, v := range row {
				acc.addProd(-v, b[j])
			}
			dst[i] = acc.hi + acc.lo
		}
		s.sums(res)
	}
}

// sumRun is the number of rows summed in plain float64 before the run
// total goes into a double-double accumulator.
const sumRun = 4

// sums sets res.rss = Σ w e² and res.tss = Σ w (y − ȳ)² over the rows
// used, from the residuals in res.resid, and also returns Σ w y².
func (s *lsSolver) sums(res *lsFit) (rss, tss, yy float64) {
	y, e, ybar := s.y, res.resid, s.ybar
	var ar, at ddAcc
	var cy, ay float64
	for k0 := 0; k0 < s.nu; k0 += sumRun {
		var r, t, c, q float64
		k1 := min(k0+sumRun, s.nu)
		if s.w == nil {
			for i := k0; i < k1; i++ {
				ei, d := e[i], y[i]-ybar
				r += ei * ei
				t += d * d
				c += d
				q += y[i] * y[i]
			}
		} else {
			for k := k0; k < k1; k++ {
				i := s.used[k]
				wi := s.w[i]
				ei, d := e[i], y[i]-ybar
				r += wi * ei * ei
				t += wi * d * d
				c += wi * d
				q += wi * y[i] * y[i]
			}
		}
		ar.add(r)
		at.add(t)
		cy += c
		ay += q
	}
	if s.icpt >= 0 {
		// Corrected two-pass: remove what is left of the mean.
		at.add(-cy * cy / s.sumW)
	}
	res.rss = ar.hi + ar.lo
	res.tss = at.hi + at.lo
	return res.rss, res.tss, ay
}

// toDesign writes T P G Pᵀ Tᵀ into out (p×p, row-major) at the estimable
// rows and columns, for G q×q symmetric, row-major, in pivoted order.
func (s *lsSolver) toDesign(out, gp []float64) {
	p, q := s.p, len(s.cols)
	piv := s.piv()
	buf := growFloats(s.f3, 2*q*q+q*p+q+p)
	s.f3 = buf
	gq := buf[:q*q] // in s.cols order
	for a := range q {
		for b := range q {
			gq[piv[a]*q+piv[b]] = gp[a*q+b]
		}
	}
	buf = buf[q*q:]
	tmp := buf[:q*p] // row c: column c of T G, in design coordinates
	buf = buf[q*p:]
	gcol := buf[:q]
	buf = buf[q:]
	col := buf[:p]
	for c := range q {
		for a := range q {
			gcol[a] = gq[a*q+c]
		}
		s.tApply(col, gcol)
		copy(tmp[c*p:], col)
	}
	for _, i := range s.cols {
		for c := range q {
			gcol[c] = tmp[c*p+i]
		}
		s.tApply(col, gcol)
		for _, j := range s.cols {
			out[i*p+j] = col[j]
		}
	}
}

// unscaledCov returns (XᵀWX)⁻¹ over the estimable columns (NaN elsewhere),
// p×p row-major. With refine, each column is refined through the augmented
// system; otherwise it is T P R⁻¹R⁻ᵀ Pᵀ Tᵀ.
func (s *lsSolver) unscaledCov(refine bool) []float64 {
	p, q := s.p, len(s.cols)
	out := make([]float64, p*p)
	for k := range out {
		out[k] = math.NaN()
	}
	if q == 0 {
		return out
	}
	if refine {
		col := make([]float64, p)
		e := make([]float64, p)
		r := make([]float64, s.nu)
		for _, j := range s.cols {
			clear(e)
			clear(col)
			e[j] = -1
			clear(r)
			s.solveAug(nil, e, col, r, refineIters)
			for _, i := range s.cols {
				out[i*p+j] = col[i]
			}
		}
		// Symmetrise.
		for a, i := range s.cols {
			for _, j := range s.cols[a+1:] {
				v := (out[i*p+j] + out[j*p+i]) / 2
				out[i*p+j], out[j*p+i] = v, v
			}
		}
		return out
	}
	// G = R⁻¹R⁻ᵀ in pivoted order.
	u := s.rinv
	s.f2 = growFloats(s.f2, q*q)
	g := s.f2
	for a := range q {
		for b := a; b < q; b++ {
			var sum float64
			for k := b; k < q; k++ {
				sum += u[k*q+a] * u[k*q+b]
			}
			g[a*q+b], g[b*q+a] = sum, sum
		}
	}
	s.toDesign(out, g)
	return out
}

// sandwich fills res.cov with the HC covariance of kind spec.Cov.
// On the weighted scale, the meat is Σ ω_i z_i z_iᵀ in equilibrated
// coordinates, z_i = R⁻ᵀPᵀa_i for the weighted row a_i, with ω_i = v_i e_i²
// /(1−h_i)^δ, v_i = w_i for precision and 1 for frequency weights, and
// h_i = |z_i|² (divided by w_i for frequency weights: the leverage of one
// copy of the row). With copies, w_i = a_i·c_i, v_i = a_i and h_i = |z_i|²/c_i:
// c_i copies of weight a_i, each with meat a_i²e_i²x_ix_iᵀ and leverage
// a_i·x_iᵀ(XᵀWX)⁻¹x_i.
func (s *lsSolver) sandwich(res *lsFit) {
	p, q := s.p, len(s.cols)
	for k := range res.cov {
		res.cov[k] = math.NaN()
	}
	if q == 0 {
		return
	}
	kind := s.spec.Cov
	piv := s.piv()
	meat := make([]float64, q*q) // pivoted order, upper triangle
	z := make([]float64, q)
	a := make([]float64, q)
	jc := make([]int, q)
	mc := make([]float64, q)
	inv := make([]float64, q)
	for c := range q {
		j := s.cols[piv[c]]
		jc[c], mc[c], inv[c] = j, s.mean[j], 1/s.scale[j]
	}
	u := s.rinv
	for k := range s.nu {
		i, sw := s.row(k)
		row := s.x[i*p : i*p+p]
		for c, j := range jc {
			a[c] = sw * (row[j] - mc[c]) * inv[c]
		}
		// z = R⁻ᵀ a = (R⁻¹)ᵀ a: z_c = Σ_{l ≤ c} U[l][c] a_l.
		var h float64
		for c := range q {
			z[c] = floats.Dot(u[c*q:c*q+c+1], a[:c+1])
			h += z[c] * z[c]
		}
		wi := sw * sw
		v := wi
		if s.spec.Freq {
			h /= wi
			v = 1
		} else if s.copies {
			h /= s.c[i]
			v = s.a[i]
		}
		e := res.resid[i]
		om := v * e * e
		switch kind {
		case HC2:
			om /= 1 - h
		case HC3:
			om /= (1 - h) * (1 - h)
		}
		for a := range q {
			za := om * z[a]
			for b := a; b < q; b++ {
				meat[a*q+b] += za * z[b]
			}
		}
	}
	for a := range q {
		for b := a + 1; b < q; b++ {
			meat[b*q+a] = meat[a*q+b]
		}
	}
	// Cov_γ (pivoted) = R⁻¹ M R⁻ᵀ = U M Uᵀ.
	um := make([]float64, q*q)
	for r := range q {
		for c := range q {
			var sum float64
			for l := r; l < q; l++ {
				sum += u[l*q+r] * meat[l*q+c]
			}
			um[r*q+c] = sum
		}
	}
	cg := make([]float64, q*q)
	for r := range q {
		for c := r; c < q; c++ {
			var sum float64
			for l := c; l < q; l++ {
				sum += um[r*q+l] * u[l*q+c]
			}
			cg[r*q+c], cg[c*q+r] = sum, sum
		}
	}
	if kind == HC1 {
		df := res.nobs - float64(q)
		f := res.nobs / df
		if df <= 0 {
			f = math.NaN()
		}
		for k := range cg {
			cg[k] *= f
		}
	}
	s.toDesign(res.cov, cg)
}

// ddAcc is a double-double accumulator (hi + lo, |lo| ≤ ulp(hi)/2).
type ddAcc struct{ hi, lo float64 }

func twoSum(a, b float64) (s, e float64) {
	s = a + b
	bb := s - a
	e = (a - (s - bb)) + (b - bb)
	return s, e
}

func twoProd(a, b float64) (p, e float64) {
	p = a * b
	e = math.FMA(a, b, -p)
	return p, e
}

func (d *ddAcc) add(v float64) {
	s, e := twoSum(d.hi, v)
	e += d.lo
	d.hi = s + e
	d.lo = e - (d.hi - s)
}

func (d *ddAcc) addProd(a, b float64) {
	p, pe := twoProd(a, b)
	s, e := twoSum(d.hi, p)
	e += d.lo + pe
	d.hi = s + e
	d.lo = e - (d.hi - s)
}
