package fit

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"
)

var (
	_ Fitter       = GLM{}
	_ CountFitter  = GLM{}
	_ Predictor    = (*GLMFit)(nil)
	_ Coefficients = (*GLMFit)(nil)
	_ Covariance   = (*GLMFit)(nil)
	_ Statistics   = (*GLMFit)(nil)
)

// GLM fits a generalised linear model by iteratively reweighted least
// squares (IRLS), which for these families is Fisher scoring. The zero
// value is not usable: Family must be set. A GLM value is safe for
// concurrent use.
//
// The design should contain its own constant column if an intercept is
// wanted; the first column that takes one and the same non-zero value in
// every row with a positive weight is taken as the intercept (it decides
// the null model of NullDeviance).
//
// Weights are prior weights: for Binomial they are the numbers of trials
// behind each proportion; for Poisson and Gamma each row's contribution to
// the log-likelihood is multiplied by its weight. Rows with weight 0 take
// no part in the fit. The estimates do not depend on the Weights kind:
//
//   - With Precision weights (the zero value), as R's glm(weights = w),
//     Stats.Rows counts the rows with a positive weight, ResidDF is
//     Rows − Params (also the divisor of the Gamma dispersion) and BIC
//     uses log(Rows).
//   - With Frequency weights, row i stands for w[i] rows (a binomial
//     proportion with w[i] trials for w[i] 0/1 rows): Rows is Σw and
//     every statistic, the standard errors and the log-likelihood equal
//     those of the expanded data (the binomial log-likelihood then has no
//     binomial-coefficient term, being that of the 0/1 rows).
//
// # Algorithm
//
// Starting means are y + 0.1 (Poisson), (w·y + ½)/(w + 1) (Binomial;
// (y + ½)/2 with Frequency weights, the start each repeated row would get,
// so that the iterations follow the path of the expanded data) and y
// (Gamma). Each iteration solves a weighted least-squares problem for
// the working response by a Householder QR that keeps columns in design
// order and drops a column whose part not explained by the earlier kept
// columns is at most 1e-7 of its norm (such a column is reported as not
// estimable, NaN, by name). If the new deviance is not finite or a fitted
// mean leaves the family's range, the step is halved back towards the
// previous coefficients until it is usable. The fit has converged when
// the deviance moved by less than Tol relative to its size:
//
//	|D_k − D_{k−1}| / (|D_k| + 0.1) < Tol
//
// where D_0 is the deviance of the starting means. The reported
// coefficients are those of the last step and the standard errors come
// from the weighted least-squares problem of that step (working weights
// of the previous means), exactly as R's glm.fit reports them.
//
// # Errors
//
// Fit returns a *DataError naming the row for an outcome outside the
// family's range (Binomial: outside [0, 1]; Poisson: below 0; Gamma: ≤ 0)
// and for NaN or infinite values; ErrTooFewRows when fewer rows have a
// positive weight than there are columns that are not constant in those
// rows (counting the intercept); a
// *ConvergenceError after MaxIter iterations without convergence; and an
// error wrapping ErrSeparation for a binomial fit whose coefficients run
// off to infinity (see [ErrSeparation] and the rule below).
//
// Separation rule (Binomial only): when the iterations stop, the rows with
// a positive weight whose fitted probability is within 1e-6 of 0 or 1 are
// examined by taking one more scoring step. If that step would move the
// linear predictor of one of them further towards the boundary by more
// than 0.1, the maximum-likelihood estimate does not exist (its
// probability is being pushed to exactly 0 or 1) and Fit returns the
// separation error naming the first such row. At a true maximum the step
// is many orders of magnitude smaller.
//
// Fit panics if Family or Weights is not one of the defined values, if
// MaxIter or Tol is negative or NaN, if the lengths of x, y and
// weights disagree, or if x has no columns.
type GLM struct {
	// Family is the error distribution and link.
	Family Family
	// MaxIter is the maximum number of IRLS iterations; 0 means 25.
	MaxIter int
	// Tol is the convergence tolerance on the relative change in
	// deviance (see the Algorithm section); 0 means 1e-8.
	Tol float64
	// Weights says what the weights passed to Fit mean (see the type
	// documentation); Precision by default.
	Weights WeightKind
}

