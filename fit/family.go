package fit

import (
	"fmt"
	"math"
)

// Family is the error distribution and link function of a [GLM]. The zero
// value is not a family: a GLM with Family 0 panics when fitted.
type Family int

// The families a GLM fits, each with its link.
const (
	// Poisson is the Poisson family with the log link, for counts
	// (outcomes ≥ 0, not necessarily integers). The dispersion is 1.
	Poisson Family = iota + 1
	// Binomial is the binomial family with the logit link. The outcome is
	// a proportion in [0, 1] and the weights are the numbers of trials
	// (nil weights: one trial per row, so a 0/1 outcome). The dispersion
	// is 1.
	Binomial
	// Gamma is the Gamma family with the log link, for positive outcomes.
	// The dispersion is estimated by Pearson's chi-squared over the
	// residual degrees of freedom.
	Gamma
)

// String returns the family and its link, such as "poisson(log)".
func (f Family) String() string {
	switch f {
	case Poisson:
		return "poisson(log)"
	case Binomial:
		return "binomial(logit)"
	case Gamma:
		return "gamma(log)"
	}
	return fmt.Sprintf("Family(%d)", int(f))
}

func (f Family) valid() bool { return f >= Poisson && f <= Gamma }

// fixedDispersion reports whether the family's dispersion is 1 by
// definition (so Wald statistics are z, not t).
func (f Family) fixedDispersion() bool { return f != Gamma }

const (
	dblEps = 0x1p-52
	// logitCut is the |linear predictor| beyond which the logit inverse
	// and its derivative are held at their limits (1 − eps, eps), as R's
	// binomial family does, so the working weights never reach 0.
	logitCut = 30
)

// outcomeOK reports whether y is in the family's domain and, if not,
// why not.
func (f Family) outcomeOK(y float64) (bool, reason) {
	switch f {
	case Poisson:
		return y >= 0, "negative count for the poisson family"
	case Binomial:
		return y >= 0 && y <= 1, "outside [0, 1] for the binomial family"
	case Gamma:
		return y > 0, "not positive for the gamma family"
	}
	return false, ""
}

// start returns the starting mean for row i (outcome y, prior weight w),
// the usual IRLS starting values: y + 0.1 for counts, (w·y + ½)/(w + 1)
// for proportions, y itself for the Gamma family.
func (f Family) start(y, w float64) float64 {
	switch f {
	case Poisson:
		return y + 0.1
	case Binomial:
		return (w*y + 0.5) / (w + 1)
	}
	return y
}

// link maps a mean to the linear predictor.
func (f Family) link(mu float64) float64 {
	if f == Binomial {
		return math.Log(mu / (1 - mu))
	}
	return math.Log(mu)
}

// inverse maps the linear predictor to the mean and returns also
// dμ/dη.
func (f Family) inverse(eta float64) (mu, dmu float64) {
	if f == Binomial {
		switch {
		case eta < -logitCut:
			return dblEps / (1 + dblEps), dblEps
		case eta > logitCut:
			return 1 / (1 + dblEps), dblEps
		}
		e := math.Exp(eta)
		return e / (1 + e), e / ((1 + e) * (1 + e))
	}
	mu = math.Max(math.Exp(eta), dblEps)
	return mu, mu
}

// variance is the variance function V(μ).
func (f Family) variance(mu float64) float64 {
	switch f {
	case Poisson:
		return mu
	case Binomial:
		return mu * (1 - mu)
	}
	return mu * mu
}

// validMean reports whether mu is a usable fitted mean.
func (f Family) validMean(mu float64) bool {
	if f == Binomial {
		return mu > 0 && mu < 1
	}
	return mu > 0 && !math.IsInf(mu, 1)
}

// xlogy returns x·log(y) with 0·log(y) = 0.
func xlogy(x, y float64) float64 {
	if x == 0 {
		return 0
	}
	return x * math.Log(y)
}

// unitDeviance is one row's contribution to the deviance, weight w.
func (f Family) unitDeviance(y, mu, w float64) float64 {
	switch f {
	case Poisson:
		// 2w(y log(y/μ) − (y − μ))
		return 2 * w * (xlogy(y, y/mu) - (y - mu))
	case Binomial:
		// 2w(y log(y/μ) + (1−y) log((1−y)/(1−μ)))
		return 2 * w * (xlogy(y, y/mu) + xlogy(1-y, (1-y)/(1-mu)))
	}
	// 2w(−log(y/μ) + (y − μ)/μ)
	return 2 * w * (-math.Log(y/mu) + (y-mu)/mu)
}

// logLik returns the maximised log-likelihood given the fitted means, the
// deviance and the sum of prior weights. The formulas are those R's
// families use for their AIC, without R's rounding of binomial trials:
//
//	Poisson:  Σ w (y log μ − μ − log Γ(y+1))
//	Binomial: Σ [log C(m, m·y) + m·y log μ + m(1−y) log(1−μ)], m = w
//	Gamma:    Σ w log f(y; shape 1/φ, scale μφ) with φ = deviance/Σw
//
// where C is the binomial coefficient computed with log Γ (so it is
// defined for non-integer m·y). With freq the binomial coefficient is left
// out: the log-likelihood is then that of the m 0/1 rows each proportion
// stands for.
func (f Family) logLik(y, mu, w []float64, dev, sumW float64, freq bool) float64 {
	ll := 0.0
	switch f {
	case Poisson:
		for i, yi := range y {
			if w[i] <= 0 {
				continue
			}
			lg, _ := math.Lgamma(yi + 1)
			ll += w[i] * (xlogy(yi, mu[i]) - mu[i] - lg)
		}
	case Binomial:
		for i, yi := range y {
			m := w[i]
			if m <= 0 {
				continue
			}
			k := m * yi
			if !freq {
				a, _ := math.Lgamma(m + 1)
				b, _ := math.Lgamma(k + 1)
				c, _ := math.Lgamma(m - k + 1)
				ll += a - b - c
			}
			ll += xlogy(k, mu[i]) + xlogy(m-k, 1-mu[i])
		}
	case Gamma:
		phi := dev / sumW
		shape := 1 / phi
		lgs, _ := math.Lgamma(shape)
		for i, yi := range y {
			if w[i] <= 0 {
				continue
			}
			scale := mu[i] * phi
			ll += w[i] * ((shape-1)*math.Log(yi) - yi/scale - lgs - shape*math.Log(scale))
		}
	}
	return ll
}

// binomialCoefs returns Σ c log C(m, m·y) over the rows with m > 0 and
// c > 0: the binomial coefficients of rows with m trials, each repeated c
// times (see [Family.logLik]).
func binomialCoefs(y, m, c []float64) float64 {
	ll := 0.0
	for i, yi := range y {
		if m[i] <= 0 || c[i] <= 0 {
			continue
		}
		k := m[i] * yi
		a, _ := math.Lgamma(m[i] + 1)
		b, _ := math.Lgamma(k + 1)
		d, _ := math.Lgamma(m[i] - k + 1)
		ll += c[i] * (a - b - d)
	}
	return ll
}
