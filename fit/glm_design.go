package fit

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
)

// This file holds the input handling shared by Ridge and GLM (it reuses
// columnNames and badValue from the OLS files, so the messages match): a
// column-major copy of the design with its names, the checks on design,
// outcome and weights, intercept detection, and a column-order
// Householder QR with rank detection used for the weighted least-squares
// steps of IRLS.

// reason is the cause of a [DataError]: a short phrase that unwraps to
// [ErrBadValue].
type reason string

func (r reason) Error() string { return string(r) }
func (r reason) Unwrap() error { return ErrBadValue }

// estDesign is a validated, column-major copy of a design.
type estDesign struct {
	n, p  int
	cols  [][]float64 // cols[j][i] = x[i, j]
	names []string
	w     []float64 // prior weights, all ones when the caller gave none
	y     []float64 // the caller's outcome (not copied; never written)
	used  int       // rows with a positive weight
	sumW  float64
}

// columnar is implemented by column-stored designs such as features.Table.
type columnar interface {
	Column(j int) []float64
}

// readDesign copies x into column-major storage and checks x, y and
// weights. It panics with a "fit: " message when the lengths disagree or x
// has no columns
// (who names the estimator in the message) and returns a *DataError
// naming the first bad value, scanning columns in order, then the
// outcome, then the weights (so a bad outcome in row 2 is reported before
// a bad design value in row 9, unlike OLS, which scans row by row).
// All-zero weights give an error wrapping ErrBadValue.
func readDesign(who string, x mat.Matrix, y, weights []float64) (*estDesign, error) {
	n, p := x.Dims()
	if len(y) != n {
		panic(fmt.Sprintf("fit: %s: len(y) = %d, design has %d rows", who, len(y), n))
	}
	if weights != nil && len(weights) != n {
		panic(fmt.Sprintf("fit: %s: len(weights) = %d, design has %d rows", who, len(weights), n))
	}
	if p == 0 {
		panic(fmt.Sprintf("fit: %s: design has no columns", who))
	}
	d := &estDesign{n: n, p: p, cols: make([][]float64, p), names: columnNames(x, p), y: y}
	back := make([]float64, n*p)
	for j := range p {
		d.cols[j] = back[j*n : (j+1)*n : (j+1)*n]
	}
	switch m := x.(type) {
	case columnar:
		for j := range p {
			copy(d.cols[j], m.Column(j))
		}
	case *mat.Dense:
		raw := m.RawMatrix()
		for i := range n {
			row := raw.Data[i*raw.Stride : i*raw.Stride+p]
			for j, v := range row {
				d.cols[j][i] = v
			}
		}
	default:
		for i := range n {
			for j := range p {
				d.cols[j][i] = x.At(i, j)
			}
		}
	}
	for j, c := range d.cols {
		for i, v := range c {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, &DataError{Row: i + 1, Column: j + 1, Name: d.names[j], Value: v, Err: badValue(v)}
			}
		}
	}
	for i, v := range y {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, &DataError{Row: i + 1, Name: "outcome", Value: v, Err: badValue(v)}
		}
	}
	if weights == nil {
		d.w = make([]float64, n)
		for i := range d.w {
			d.w[i] = 1
		}
	} else {
		for i, v := range weights {
			switch {
			case math.IsNaN(v) || math.IsInf(v, 0):
				return nil, &DataError{Row: i + 1, Name: "weights", Value: v, Err: badValue(v)}
			case v < 0:
				return nil, &DataError{Row: i + 1, Name: "weights", Value: v, Err: fmt.Errorf("negative weight: %w", ErrBadValue)}
			}
		}
		d.w = weights
	}
	for _, v := range d.w {
		if v > 0 {
			d.used++
			d.sumW += v
		}
	}
	if d.used == 0 {
		return nil, fmt.Errorf("fit: %s: weights: all %d weights are zero: %w", who, n, ErrBadValue)
	}
	return d, nil
}

// applyCounts replaces the prior weights d.w by their products with the
// row multiplicities counts (len(counts) == d.n, checked by the caller)
// and recounts the rows used. It returns a *DataError named "counts" for
// a NaN, infinite or negative count, one named "weights" when a product
// overflows, and an error wrapping ErrBadValue when every product is
// zero. The caller's weights are not modified.
func (d *estDesign) applyCounts(counts []float64) error {
	for i, c := range counts {
		if err := checkWeight(i, c, "counts"); err != nil {
			return err
		}
	}
	w := make([]float64, d.n)
	d.used, d.sumW = 0, 0
	for i, c := range counts {
		v := d.w[i] * c
		if math.IsInf(v, 0) {
			return &DataError{Row: i + 1, Name: "weights", Value: v, Err: badValue(v)}
		}
		w[i] = v
		if v > 0 {
			d.used++
			d.sumW += v
		}
	}
	d.w = w
	if d.used == 0 {
		return fmt.Errorf("fit: GLM: every row has weight or count zero: %w", ErrBadValue)
	}
	return nil
}

// intercept returns the index of the first column that takes one and the
// same non-zero value in every row with a positive weight, or -1.
func (d *estDesign) intercept() int {
	for j, c := range d.cols {
		first, ok := math.NaN(), true
		for i, v := range c {
			if d.w[i] <= 0 {
				continue
			}
			if math.IsNaN(first) {
				first = v
			}
			if v != first {
				ok = false
				break
			}
		}
		if ok && first != 0 {
			return j
		}
	}
	return -1
}

