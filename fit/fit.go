package fit

import "gonum.org/v1/gonum/mat"

// Fitter is an estimator: a value whose Fit method learns a model from a
// design x (rows × columns), an outcome y and optional case weights.
//
// weights == nil means every row has weight 1; otherwise len(weights) must
// equal len(y). What a weight means is the estimator's to document; the
// built-in estimators read it as their Weights field says (see [WeightKind]).
// A resampling run passes each replicate's in-bag multiplicities (or
// Bayesian-bootstrap weights) as weights, after asking for frequency
// semantics through [FrequencyWeigher] when the estimator offers it; when
// the data carry case weights it passes the counts apart through
// [CountFitter] where offered.
//
// Fit must not modify x, y or weights, must not keep references to them
// in the returned Predictor unless documented, and must be safe to call from
// several goroutines at once on the same Fitter value. Fit panics for caller
// bugs (len(y) differs from the rows of x) and returns an error for data
// problems (see the package documentation).
//
// If x implements [Namer], the estimator may use its column names to label
// coefficients.
type Fitter interface {
	Fit(x mat.Matrix, y, weights []float64) (Predictor, error)
}

// Predictor is a fitted model. Predict writes one prediction per row of x
// into dst and returns it; if dst is nil a new slice is allocated, otherwise
// len(dst) must equal the rows of x. A Predictor is immutable: Predict is
// safe for concurrent use.
type Predictor interface {
	Predict(dst []float64, x mat.Matrix) []float64
}

// FitterFunc adapts an ordinary function to the [Fitter] interface.
type FitterFunc func(x mat.Matrix, y, weights []float64) (Predictor, error)

// Fit calls f(x, y, weights).
func (f FitterFunc) Fit(x mat.Matrix, y, weights []float64) (Predictor, error) {
	return f(x, y, weights)
}

// PredictorFunc adapts an ordinary function to the [Predictor] interface.
type PredictorFunc func(dst []float64, x mat.Matrix) []float64

// Predict calls f(dst, x).
func (f PredictorFunc) Predict(dst []float64, x mat.Matrix) []float64 { return f(dst, x) }

// Namer is implemented by designs that carry column names, such as
// features.Table.
type Namer interface {
	Name(j int) string
}

// Coefficient is one estimated coefficient of a fitted model.
//
// Estimable reports whether the data identified the coefficient. A column
// that is constant (other than the intercept) or collinear with earlier
// columns in the rows a model was fitted on is not estimable: its Estimate,
// StdErr and the statistics derived from them are NaN and Estimable is
// false, so that no NaN is ever silent.
//
// A Coefficient is a plain value, safe to copy and share; its zero value
// is an unnamed coefficient estimated as 0 that is not estimable.
type Coefficient struct {
	Name      string
	Estimate  float64
	StdErr    float64
	Estimable bool
}

// Coefficients is implemented by fitted models that have named
// coefficients, one per design column in design order.
type Coefficients interface {
	Coefficients() []Coefficient
}

// Covariance is implemented by fitted models that can report the estimated
// covariance matrix of their coefficients. CovTo writes it into dst and
// returns dst; a nil or empty dst is allocated, otherwise it must be p × p.
// Rows and columns of coefficients that are not estimable are NaN.
type Covariance interface {
	CovTo(dst *mat.SymDense) *mat.SymDense
}

// Statistics is implemented by fitted models that report fit statistics.
type Statistics interface {
	Statistics() Stats
}

// FrequencyWeigher is implemented by estimators that can be told to read
// their case weights as frequencies (row counts): a fit with weights w then
// gives the same estimates, standard errors and degrees of freedom as a fit
// on the data with row i repeated w[i] times. Resampling runs use it so
// that replicates need no copied rows.
type FrequencyWeigher interface {
	FrequencyWeighted() Fitter
}

// CountFitter is implemented by estimators that can fit replicated rows
// without copying them. FitCounts fits the data in which row i appears
// counts[i] times, each copy with case weight weights[i] (weights == nil
// means all 1; the weights keep the meaning Fit gives them), and gives the
// estimates, standard errors, degrees of freedom and fit statistics of Fit
// on those rows materialised. Unlike a fit with weights counts[i]·weights[i],
// this keeps precision weights and row counts apart, so that the residual
// degrees of freedom count copies. counts == nil means every row once;
// otherwise len(counts) must equal len(y). Resampling runs use it when the
// data carry case weights. FitCounts keeps the promises of [Fitter.Fit].
type CountFitter interface {
	FitCounts(x mat.Matrix, y, weights, counts []float64) (Predictor, error)
}

// Stats are the whole-fit statistics of a model. Fields an estimator does
// not compute are NaN.
//
// Stats is a plain value, safe to copy and share; its zero value is not a
// statistic of any fit (NaN marks the fields not computed).
type Stats struct {
	// Rows is the number of rows used (the sum of frequency weights, or
	// the number of rows with a non-zero weight for precision weights,
	// copies counted for [CountFitter]).
	Rows float64
	// Params is the number of estimable coefficients.
	Params int
	// ResidDF is the residual degrees of freedom, Rows − Params.
	ResidDF float64
	// ResidSE is the residual standard error (for a GLM, the square root
	// of the estimated dispersion).
	ResidSE float64
	// RSquared and AdjRSquared are the coefficient of determination and
	// its adjustment for Params. They are centred when the model has an
	// intercept and uncentred otherwise.
	RSquared, AdjRSquared float64
	// F is the overall F statistic against the intercept-only model (or
	// the zero model without intercept) and FPValue its upper tail.
	F, FPValue float64
	// LogLik, AIC and BIC are the maximised log-likelihood and the
	// information criteria derived from it.
	LogLik, AIC, BIC float64
	// Deviance is the residual deviance (the residual sum of squares for
	// linear models) and NullDeviance that of the intercept-only model.
	Deviance, NullDeviance float64
	// Iterations is the number of IRLS iterations (0 for direct solvers).
	Iterations int
}