// GLMFit is a fitted generalised linear model. It is immutable and safe
// for concurrent use.
type GLMFit struct {
	family     Family
	coefs      []Coefficient
	beta       []float64 // estimates with 0 for columns not estimable
	cov        *mat.SymDense
	dispersion float64
	resDF      float64
	intercept  int
	stats      Stats
}

// Fit fits the model to design x, outcome y and prior weights (nil means
// all 1) and returns a *GLMFit. See [GLM.FitGLM].
func (g GLM) Fit(x mat.Matrix, y, weights []float64) (Predictor, error) {
	f, err := g.FitGLM(x, y, weights)
	if err != nil {
		return nil, err
	}
	return f, nil
}

// FrequencyWeighted returns a copy of g that reads its weights as
// frequencies.
func (g GLM) FrequencyWeighted() Fitter {
	g.Weights = Frequency
	return g
}

// FitCounts fits the model to the data in which row i appears counts[i]
// times, each copy with prior weight weights[i] of the kind g.Weights (nil
// weights: all 1; for Binomial each copy keeps the row's trials), without
// copying rows, and returns a *GLMFit. Its estimates, standard errors,
// dispersion, deviances, log-likelihood, AIC, BIC, residual degrees of
// freedom and number of iterations are those of [GLM.FitGLM] on the
// expanded data, to rounding: the IRLS steps use the working weights
// times the counts, and the starting means are those each copy would get.
// With Precision weights Rows counts the copies of the rows with a
// positive weight (Σ counts), with Frequency weights row i stands for
// counts[i]·weights[i] rows. Counts need not be integers; a row of count
// zero takes no part in the fit, as a row of weight zero does (its values
// are still checked), and the check for too few rows uses the distinct
// rows, as Frequency weights do. counts == nil is Fit.
//
// FitCounts returns the errors of FitGLM, and a *[DataError] named
// "counts" for a NaN, infinite or negative count (one named "weights" if
// a weight times its count overflows). It panics as FitGLM does and if
// counts is not nil and len(counts) != len(y).
func (g GLM) FitCounts(x mat.Matrix, y, weights, counts []float64) (Predictor, error) {
	f, err := g.fitGLM(x, y, weights, counts)
	if err != nil {
		return nil, err
	}
	return f, nil
}

// FitGLM is [GLM.Fit] returning the concrete model. Coefficients are
// named from x if it implements [Namer], else "x1", "x2", and so on.
func (g GLM) FitGLM(x mat.Matrix, y, weights []float64) (*GLMFit, error) {
	return g.fitGLM(x, y, weights, nil)
}