// candidates returns the number of columns that could be estimated: the
// intercept, if any, and the columns that are not constant over the rows
// with a positive weight.
func (d *estDesign) candidates() int {
	icpt := d.intercept()
	k := 0
	for j, c := range d.cols {
		if j == icpt {
			k++
			continue
		}
		first, seen := 0.0, false
		for i, v := range c {
			if d.w[i] <= 0 {
				continue
			}
			if !seen {
				first, seen = v, true
			} else if v != first {
				k++
				break
			}
		}
	}
	return k
}

// orderedQR is a Householder QR of an n × p matrix (column-major) that
// takes the columns in their given order and skips a column whose part
// orthogonal to the columns kept before it has a norm of at most tol
// times its own norm (tol is rankTol for IRLS steps). Skipped columns are not estimable. Unlike
// full pivoting by column norm, this keeps the earlier of two collinear
// columns, so the column reported as not estimable is always the later
// one (a zero column is always skipped).
type orderedQR struct {
	n     int
	a     [][]float64 // reflectors below the diagonal, R on and above it, in kept order
	tau   []float64
	kept  []int // design indices of the kept columns, in order
	alias []bool
}

// rankTol is the relative tolerance of orderedQR's rank decision.
const rankTol = 1e-7

// factorize computes the QR of the columns cols (each of length n, all
// copied into q's storage; cols is not modified) with relative rank
// tolerance tol; with tol 0 only columns that become exactly zero are
// skipped.
func (q *orderedQR) factorize(cols [][]float64, tol float64) {
	n, p := len(cols[0]), len(cols)
	q.n = n
	if cap(q.a) < p {
		q.a = make([][]float64, p)
		q.tau = make([]float64, p)
		q.alias = make([]bool, p)
	}
	q.a, q.tau, q.alias = q.a[:p], q.tau[:p], q.alias[:p]
	q.kept = q.kept[:0]
	for j := range p {
		if cap(q.a[j]) < n {
			q.a[j] = make([]float64, n)
		}
		q.a[j] = q.a[j][:n]
	}
	k := 0 // rows 0..k-1 are done
	for j := range p {
		col := q.a[k] // storage slot for the k-th kept column
		copy(col, cols[j])
		norm0 := norm2(col)
		// apply the reflectors found so far
		for r := range k {
			applyReflector(q.a[r][r:], q.tau[r], col[r:])
		}
		rest := norm2(col[k:])
		if norm0 == 0 || rest <= tol*norm0 || k == n {
			q.alias[j] = true
			continue
		}
		q.alias[j] = false
		// reflector for col[k:], sending it to (beta, 0, ..., 0)
		alpha := col[k]
		beta := -math.Copysign(rest, alpha)
		q.tau[k] = (beta - alpha) / beta
		scale := 1 / (alpha - beta)
		for i := k + 1; i < n; i++ {
			col[i] *= scale
		}
		col[k] = beta
		q.kept = append(q.kept, j)
		k++
	}
}

// applyReflector applies H = I − tau v vᵀ, v = (1, vs[1:]...), to x.
func applyReflector(vs []float64, tau float64, x []float64) {
	if tau == 0 {
		return
	}
	s := tau * (x[0] + floats.Dot(vs[1:], x[1:]))
	x[0] -= s
	floats.AddScaled(x[1:], -s, vs[1:])
}

// norm2 returns the Euclidean norm of x, rescaling only when the plain
// sum of squares underflows or overflows.
func norm2(x []float64) float64 {
	ss := floats.Dot(x, x)
	if ss > 0x1p-900 && ss < 0x1p900 {
		return math.Sqrt(ss)
	}
	if ss == 0 {
		return 0
	}
	scale := 0.0
	for _, v := range x {
		scale = math.Max(scale, math.Abs(v))
	}
	ss = 0
	for _, v := range x {
		ss += (v / scale) * (v / scale)
	}
	return scale * math.Sqrt(ss)
}

// solve returns the least-squares coefficients for right-hand side b
// (length n, overwritten with Qᵀb) in dst (length p, design order);
// skipped columns get 0.
func (q *orderedQR) solve(dst, b []float64) {
	k := len(q.kept)
	for r := range k {
		applyReflector(q.a[r][r:], q.tau[r], b[r:])
	}
	for j := range dst {
		dst[j] = 0
	}
	// back substitution with R (R[r][c] = q.a[c][r] for r <= c)
	for r := k - 1; r >= 0; r-- {
		s := b[r]
		for c := r + 1; c < k; c++ {
			s -= q.a[c][r] * dst[q.kept[c]]
		}
		dst[q.kept[r]] = s / q.a[r][r]
	}
}

// unscaledCov writes (RᵀR)⁻¹ for the kept columns into cov (p × p,
// design order); rows and columns of skipped columns are NaN.
func (q *orderedQR) unscaledCov(cov *mat.SymDense) {
	k := len(q.kept)
	// Rinv is upper triangular, Rinv[r][c] for r <= c
	rinv := make([]float64, k*k)
	for c := range k {
		rinv[c*k+c] = 1 / q.a[c][c]
		for r := c - 1; r >= 0; r-- {
			s := 0.0
			for m := r + 1; m <= c; m++ {
				s += q.a[m][r] * rinv[m*k+c]
			}
			rinv[r*k+c] = -s / q.a[r][r]
		}
	}
	p := len(q.alias)
	for i := range p {
		for j := i; j < p; j++ {
			cov.SetSym(i, j, math.NaN())
		}
	}
	for a := range k {
		for b := a; b < k; b++ {
			s := 0.0
			for m := b; m < k; m++ {
				s += rinv[a*k+m] * rinv[b*k+m]
			}
			cov.SetSym(q.kept[a], q.kept[b], s)
		}
	}
}
