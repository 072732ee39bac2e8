package fit

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mathext"
	"gonum.org/v1/gonum/stat/distuv"
)

// WeightKind says what the case weights passed to Fit mean.
//
// The zero value is [Precision].
type WeightKind int

const (
	// Precision weights (the zero value) are analytic weights: row i has
	// error variance σ²/w[i], as in R's lm(weights = w). A weight of zero
	// removes the row; the rows used, and hence the residual degrees of
	// freedom, count the rows with a non-zero weight.
	Precision WeightKind = iota
	// Frequency weights are row counts: a fit with weight w[i] gives the
	// same estimates, standard errors and degrees of freedom as the data
	// with row i repeated w[i] times. Non-integer weights are read as
	// fractional counts (as Bayesian-bootstrap weights are); the rows used
	// are the sum of the weights.
	Frequency
)

// String returns the name of the weight kind.
func (k WeightKind) String() string {
	switch k {
	case Precision:
		return "precision"
	case Frequency:
		return "frequency"
	}
	return fmt.Sprintf("WeightKind(%d)", int(k))
}

// CovKind selects the estimator of the coefficient covariance matrix, and so
// of the standard errors, t statistics, p-values and intervals derived from it.
//
// The zero value is [Classical].
type CovKind int

const (
	// Classical (the zero value) is s²(XᵀWX)⁻¹, with s² the residual
	// mean square.
	Classical CovKind = iota
	// HC0 is White's heteroskedasticity-consistent sandwich estimator,
	// (XᵀWX)⁻¹ XᵀW Ω WX (XᵀWX)⁻¹ with Ω = diag(e²).
	HC0
	// HC1 is HC0 scaled by n/(n−k), n the rows used and k the number of
	// estimable coefficients.
	HC1
	// HC2 divides each squared residual by 1−h, h the leverage.
	HC2
	// HC3 divides each squared residual by (1−h)², the jackknife-like
	// form Long & Ervin (2000) recommend for small samples.
	HC3
)

// String returns the name of the covariance kind.
func (k CovKind) String() string {
	switch k {
	case Classical:
		return "classical"
	case HC0:
		return "HC0"
	case HC1:
		return "HC1"
	case HC2:
		return "HC2"
	case HC3:
		return "HC3"
	}
	return fmt.Sprintf("CovKind(%d)", int(k))
}

func (k CovKind) valid() bool { return k >= Classical && k <= HC3 }

// studentTwoSided returns the two-sided p-value P(|T| ≥ |t|) of Student's t
// with df degrees of freedom, computed from the regularised incomplete beta
// function so that small p-values keep their relative precision.
func studentTwoSided(t, df float64) float64 {
	switch {
	case math.IsNaN(t) || math.IsNaN(df) || df <= 0:
		return math.NaN()
	case math.IsInf(t, 0):
		return 0
	}
	return mathext.RegIncBeta(df/2, 0.5, df/(df+t*t))
}

// studentQuantile returns the p quantile of Student's t with df degrees of
// freedom (NaN if df ≤ 0).
func studentQuantile(p, df float64) float64 {
	if !(df > 0) {
		return math.NaN()
	}
	// Sigma must be set: the zero value gives silently wrong quantiles.
	return distuv.StudentsT{Mu: 0, Sigma: 1, Nu: df}.Quantile(p)
}

// fUpper returns the upper tail P(F ≥ f) of the F distribution with d1 and
// d2 degrees of freedom, computed directly from the regularised incomplete
// beta function (distuv.F.Survival is 1−CDF and loses tail precision).
func fUpper(f, d1, d2 float64) float64 {
	switch {
	case math.IsNaN(f) || !(d1 > 0) || !(d2 > 0):
		return math.NaN()
	case math.IsInf(f, 1):
		return 0
	case f <= 0:
		return 1
	}
	return mathext.RegIncBeta(d2/2, d1/2, d2/(d2+d1*f))
}
