package fit

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/lapack"
	"gonum.org/v1/gonum/lapack/lapack64"
)

// This file holds the least-squares core shared by OLS and the batched
// paths: a rank-revealing Householder QR with column pivoting (LAPACK
// Dgeqp3) on the weighted, centred and equilibrated design, with
// iterative refinement of the augmented system (Björck 1967) using
// residuals accumulated in double-double arithmetic when the design is
// ill-conditioned.

// lsSpec configures leastSquares.
type lsSpec struct {
	Freq bool    // frequency weights (else precision)
	Tol  float64 // rank tolerance; 0 means max(rows, cols)·ε
	Cov  CovKind
	// Refine forces (1) or forbids (-1) iterative refinement; 0 applies it
	// when the equilibrated condition number exceeds refineCond.
	Refine int
}

// refineCond is the condition number (1-norm estimate, equilibrated design)
// above which leastSquares refines its solution and covariance.
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
	nobs      float64   // rows used: count of w > 0, or Σ w for frequency
	sumLogW   float64   // Σ log w over rows used (precision weights only)
	cond      float64   // 1-norm condition estimate of the equilibrated estimable design
	refined   bool
}

// leastSquares fits y on the n×p row-major design x with optional weights
// w (nil means all ones). It validates the data and returns a *DataError
// (Column 1-based, 0 for outcome or weights, Name "outcome" or "weights")
// for NaN, ±Inf or negative weights, an error wrapping ErrBadValue if every
// weight is zero, and one wrapping ErrTooFewRows if fewer rows have a
// positive weight than there are columns that are not constant. It panics
// on length mismatch. x, y and w are not modified or retained.
func leastSquares(x []float64, n, p int, y, w []float64, spec lsSpec) (*lsFit, error) {
	if len(x) != n*p {
		panic(fmt.Sprintf("fit: design has %d values, want %d×%d", len(x), n, p))
	}
	if len(y) != n {
		panic(fmt.Sprintf("fit: outcome has %d values, design has %d rows", len(y), n))
	}
	if w != nil && len(w) != n {
		panic(fmt.Sprintf("fit: weights have %d values, design has %d rows", len(w), n))
	}
	if p == 0 {
		panic("fit: design has no columns")
	}
	if !spec.Cov.valid() {
		panic(fmt.Sprintf("fit: invalid covariance kind %d", int(spec.Cov)))
	}
	if err := validate(x, n, p, y, w); err != nil {
		return nil, err
	}
	s := &lsSolver{x: x, n: n, p: p, y: y, w: w, spec: spec}
	return s.run()
}

// validate checks for NaN, infinite and negative values row by row.
func validate(x []float64, n, p int, y, w []float64) error {
	anyPos := w == nil
	for i := range n {
		row := x[i*p : i*p+p]
		for j, v := range row {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return &DataError{Row: i + 1, Column: j + 1, Value: v, Err: badValue(v)}
			}
		}
		if v := y[i]; math.IsNaN(v) || math.IsInf(v, 0) {
			return &DataError{Row: i + 1, Name: "outcome", Value: v, Err: badValue(v)}
		}
		if w != nil {
			v := w[i]
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return &DataError{Row: i + 1, Name: "weights", Value: v, Err: badValue(v)}
			}
			if v < 0 {
				return &DataError{Row: i + 1, Name: "weights", Value: v, Err: fmt.Errorf("negative weight: %w", ErrBadValue)}
			}
			if v > 0 {
				anyPos = true
			}
		}
	}
	if !anyPos && n > 0 {
		return fmt.Errorf("fit: weights: all %d weights are zero: %w", n, ErrBadValue)
	}
	return nil
}

func badValue(v float64) error {
	if math.IsNaN(v) {
		return fmt.Errorf("not a number: %w", ErrBadValue)
	}
	return fmt.Errorf("infinite value: %w", ErrBadValue)
}

