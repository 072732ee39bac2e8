package fit

import (
	"fmt"
	"math"
	"strconv"

	"gonum.org/v1/gonum/mat"
)

var (
	_ Fitter           = OLS{}
	_ FrequencyWeigher = OLS{}
	_ CountFitter      = OLS{}
	_ Predictor        = (*OLSFit)(nil)
	_ Coefficients     = (*OLSFit)(nil)
	_ Covariance       = (*OLSFit)(nil)
	_ Statistics       = (*OLSFit)(nil)
)

// OLS is the linear least-squares estimator: ordinary least squares with
// weights == nil, weighted least squares otherwise.
//
// The design is used as given: OLS adds no intercept. To fit one, include a
// column of ones (any constant non-zero column will do). OLS detects the
// intercept as the first column that is constant and non-zero over the rows
// used; with one, R² is centred and the F test is against the
// intercept-only model, without one both are uncentred (against zero).
//
// The fit is a Householder QR factorisation with column pivoting of the
// weighted design after centring (when there is an intercept) and scaling
// every column to unit norm: a blocked unpivoted Householder QR of the
// design followed by a pivoted one (Businger–Golub) of its triangle, which
// pivots and reveals the rank as a pivoted QR of the design itself. The numerical rank is
// the number of diagonal entries with |R_kk| > Tol·|R_00|. Columns that are
// constant (other than the intercept), all zero, or in the span of the
// columns before them over the rows used are not estimable: they get NaN
// estimates and standard errors, and every other number is what a fit
// without them gives. Among collinear columns the later ones in design
// order are the ones dropped. When the condition number of the scaled
// design exceeds 1e3, the solution and the covariance are improved by
// iterative refinement of the augmented least-squares system with residuals
// accumulated in double-double precision (Björck 1967); this keeps about
// ten or more correct digits on every NIST StRD linear dataset, Filip
// included.
//
// The zero value fits with precision weights, the default tolerance and
// classical standard errors. OLS values are safe for concurrent use.
type OLS struct {
	// Weights says what the weights passed to Fit mean (precision by
	// default).
	Weights WeightKind
	// Tol is the rank tolerance relative to the largest diagonal entry of
	// R of the centred, unit-norm design; 0 means max(rows used, columns)·ε
	// with ε = 2⁻⁵² (the rule numpy's matrix_rank applies to singular
	// values).
	Tol float64
	// Cov selects the covariance estimator behind the standard errors
	// (Classical by default).
	Cov CovKind
}

// FrequencyWeighted returns a copy of o that reads its weights as
// frequencies.
func (o OLS) FrequencyWeighted() Fitter {
	o.Weights = Frequency
	return o
}

// Fit fits the linear model y ≈ x·β by weighted least squares and returns
// an *OLSFit. See [OLS.FitOLS].
func (o OLS) Fit(x mat.Matrix, y, weights []float64) (Predictor, error) {
	m, err := o.FitOLS(x, y, weights)
	if err != nil {
		return nil, err
	}
	return m, nil
}

// FitCounts fits the linear model to the data in which row i appears
// counts[i] times, each copy with weight weights[i] of the kind o.Weights
// (nil weights: all 1), without copying rows, and returns an *OLSFit. Its
// estimates, standard errors of every CovKind (the HC leverages are those
// of one copy), residual degrees of freedom (Σ counts over the rows with a
// positive weight, minus the rank), residual standard error, R², F and
// log-likelihood (summed over the copies, as R's logLik.lm) are those of
// [OLS.FitOLS] on the expanded data, to rounding. With Frequency weights
// row i stands for counts[i]·weights[i] rows. Counts need not be integers;
// a row of count zero is left out as a row of weight zero is, and the
// rank tolerance and the check for too few rows use the distinct rows, as
// [OLS.FrequencyWeighted] does. counts == nil is Fit.
//
// FitCounts returns the errors of FitOLS, and a *[DataError] named
// "counts" for a NaN, infinite or negative count. It panics as FitOLS does
// and if counts is not nil and len(counts) != len(y).
func (o OLS) FitCounts(x mat.Matrix, y, weights, counts []float64) (Predictor, error) {
	m, err := o.fitOLS(x, y, weights, counts)
	if err != nil {
		return nil, err
	}
	return m, nil
}

