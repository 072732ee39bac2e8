package fit_test

import (
	"fmt"
	"slices"

	"github.com/kalends/kalends/fit"
	"gonum.org/v1/gonum/mat"
)

// named is a design with column names (features.Table is another).
type named struct {
	*mat.Dense
	names []string
}

func (d named) Name(j int) string { return d.names[j] }

// A holiday column that is zero in every row given (as in a bootstrap
// replicate that missed the holiday) is reported as not estimable; the other
// coefficients are those of the fit without it.
func ExampleOLS_notEstimable() {
	// Invented tickets per show: intercept, week number, holiday dummy.
	x := named{mat.NewDense(6, 3, []float64{
		1, 1, 0,
		1, 2, 0,
		1, 3, 0,
		1, 4, 0,
		1, 5, 0,
		1, 6, 0,
	}), []string{"(intercept)", "week", "holiday"}}
	y := []float64{102, 105, 109, 110, 115, 117}

	m, err := fit.OLS{}.FitOLS(x, y, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, c := range m.Coefficients() {
		fmt.Printf("%-12s estimable=%-5v %8.4f (SE %.4f)\n", c.Name, c.Estimable, c.Estimate, c.StdErr)
	}
	st := m.Statistics()
	fmt.Printf("residual df %v, R² %.4f\n", st.ResidDF, st.RSquared)
	// R 4.2.2, summary(lm(y ~ week)), gives the same numbers.

	// Output:
	// (intercept)  estimable=true   99.0667 (SE 0.7815)
	// week         estimable=true    3.0286 (SE 0.2007)
	// holiday      estimable=false      NaN (SE NaN)
	// residual df 4, R² 0.9827
}

// Frequency weights give the fit of the data with each row repeated as
// often as its weight says, so a bootstrap replicate needs no copied rows.
func ExampleOLS_FrequencyWeighted() {
	x := mat.NewDense(4, 2, []float64{1, 0, 1, 1, 1, 2, 1, 3})
	y := []float64{1, 3, 4, 8}
	counts := []float64{2, 0, 1, 3} // row 2 left out, row 4 drawn three times

	weighted, _ := fit.OLS{}.FrequencyWeighted().Fit(x, y, counts)

	expanded := mat.NewDense(6, 2, []float64{1, 0, 1, 0, 1, 2, 1, 3, 1, 3, 1, 3})
	copied, _ := fit.OLS{}.Fit(expanded, []float64{1, 1, 4, 8, 8, 8}, nil)

	for _, p := range []fit.Predictor{weighted, copied} {
		c := p.(fit.Coefficients).Coefficients()
		st := p.(fit.Statistics).Statistics()
		fmt.Printf("slope %.4f (SE %.4f), rows %v, residual df %v\n", c[1].Estimate, c[1].StdErr, st.Rows, st.ResidDF)
	}
	// R 4.2.2 on the expanded data: slope 2.3077, SE 0.23077.

	// Output:
	// slope 2.3077 (SE 0.2308), rows 6, residual df 4
	// slope 2.3077 (SE 0.2308), rows 6, residual df 4
}

// medianSlope is a custom estimator: the line through the origin whose
// slope is the median of y/x over the rows with x ≠ 0 and positive weight.
type medianSlope struct{}

func (medianSlope) Fit(x mat.Matrix, y, w []float64) (fit.Predictor, error) {
	n, _ := x.Dims()
	if len(y) != n {
		panic("medianslope: length mismatch")
	}
	var r []float64
	for i := range n {
		if xi := x.At(i, 0); xi != 0 && (w == nil || w[i] > 0) {
			r = append(r, y[i]/xi)
		}
	}
	if len(r) == 0 {
		return nil, fit.ErrTooFewRows
	}
	slices.Sort(r)
	b := (r[(len(r)-1)/2] + r[len(r)/2]) / 2
	return fit.PredictorFunc(func(dst []float64, x mat.Matrix) []float64 {
		n, _ := x.Dims()
		if dst == nil {
			dst = make([]float64, n)
		}
		for i := range dst {
			dst[i] = b * x.At(i, 0)
		}
		return dst
	}), nil
}

// A custom estimator needs only a Fit method returning a Predictor.
func ExampleFitter() {
	var est fit.Fitter = medianSlope{}
	x := mat.NewDense(5, 1, []float64{1, 2, 3, 4, 5})
	y := []float64{2.1, 3.9, 6.3, 30, 9.8} // one wild row
	p, err := est.Fit(x, y, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%.2f\n", p.Predict(nil, mat.NewDense(1, 1, []float64{10})))
	// The median of the ratios is 2.1, so the prediction at 10 is 21.

	// Output:
	// [21.00]
}

// A Poisson GLM of invented encore counts per show on the week and a
// holiday dummy. Coefficients are on the log scale: exp(0.7307) ≈ 2.08
// is the multiplicative difference in the expected count between holiday
// and other shows in these data, an association, not a causal effect.
func ExampleGLM() {
	x := named{mat.NewDense(10, 3, []float64{
		1, 1, 0,
		1, 2, 0,
		1, 3, 1,
		1, 4, 0,
		1, 5, 0,
		1, 6, 0,
		1, 7, 1,
		1, 8, 0,
		1, 9, 0,
		1, 10, 1,
	}), []string{"(intercept)", "week", "holiday"}}
	y := []float64{2, 3, 6, 2, 4, 3, 7, 3, 5, 9}

	m, err := fit.GLM{Family: fit.Poisson}.FitGLM(x, y, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	z, p := m.WaldStats(nil), m.PValues(nil)
	for j, c := range m.Coefficients() {
		fmt.Printf("%-12s %7.4f (SE %.4f) z %6.3f p %.4f\n", c.Name, c.Estimate, c.StdErr, z[j], p[j])
	}
	st := m.Statistics()
	fmt.Printf("deviance %.4f on %v df, null %.4f, AIC %.3f, %d iterations\n",
		st.Deviance, st.ResidDF, st.NullDeviance, st.AIC, st.Iterations)
	// R 4.2.2, glm(y ~ week + holiday, family = poisson()): estimates
	// 0.7827374, 0.0689593, 0.7307283; SEs 0.3708018, 0.0550745,
	// 0.3158806; deviance 1.148677, null 10.41763, AIC 39.61656, 4
	// iterations.

	// Output:
	// (intercept)   0.7827 (SE 0.3708) z  2.111 p 0.0348
	// week          0.0690 (SE 0.0551) z  1.252 p 0.2105
	// holiday       0.7307 (SE 0.3159) z  2.313 p 0.0207
	// deviance 1.1487 on 7 df, null 10.4176, AIC 39.617, 4 iterations
}

// Ridge shrinks the coefficients of two nearly collinear columns towards
// each other and towards zero; the intercept is not penalised.
func ExampleRidge() {
	x := named{mat.NewDense(8, 3, []float64{
		1, 1, 1.2,
		1, 2, 1.9,
		1, 3, 3.1,
		1, 4, 4.2,
		1, 5, 4.8,
		1, 6, 6.1,
		1, 7, 7.0,
		1, 8, 7.9,
	}), []string{"(intercept)", "a", "b"}}
	y := []float64{1.1, 1.9, 3.2, 3.9, 5.2, 5.8, 7.1, 8.2}

	for _, lambda := range []float64{0, 1, 10} {
		m, err := fit.Ridge{Lambda: lambda}.FitRidge(x, y, nil)
		if err != nil {
			fmt.Println(err)
			return
		}
		c := m.Coefficients()
		fmt.Printf("lambda %-3v intercept %7.4f  a %7.4f  b %7.4f  effective df %.3f\n",
			lambda, c[0].Estimate, c[1].Estimate, c[2].Estimate, m.EffectiveDF())
	}
	// The closed form (Z1ᵀZ1 + λD)⁻¹Z1ᵀy on the standardised scale
	// (divisor n), solved with R 4.2.2's solve(), gives the same numbers:
	// λ 0: 0.05798548, 1.385118, −0.384755, df 3; λ 1: 0.2179651,
	// 0.4861273, 0.4739142, df 1.954041; λ 10: 1.717468, 0.3114861,
	// 0.3162088, df 1.616497.

	// Output:
	// lambda 0   intercept  0.0580  a  1.3851  b -0.3848  effective df 3.000
	// lambda 1   intercept  0.2180  a  0.4861  b  0.4739  effective df 1.954
	// lambda 10  intercept  1.7175  a  0.3115  b  0.3162  effective df 1.616
}
