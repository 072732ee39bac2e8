package fit

import (
	"fmt"
	"math"
)

// Ridge replicates in Batch.
//
// Replicate r's ridge fit standardises its columns by its own weighted
// means and standard deviations (divisor Σw, see [Ridge]). In the batch's
// units u (the full-data Standardization) those are affine in u, so the
// replicate's centred cross-products C = Σcw(u − ū)(u − ū)ᵀ and
// c = Σcw(u − ū)(v − v̄) come from the same sums as OLS's, and with
// d_a² = C_aa/Σcw the replicate's standardised coefficients b_a = γ_a·d_a
// (γ in batch units) solve
//
//	(C + Lambda·diag(d²)) γ = c,
//
// since Σcw(v − v̄ − (u − ū)γ)² + Lambda·Σ(γ_a d_a)² is Ridge's objective
// divided by YScale².

// ridgeColumns returns the columns the batched ridge path keeps (the
// intercept and every column that is not constant on the whole data; a
// constant one standardises to exactly zero) and whether the whole data's
// system passes the conditioning check.
func (e *batchEngine) ridgeColumns(std Standardization) ([]int, bool) {
	p := e.src.p
	all := make([]int, p)
	for j := range all {
		all[j] = j
	}
	sums := e.fullDataSums(std, all)
	l := newLayout(p)
	var kept []int
	t := 0
	for a := range p {
		if a == std.Intercept || sums[t] > 0 {
			kept = append(kept, a)
		}
		t += p - a
	}
	if len(kept) == 0 {
		return all, false
	}
	if len(kept) < p {
		sums = e.fullDataSums(std, kept)
		l = newLayout(len(kept))
	}
	out := newRepFit(p)
	m := newStdMap(std, kept)
	return kept, m.solveRidge(l, sums, e.bt.Ridge.Lambda, e.condLimit, newSolveWork(len(kept)), &out)
}

// fullDataSums returns the whole data's sums of z over the kept columns.
func (e *batchEngine) fullDataSums(std Standardization, kept []int) []float64 {
	m := newStdMap(std, kept)
	l := newLayout(len(kept))
	sums := make([]float64, l.q)
	z := make([]float64, l.q)
	row := make([]float64, e.src.p)
	u := make([]float64, len(kept))
	for i := range e.src.n {
		e.src.row(i, row)
		v := m.standardise(u, row, e.y[i])
		l.fill(z, u, v, e.weight(i))
		for t, zt := range z {
			sums[t] += zt
		}
	}
	return sums
}

// solveRidge solves one replicate's ridge system from its sums of z. It
// reports false, leaving out untouched, when that is not safe: no
// intercept (a column constant in the replicate could then become Ridge's
// intercept there, which the sums cannot tell), no weight, a kept column
// whose replicate variance is below 10⁻⁸ of its second moment (constant in
// the replicate, or nearly: the QR path decides whether it is estimable and
// which column is the intercept), a failed Cholesky factorisation, or an
// estimated condition number above condLimit.
func (m stdMap) solveRidge(l xpLayout, sums []float64, lambda, condLimit float64, w *solveWork, out *repFit) bool {
	k := l.k
	a, inv, d, g, b := w.a, w.inv, w.d, w.g, w.b
	ic := m.icpt
	if ic < 0 {
		return false
	}
	sumW := sums[triIndex(k, ic, ic)]
	if !(sumW > 0) {
		return false
	}
	// Replicate means in batch units.
	mu := w.mu(k)
	for c := range k {
		mu[c] = sums[triIndex(k, min(c, ic), max(c, ic))] / sumW
	}
	mu[ic] = 0
	muV := sums[l.pp+ic] / sumW
	// The penalised system over the columns other than the intercept,
	// written into a over all k (the intercept's row and column unit).
	for i := range k {
		for j := i; j < k; j++ {
			s := sums[triIndex(k, i, j)]
			if i == ic || j == ic {
				s = 0
				if i == j {
					s = 1
				}
			} else {
				s -= sumW * mu[i] * mu[j]
			}
			a[i*k+j], a[j*k+i] = s, s
		}
	}
	for i := range k {
		if i == ic {
			g[i] = 0
			continue
		}
		raw := sums[triIndex(k, i, i)]
		if !(a[i*k+i] > 1e-8*raw) {
			return false
		}
		a[i*k+i] *= 1 + lambda/sumW
		g[i] = sums[l.pp+i] - sumW*mu[i]*muV
	}
	cond, ok := cholEquilibrated(a, k, d, inv, b)
	if !ok || !(cond <= condLimit) {
		return false
	}
	for i := range k {
		g[i] /= d[i]
	}
	cholSolve(a, k, g)
	// Back to design units.
	st := m.std
	sy := st.YScale
	for j := range m.p {
		out.coef[j], out.se[j], out.estimable[j] = math.NaN(), math.NaN(), false
	}
	yMean := st.YCentre + sy*muV
	icptV := yMean
	for c, j := range m.kept {
		out.estimable[j] = true
		if c == ic {
			continue
		}
		beta := sy * g[c] / d[c] / st.Scale[j]
		out.coef[j] = beta
		icptV -= beta * (st.Centre[j] + st.Scale[j]*mu[c])
	}
	out.coef[m.kept[ic]] = icptV / st.Scale[m.kept[ic]]
	out.rows = sums[l.pp+k+1]
	out.rank = k
	out.residSE = math.NaN()
	out.cond = cond
	return true
}

// triIndex is the position of (i, j), i ≤ j, in the packed upper triangle
// of a k × k matrix, as xpLayout stores it.
func triIndex(k, i, j int) int { return i*k - i*(i-1)/2 + (j - i) }

// mu returns scratch of length k for the replicate means.
func (w *solveWork) mu(k int) []float64 {
	if len(w.m) < k {
		w.m = make([]float64, k)
	}
	return w.m[:k]
}

// fallbackRidge fits replicate r by Ridge.FitRidge with the counts (times
// the weights) as case weights, which gives the coefficients of the
// materialised replicate.
func (e *batchEngine) fallbackRidge(r int, cbuf []int32) {
	n, p := e.src.n, e.src.p
	if cbuf == nil {
		cbuf = make([]int32, n)
		e.fetch(r, cbuf)
	}
	res := e.res
	res.Fallback[r] = true
	cw := make([]float64, n)
	var rows float64
	for i, c := range cbuf {
		cw[i] = float64(c) * e.weight(i)
		if cw[i] > 0 {
			rows += float64(c)
		}
	}
	coef, se, est := res.Coef[r*p:(r+1)*p], res.StdErr[r*p:(r+1)*p], res.Estimable[r*p:(r+1)*p]
	rf, err := Ridge{Lambda: e.bt.Ridge.Lambda}.FitRidge(e.x, e.y, cw)
	res.ResidSE[r] = math.NaN()
	if err != nil {
		res.Err[r] = err
		for j := range coef {
			coef[j], se[j], est[j] = math.NaN(), math.NaN(), false
		}
		return
	}
	rank := 0
	for j, c := range rf.Coefficients() {
		coef[j], se[j], est[j] = c.Estimate, math.NaN(), c.Estimable
		if c.Estimable {
			rank++
		}
	}
	res.Rows[r], res.Rank[r] = rows, rank
}

// checkRidge panics on an invalid penalty.
func checkRidge(r *Ridge) {
	if r != nil && (r.Lambda < 0 || math.IsNaN(r.Lambda) || math.IsInf(r.Lambda, 0)) {
		panic(fmt.Sprintf("fit: Batch: invalid Ridge.Lambda %v", r.Lambda))
	}
}