// FitOLS fits the linear model y ≈ x·β by weighted least squares.
//
// Coefficients are named from x if it implements [Namer], else "x1", "x2",
// and so on. FitOLS returns a *[DataError] naming the row and column of
// a NaN or infinite value in x or y, or of a NaN, infinite or negative
// weight; an error wrapping [ErrBadValue] if every weight is zero; and one
// wrapping [ErrTooFewRows] if fewer rows have a positive weight than x has
// columns that are not constant. Rows with weight zero are not used in the
// fit but get residuals.
//
// FitOLS panics if len(y) differs from the rows of x, if weights is not
// nil and len(weights) != len(y), if x has no columns, or if o.Weights or
// o.Cov is not a valid kind.
func (o OLS) FitOLS(x mat.Matrix, y, weights []float64) (*OLSFit, error) {
	return o.fitOLS(x, y, weights, nil)
}

// fitOLS is FitOLS with optional row multiplicities (see [OLS.FitCounts]).
func (o OLS) fitOLS(x mat.Matrix, y, weights, counts []float64) (*OLSFit, error) {
	if o.Weights != Precision && o.Weights != Frequency {
		panic(fmt.Sprintf("fit: invalid weight kind %d", int(o.Weights)))
	}
	n, p := x.Dims()
	if len(y) != n {
		panic(fmt.Sprintf("fit: outcome has %d values, design has %d rows", len(y), n))
	}
	if weights != nil && len(weights) != n {
		panic(fmt.Sprintf("fit: weights have %d values, design has %d rows", len(weights), n))
	}
	if counts != nil && len(counts) != n {
		panic(fmt.Sprintf("fit: counts have %d values, design has %d rows", len(counts), n))
	}
	data := rowMajor(x)
	names := columnNames(x, p)
	ls, err := leastSquares(data, n, p, y, weights, counts, lsSpec{Freq: o.Weights == Frequency, Tol: o.Tol, Cov: o.Cov})
	if err != nil {
		if de, ok := err.(*DataError); ok && de.Column > 0 && de.Name == "" {
			de.Name = names[de.Column-1]
		}
		return nil, err
	}
	return newOLSFit(ls, names, o.Cov, o.Weights), nil
}

// rowMajor returns the n×p row-major values of x, without copying when x is
// a *mat.Dense with contiguous rows.
func rowMajor(x mat.Matrix) []float64 {
	n, p := x.Dims()
	if rm, ok := x.(mat.RawMatrixer); ok {
		raw := rm.RawMatrix()
		if raw.Stride == p || n <= 1 {
			return raw.Data[:n*p]
		}
		out := make([]float64, n*p)
		for i := range n {
			copy(out[i*p:i*p+p], raw.Data[i*raw.Stride:])
		}
		return out
	}
	out := make([]float64, n*p)
	if cv, ok := x.(interface{ Column(int) []float64 }); ok {
		for j := range p {
			col := cv.Column(j)
			for i, v := range col[:n] {
				out[i*p+j] = v
			}
		}
		return out
	}
	for i := range n {
		for j := range p {
			out[i*p+j] = x.At(i, j)
		}
	}
	return out
}

// columnNames returns the p coefficient names of every estimator: x's
// column names if it implements [Namer] (x may be nil), with "x1", "x2",
// and so on for columns it leaves unnamed.
func columnNames(x mat.Matrix, p int) []string {
	names := make([]string, p)
	nm, ok := x.(Namer)
	for j := range p {
		if ok {
			names[j] = nm.Name(j)
		}
		if names[j] == "" {
			names[j] = "x" + strconv.Itoa(j+1)
		}
	}
	return names
}

// OLSFit is a linear model fitted by [OLS]. It is immutable and safe
// for concurrent use.
//
// Coefficients that are not estimable have NaN estimates, standard errors,
// t statistics, p-values and intervals; Predict treats them as zero, as a
// fit without those columns would.
type OLSFit struct {
	names     []string
	coef      []float64
	se        []float64
	estimable []bool
	cov       []float64 // p×p
	resid     []float64
	intercept int
	covKind   CovKind
	wkind     WeightKind
	stats     Stats
	cond      float64
}

