package fit

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

var (
	_ Fitter           = Ridge{}
	_ FrequencyWeigher = Ridge{}
	_ Predictor        = (*RidgeFit)(nil)
	_ Coefficients     = (*RidgeFit)(nil)
	_ Statistics       = (*RidgeFit)(nil)
)

// Ridge fits a linear model by ridge (Tikhonov) regression with penalty
// Lambda on the standardised scale. The zero value is ordinary least
// squares. A Ridge value is safe for concurrent use.
//
// # Standardisation
//
// The intercept is the first column that takes one and the same non-zero
// value in every row with a positive weight; it is never penalised. Every
// other column j is standardised as z = (x − m_j)/s_j, where, with an
// intercept, m_j is the weighted mean Σwx/Σw and
//
//	s_j = √(Σ w (x − m_j)² / Σw)
//
// is the weighted standard deviation with divisor Σw (not Σw − 1); without
// an intercept nothing is centred (m_j = 0) and s_j is the weighted root
// mean square √(Σ w x² / Σw). The coefficients b on that scale minimise
//
//	Σ w (y − ȳ − Z b)² + Lambda · Σ b_j²
//
// (ȳ the weighted mean of y with an intercept, 0 without), that is
// b = (ZᵀWZ + Lambda·I)⁻¹ ZᵀW(y − ȳ), computed by a Householder QR of
// the stacked matrix [√W Z; √Lambda I] rather than by forming ZᵀWZ. They
// are reported on the original scale, β_j = b_j / s_j, with the intercept
// (ȳ − Σ β_j m_j) divided by the intercept column's value. Because the
// divisor is Σw, integer weights give the same coefficients as repeating
// rows: the Weights kind changes only Stats.Rows (rows with a positive
// weight for Precision, Σw for Frequency).
//
// Columns other than the intercept that are constant in the rows with a
// positive weight (s_j ≤ 8ε times their root mean square) are not
// estimable: their coefficients are NaN with Estimable false, and Predict
// ignores them. With Lambda 0 a column collinear with earlier ones is
// likewise not estimable; with Lambda > 0 the penalty identifies every
// other column.
//
// Ridge estimates are biased towards zero by design and have no standard
// errors here: Coefficient.StdErr is NaN. Lambda is on the scale of the
// weighted residual sum of squares, so the same Lambda shrinks less as
// Σw grows.
//
// Fit panics if Lambda is negative, NaN or infinite, if Weights is not a
// defined kind, if the lengths of x, y and weights disagree, or if x has no
// columns. It returns a *DataError for NaN or infinite
// values and negative weights, and an error wrapping ErrBadValue when all
// weights are zero.
type Ridge struct {
	// Lambda is the penalty on the sum of squared standardised
	// coefficients; 0 means no penalty.
	Lambda float64
	// Weights says what the weights passed to Fit mean; Precision by
	// default. It changes only Stats.Rows.
	Weights WeightKind
}

// FrequencyWeighted returns a copy of r that reads its weights as
// frequencies.
func (r Ridge) FrequencyWeighted() Fitter {
	r.Weights = Frequency
	return r
}

// RidgeFit is a fitted ridge regression. It is immutable and safe for
// concurrent use.
type RidgeFit struct {
	lambda    float64
	coefs     []Coefficient
	beta      []float64 // estimates with 0 for columns not estimable
	std       []float64 // standardised-scale coefficients
	intercept int
	edf       float64
	stats     Stats
}

// Fit fits the model to design x, outcome y and case weights (nil means
// all 1) and returns a *RidgeFit. See [Ridge.FitRidge].
func (r Ridge) Fit(x mat.Matrix, y, weights []float64) (Predictor, error) {
	f, err := r.FitRidge(x, y, weights)
	if err != nil {
		return nil, err
	}
	return f, nil
}

