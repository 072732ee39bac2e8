package fit

import (
	"math"

	"github.com/kalends/kalends/internal/blockxp"
)

// xpLayout is the layout of one row's cross-product vector z over the kept
// design columns (in standardised units u, outcome v, precision weight w):
//
//	z[tri(a,b)]     = w·u_a·u_b   for a ≤ b      (pp = k(k+1)/2 entries)
//	z[pp+a]         = w·u_a·v                    (k entries)
//	z[pp+k]         = w·v²
//	z[pp+k+1]       = 1 if w > 0, else 0         (the row count)
//
// A replicate's sums of z weighted by its row counts are its sufficient
// statistics: XᵀWX, XᵀWy, yᵀWy and the number of rows used.
type xpLayout struct {
	k    int // kept columns
	pp   int // k(k+1)/2
	q    int // pp + k + 2
	qpad int // q rounded up to a multiple of blockxp.Strip
}

func newLayout(k int) xpLayout {
	l := xpLayout{k: k, pp: k * (k + 1) / 2}
	l.q = l.pp + k + 2
	l.qpad = (l.q + blockxp.Strip - 1) / blockxp.Strip * blockxp.Strip
	return l
}

// fill writes z for one standardised row u into z[:q].
func (l xpLayout) fill(z, u []float64, v, w float64) {
	z = z[:l.q]
	u = u[:l.k]
	t := 0
	for a, ua := range u {
		wa := w * ua
		ub := u[a:]
		zt := z[t : t+len(ub)]
		for b, x := range ub {
			zt[b] = wa * x
		}
		t += len(ub)
	}
	wv := w * v
	for a, ua := range u {
		z[l.pp+a] = wv * ua
	}
	z[l.pp+l.k] = wv * v
	if w > 0 {
		z[l.pp+l.k+1] = 1
	} else {
		z[l.pp+l.k+1] = 0
	}
}

// stdMap maps the kept standardised columns back to the design.
type stdMap struct {
	std  Standardization
	kept []int // design column of each kept column, increasing
	icpt int   // kept index of the intercept, −1 if none
	p    int   // design columns
}

func newStdMap(std Standardization, kept []int) stdMap {
	m := stdMap{std: std, kept: kept, icpt: -1, p: len(std.Centre)}
	for a, j := range kept {
		if j == std.Intercept {
			m.icpt = a
		}
	}
	return m
}

// standardise writes the kept standardised values of the design row x into
// u and returns the standardised outcome.
func (m stdMap) standardise(u, x []float64, y float64) float64 {
	c, s := m.std.Centre, m.std.Scale
	for a, j := range m.kept {
		u[a] = (x[j] - c[j]) / s[j]
	}
	return (y - m.std.YCentre) / m.std.YScale
}

// toStd converts design-unit coefficients (NaN meaning not estimable, read
// as zero) to standardised coefficients over the kept columns.
func (m stdMap) toStd(dst, beta []float64) {
	st := m.std
	sy := st.YScale
	var shift float64
	for a, j := range m.kept {
		bj := beta[j]
		if math.IsNaN(bj) {
			bj = 0
		}
		if a == m.icpt {
			continue
		}
		dst[a] = bj * st.Scale[j] / sy
		shift += dst[a] * st.Centre[j] / st.Scale[j]
	}
	if m.icpt >= 0 {
		j := m.kept[m.icpt]
		bj := beta[j]
		if math.IsNaN(bj) {
			bj = 0
		}
		dst[m.icpt] = (bj*st.Scale[j]-st.YCentre)/sy + shift
	}
}

// solveWork is scratch space for one replicate's solve; one per goroutine.
type solveWork struct {
	a, inv  []float64 // k×k
	d, g, b []float64 // k
	m       []float64 // k, allocated on first use
}

func newSolveWork(k int) *solveWork {
	return &solveWork{a: make([]float64, k*k), inv: make([]float64, k*k), d: make([]float64, k), g: make([]float64, k), b: make([]float64, k)}
}

// repFit is one replicate's result in design units.
type repFit struct {
	coef, se  []float64 // p, NaN where not estimable
	estimable []bool    // p
	rows      float64
	rank      int
	residSE   float64
	cond      float64
}