// fitGLM is FitGLM with optional row multiplicities (see [GLM.FitCounts]).
func (g GLM) fitGLM(x mat.Matrix, y, weights, counts []float64) (*GLMFit, error) {
	fam := g.Family
	if !fam.valid() {
		panic(fmt.Sprintf("fit: GLM: invalid Family %d", int(fam)))
	}
	if g.Weights != Precision && g.Weights != Frequency {
		panic(fmt.Sprintf("fit: GLM: invalid weight kind %d", int(g.Weights)))
	}
	maxIter := g.MaxIter
	if maxIter < 0 {
		panic(fmt.Sprintf("fit: GLM: negative MaxIter %d", maxIter))
	}
	if maxIter == 0 {
		maxIter = 25
	}
	tol := g.Tol
	if tol < 0 || math.IsNaN(tol) {
		panic(fmt.Sprintf("fit: GLM: invalid Tol %v", tol))
	}
	if tol == 0 {
		tol = 1e-8
	}
	if counts != nil && len(counts) != len(y) {
		panic(fmt.Sprintf("fit: GLM: len(counts) = %d, outcome has %d values", len(counts), len(y)))
	}
	d, err := readDesign("GLM", x, y, weights)
	if err != nil {
		return nil, err
	}
	// prior holds each copy's prior weight; d.w becomes prior × counts.
	prior := d.w
	if counts != nil {
		if err := d.applyCounts(counts); err != nil {
			return nil, err
		}
	}
	for i, v := range y {
		if ok, why := fam.outcomeOK(v); !ok {
			return nil, &DataError{Row: i + 1, Name: "outcome", Value: v, Err: why}
		}
	}
	n, p := d.n, d.p

	s := &irls{fam: fam, d: d, prior: prior, counts: counts}
	s.alloc()
	mu, eta := s.mu, s.eta
	if cand := d.candidates(); d.used < cand {
		return nil, fmt.Errorf("fit: GLM: %d rows with positive weight, %d columns to estimate: %w", d.used, cand, ErrTooFewRows)
	}
	freq := g.Weights == Frequency
	for i := range n {
		if freq {
			mu[i] = fam.start(y[i], 1)
		} else {
			mu[i] = fam.start(y[i], prior[i])
		}
		eta[i] = fam.link(mu[i])
		mu[i], s.dmu[i] = fam.inverse(eta[i])
	}
	devOld := s.deviance(mu)
	var (
		beta    = make([]float64, p)
		betaOld []float64
		iter    int
		conv    bool
		change  = math.NaN()
	)
	for iter = 1; iter <= maxIter; iter++ {
		if err := s.step(beta, &s.qr); err != nil {
			return nil, err
		}
		s.predict(beta)
		dev := s.deviance(mu)
		if !s.usable(dev) {
			if betaOld == nil {
				return nil, fmt.Errorf("%w: the first step gave no valid fit (%s)", ErrNoConvergence, fam)
			}
			for h := 0; !s.usable(dev); h++ {
				if h >= maxIter {
					return nil, &ConvergenceError{Iter: iter, Change: math.NaN()}
				}
				for j := range beta {
					beta[j] = (beta[j] + betaOld[j]) / 2
				}
				s.predict(beta)
				dev = s.deviance(mu)
			}
		}
		change = math.Abs(dev-devOld) / (math.Abs(dev) + 0.1)
		devOld = dev
		if change < tol {
			conv = true
			break
		}
		if betaOld == nil {
			betaOld = make([]float64, p)
		}
		copy(betaOld, beta)
	}
	if iter > maxIter {
		iter = maxIter
	}
	if fam == Binomial {
		if row, ok := s.separated(beta); ok {
			return nil, fmt.Errorf("%w: row %d has fitted probability %.3g and the scoring steps push it further (%s)",
				ErrSeparation, row+1, mu[row], fam)
		}
	}
	if !conv {
		return nil, &ConvergenceError{Iter: iter, Change: change}
	}
	return s.result(beta, devOld, iter, freq), nil
}

// irls holds the state of one IRLS run.
type irls struct {
	fam     Family
	d       *estDesign
	prior   []float64 // each copy's prior weight (d.w without counts)
	counts  []float64 // row multiplicities, nil for one copy each
	mu, eta []float64
	dmu     []float64 // dμ/dη at eta
	z       []float64 // working response, scaled
	sw      []float64 // square roots of the working weights
	wcols   [][]float64
	qr      orderedQR
}

func (s *irls) alloc() {
	n, p := s.d.n, s.d.p
	s.mu = make([]float64, n)
	s.eta = make([]float64, n)
	s.dmu = make([]float64, n)
	s.z = make([]float64, n)
	s.sw = make([]float64, n)
	s.wcols = make([][]float64, p)
	back := make([]float64, n*p)
	for j := range p {
		s.wcols[j] = back[j*n : (j+1)*n]
	}
}