func newOLSFit(ls *lsFit, names []string, kind CovKind, wk WeightKind) *OLSFit {
	p := ls.p
	m := &OLSFit{
		names:     names,
		coef:      ls.coef,
		estimable: ls.estimable,
		cov:       ls.cov,
		resid:     ls.resid,
		intercept: ls.intercept,
		covKind:   kind,
		wkind:     wk,
		cond:      ls.cond,
	}
	m.se = make([]float64, p)
	for j := range p {
		if ls.estimable[j] {
			m.se[j] = math.Sqrt(ls.cov[j*p+j])
		} else {
			m.se[j] = math.NaN()
		}
	}
	m.stats = linearStats(ls)
	return m
}

// linearStats computes the whole-fit statistics of a least-squares fit.
func linearStats(ls *lsFit) Stats {
	st := Stats{
		Rows:         ls.nobs,
		Params:       ls.rank,
		ResidDF:      ls.nobs - float64(ls.rank),
		Deviance:     ls.rss,
		NullDeviance: ls.tss,
	}
	df := st.ResidDF
	if df > 0 {
		st.ResidSE = math.Sqrt(ls.rss / df)
	} else {
		st.ResidSE = math.NaN()
	}
	icpt := 0.0
	if ls.intercept >= 0 {
		icpt = 1
	}
	st.RSquared, st.AdjRSquared, st.F, st.FPValue = math.NaN(), math.NaN(), math.NaN(), math.NaN()
	if ls.tss > 0 {
		st.RSquared = 1 - ls.rss/ls.tss
		if df > 0 {
			st.AdjRSquared = 1 - (1-st.RSquared)*(ls.nobs-icpt)/df
		}
	}
	d1 := float64(ls.rank) - icpt
	if d1 > 0 && df > 0 {
		mss := ls.tss - ls.rss
		if ls.rss == 0 {
			st.F = math.Inf(1)
		} else {
			st.F = (mss / d1) / (ls.rss / df)
		}
		st.FPValue = fUpper(st.F, d1, df)
	}
	// Log-likelihood of the normal model, as R's logLik.lm: with precision
	// weights 0.5·(Σ log w − N(log 2π + 1 − log N + log RSS)).
	nn := ls.nobs
	st.LogLik = 0.5 * (ls.sumLogW - nn*(math.Log(2*math.Pi)+1-math.Log(nn)+math.Log(ls.rss)))
	k := float64(ls.rank + 1)
	st.AIC = -2*st.LogLik + 2*k
	st.BIC = -2*st.LogLik + math.Log(nn)*k
	return st
}

// Predict writes x·β into dst and returns it; not-estimable coefficients
// count as zero. If dst is nil it is allocated. Predict panics if x does not
// have one column per coefficient or if dst is not nil and len(dst) differs
// from the rows of x.
func (m *OLSFit) Predict(dst []float64, x mat.Matrix) []float64 {
	n, p := x.Dims()
	if p != len(m.coef) {
		panic(fmt.Sprintf("fit: predict: design has %d columns, model has %d", p, len(m.coef)))
	}
	if dst == nil {
		dst = make([]float64, n)
	} else if len(dst) != n {
		panic(fmt.Sprintf("fit: predict: dst has %d values, design has %d rows", len(dst), n))
	}
	data := rowMajor(x)
	for i := range n {
		row := data[i*p : i*p+p]
		var sum float64
		for j, v := range row {
			if m.estimable[j] {
				sum += v * m.coef[j]
			}
		}
		dst[i] = sum
	}
	return dst
}

// Coefficients returns the coefficients in design-column order.
func (m *OLSFit) Coefficients() []Coefficient {
	out := make([]Coefficient, len(m.coef))
	for j := range out {
		out[j] = Coefficient{Name: m.names[j], Estimate: m.coef[j], StdErr: m.se[j], Estimable: m.estimable[j]}
	}
	return out
}

// NotEstimable returns the names of the columns the data did not identify,
// in design order (nil if there are none).
func (m *OLSFit) NotEstimable() []string {
	var out []string
	for j, ok := range m.estimable {
		if !ok {
			out = append(out, m.names[j])
		}
	}
	return out
}

// Intercept returns the index of the design column detected as the
// intercept (the first column constant and non-zero over the rows used), or
// -1 if there is none.
func (m *OLSFit) Intercept() int { return m.intercept }

