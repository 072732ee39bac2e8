package resample

import (
	"fmt"
	"math"
)

// minBlockLengthRows is the shortest series BlockLength accepts.
const minBlockLengthRows = 10

// BlockLength returns the automatic block lengths of Politis & White
// (2004), with the correction of Patton, Politis & White (2009), for the
// stationary bootstrap (the mean block length) and for the circular-block
// bootstrap, from a numeric series in time order, usually the residuals
// of a first fit. The series is never modified.
//
// The rule, with n = len(series), autocovariances
// R(k) = (1/n) Σ_{t=1}^{n−k} (x_t − x̄)(x_{t+k} − x̄) and autocorrelations
// ρ(k) = R(k)/R(0):
//
//   - K = max(5, ⌈√log₁₀ n⌉), m_max = min(⌈√n⌉ + K, n − 1).
//   - m̂ is the smallest m ≥ 0 with |ρ(m+j)| < 2√(log₁₀ n / n) for
//     j = 1, …, K and m + K ≤ m_max; if there is none, m̂ = m_max.
//   - M = min(2m̂, m_max), and with the flat-top window λ(t) = 1 for
//     |t| ≤ ½, 2(1−|t|) for ½ < |t| ≤ 1, 0 beyond (λ ≡ 1 at k = 0 when
//     M = 0): ĝ = Σ_{|k|≤M} λ(k/M) R(k) and Ĝ = Σ_{|k|≤M} λ(k/M) |k| R(k).
//   - D_SB = 2ĝ² and D_CB = (4/3)ĝ² (the 2009 correction of D_SB), and
//     b = (2Ĝ²/D)^{1/3} n^{1/3} for each.
//   - Each length is then bounded to [1, ⌈min(3√n, n/3)⌉].
//
// The search constants (K, c = 2, m_max and the upper bound) follow the
// suggestions in the papers; they are kalends' documented choices, and
// changing them is a change of results. BlockLength returns an
// [*InputError] wrapping [ErrTooFewRows] if the series has fewer than 10
// values, and [ErrBadValue] if it holds NaN or ±Inf (naming the row) or is
// constant.
func BlockLength(series []float64) (stationary, circular float64, err error) {
	n := len(series)
	if n < minBlockLengthRows {
		return 0, 0, &InputError{Option: "BlockLength", Detail: fmt.Sprintf("%d values, need at least %d", n, minBlockLengthRows), Err: ErrTooFewRows}
	}
	var mean float64
	for i, v := range series {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return 0, 0, &InputError{Option: "BlockLength", Row: i + 1, Detail: fmt.Sprintf("value %v", v), Err: ErrBadValue}
		}
		mean += v
	}
	mean /= float64(n)
	nf := float64(n)
	kn := max(5, int(math.Ceil(math.Sqrt(math.Log10(nf)))))
	mmax := min(int(math.Ceil(math.Sqrt(nf)))+kn, n-1)
	bmax := math.Ceil(min(3*math.Sqrt(nf), nf/3))

	acov := make([]float64, mmax+1)
	for k := range acov {
		var s float64
		for t := 0; t+k < n; t++ {
			s += (series[t] - mean) * (series[t+k] - mean)
		}
		acov[k] = s / nf
	}
	if acov[0] == 0 {
		return 0, 0, &InputError{Option: "BlockLength", Detail: "constant series", Err: ErrBadValue}
	}
	thr := 2 * math.Sqrt(math.Log10(nf)/nf)
	mhat := mmax
search:
	for m := 0; m+kn <= mmax; m++ {
		for j := 1; j <= kn; j++ {
			if math.Abs(acov[m+j]/acov[0]) >= thr {
				continue search
			}
		}
		mhat = m
		break
	}
	bigM := min(2*mhat, mmax)
	g, bigG := acov[0], 0.0
	for k := 1; k <= bigM; k++ {
		w := flatTop(float64(k) / float64(bigM))
		g += 2 * w * acov[k]
		bigG += 2 * w * float64(k) * acov[k]
	}
	dSB := 2 * g * g
	dCB := 4.0 / 3.0 * g * g
	bound := func(b float64) float64 {
		if math.IsNaN(b) {
			return 1
		}
		return min(max(b, 1), bmax)
	}
	cube := math.Cbrt(nf)
	stationary = bound(math.Cbrt(2*bigG*bigG/dSB) * cube)
	circular = bound(math.Cbrt(2*bigG*bigG/dCB) * cube)
	return stationary, circular, nil
}

// flatTop is the trapezoidal flat-top lag window of Politis & Romano.
func flatTop(t float64) float64 {
	t = math.Abs(t)
	switch {
	case t <= 0.5:
		return 1
	case t <= 1:
		return 2 * (1 - t)
	}
	return 0
}