// step computes the working response and weights from the current means
// and solves the weighted least-squares problem into beta.
func (s *irls) step(beta []float64, qr *orderedQR) error {
	fam, d := s.fam, s.d
	y, w := d.y, d.w
	for i := range d.n {
		dmu := s.dmu[i]
		if w[i] <= 0 || dmu == 0 {
			s.sw[i], s.z[i] = 0, 0
			continue
		}
		sw := math.Sqrt(w[i] * dmu * dmu / fam.variance(s.mu[i]))
		s.sw[i] = sw
		s.z[i] = sw * (s.eta[i] + (y[i]-s.mu[i])/dmu)
	}
	for j, c := range d.cols {
		wc := s.wcols[j]
		for i, v := range c {
			wc[i] = v * s.sw[i]
		}
	}
	qr.factorize(s.wcols, rankTol)
	if len(qr.kept) > d.used {
		return fmt.Errorf("%w: %d rows with positive weight for %d estimable coefficients", ErrTooFewRows, d.used, len(qr.kept))
	}
	qr.solve(beta, s.z)
	for _, v := range beta {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("%w: non-finite coefficients (%s)", ErrNoConvergence, fam)
		}
	}
	return nil
}

// predict sets eta and mu from beta.
func (s *irls) predict(beta []float64) {
	for i := range s.eta {
		s.eta[i] = 0
	}
	for j, c := range s.d.cols {
		b := beta[j]
		if b == 0 {
			continue
		}
		for i, v := range c {
			s.eta[i] += b * v
		}
	}
	for i, e := range s.eta {
		s.mu[i], s.dmu[i] = s.fam.inverse(e)
	}
}

func (s *irls) deviance(mu []float64) float64 {
	dev := 0.0
	for i, y := range s.d.y {
		if w := s.d.w[i]; w > 0 {
			dev += s.fam.unitDeviance(y, mu[i], w)
		}
	}
	return dev
}

// usable reports whether dev is finite and all fitted means are valid.
func (s *irls) usable(dev float64) bool {
	if math.IsNaN(dev) || math.IsInf(dev, 0) {
		return false
	}
	for _, m := range s.mu {
		if !s.fam.validMean(m) {
			return false
		}
	}
	return true
}

// separated applies the separation rule of the GLM documentation at the
// current coefficients and returns the first offending row.
func (s *irls) separated(beta []float64) (int, bool) {
	const near, push = 1e-6, 0.1
	var cand []int
	for i, m := range s.mu {
		if s.d.w[i] > 0 && (m < near || m > 1-near) {
			cand = append(cand, i)
		}
	}
	if len(cand) == 0 {
		return 0, false
	}
	eta0 := make([]float64, len(cand))
	for k, i := range cand {
		eta0[k] = s.eta[i]
	}
	next := make([]float64, len(beta))
	var qr orderedQR // keep s.qr: the reported standard errors come from it
	if s.step(next, &qr) != nil {
		return cand[0], true
	}
	for k, i := range cand {
		e := 0.0
		for j, c := range s.d.cols {
			e += next[j] * c[i]
		}
		if math.Copysign(1, eta0[k])*(e-eta0[k]) > push {
			return i, true
		}
	}
	return 0, false
}