// CovKind returns the covariance estimator the standard errors use.
func (m *OLSFit) CovKind() CovKind { return m.covKind }

// Condition returns an estimate of the 1-norm condition number of the
// estimable part of the design after weighting, centring and scaling the
// columns to unit norm.
func (m *OLSFit) Condition() float64 { return m.cond }

// CovTo writes the coefficient covariance matrix of the kind chosen by the
// estimator's Cov field into dst and returns it. A nil or empty dst is
// allocated; otherwise it must be p×p or CovTo panics. Rows and columns of
// coefficients that are not estimable are NaN.
func (m *OLSFit) CovTo(dst *mat.SymDense) *mat.SymDense {
	p := len(m.coef)
	if dst == nil {
		dst = mat.NewSymDense(p, nil)
	} else if dst.IsEmpty() {
		dst.ReuseAsSym(p)
	} else if dst.SymmetricDim() != p {
		panic(fmt.Sprintf("fit: covariance dst is %d×%d, want %d×%d", dst.SymmetricDim(), dst.SymmetricDim(), p, p))
	}
	for i := range p {
		for j := i; j < p; j++ {
			dst.SetSym(i, j, m.cov[i*p+j])
		}
	}
	return dst
}

// TStats writes the t statistics (estimate / standard error) into dst and
// returns it; nil dst is allocated, otherwise len(dst) must be the number
// of coefficients or TStats panics.
func (m *OLSFit) TStats(dst []float64) []float64 {
	dst = m.dst(dst)
	for j := range dst {
		dst[j] = m.coef[j] / m.se[j]
	}
	return dst
}

// PValues writes the two-sided p-values of the t statistics into dst and
// returns it, from Student's t with the residual degrees of freedom (also
// for the HC covariances, as R's lmtest::coeftest does). dst is as for
// [OLSFit.TStats].
func (m *OLSFit) PValues(dst []float64) []float64 {
	dst = m.TStats(dst)
	for j, t := range dst {
		dst[j] = studentTwoSided(t, m.stats.ResidDF)
	}
	return dst
}

// ConfInt writes the lower and upper limits of two-sided confidence
// intervals at the given level (such as 0.95) into lo and hi and returns
// them: estimate ± t·SE with t the (1+level)/2 quantile of Student's t with
// the residual degrees of freedom. lo and hi are as dst for
// [OLSFit.TStats]. ConfInt panics unless 0 < level < 1.
func (m *OLSFit) ConfInt(lo, hi []float64, level float64) ([]float64, []float64) {
	if !(level > 0 && level < 1) {
		panic(fmt.Sprintf("fit: confidence level %v outside (0, 1)", level))
	}
	lo, hi = m.dst(lo), m.dst(hi)
	q := studentQuantile((1+level)/2, m.stats.ResidDF)
	for j := range lo {
		lo[j] = m.coef[j] - q*m.se[j]
		hi[j] = m.coef[j] + q*m.se[j]
	}
	return lo, hi
}

// Residuals writes the residuals y − x·β of every row of the fitted data,
// unweighted, into dst and returns it (rows with weight zero included).
// A nil dst is allocated; otherwise its length must be the number of rows
// or Residuals panics.
func (m *OLSFit) Residuals(dst []float64) []float64 {
	if dst == nil {
		dst = make([]float64, len(m.resid))
	} else if len(dst) != len(m.resid) {
		panic(fmt.Sprintf("fit: residuals dst has %d values, want %d", len(dst), len(m.resid)))
	}
	copy(dst, m.resid)
	return dst
}

// Statistics returns the whole-fit statistics. Rows is the number of rows
// with a positive weight for precision weights and the sum of the weights
// for frequency weights; RSquared and AdjRSquared are centred when the
// model has an intercept and uncentred otherwise; LogLik, AIC and BIC
// follow R's logLik.lm, counting the residual variance as a parameter.
func (m *OLSFit) Statistics() Stats { return m.stats }

func (m *OLSFit) dst(dst []float64) []float64 {
	if dst == nil {
		return make([]float64, len(m.coef))
	}
	if len(dst) != len(m.coef) {
		panic(fmt.Sprintf("fit: dst has %d values, model has %d coefficients", len(dst), len(m.coef)))
	}
	return dst
}
