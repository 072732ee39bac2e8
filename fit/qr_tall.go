package fit

import (
	"math"

	"gonum.org/v1/gonum/floats"
)

// This file holds the two Householder QR kernels behind leastSquares.
//
// tallQR factorises a tall n×m matrix without pivoting, one block of rows
// at a time (sequential TSQR): block 0 gets an ordinary Householder QR,
// whose upper triangle R then absorbs every later block B through the
// structured factorisation of [R; B], whose reflectors touch one row of R
// and the rows of B. Each block is stored column-major and is small enough
// to stay in the first-level cache while it is reduced, so the work runs
// on contiguous columns with gonum's assembly dot and axpy kernels. The
// product of the reflectors is an n×n orthogonal Q with A = Q [R; 0],
// where the rows of R are the first rows of block 0.
//
// pivQR is the Householder QR with column pivoting of Businger & Golub
// (1965) for the small matrices that come out of tallQR: column norms are
// recomputed at every step rather than downdated, which costs the same
// order of work as the factorisation itself on a matrix with as many rows
// as columns and needs no safeguard against cancellation.
//
// Because Q is orthogonal, pivoting on R rather than on A chooses the same
// columns and reveals the same rank in exact arithmetic, and the
// unpivoted Householder QR is column-wise backward stable, so the pivoted
// factorisation of R is a rank-revealing QR of a matrix within a few
// units of rounding of A, column by column (Higham 2002, §19.3).

// tallBlockValues is the number of float64 values a block of tallQR aims
// to hold (24 KiB, within a 32 KiB first-level data cache).
const tallBlockValues = 3072

// tallQR is an unpivoted Householder QR of a tall n×m matrix held in row
// blocks. Only the first k columns are reduced; columns k..m-1 (right-hand
// sides) are transformed by the same reflectors, so they hold Qᵀb. The
// zero value is ready for reset.
type tallQR struct {
	n, m, k int
	b       int       // rows per block (the last block may be shorter)
	data    []float64 // block t: rows t*b ..., column-major with its own row count as stride
	tau     []float64 // reflector scalars, k per block
}

// tallBlockRows returns the block height for an n×m matrix with k
// reflectors: about tallBlockValues/m rows, at least k (block 0 holds R)
// and at least 16.
func tallBlockRows(n, m, k int) int {
	b := max(tallBlockValues/max(m, 1), k, 16)
	return min(b, max(n, 1))
}

// reset sizes f for an n×m matrix with k ≤ min(n, m) reflectors and
// returns the storage, reusing buf when it is large enough. The caller
// fills block t (see block) and calls factorBlock(t) for t = 0, 1, ... in
// order.
func (f *tallQR) reset(n, m, k int, buf []float64) {
	f.n, f.m, f.k = n, m, k
	f.b = tallBlockRows(n, m, k)
	f.data = growFloats(buf, n*m)
	f.tau = growFloats(f.tau, f.blocks()*k)
}

// blocks returns the number of row blocks.
func (f *tallQR) blocks() int {
	if f.n == 0 {
		return 0
	}
	return (f.n + f.b - 1) / f.b
}

// block returns the first row, the row count and the column-major storage
// (stride rows) of block t.
func (f *tallQR) block(t int) (first, rows int, a []float64) {
	first = t * f.b
	rows = min(f.b, f.n-first)
	return first, rows, f.data[first*f.m : (first+rows)*f.m]
}

// rAt returns R[i][j] (i ≤ j < m; for j ≥ k, the transformed right-hand
// side).
func (f *tallQR) rAt(i, j int) float64 {
	_, rows, a := f.block(0)
	return a[j*rows+i]
}