// result builds the fitted model after convergence. beta are the final
// coefficients; s.qr still holds the factorization of the last step.
func (s *irls) result(beta []float64, dev float64, iter int, freq bool) *GLMFit {
	fam, d := s.fam, s.d
	n, p := d.n, d.p
	y, w := d.y, d.w
	rank := len(s.qr.kept)
	cov := mat.NewSymDense(p, nil)
	s.qr.unscaledCov(cov)
	nobs := float64(d.used)
	switch {
	case freq:
		nobs = d.sumW
	case s.counts != nil:
		nobs = 0
		for i, c := range s.counts {
			if w[i] > 0 {
				nobs += c
			}
		}
	}
	resDF := nobs - float64(rank)
	disp := 1.0
	if !fam.fixedDispersion() {
		chi2 := 0.0
		for i := range n {
			if w[i] > 0 {
				r := y[i] - s.mu[i]
				chi2 += w[i] * r * r / fam.variance(s.mu[i])
			}
		}
		disp = chi2 / resDF
	}
	cov.ScaleSym(disp, cov)
	icpt := d.intercept()
	f := &GLMFit{
		family:     fam,
		coefs:      make([]Coefficient, p),
		beta:       make([]float64, p),
		cov:        cov,
		dispersion: disp,
		resDF:      resDF,
		intercept:  icpt,
	}
	for j := range p {
		c := Coefficient{Name: d.names[j], Estimate: math.NaN(), StdErr: math.NaN()}
		if !s.qr.alias[j] {
			c.Estimate = beta[j]
			c.StdErr = math.Sqrt(cov.At(j, j))
			c.Estimable = true
			f.beta[j] = beta[j]
		}
		f.coefs[j] = c
	}
	// null model: the weighted mean with an intercept, the inverse link
	// of 0 without
	var nullMu float64
	if icpt >= 0 {
		sy := 0.0
		for i := range n {
			sy += w[i] * y[i]
		}
		nullMu = sy / d.sumW
	} else {
		nullMu, _ = fam.inverse(0)
	}
	nullDev := 0.0
	for i := range n {
		if w[i] > 0 {
			nullDev += fam.unitDeviance(y[i], nullMu, w[i])
		}
	}
	var ll float64
	if s.counts != nil && fam == Binomial && !freq {
		// w folds the counts into the trials; the binomial coefficients
		// are those of each copy's trials, once per copy.
		ll = fam.logLik(y, s.mu, w, dev, d.sumW, true) + binomialCoefs(y, s.prior, s.counts)
	} else {
		ll = fam.logLik(y, s.mu, w, dev, d.sumW, freq)
	}
	k := float64(rank)
	if !fam.fixedDispersion() {
		k++
	}
	f.stats = Stats{
		Rows:         nobs,
		Params:       rank,
		ResidDF:      resDF,
		ResidSE:      math.Sqrt(disp),
		RSquared:     math.NaN(),
		AdjRSquared:  math.NaN(),
		F:            math.NaN(),
		FPValue:      math.NaN(),
		LogLik:       ll,
		AIC:          -2*ll + 2*k,
		BIC:          -2*ll + math.Log(nobs)*k,
		Deviance:     dev,
		NullDeviance: nullDev,
		Iterations:   iter,
	}
	return f
}

// Predict writes the fitted mean (on the outcome scale: a count, a
// probability, a positive amount) for each row of x into dst and returns
// it. Columns whose coefficient is not estimable contribute nothing.
// Predict panics if x has the wrong number of columns or dst the wrong
// length.
func (f *GLMFit) Predict(dst []float64, x mat.Matrix) []float64 {
	dst = f.LinearPredictor(dst, x)
	for i, e := range dst {
		dst[i], _ = f.family.inverse(e)
	}
	return dst
}

// LinearPredictor writes x·β (the link scale) for each row of x into dst
// and returns it, with the conventions of [GLMFit.Predict].
func (f *GLMFit) LinearPredictor(dst []float64, x mat.Matrix) []float64 {
	return linearPredict("GLMFit", dst, x, f.beta)
}

// linearPredict writes x·beta into dst (allocated if nil).
func linearPredict(who string, dst []float64, x mat.Matrix, beta []float64) []float64 {
	r, c := x.Dims()
	if c != len(beta) {
		panic(fmt.Sprintf("fit: %s.Predict: design has %d columns, model has %d", who, c, len(beta)))
	}
	if dst == nil {
		dst = make([]float64, r)
	} else if len(dst) != r {
		panic(fmt.Sprintf("fit: %s.Predict: len(dst) = %d, design has %d rows", who, len(dst), r))
	}
	for i := range r {
		s := 0.0
		for j, b := range beta {
			if b != 0 {
				s += b * x.At(i, j)
			}
		}
		dst[i] = s
	}
	return dst
}

// Family returns the family the model was fitted with.
func (f *GLMFit) Family() Family { return f.family }

// Coefficients returns a copy of the coefficients in design order, with
// Wald standard errors: the square roots of the diagonal of
// dispersion × (XᵀWX)⁻¹.
func (f *GLMFit) Coefficients() []Coefficient {
	return append([]Coefficient(nil), f.coefs...)
}

