package inspect

import (
	"errors"
	"fmt"
	"math"
)

// Metrics holds prediction error measures over a set of rows.
//
// Metrics is a plain value, safe to copy and share; the zero value
// describes no rows.
type Metrics struct {
	// N is the number of rows.
	N int
	// RMSE is the root mean squared error, MAE the mean absolute error.
	RMSE, MAE float64
	// R2 is 1 − Σ(y − ŷ)² / Σ(y − ȳ)², ȳ the mean of the observed values
	// of these rows; it is negative when the predictions do worse than ȳ.
	R2 float64
}

// Measure returns the RMSE, MAE and R² of predicted against observed, for
// instance one replicate's out-of-bag rows. It returns an error naming the
// first row (1-based) with a NaN or infinite value, or an error for no
// rows. If the observed values have no spread, it returns the metrics with
// R2 set to NaN together with an error wrapping [ErrNoVariance]. Measure
// panics if the lengths differ.
func Measure(observed, predicted []float64) (Metrics, error) {
	if len(observed) != len(predicted) {
		panic("inspect: Measure: len(observed) != len(predicted)")
	}
	m := Metrics{N: len(observed)}
	if m.N == 0 {
		return m, errors.New("inspect: Measure: no rows")
	}
	var sse, sae, mean float64
	for i, y := range observed {
		p := predicted[i]
		if !finite(y) || !finite(p) {
			return m, fmt.Errorf("inspect: row %d: observed %v, predicted %v: %w", i+1, y, p, errNotFinite)
		}
		d := y - p
		sse += d * d
		sae += math.Abs(d)
		mean += y
	}
	mean /= float64(m.N)
	var sst float64
	for _, y := range observed {
		sst += (y - mean) * (y - mean)
	}
	m.RMSE = math.Sqrt(sse / float64(m.N))
	m.MAE = sae / float64(m.N)
	if m.N < 2 || sst <= 1e-24*mean*mean {
		m.R2 = math.NaN()
		return m, fmt.Errorf("%w (%d rows)", ErrNoVariance, m.N)
	}
	m.R2 = 1 - sse/sst
	return m, nil
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// OutOfBag is one replicate's out-of-bag predictions: Pred[k] is the
// prediction for row Rows[k] (0-based), made by the model fitted on that
// replicate's in-bag rows.
//
// An OutOfBag is a plain value; the functions that take one only read it.
// The zero value has no rows.
type OutOfBag struct {
	Rows []int
	Pred []float64
}

// MeanOutOfBag returns, for each of n rows, the mean of its out-of-bag
// predictions over the replicates, and how many there were. A row that is
// never out of bag gets a NaN mean and a zero count. It panics if a row
// index is outside [0, n) or a replicate's Rows and Pred differ in length.
func MeanOutOfBag(n int, oob []OutOfBag) (mean []float64, count []int) {
	mean, count = make([]float64, n), make([]int, n)
	for _, o := range oob {
		checkOOB(n, o)
		for k, i := range o.Rows {
			mean[i] += o.Pred[k]
			count[i]++
		}
	}
	for i := range mean {
		if count[i] == 0 {
			mean[i] = math.NaN()
		} else {
			mean[i] /= float64(count[i])
		}
	}
	return mean, count
}

func checkOOB(n int, o OutOfBag) {
	if len(o.Rows) != len(o.Pred) {
		panic("inspect: OutOfBag: len(Rows) != len(Pred)")
	}
	for _, i := range o.Rows {
		if i < 0 || i >= n {
			panic(fmt.Sprintf("inspect: OutOfBag: row %d outside [0, %d)", i, n))
		}
	}
}

// Error632 holds the bootstrap prediction error estimates of Efron &
// Tibshirani (1997), "Improvements on cross-validation: the .632+
// bootstrap method", JASA 92:548–560, for squared error.
//
// An Error632 is a plain value, safe to copy and share; the zero value is
// not an estimate.
type Error632 struct {
	// Apparent is the training error err̄: the mean squared error of the
	// full-data fit on the full data.
	Apparent float64
	// OutOfBag is the leave-one-out bootstrap error Err⁽¹⁾: for each row,
	// the mean squared error of the replicates in which it was out of
	// bag, averaged over the rows that were out of bag at least once.
	OutOfBag float64
	// NoInformation is the no-information error rate γ̂ = (1/n²) Σᵢ Σⱼ
	// (yᵢ − ŷⱼ)², over all pairs of observed and full-data fitted values.
	NoInformation float64
	// Overfitting is the relative overfitting rate R̂′ = (Err⁽¹⁾′ − err̄) /
	// (γ̂ − err̄), with Err⁽¹⁾′ = min(Err⁽¹⁾, γ̂), set to 0 unless both
	// Err⁽¹⁾ and γ̂ exceed err̄; it lies in [0, 1].
	Overfitting float64
	// Weight is ŵ = .632 / (1 − .368 R̂′).
	Weight float64
	// Err632 is .368 err̄ + .632 Err⁽¹⁾.
	Err632 float64
	// Err632Plus is (1 − ŵ) err̄ + ŵ Err⁽¹⁾′.
	Err632Plus float64
	// Rows is the number of rows; NeverOut of them were out of bag in no
	// replicate and are left out of OutOfBag.
	Rows, NeverOut int
}

// Estimate632 computes the .632 and .632+ estimates of prediction error
// (squared error) from the observed values, the full-data model's fitted
// values for the same rows, and each replicate's out-of-bag predictions.
// The constants .632 and .368 are those printed in the paper.
//
// It returns an error naming the row (1-based), and the replicate, of the
// first NaN or infinite value, or wrapping [ErrNoOutOfBag] if no row was
// ever out of bag. It panics if observed and fitted differ in length or an
// [OutOfBag] is malformed (see [MeanOutOfBag]).
func Estimate632(observed, fitted []float64, oob []OutOfBag) (Error632, error) {
	n := len(observed)
	if len(fitted) != n {
		panic("inspect: Estimate632: len(observed) != len(fitted)")
	}
	e := Error632{Rows: n}
	var my, mf float64
	for i, y := range observed {
		if !finite(y) || !finite(fitted[i]) {
			return e, fmt.Errorf("inspect: Estimate632: row %d: observed %v, fitted %v: %w", i+1, y, fitted[i], errNotFinite)
		}
		d := y - fitted[i]
		e.Apparent += d * d
		my += y
		mf += fitted[i]
	}
	if n == 0 {
		return e, fmt.Errorf("%w: no rows", ErrNoOutOfBag)
	}
	e.Apparent /= float64(n)
	my /= float64(n)
	mf /= float64(n)
	// (1/n²)ΣᵢΣⱼ(yᵢ − ŷⱼ)² = var(y) + var(ŷ) + (ȳ − ŷ̄)², both variances
	// with divisor n: the same sum in O(n) and without cancellation.
	var vy, vf float64
	for i, y := range observed {
		vy += (y - my) * (y - my)
		vf += (fitted[i] - mf) * (fitted[i] - mf)
	}
	e.NoInformation = vy/float64(n) + vf/float64(n) + (my-mf)*(my-mf)

	loss := make([]float64, n)
	count := make([]int, n)
	for r, o := range oob {
		checkOOB(n, o)
		for k, i := range o.Rows {
			p := o.Pred[k]
			if !finite(p) {
				return e, fmt.Errorf("inspect: Estimate632: replicate %d: row %d: out-of-bag prediction %v: %w", r, i+1, p, errNotFinite)
			}
			d := observed[i] - p
			loss[i] += d * d
			count[i]++
		}
	}
	var sum float64
	for i := range loss {
		if count[i] == 0 {
			e.NeverOut++
			continue
		}
		sum += loss[i] / float64(count[i])
	}
	if e.NeverOut == n {
		return e, fmt.Errorf("%w (%d rows, %d replicates)", ErrNoOutOfBag, n, len(oob))
	}
	e.OutOfBag = sum / float64(n-e.NeverOut)

	e.Err632 = .368*e.Apparent + .632*e.OutOfBag
	err1 := math.Min(e.OutOfBag, e.NoInformation)
	if e.OutOfBag > e.Apparent && e.NoInformation > e.Apparent {
		e.Overfitting = (err1 - e.Apparent) / (e.NoInformation - e.Apparent)
	}
	e.Weight = .632 / (1 - .368*e.Overfitting)
	e.Err632Plus = (1-e.Weight)*e.Apparent + e.Weight*err1
	return e, nil
}
