// Package fit defines the estimator interface of kalends and its built-in
// estimators: exact least squares with full inference ([OLS]), ridge
// regression and generalised linear models fitted by IRLS.
//
// An estimator is a [Fitter]: Fit(x, y, weights) learns from a design x
// (any [mat.Matrix], such as a features.Table), an outcome y and optional
// case weights, and returns a [Predictor] whose Predict(dst, x) predicts
// for new rows. Everything else is optional and discovered by interface
// assertion, so that inspect can use whatever an estimator offers:
//
//   - [Coefficients]: named estimates with standard errors;
//   - [Covariance]: the coefficient covariance matrix (CovTo);
//   - [Statistics]: whole-fit statistics ([Stats]);
//   - [FrequencyWeigher], on the Fitter: a copy that reads weights as row
//     counts, which resampling runs ask for so that a bootstrap replicate
//     needs no copied rows;
//   - [CountFitter], on the Fitter: FitCounts(x, y, weights, counts) fits
//     rows repeated counts[i] times, each copy keeping its weight, so
//     that a replicate of weighted data counts its copies in the degrees
//     of freedom ([OLS] and [GLM] have it; [Ridge] does not).
//
// # Writing an estimator
//
// A custom estimator needs only Fit and a Predictor. A through-the-origin
// slope, median of y/x, fits in a few lines:
//
//	type MedianSlope struct{}
//
//	func (MedianSlope) Fit(x mat.Matrix, y, w []float64) (fit.Predictor, error) {
//		n, _ := x.Dims()
//		if len(y) != n {
//			panic("medianslope: length mismatch")
//		}
//		var r []float64
//		for i := range n {
//			if xi := x.At(i, 0); xi != 0 && (w == nil || w[i] > 0) {
//				r = append(r, y[i]/xi)
//			}
//		}
//		if len(r) == 0 {
//			return nil, fit.ErrTooFewRows
//		}
//		slices.Sort(r)
//		b := (r[(len(r)-1)/2] + r[len(r)/2]) / 2
//		return fit.PredictorFunc(func(dst []float64, x mat.Matrix) []float64 {
//			n, _ := x.Dims()
//			if dst == nil {
//				dst = make([]float64, n)
//			}
//			for i := range dst {
//				dst[i] = b * x.At(i, 0)
//			}
//			return dst
//		}), nil
//	}
//
// (The example for [Fitter] runs it.) Add a Coefficients method to the
// returned model to have its coefficient reported, and FrequencyWeighted to
// the estimator if it can treat weights as counts; a resampling run
// otherwise passes the weights as they are.
//
// # Weights
//
// Weights mean different things to different estimators, and the built-in
// ones say which in a Weights field of kind [WeightKind]. Precision
// (analytic) weights, the default, say row i has error variance σ²/w[i]
// (R's lm weights): scaling every weight by a constant changes no estimate
// or standard error, and the residual degrees of freedom count the rows
// with a positive weight. Frequency weights are row counts: the fit equals
// the fit on the data with row i repeated w[i] times, standard errors and
// degrees of freedom included. Weights must be finite and non-negative and
// not all zero; rows of weight zero are left out of the fit.
//
// # Errors
//
// Caller bugs panic with a message starting "fit: ": a design, outcome or
// weights of mismatched lengths, an invalid enum value (WeightKind,
// CovKind, family), a design with no columns, a dst of the wrong size.
// Problems with the data are returned as errors that wrap a sentinel, so
// callers test them with [errors.Is]: a NaN or infinite value in the
// design or outcome, or a NaN, infinite or negative weight, is a
// *[DataError] naming the 1-based row and the column (by name when the
// design implements [Namer]) and wrapping [ErrBadValue]; all-zero weights
// wrap ErrBadValue; fewer usable rows than coefficients wrap
// [ErrTooFewRows]. A column that the data do not identify (constant, all
// zero, or collinear with earlier columns in the rows given, such as a
// holiday that does not occur in a bootstrap replicate) is not an error:
// least squares reports it as not estimable (Coefficient.Estimable false,
// NaN estimate and standard error) and everything else is what a fit
// without it gives.
//
// # Built-in estimators
//
// [OLS] is least squares by Householder QR with column pivoting, with
// classical or heteroskedasticity-consistent (HC0–HC3) covariances and the
// full set of [Stats]. [Ridge] penalises every column but a detected
// intercept, on internally standardised columns, and reports coefficients
// on the original scale; it has no standard errors (StdErr is NaN). [GLM]
// fits the Poisson (log link), binomial (logit link) and Gamma (log link)
// families by iteratively reweighted least squares, with deviance,
// dispersion and Wald standard errors; it returns a *[ConvergenceError] when
// the iterations run out and an error wrapping [ErrSeparation] when a
// binomial fit separates perfectly. All three detect the intercept as the
// first column that is constant and non-zero, and report columns the data
// do not identify as not estimable. For a binomial GLM whose weights are
// numbers of trials, a resampling run multiplies them by the replicate's
// row counts.
//
// # Determinism and concurrency
//
// Fits are deterministic: the same inputs give bit-identical results on
// every run and any number of goroutines. Estimator values are
// configuration only and are safe for concurrent use; Fit never modifies
// or retains x, y or weights. Fitted models are immutable, and all their
// methods are safe for concurrent use.
//
// # Reading the numbers
//
// Standard errors, p-values and intervals describe sampling variation
// under the model's assumptions; a coefficient on a calendar or holiday
// column measures association in the data given, not a causal effect of
// the day. The HC covariances ([CovKind]) drop the assumption of equal
// error variances, not that of independent rows.
package fit