// CovTo writes the estimated covariance of the coefficients,
// dispersion × (XᵀWX)⁻¹, into dst and returns it (see [Covariance]).
func (f *GLMFit) CovTo(dst *mat.SymDense) *mat.SymDense {
	p := len(f.coefs)
	if dst == nil {
		dst = mat.NewSymDense(p, nil)
	} else if dst.IsEmpty() {
		dst.ReuseAsSym(p)
	} else if dst.SymmetricDim() != p {
		panic(fmt.Sprintf("fit: GLMFit.CovTo: dst is %d × %d, want %d × %d", dst.SymmetricDim(), dst.SymmetricDim(), p, p))
	}
	dst.CopySym(f.cov)
	return dst
}

// Statistics returns the fit statistics. RSquared, AdjRSquared, F and
// FPValue are NaN. Rows and ResidDF depend on the Weights kind (see
// [GLM]). LogLik, AIC and BIC follow R's definitions for these
// families: for Gamma the dispersion counts as one more parameter and the
// log-likelihood uses the dispersion deviance/Σw; BIC uses log(Rows).
func (f *GLMFit) Statistics() Stats { return f.stats }

// Dispersion returns the dispersion used for the standard errors: 1 for
// Poisson and Binomial, Pearson's chi-squared Σ w (y − μ)²/V(μ) divided by
// the residual degrees of freedom for Gamma.
func (f *GLMFit) Dispersion() float64 { return f.dispersion }

// Intercept returns the index of the column detected as the intercept,
// or -1 if there is none.
func (f *GLMFit) Intercept() int { return f.intercept }

// WaldStats writes the Wald statistics estimate/stderr into dst and
// returns it (z for Poisson and Binomial, t for Gamma); NaN for
// coefficients not estimable. A nil dst is allocated, otherwise it must
// have one entry per coefficient.
func (f *GLMFit) WaldStats(dst []float64) []float64 {
	dst = f.dst("WaldStats", dst)
	for j, c := range f.coefs {
		dst[j] = c.Estimate / c.StdErr
	}
	return dst
}

// PValues writes the two-sided p-values of the Wald statistics into dst
// and returns it: against the standard normal for Poisson and Binomial,
// and against Student's t with the residual degrees of freedom for Gamma
// (whose dispersion is estimated), as R's summary.glm does. dst is as for
// [GLMFit.WaldStats].
func (f *GLMFit) PValues(dst []float64) []float64 {
	dst = f.WaldStats(dst)
	for j, z := range dst {
		if f.family.fixedDispersion() {
			dst[j] = 2 * distuv.UnitNormal.CDF(-math.Abs(z))
		} else {
			dst[j] = studentTwoSided(z, f.resDF)
		}
	}
	return dst
}

// ConfInt writes the limits of two-sided Wald confidence intervals at the
// given level (such as 0.95) into lo and hi and returns them: estimate ±
// q·stderr, q the (1+level)/2 quantile of the distribution PValues uses.
// These are not profile-likelihood intervals; for small samples or
// estimates near a boundary they can be poor. lo and hi are as dst for
// [GLMFit.WaldStats]. ConfInt panics unless 0 < level < 1.
func (f *GLMFit) ConfInt(lo, hi []float64, level float64) ([]float64, []float64) {
	if !(level > 0 && level < 1) {
		panic(fmt.Sprintf("fit: GLMFit.ConfInt: level %v outside (0, 1)", level))
	}
	lo, hi = f.dst("ConfInt", lo), f.dst("ConfInt", hi)
	var q float64
	if f.family.fixedDispersion() {
		q = distuv.UnitNormal.Quantile((1 + level) / 2)
	} else {
		q = studentQuantile((1+level)/2, f.resDF)
	}
	for j, c := range f.coefs {
		lo[j] = c.Estimate - q*c.StdErr
		hi[j] = c.Estimate + q*c.StdErr
	}
	return lo, hi
}

func (f *GLMFit) dst(who string, dst []float64) []float64 {
	if dst == nil {
		return make([]float64, len(f.coefs))
	}
	if len(dst) != len(f.coefs) {
		panic(fmt.Sprintf("fit: GLMFit.%s: len(dst) = %d, model has %d coefficients", who, len(dst), len(f.coefs)))
	}
	return dst
}