// FitRidge is [Ridge.Fit] returning the concrete model. Coefficients are
// named from x if it implements [Namer], else "x1", "x2", and so on.
func (r Ridge) FitRidge(x mat.Matrix, y, weights []float64) (*RidgeFit, error) {
	lam := r.Lambda
	if lam < 0 || math.IsNaN(lam) || math.IsInf(lam, 0) {
		panic(fmt.Sprintf("fit: Ridge: invalid Lambda %v", lam))
	}
	if r.Weights != Precision && r.Weights != Frequency {
		panic(fmt.Sprintf("fit: Ridge: invalid weight kind %d", int(r.Weights)))
	}
	d, err := readDesign("Ridge", x, y, weights)
	if err != nil {
		return nil, err
	}
	n, p := d.n, d.p
	w := d.w
	icpt := d.intercept()

	mean := make([]float64, p)
	scale := make([]float64, p)
	var cols []int // standardised (penalised) columns
	for j, c := range d.cols {
		if j == icpt {
			continue
		}
		if icpt >= 0 {
			mean[j] = weightedMean(c, w, d.sumW)
		}
		var ss, raw float64
		for i, v := range c {
			if w[i] > 0 {
				e := v - mean[j]
				ss += w[i] * e * e
				raw += w[i] * v * v
			}
		}
		scale[j] = math.Sqrt(ss / d.sumW)
		if scale[j] > 8*dblEps*math.Sqrt(raw/d.sumW) {
			cols = append(cols, j)
		}
	}
	ybar := 0.0
	if icpt >= 0 {
		ybar = weightedMean(y, w, d.sumW)
	}

	// Stacked problem [√W Z; √λ I] b = [√W (y − ȳ); 0].
	k := len(cols)
	m := n + k
	a := make([][]float64, k)
	back := make([]float64, m*k)
	sl := math.Sqrt(lam)
	rhs := make([]float64, m)
	sw := rhs[:n] // √w, overwritten by the right-hand side below
	for i, wi := range w {
		sw[i] = math.Sqrt(wi)
	}
	for c, j := range cols {
		col := back[c*m : (c+1)*m]
		inv := 1 / scale[j]
		for i, v := range d.cols[j] {
			col[i] = sw[i] * (v - mean[j]) * inv
		}
		col[n+c] = sl
		a[c] = col
	}
	for i, v := range y {
		rhs[i] = sw[i] * (v - ybar)
	}
	b := make([]float64, k)
	var qr orderedQR
	tol := 0.0
	if lam == 0 {
		tol = rankTol
	}
	if k > 0 {
		qr.factorize(a, tol)
		qr.solve(b, rhs)
	}

	f := &RidgeFit{
		lambda:    lam,
		coefs:     make([]Coefficient, p),
		beta:      make([]float64, p),
		std:       make([]float64, p),
		intercept: icpt,
	}
	for j := range p {
		f.coefs[j] = Coefficient{Name: d.names[j], Estimate: math.NaN(), StdErr: math.NaN()}
		f.std[j] = math.NaN()
	}
	kept := 0
	for c, j := range cols {
		if qr.alias[c] {
			continue
		}
		kept++
		f.std[j] = b[c]
		f.beta[j] = b[c] / scale[j]
		f.coefs[j].Estimate, f.coefs[j].Estimable = f.beta[j], true
	}
	if icpt >= 0 {
		kept++
		v := ybar
		for _, j := range cols {
			v -= f.beta[j] * mean[j]
		}
		cval := d.cols[icpt][firstUsed(w)]
		f.std[icpt] = ybar
		f.beta[icpt] = v / cval
		f.coefs[icpt].Estimate, f.coefs[icpt].Estimable = f.beta[icpt], true
	}

	// effective degrees of freedom: trace of the hat matrix,
	// k − λ·tr((ZᵀWZ + λI)⁻¹) over the kept columns, plus the intercept
	edf := float64(len(qr.kept))
	if lam > 0 && k > 0 {
		cov := mat.NewSymDense(k, nil)
		qr.unscaledCov(cov)
		for c := range k {
			edf -= lam * cov.At(c, c)
		}
	}
	if icpt >= 0 {
		edf++
	}
	f.edf = edf

	var rss, tss float64
	fitted := linearPredict("RidgeFit", nil, x, f.beta)
	for i, v := range y {
		if w[i] > 0 {
			e := v - fitted[i]
			rss += w[i] * e * e
			t := v - ybar
			tss += w[i] * t * t
		}
	}
	rows := float64(d.used)
	if r.Weights == Frequency {
		rows = d.sumW
	}
	f.stats = Stats{
		Rows:         rows,
		Params:       kept,
		ResidDF:      math.NaN(),
		ResidSE:      math.NaN(),
		RSquared:     1 - rss/tss,
		AdjRSquared:  math.NaN(),
		F:            math.NaN(),
		FPValue:      math.NaN(),
		LogLik:       math.NaN(),
		AIC:          math.NaN(),
		BIC:          math.NaN(),
		Deviance:     rss,
		NullDeviance: tss,
	}
	return f, nil
}

