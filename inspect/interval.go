package inspect

import (
	"fmt"
	"math"
	"slices"

	"github.com/kalends/kalends/internal/quantile"
	"gonum.org/v1/gonum/stat/distuv"
)

// Method is a bootstrap confidence interval method. The zero value is not a
// method; String reports an invalid Method as "Method(n)".
type Method int

// The interval methods, with the formulas of Davison & Hinkley (1997), §5.2–5.3.
const (
	// Percentile takes the interval's endpoints as quantiles of the
	// replicate values: [q(α/2), q(1−α/2)].
	Percentile Method = iota + 1
	// Basic reflects the percentile endpoints about the estimate:
	// [2t₀ − q(1−α/2), 2t₀ − q(α/2)].
	Basic
	// Normal is t₀ − bias ∓ z(1−α/2)·se, with bias and se from the
	// replicates; it reads no quantiles.
	Normal
	// BCa is Efron's bias-corrected and accelerated percentile interval.
	// It needs jackknife values or an acceleration (see [Statistic]).
	BCa
	// Studentized is the bootstrap-t interval, from quantiles of
	// (t* − t₀)/se*: [t₀ − se₀·q(1−α/2), t₀ − se₀·q(α/2)]. It needs the
	// full-data and per-replicate standard errors.
	Studentized
)

var methodNames = [...]string{
	Percentile:  "percentile",
	Basic:       "basic",
	Normal:      "normal",
	BCa:         "BCa",
	Studentized: "studentized",
}

// String returns the method's name in lower case ("percentile", "basic",
// "normal", "studentized"), except "BCa".
func (m Method) String() string {
	if !m.valid() {
		return fmt.Sprintf("Method(%d)", int(m))
	}
	return methodNames[m]
}

func (m Method) valid() bool { return m >= Percentile && m <= Studentized }

// QuantileRule chooses how a quantile is read from B sorted replicate
// values. The zero value is [DavisonHinkley].
type QuantileRule int

const (
	// DavisonHinkley is the rule of Davison & Hinkley (1997), §5.2.1–5.3:
	// the p quantile is the (B+1)p-th order statistic; when (B+1)p is not
	// an integer k, it is interpolated between the k-th and (k+1)-th on
	// the normal-quantile scale,
	//
	//	t(k) + (Φ⁻¹(p) − Φ⁻¹(k/(B+1))) / (Φ⁻¹((k+1)/(B+1)) − Φ⁻¹(k/(B+1))) · (t(k+1) − t(k)),
	//
	// and for k = 0 or k = B the smallest or largest value is used. This is
	// the rule R's boot package applies in boot.ci.
	DavisonHinkley QuantileRule = iota
	// R7 is Hyndman & Fan's (1996) definition 7, the default of R's
	// quantile and numpy: linear interpolation at position (B−1)p + 1.
	R7
)

// String returns "Davison-Hinkley" or "R-7".
func (r QuantileRule) String() string {
	switch r {
	case DavisonHinkley:
		return "Davison-Hinkley"
	case R7:
		return "R-7"
	}
	return fmt.Sprintf("QuantileRule(%d)", int(r))
}

// Quantile returns the p quantile of sorted by rule. It panics if sorted is
// empty or not sorted in increasing order, if it holds a NaN, if p is
// outside [0, 1], or if rule is invalid.
func Quantile(p float64, rule QuantileRule, sorted []float64) float64 {
	if len(sorted) == 0 {
		panic("inspect: Quantile: no values")
	}
	if !(p >= 0 && p <= 1) {
		panic("inspect: Quantile: p outside [0, 1]")
	}
	if !slices.IsSorted(sorted) || slices.ContainsFunc(sorted, math.IsNaN) {
		panic("inspect: Quantile: values not sorted")
	}
	switch rule {
	case DavisonHinkley:
		return quantileDH(p, sorted)
	case R7:
		return quantile.R7(sorted, p)
	}
	panic("inspect: Quantile: invalid rule")
}

// quantileDH is the Davison–Hinkley rule on sorted values, written to
// follow boot's arithmetic step by step so that results agree to rounding.
func quantileDH(p float64, t []float64) float64 {
	b := len(t)
	rk := float64(b+1) * p
	k := int(math.Trunc(rk))
	switch {
	case k <= 0:
		return t[0]
	case k >= b:
		return t[b-1]
	case float64(k) == rk:
		return t[k-1]
	}
	z := distuv.UnitNormal.Quantile(p)
	zk := distuv.UnitNormal.Quantile(float64(k) / float64(b+1))
	zk1 := distuv.UnitNormal.Quantile(float64(k+1) / float64(b+1))
	return t[k-1] + (z-zk)/(zk1-zk)*(t[k]-t[k-1])
}