// factorBlock reduces block t, which the caller has filled.
func (f *tallQR) factorBlock(t int) {
	_, rows, a := f.block(t)
	m, k := f.m, f.k
	tau := f.tau[t*k : t*k+k]
	if t == 0 {
		for c := range k {
			col := a[c*rows : c*rows+rows]
			tc, beta := reflector(col[c], col[c+1:])
			tau[c] = tc
			if tc == 0 {
				continue
			}
			col[c] = beta
			v := col[c+1:]
			for j := c + 1; j < m; j++ {
				cj := a[j*rows : j*rows+rows]
				w := tc * (cj[c] + floats.Dot(v, cj[c+1:]))
				cj[c] -= w
				floats.AddScaled(cj[c+1:], -w, v)
			}
		}
		return
	}
	_, r0, top := f.block(0)
	for c := range k {
		v := a[c*rows : c*rows+rows]
		rc := c*r0 + c
		tc, beta := reflector(top[rc], v)
		tau[c] = tc
		if tc == 0 {
			continue
		}
		top[rc] = beta
		for j := c + 1; j < m; j++ {
			cj := a[j*rows : j*rows+rows]
			rj := j*r0 + c
			w := tc * (top[rj] + floats.Dot(v, cj))
			top[rj] -= w
			floats.AddScaled(cj, -w, v)
		}
	}
}

// applyQT overwrites v (length n) with Qᵀv.
func (f *tallQR) applyQT(v []float64) {
	k := f.k
	for t := range f.blocks() {
		first, rows, a := f.block(t)
		tau := f.tau[t*k : t*k+k]
		if t == 0 {
			for c := range k {
				if tc := tau[c]; tc != 0 {
					u := a[c*rows+c+1 : c*rows+rows]
					w := tc * (v[c] + floats.Dot(u, v[c+1:rows]))
					v[c] -= w
					floats.AddScaled(v[c+1:rows], -w, u)
				}
			}
			continue
		}
		vb := v[first : first+rows]
		for c := range k {
			if tc := tau[c]; tc != 0 {
				u := a[c*rows : c*rows+rows]
				w := tc * (v[c] + floats.Dot(u, vb))
				v[c] -= w
				floats.AddScaled(vb, -w, u)
			}
		}
	}
}

// applyQ overwrites v (length n) with Qv.
func (f *tallQR) applyQ(v []float64) {
	k := f.k
	for t := f.blocks() - 1; t >= 0; t-- {
		first, rows, a := f.block(t)
		tau := f.tau[t*k : t*k+k]
		if t == 0 {
			for c := k - 1; c >= 0; c-- {
				if tc := tau[c]; tc != 0 {
					u := a[c*rows+c+1 : c*rows+rows]
					w := tc * (v[c] + floats.Dot(u, v[c+1:rows]))
					v[c] -= w
					floats.AddScaled(v[c+1:rows], -w, u)
				}
			}
			continue
		}
		vb := v[first : first+rows]
		for c := k - 1; c >= 0; c-- {
			if tc := tau[c]; tc != 0 {
				u := a[c*rows : c*rows+rows]
				w := tc * (v[c] + floats.Dot(u, vb))
				v[c] -= w
				floats.AddScaled(vb, -w, u)
			}
		}
	}
}

// reflector computes an elementary reflector H = I − τ u uᵀ, u = (1, x'),
// with H (alpha, x) = (beta, 0), as LAPACK's Dlarfg: it overwrites x with
// x' and returns τ and beta. τ = 0 (H = I) when x is zero.
func reflector(alpha float64, x []float64) (tau, beta float64) {
	xn := nrm2(x)
	if xn == 0 {
		return 0, alpha
	}
	beta = -math.Copysign(math.Hypot(alpha, xn), alpha)
	tau = (beta - alpha) / beta
	floats.Scale(1/(alpha-beta), x)
	return tau, beta
}

