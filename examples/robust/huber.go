package main

import (
	"cmp"
	"fmt"
	"math"
	"slices"

	"github.com/kalends/kalends/fit"
	"gonum.org/v1/gonum/mat"
)

// Huber is Huber's M-estimator of a linear model (Huber 1964, "Robust
// estimation of a location parameter", Ann. Math. Statist. 35:73–101),
// fitted by iteratively reweighted least squares (Holland & Welsch 1977,
// "Robust regression using iteratively reweighted least-squares", Commun.
// Statist. A6:813–827). Each step fits fit.OLS with precision weights
// w_i·min(1, K/|r_i/s|), where r are the previous step's residuals and s is
// their MAD about zero, median|r|/0.6745 (weighted by w), re-estimated at
// every step, as R's MASS::rlm does with its defaults. K = 1.345 gives 95%
// efficiency at the normal distribution (Holland & Welsch 1977; the default
// of rlm's psi.huber). The start is the least-squares fit.
//
// The weights given to Fit are case weights (a bootstrap run passes
// in-bag counts), multiplied into every step. The model's standard errors
// are those of the last weighted least-squares step, not the asymptotic
// ones of the M-estimator: use a bootstrap for the uncertainty.
type Huber struct {
	K       float64 // tuning constant; 0 means 1.345
	MaxIter int     // 0 means 50
	Tol     float64 // on max |Δβ| / (max |β| + 1e-10); 0 means 1e-10
}

var _ fit.Fitter = Huber{}

// HuberFit is a fitted Huber model: the last weighted least-squares step,
// whose Predict and Coefficients it offers, with the robust scale, the share
// of rows (by weight) whose weight was reduced, and the iterations run.
type HuberFit struct {
	*fit.OLSFit
	Scale, DownWeighted float64
	Iter                int
}

// Fit fits the model; see Huber. It returns the errors of fit.OLS, an error
// if the scale is zero (half the rows or more fitted exactly) and a
// *fit.ConvergenceError after MaxIter steps without convergence. A scale
// below 1e-12 max|y| counts as zero.
func (h Huber) Fit(x mat.Matrix, y, w []float64) (fit.Predictor, error) {
	k, maxIter, tol := cmp.Or(h.K, 1.345), cmp.Or(h.MaxIter, 50), cmp.Or(h.Tol, 1e-10)
	m, err := fit.OLS{}.FitOLS(x, y, w)
	if err != nil {
		return nil, err
	}
	hw, tiny := make([]float64, len(y)), 0.0
	for _, v := range y {
		tiny = max(tiny, 1e-12*math.Abs(v))
	}
	for iter := 1; ; iter++ {
		r := m.Residuals(nil)
		s := weightedMedianAbs(r, w) / 0.6745
		if s <= tiny {
			return nil, fmt.Errorf("huber: residual scale is zero at step %d (half the rows or more fitted exactly)", iter)
		}
		var down, total float64
		for i, ri := range r {
			wi := weight(w, i)
			hw[i] = wi * min(1, k/math.Abs(ri/s))
			total += wi
			if math.Abs(ri/s) > k {
				down += wi
			}
		}
		next, err := fit.OLS{}.FitOLS(x, y, hw)
		if err != nil {
			return nil, err
		}
		change := maxChange(m.Coefficients(), next.Coefficients())
		m = next
		if change <= tol {
			return &HuberFit{OLSFit: m, Scale: s, DownWeighted: down / total, Iter: iter}, nil
		}
		if iter == maxIter {
			return nil, &fit.ConvergenceError{Iter: iter, Change: change}
		}
	}
}

// weightedMedianAbs is the median of |r| when row i counts w[i] times (nil
// w: once each): the mean of the lower and upper weighted medians, which for
// whole-number weights is the median of the expanded rows.
func weightedMedianAbs(r, w []float64) float64 {
	idx := make([]int, 0, len(r))
	var total float64
	for i := range r {
		if w == nil || w[i] > 0 {
			idx = append(idx, i)
			total += weight(w, i)
		}
	}
	slices.SortFunc(idx, func(a, b int) int { return cmp.Compare(math.Abs(r[a]), math.Abs(r[b])) })
	cum, lower := 0.0, math.NaN()
	for _, i := range idx {
		cum += weight(w, i)
		if math.IsNaN(lower) && cum >= total/2 {
			lower = math.Abs(r[i])
		}
		if cum > total/2 {
			return (lower + math.Abs(r[i])) / 2
		}
	}
	return lower
}

func weight(w []float64, i int) float64 {
	if w == nil {
		return 1
	}
	return w[i]
}

// maxChange is max |Δβ| / (max |β| + 1e-10) over the estimable coefficients.
func maxChange(old, cur []fit.Coefficient) float64 {
	var d, size float64
	for j := range cur {
		if cur[j].Estimable && old[j].Estimable {
			d = max(d, math.Abs(cur[j].Estimate-old[j].Estimate))
			size = max(size, math.Abs(cur[j].Estimate))
		}
	}
	return d / (size + 1e-10)
}