// interior reports whether reading the p quantile of b values by rule stays
// off the smallest and largest value, and if not, how many values would be
// needed for it to.
//
// For [DavisonHinkley] with q = min(p, 1−p), the endpoint is interior when
// (b+1)q > 1 (boot's check), that is b ≥ ⌊1/q⌋; for q = 0.025 (a 95%
// percentile interval) b ≥ 40. For [R7] it is interior when (b−1)q ≥ 1,
// that is b ≥ ⌈1/q⌉ + 1. Both comparisons allow 1e-9 for rounding: with
// level 0.95, q is 0.025000000000000022 and 40q exceeds 1 only by rounding,
// yet the endpoint is then the smallest value to 15 digits.
func interior(p float64, b int, rule QuantileRule) (ok bool, need int) {
	q := math.Min(p, 1-p)
	okAt := func(b int) bool {
		if rule == R7 {
			return float64(b-1)*q >= 1-1e-9
		}
		return float64(b+1)*q > 1+1e-9
	}
	if okAt(b) {
		return true, b
	}
	if !(q > 1e-9) {
		return false, math.MaxInt32
	}
	if rule == R7 {
		need = int(math.Ceil(1/q)) + 1
	} else {
		need = int(math.Floor(1 / q))
	}
	for need > 2 && okAt(need-1) {
		need--
	}
	for !okAt(need) {
		need++
	}
	return false, need
}

// Acceleration returns the BCa acceleration from jackknife (leave-one-out)
// estimates θ₍ᵢ₎, by Efron's formula (Efron & Tibshirani 1993, eq. 14.15)
//
//	a = Σ(θ̄ − θ₍ᵢ₎)³ / (6 (Σ(θ̄ − θ₍ᵢ₎)²)^1.5),  θ̄ = mean of the θ₍ᵢ₎.
//
// It returns [ErrJackknife] if fewer than 2 values are given, if any is
// not finite, or if all are equal (to a relative 1e-12, see [ErrDegenerate]).
func Acceleration(jackknife []float64) (float64, error) {
	if len(jackknife) < 2 {
		return math.NaN(), fmt.Errorf("%w: %d jackknife values", ErrJackknife, len(jackknife))
	}
	var mean float64
	lo, hi := math.Inf(1), math.Inf(-1)
	for i, v := range jackknife {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return math.NaN(), fmt.Errorf("%w: jackknife value %d is %v (for a leave-one-out jackknife: the statistic cannot be computed with row %d left out)", ErrJackknife, i+1, v, i+1)
		}
		mean += v
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	if constant(lo, hi) {
		return math.NaN(), fmt.Errorf("%w: all jackknife values are equal", ErrJackknife)
	}
	mean /= float64(len(jackknife))
	d := make([]float64, len(jackknife))
	for i, v := range jackknife {
		d[i] = mean - v
	}
	return InfluenceAcceleration(d)
}

// InfluenceAcceleration returns the BCa acceleration from empirical
// influence values lᵢ (Davison & Hinkley 1997, eq. 5.23),
//
//	a = Σ lᵢ³ / (6 (Σ lᵢ²)^1.5),
//
// which is what R's boot.ci computes from its argument L. The jackknife
// values lᵢ = (n−1)(t₀ − θ₍ᵢ₎) that boot's empinf(type = "jack") returns
// are centred on the full-data estimate t₀, not on the jackknife mean as in
// [Acceleration]; the two agree when t₀ equals the jackknife mean (a
// sample mean, for instance) and differ slightly otherwise. The scale of
// the lᵢ cancels. It returns [ErrJackknife] if fewer than 2 values are
// given, any is not finite, or all are zero.
func InfluenceAcceleration(l []float64) (float64, error) {
	if len(l) < 2 {
		return math.NaN(), fmt.Errorf("%w: %d influence values", ErrJackknife, len(l))
	}
	var s2, s3, scale float64
	for i, v := range l {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return math.NaN(), fmt.Errorf("%w: influence value %d is %v", ErrJackknife, i+1, v)
		}
		scale = math.Max(scale, math.Abs(v))
	}
	if scale == 0 {
		return math.NaN(), fmt.Errorf("%w: all jackknife values are equal", ErrJackknife)
	}
	for _, v := range l {
		s2 += v * v
		s3 += v * v * v
	}
	return s3 / (6 * math.Pow(s2, 1.5)), nil
}