// lsSolver holds the state of one fit.
type lsSolver struct {
	x       []float64
	n, p    int
	y, w    []float64
	spec    lsSpec
	used    []int     // rows with positive weight
	sw      []float64 // sqrt of the weight of each used row (nil: all 1)
	mean    []float64 // column means removed (0 for no intercept, and the intercept)
	scale   []float64 // column norms after weighting and centring
	icpt    int       // intercept column or -1
	icptVal float64   // its constant value
	cols    []int     // design columns of the factorised matrix, in order
	a       []float64 // len(used)×len(cols) factorised matrix (R and reflectors)
	tau     []float64
	piv     []int // R column k is cols[piv[k]]
	work    []float64
}

func (s *lsSolver) run() (*lsFit, error) {
	n, p := s.n, s.p
	// Rows used.
	if s.w == nil {
		s.used = make([]int, n)
		for i := range s.used {
			s.used[i] = i
		}
	} else {
		s.sw = make([]float64, 0, n)
		for i, v := range s.w {
			if v > 0 {
				s.used = append(s.used, i)
				s.sw = append(s.sw, math.Sqrt(v))
			}
		}
	}
	nu := len(s.used)
	res := &lsFit{n: n, p: p, intercept: -1}
	if s.w == nil || !s.spec.Freq {
		res.nobs = float64(nu)
	} else {
		var sum float64
		for _, v := range s.w {
			sum += v
		}
		res.nobs = sum
	}
	if s.w != nil && !s.spec.Freq {
		for _, i := range s.used {
			res.sumLogW += math.Log(s.w[i])
		}
	}

	s.columnStats()
	res.intercept = s.icpt

	// Candidate columns: those not constant (after centring) over the rows used.
	tol := s.spec.Tol
	if tol <= 0 {
		tol = float64(max(nu, p)) * epsilon
	}
	var cand []int
	for j := range p {
		if s.scale[j] > 0 {
			cand = append(cand, j)
		}
	}
	if nu < len(cand) || nu == 0 {
		return nil, fmt.Errorf("fit: %d rows with positive weight, %d columns to estimate: %w", nu, len(cand), ErrTooFewRows)
	}

	cols := cand
	rank := 0
	if len(cols) > 0 {
		rank = s.factor(cols, tol)
		if rank < len(cols) {
			// Prefer dropping later columns: choose the estimable set in
			// design order, then factorise that set alone.
			sel := s.selectInOrder(cols, tol)
			if len(sel) != rank {
				// Rare disagreement on a borderline column: trust the
				// pivoted factorisation.
				sel = sel[:0]
				for k := range rank {
					sel = append(sel, cols[s.piv[k]])
				}
				sortInts(sel)
			}
			cols = sel
			if r := s.factor(cols, tol); r != len(cols) {
				// Cannot happen in exact arithmetic; keep what is left.
				return nil, &ConditionError{Cond: math.Inf(1)}
			}
			rank = len(cols)
		}
	}
	s.cols = cols
	res.rank = rank
	res.estimable = make([]bool, p)
	for _, j := range cols {
		res.estimable[j] = true
	}
	if rank > 0 {
		res.cond = s.condition()
	}

	refine := s.spec.Refine > 0 || (s.spec.Refine == 0 && res.cond > refineCond)
	res.refined = refine
	iters := 0
	if refine {
		iters = refineIters
	}

	// Coefficients.
	beta := make([]float64, p)
	r := make([]float64, nu)
	if rank > 0 {
		s.solveAug(s.y, nil, beta, r, iters)
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

	// Residuals: in double-double when refined, or when the plain ones
	// turn out small next to the outcome (cancellation, R² near 1).
	res.resid = make([]float64, n)
	s.residuals(res.resid, beta, refine)
	if !refine {
		var ss, yy float64
		for k, i := range s.used {
			e, wi := res.resid[i], s.wt(k)
			ss += wi * e * e
			yy += wi * s.y[i] * s.y[i]
		}
		if ss < 1e-4*yy {
			s.residuals(res.resid, beta, true)
		}
	}
	var rss, tss ddAcc
	var ybar float64
	if s.icpt >= 0 {
		ybar = s.weightedMean(s.y)
	}
	for k, i := range s.used {
		e := res.resid[i]
		d := s.y[i] - ybar
		wi := 1.0
		if s.w != nil {
			wi = s.w[i]
		}
		_ = k
		rss.addProd(wi*e, e)
		tss.addProd(wi*d, d)
	}
	res.rss = rss.hi + rss.lo
	res.tss = tss.hi + tss.lo

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

// residuals writes y − Xβ for every row into dst, accumulated in
// double-double arithmetic when exact, with fused multiply-adds otherwise.
func (s *lsSolver) residuals(dst, beta []float64, exact bool) {
	p := s.p
	for i := range s.n {
		row := s.x[i*p : i*p+p]
		if exact {
			acc := ddAcc{hi: s.y[i]}
			for _, j := range s.cols {
				acc.addProd(-row[j], beta[j])
			}
			dst[i] = acc.hi + acc.lo
			continue
		}
		e := s.y[i]
		for _, j := range s.cols {
			e = math.FMA(-row[j], beta[j], e)
		}
		dst[i] = e
	}
}

// columnStats finds the intercept, the column means to remove and the
// column norms after weighting and centring.
func (s *lsSolver) columnStats() {
	p := s.p
	s.icpt = -1
	s.mean = make([]float64, p)
	s.scale = make([]float64, p)
	if len(s.used) == 0 {
		return
	}
	first := s.x[s.used[0]*p : s.used[0]*p+p]
	constant := make([]bool, p)
	for j := range p {
		constant[j] = true
	}
	for _, i := range s.used[1:] {
		row := s.x[i*p : i*p+p]
		for j, v := range row {
			if v != first[j] {
				constant[j] = false
			}
		}
	}
	for j := range p {
		if constant[j] && first[j] != 0 {
			s.icpt, s.icptVal = j, first[j]
			break
		}
	}
	// Weighted means and centred norms in two passes: the first sums, the
	// second accumulates deviations from the provisional mean and corrects
	// both the mean and the sum of squares (the corrected two-pass
	// algorithm of Chan, Golub & LeVeque 1983).
	var sumw float64
	if s.icpt >= 0 {
		for k, i := range s.used {
			wi := s.wt(k)
			sumw += wi
			row := s.x[i*p : i*p+p]
			for j, v := range row {
				s.mean[j] += wi * v
			}
		}
		for j := range p {
			s.mean[j] /= sumw
			if constant[j] {
				s.mean[j] = first[j]
			}
		}
		s.mean[s.icpt] = 0
	}
	raw := make([]float64, p)
	corr := make([]float64, p)
	for k, i := range s.used {
		wi := s.wt(k)
		row := s.x[i*p : i*p+p]
		for j, v := range row {
			d := v - s.mean[j]
			wd := wi * d
			corr[j] += wd
			s.scale[j] += wd * d
			raw[j] += wi * v * v
		}
	}
	for j := range p {
		if s.icpt >= 0 && j != s.icpt && !constant[j] {
			c := corr[j] / sumw
			s.mean[j] += c
			s.scale[j] -= c * corr[j]
		}
		s.scale[j] = math.Sqrt(max(s.scale[j], 0))
		raw[j] = math.Sqrt(raw[j])
		switch {
		case s.icpt >= 0 && j != s.icpt && constant[j]:
			s.scale[j] = 0 // constant: absorbed by the intercept
		case s.icpt >= 0 && j != s.icpt && s.scale[j] <= 8*epsilon*raw[j]:
			s.scale[j] = 0 // constant up to rounding
		}
	}
}

// wt returns the weight of the k-th used row.
func (s *lsSolver) wt(k int) float64 {
	if s.w == nil {
		return 1
	}
	return s.w[s.used[k]]
}

func (s *lsSolver) weightedMean(v []float64) float64 {
	var sum, sumw float64
	for k, i := range s.used {
		wi := s.wt(k)
		sum += wi * v[i]
		sumw += wi
	}
	m := sum / sumw
	var corr float64
	for k, i := range s.used {
		corr += s.wt(k) * (v[i] - m)
	}
	return m + corr/sumw
}

// fill writes the weighted, centred, equilibrated columns cols of the used
// rows into s.a (row-major, len(used)×len(cols)).
func (s *lsSolver) fill(cols []int) {
	nu, q, p := len(s.used), len(cols), s.p
	if cap(s.a) < nu*q {
		s.a = make([]float64, nu*q)
	}
	s.a = s.a[:nu*q]
	inv := make([]float64, q)
	for c, j := range cols {
		inv[c] = 1 / s.scale[j]
	}
	for k, i := range s.used {
		row := s.x[i*p : i*p+p]
		dst := s.a[k*q : k*q+q]
		sw := 1.0
		if s.sw != nil {
			sw = s.sw[k]
		}
		for c, j := range cols {
			dst[c] = sw * (row[j] - s.mean[j]) * inv[c]
		}
	}
}

// factor fills and factorises columns cols with Dgeqp3 and returns the
// numerical rank: the number of leading |R_kk| > tol·|R_00|.
func (s *lsSolver) factor(cols []int, tol float64) int {
	s.fill(cols)
	nu, q := len(s.used), len(cols)
	s.piv = make([]int, q)
	for k := range s.piv {
		s.piv[k] = -1
	}
	s.tau = make([]float64, min(nu, q))
	g := blas64.General{Rows: nu, Cols: q, Stride: q, Data: s.a}
	var wq [1]float64
	lapack64.Geqp3(g, s.piv, s.tau, wq[:], -1)
	lw := max(int(wq[0]), 3*q+1)
	if cap(s.work) < lw {
		s.work = make([]float64, lw)
	}
	lapack64.Geqp3(g, s.piv, s.tau, s.work[:lw], lw)
	r00 := math.Abs(s.a[0])
	rank := 0
	for k := range min(nu, q) {
		if math.Abs(s.a[k*q+k]) > tol*r00 {
			rank++
		} else {
			break
		}
	}
	return rank
}

// selectInOrder picks, in design order, the columns of cols not in the
// span of the columns kept before them (distance above tol, columns having
// unit norm), by classical Gram–Schmidt with reorthogonalisation.
func (s *lsSolver) selectInOrder(cols []int, tol float64) []int {
	s.fill(cols)
	nu, q := len(s.used), len(cols)
	basis := make([][]float64, 0, q)
	var sel []int
	v := make([]float64, nu)
	for c, j := range cols {
		for k := range nu {
			v[k] = s.a[k*q+c]
		}
		for range 2 {
			for _, b := range basis {
				d := blas64.Dot(vec(b), vec(v))
				blas64.Axpy(-d, vec(b), vec(v))
			}
		}
		nv := blas64.Nrm2(vec(v))
		if nv > tol {
			b := make([]float64, nu)
			for k := range nu {
				b[k] = v[k] / nv
			}
			basis = append(basis, b)
			sel = append(sel, j)
		}
	}
	return sel
}

func vec(v []float64) blas64.Vector { return blas64.Vector{N: len(v), Data: v, Inc: 1} }

func sortInts(v []int) {
	for i := 1; i < len(v); i++ {
		for k := i; k > 0 && v[k] < v[k-1]; k-- {
			v[k], v[k-1] = v[k-1], v[k]
		}
	}
}

// rTri returns the rank×rank upper triangle R of the factorisation.
func (s *lsSolver) rTri() blas64.Triangular {
	q := len(s.cols)
	return blas64.Triangular{Uplo: blas.Upper, Diag: blas.NonUnit, N: q, Stride: q, Data: s.a}
}

// condition estimates the 1-norm condition number of R.
func (s *lsSolver) condition() float64 {
	q := len(s.cols)
	work := make([]float64, 3*q)
	iwork := make([]int, q)
	rc := lapack64.Trcon(lapack.MaxColumnSum, s.rTri(), work, iwork)
	return 1 / rc
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
	nu, q, p := len(s.used), len(s.cols), s.p
	f := make([]float64, nu)
	g := make([]float64, p)
	gq := make([]float64, q)
	h := make([]float64, q)
	dg := make([]float64, q)
	db := make([]float64, p)
	needR := iters > 0
	for it := 0; it <= iters; it++ {
		if it == 0 {
			for k, i := range s.used {
				if yb == nil {
					f[k] = 0
				} else if s.sw == nil {
					f[k] = yb[i]
				} else {
					f[k] = s.sw[k] * yb[i]
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
	nu, q := len(s.used), len(s.cols)
	// h = R⁻ᵀ P' gq.
	for k := range q {
		h[k] = gq[s.piv[k]]
	}
	blas64.Trsv(blas.Trans, s.rTri(), vec(h))
	// u = Qᵀ f.
	s.applyQ(blas.Trans, f)
	// dgp = R⁻¹ (u[:q] − h).
	d := make([]float64, q)
	for k := range q {
		d[k] = f[k] - h[k]
	}
	blas64.Trsv(blas.NoTrans, s.rTri(), vec(d))
	for k := range q {
		dg[s.piv[k]] = d[k]
	}
	if needR {
		copy(f[:q], h)
		s.applyQ(blas.NoTrans, f)
	}
	_ = nu
}

// applyQ overwrites v (length len(used)) with Q v or Qᵀ v, applying the
// Householder reflectors H_k = I − τ_k u_k u_kᵀ stored below the diagonal
// of s.a (LAPACK layout, u_k[k] = 1).
func (s *lsSolver) applyQ(trans blas.Transpose, v []float64) {
	nu, q := len(s.used), len(s.cols)
	a := s.a
	apply := func(k int) {
		tau := s.tau[k]
		if tau == 0 {
			return
		}
		d := v[k]
		for i := k + 1; i < nu; i++ {
			d += a[i*q+k] * v[i]
		}
		d *= tau
		v[k] -= d
		for i := k + 1; i < nu; i++ {
			v[i] -= d * a[i*q+k]
		}
	}
	if trans == blas.Trans {
		for k := range q {
			apply(k)
		}
		return
	}
	for k := q - 1; k >= 0; k-- {
		apply(k)
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
	for k, i := range s.used {
		row := s.x[i*p : i*p+p]
		var e ddAcc
		if yb != nil {
			e.hi = yb[i]
		}
		for _, j := range s.cols {
			e.addProd(-row[j], beta[j])
		}
		rk := r[k]
		if s.sw == nil {
			e.add(-rk)
			f[k] = e.hi + e.lo
			for _, j := range s.cols {
				gacc[j].addProd(-row[j], rk)
			}
			continue
		}
		sw := s.sw[k]
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
	col := make([]float64, p)
	if refine {
		nu := len(s.used)
		e := make([]float64, p)
		r := make([]float64, nu)
		for _, j := range s.cols {
			for k := range e {
				e[k], col[k] = 0, 0
			}
			e[j] = -1
			for k := range r {
				r[k] = 0
			}
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
	// Rinv: R⁻¹ (upper), then G = Rinv Rinvᵀ in pivoted order.
	rinv := make([]float64, q*q)
	for k := range q {
		rinv[k*q+k] = 1
	}
	blas64.Trsm(blas.Left, blas.NoTrans, 1, s.rTri(), blas64.General{Rows: q, Cols: q, Stride: q, Data: rinv})
	gq := make([]float64, q*q) // in s.cols order
	for a := range q {
		for b := a; b < q; b++ {
			var sum float64
			for k := b; k < q; k++ {
				sum += rinv[a*q+k] * rinv[b*q+k]
			}
			ia, ib := s.piv[a], s.piv[b]
			gq[ia*q+ib], gq[ib*q+ia] = sum, sum
		}
	}
	// C = T G Tᵀ: apply T to the columns, then to the rows.
	tmp := make([]float64, q*p) // row c (cols order) = T applied to G row? build columns
	gcol := make([]float64, q)
	for c := range q {
		for a := range q {
			gcol[a] = gq[a*q+c]
		}
		for k := range col {
			col[k] = 0
		}
		s.tApply(col, gcol) // column c of T G, in design coordinates
		copy(tmp[c*p:], col)
	}
	// tmp[c][i] = (T G)[i][c]; C[i][·] = T applied to row i of (T G).
	for _, i := range s.cols {
		for c := range q {
			gcol[c] = tmp[c*p+i]
		}
		for k := range col {
			col[k] = 0
		}
		s.tApply(col, gcol)
		for _, j := range s.cols {
			out[i*p+j] = col[j]
		}
	}
	return out
}

// sandwich fills res.cov with the HC covariance of kind spec.Cov.
// On the weighted scale, the meat is Σ ω_i z_i z_iᵀ in equilibrated
// coordinates, z_i = R⁻ᵀPᵀa_i for the weighted row a_i, with ω_i = v_i e_i²
// /(1−h_i)^δ, v_i = w_i for precision and 1 for frequency weights, and
// h_i = |z_i|² (divided by w_i for frequency weights: the leverage of one
// copy of the row).
func (s *lsSolver) sandwich(res *lsFit) {
	p, q := s.p, len(s.cols)
	for k := range res.cov {
		res.cov[k] = math.NaN()
	}
	if q == 0 {
		return
	}
	delta := 0.0
	switch s.spec.Cov {
	case HC2:
		delta = 1
	case HC3:
		delta = 2
	}
	meat := make([]float64, q*q) // pivoted order, upper triangle
	z := make([]float64, q)
	inv := make([]float64, q)
	for k := range q {
		inv[k] = 1 / s.scale[s.cols[s.piv[k]]]
	}
	tri := s.rTri()
	for k, i := range s.used {
		row := s.x[i*p : i*p+p]
		sw := 1.0
		if s.sw != nil {
			sw = s.sw[k]
		}
		for c := range q {
			j := s.cols[s.piv[c]]
			z[c] = sw * (row[j] - s.mean[j]) * inv[c]
		}
		blas64.Trsv(blas.Trans, tri, vec(z))
		h := blas64.Dot(vec(z), vec(z))
		wi := sw * sw
		v := wi
		if s.spec.Freq {
			h /= wi
			v = 1
		}
		e := res.resid[i]
		om := v * e * e / math.Pow(1-h, delta)
		if delta == 0 {
			om = v * e * e
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
	// Cov_γ (pivoted) = R⁻¹ M R⁻ᵀ.
	mg := blas64.General{Rows: q, Cols: q, Stride: q, Data: meat}
	blas64.Trsm(blas.Left, blas.NoTrans, 1, tri, mg)
	blas64.Trsm(blas.Right, blas.Trans, 1, tri, mg)
	if s.spec.Cov == HC1 {
		df := res.nobs - float64(q)
		f := res.nobs / df
		if df <= 0 {
			f = math.NaN()
		}
		for k := range meat {
			meat[k] *= f
		}
	}
	// Unpivot into s.cols order, then apply T on both sides.
	gq := make([]float64, q*q)
	for a := range q {
		for b := range q {
			gq[s.piv[a]*q+s.piv[b]] = meat[a*q+b]
		}
	}
	col := make([]float64, p)
	gcol := make([]float64, q)
	tmp := make([]float64, q*p)
	for c := range q {
		for a := range q {
			gcol[a] = gq[a*q+c]
		}
		clear(col)
		s.tApply(col, gcol)
		copy(tmp[c*p:], col)
	}
	for _, i := range s.cols {
		for c := range q {
			gcol[c] = tmp[c*p+i]
		}
		clear(col)
		s.tApply(col, gcol)
		for _, j := range s.cols {
			res.cov[i*p+j] = col[j]
		}
	}
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

var _ = errors.New