// nrm2 returns the Euclidean norm of x, rescaling only when the plain sum
// of squares is outside the range where it is exact to rounding.
func nrm2(x []float64) float64 {
	ss := floats.Dot(x, x)
	if ss > 0x1p-900 && ss < 0x1p900 {
		return math.Sqrt(ss)
	}
	var scale float64
	for _, v := range x {
		scale = math.Max(scale, math.Abs(v))
	}
	if scale == 0 || math.IsInf(scale, 0) {
		return scale
	}
	ss = 0
	for _, v := range x {
		ss += (v / scale) * (v / scale)
	}
	return scale * math.Sqrt(ss)
}

// pivQR is a Householder QR with column pivoting of a small rows×cols
// matrix, column-major with stride rows. After factor, R is on and above
// the diagonal, the reflectors below it, and column c of R is column
// piv[c] of the input. The zero value is ready for reset.
type pivQR struct {
	rows, cols int
	a          []float64
	tau        []float64
	piv        []int
	nrm        []float64
}

// reset sizes f for a rows×cols matrix (rows ≥ cols) and returns its
// storage for the caller to fill.
func (f *pivQR) reset(rows, cols int) []float64 {
	f.rows, f.cols = rows, cols
	f.a = growFloats(f.a, rows*cols)
	f.tau = growFloats(f.tau, cols)
	f.nrm = growFloats(f.nrm, cols)
	if cap(f.piv) < cols {
		f.piv = make([]int, cols)
	}
	f.piv = f.piv[:cols]
	return f.a
}

// factor factorises the matrix filled after reset. At step c the column
// of largest remaining norm (the first of equals) is moved to position c.
func (f *pivQR) factor() {
	rows, cols, a := f.rows, f.cols, f.a
	for c := range f.piv {
		f.piv[c] = c
	}
	for c := range min(rows, cols) {
		best, bn := c, -1.0
		for j := c; j < cols; j++ {
			n := nrm2(a[j*rows+c : j*rows+rows])
			if n > bn {
				best, bn = j, n
			}
		}
		if best != c {
			ca, cb := a[c*rows:c*rows+rows], a[best*rows:best*rows+rows]
			for i := range ca {
				ca[i], cb[i] = cb[i], ca[i]
			}
			f.piv[c], f.piv[best] = f.piv[best], f.piv[c]
		}
		col := a[c*rows : c*rows+rows]
		tc, beta := reflector(col[c], col[c+1:])
		f.tau[c] = tc
		if tc == 0 {
			continue
		}
		col[c] = beta
		v := col[c+1:]
		for j := c + 1; j < cols; j++ {
			cj := a[j*rows : j*rows+rows]
			w := tc * (cj[c] + floats.Dot(v, cj[c+1:]))
			cj[c] -= w
			floats.AddScaled(cj[c+1:], -w, v)
		}
	}
}

// rAt returns R[i][j].
func (f *pivQR) rAt(i, j int) float64 { return f.a[j*f.rows+i] }

// applyQT overwrites v (length rows) with Qᵀv.
func (f *pivQR) applyQT(v []float64) {
	rows := f.rows
	for c := range min(rows, f.cols) {
		if tc := f.tau[c]; tc != 0 {
			u := f.a[c*rows+c+1 : c*rows+rows]
			w := tc * (v[c] + floats.Dot(u, v[c+1:]))
			v[c] -= w
			floats.AddScaled(v[c+1:], -w, u)
		}
	}
}

// applyQ overwrites v (length rows) with Qv.
func (f *pivQR) applyQ(v []float64) {
	rows := f.rows
	for c := min(rows, f.cols) - 1; c >= 0; c-- {
		if tc := f.tau[c]; tc != 0 {
			u := f.a[c*rows+c+1 : c*rows+rows]
			w := tc * (v[c] + floats.Dot(u, v[c+1:]))
			v[c] -= w
			floats.AddScaled(v[c+1:], -w, u)
		}
	}
}

// growFloats returns buf resliced to n values, or a new slice if buf is
// too small. The values are not cleared.
func growFloats(buf []float64, n int) []float64 {
	if cap(buf) < n {
		return make([]float64, n)
	}
	return buf[:n]
}