// solve solves one replicate's normal equations from its sums of z (length
// ≥ q) by a Cholesky factorisation of the equilibrated cross-product matrix.
// It reports false, leaving out untouched, when the system is not safe to
// solve that way: a column with no weight, a factorisation that breaks
// down, an estimated 1-norm condition number above condLimit, or no
// residual degrees of freedom. Coefficients in the columns that were not
// kept are NaN and not estimable.
func (m stdMap) solve(l xpLayout, sums []float64, condLimit float64, w *solveWork, out *repFit) bool {
	k := l.k
	a, inv, d, g, b := w.a, w.inv, w.d, w.g, w.b
	rows := sums[l.pp+k+1]
	if rows-float64(k) <= 0 {
		return false
	}
	t := 0
	for i := range k {
		for j := i; j < k; j++ {
			a[i*k+j] = sums[t]
			a[j*k+i] = sums[t]
			t++
		}
	}
	cond, ok := cholEquilibrated(a, k, d, inv, b)
	if !ok {
		return false
	}
	if !(cond <= condLimit) {
		return false
	}
	for i := range k {
		g[i] = sums[l.pp+i] / d[i]
	}
	cholSolve(a, k, g)
	for i := range k {
		b[i] = g[i] / d[i]
	}
	rss := sums[l.pp+k]
	for i := range k {
		rss -= b[i] * sums[l.pp+i]
	}
	rss = max(rss, 0)
	df := rows - float64(k)
	s2 := rss / df // in standardised outcome units
	// Back to design units: β = M·b (+ shift for the intercept).
	st := m.std
	sy := st.YScale
	for j := range m.p {
		out.coef[j], out.se[j], out.estimable[j] = math.NaN(), math.NaN(), false
	}
	var shift float64
	for a2, j := range m.kept {
		out.estimable[j] = true
		if a2 == m.icpt {
			continue
		}
		out.coef[j] = sy * b[a2] / st.Scale[j]
		v := inv[a2*k+a2] / (d[a2] * d[a2]) * s2
		out.se[j] = sy * math.Sqrt(v) / math.Abs(st.Scale[j])
		shift += b[a2] * st.Centre[j] / st.Scale[j]
	}
	if m.icpt >= 0 {
		j := m.kept[m.icpt]
		c0 := st.Scale[j]
		out.coef[j] = (st.YCentre + sy*(b[m.icpt]-shift)) / c0
		// Row of M for the intercept: h_a = −Centre/Scale, h_icpt = 1
		// (times sy/c0); var = hᵀ·Cov_b·h.
		for a2, jj := range m.kept {
			if a2 == m.icpt {
				d[a2] = 1 / d[a2]
			} else {
				d[a2] = -st.Centre[jj] / st.Scale[jj] / d[a2]
			}
		}
		v := 0.0
		for a2 := range k {
			s := 0.0
			for b2 := range k {
				s += inv[a2*k+b2] * d[b2]
			}
			v += d[a2] * s
		}
		out.se[j] = sy * math.Sqrt(max(v, 0)*s2) / math.Abs(c0)
	}
	out.rows = rows
	out.rank = k
	out.residSE = sy * math.Sqrt(s2)
	out.cond = cond
	return true
}

// cholSolve overwrites x with (L·Lᵀ)⁻¹x, L in the lower triangle of a.
func cholSolve(a []float64, k int, x []float64) {
	for i := range k {
		s := x[i]
		for c := range i {
			s -= a[i*k+c] * x[c]
		}
		x[i] = s / a[i*k+i]
	}
	for i := k - 1; i >= 0; i-- {
		s := x[i]
		for c := i + 1; c < k; c++ {
			s -= a[c*k+i] * x[c]
		}
		x[i] = s / a[i*k+i]
	}
}

// cholEquilibrated equilibrates the symmetric k × k matrix a (row-major,
// both triangles) by d = √diag(a), factorises it as L·Lᵀ in place (L in
// the lower triangle), writes its inverse into inv and returns its
// estimated 1-norm condition number. It reports false if a diagonal entry
// is not positive or the factorisation breaks down. b is scratch.
func cholEquilibrated(a []float64, k int, d, inv, b []float64) (float64, bool) {
	for i := range k {
		if !(a[i*k+i] > 0) {
			return 0, false
		}
		d[i] = math.Sqrt(a[i*k+i])
	}
	norm1 := 0.0
	for i := range k {
		s := 0.0
		for j := range k {
			a[i*k+j] /= d[i] * d[j]
			s += math.Abs(a[i*k+j])
		}
		norm1 = max(norm1, s)
	}
	for j := range k {
		s := a[j*k+j]
		for c := range j {
			s -= a[j*k+c] * a[j*k+c]
		}
		if !(s > 0) {
			return 0, false
		}
		ljj := math.Sqrt(s)
		a[j*k+j] = ljj
		for i := j + 1; i < k; i++ {
			s := a[i*k+j]
			for c := range j {
				s -= a[i*k+c] * a[j*k+c]
			}
			a[i*k+j] = s / ljj
		}
	}
	for c := range k {
		clear(b[:k])
		b[c] = 1
		cholSolve(a, k, b)
		for i := range k {
			inv[i*k+c] = b[i]
		}
	}
	ninv := 0.0
	for i := range k {
		s := 0.0
		for j := range k {
			s += math.Abs(inv[i*k+j])
		}
		ninv = max(ninv, s)
	}
	return norm1 * ninv, true
}