// weightedMean returns Σwx/Σw over rows with w > 0, with one correction
// sweep for accuracy.
func weightedMean(x, w []float64, sumW float64) float64 {
	s := 0.0
	for i, v := range x {
		if w[i] > 0 {
			s += w[i] * v
		}
	}
	m := s / sumW
	c := 0.0
	for i, v := range x {
		if w[i] > 0 {
			c += w[i] * (v - m)
		}
	}
	return m + c/sumW
}

func firstUsed(w []float64) int {
	for i, v := range w {
		if v > 0 {
			return i
		}
	}
	return -1
}

// Predict writes x·β for each row of x into dst and returns it; columns
// whose coefficient is not estimable contribute nothing. Predict panics
// if x has the wrong number of columns or dst the wrong length.
func (f *RidgeFit) Predict(dst []float64, x mat.Matrix) []float64 {
	return linearPredict("RidgeFit", dst, x, f.beta)
}

// Coefficients returns a copy of the coefficients on the original scale,
// in design order. StdErr is always NaN.
func (f *RidgeFit) Coefficients() []Coefficient {
	return append([]Coefficient(nil), f.coefs...)
}

// Standardized writes the coefficients on the standardised scale (the b
// of the [Ridge] documentation; for the intercept column, ȳ) into dst and
// returns it; dst is allocated if nil, otherwise it must have one entry
// per design column. Entries of columns not estimable are NaN.
func (f *RidgeFit) Standardized(dst []float64) []float64 {
	if dst == nil {
		dst = make([]float64, len(f.std))
	} else if len(dst) != len(f.std) {
		panic(fmt.Sprintf("fit: RidgeFit.Standardized: len(dst) = %d, want %d", len(dst), len(f.std)))
	}
	copy(dst, f.std)
	return dst
}

// Lambda returns the penalty the model was fitted with.
func (f *RidgeFit) Lambda() float64 { return f.lambda }

// Intercept returns the index of the column detected as the intercept,
// or -1 if there is none.
func (f *RidgeFit) Intercept() int { return f.intercept }

// EffectiveDF returns the effective number of parameters, the trace of
// the hat matrix: Σ d²/(d² + Lambda) over the singular values d of √W Z,
// plus 1 for the intercept. With Lambda 0 it is the number of estimable
// coefficients.
func (f *RidgeFit) EffectiveDF() float64 { return f.edf }

// Statistics returns the fit statistics. Rows counts rows with a positive
// weight (Σw for frequency weights); Params counts estimable coefficients; Deviance is the weighted
// residual sum of squares Σ w (y − ŷ)², NullDeviance the weighted total
// sum of squares (about ȳ with an intercept, about 0 without) and
// RSquared is 1 − Deviance/NullDeviance. The other fields are NaN:
// ridge estimates are biased, so the usual degrees of freedom and
// likelihood statistics do not apply.
func (f *RidgeFit) Statistics() Stats { return f.stats }
