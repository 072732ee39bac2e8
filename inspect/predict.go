package inspect

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime/debug"
	"slices"

	"gonum.org/v1/gonum/mat"

	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/fit"
	"github.com/kalends/kalends/internal/rng"
)

// PredictOptions configure [Predict]. The zero value is not usable: Fitter
// is required.
type PredictOptions struct {
	// Fitter is a least-squares estimator (fit.OLS, say) fitted to the
	// full data and to every replicate's resampled outcome.
	Fitter fit.Fitter
	// Seed drives the residual draws: replicate r uses rng.Replicate(Seed, r).
	Seed uint64
	// B is the number of replicates; 0 means 999.
	B int
	// Level is the coverage of both intervals, in (0, 1); 0 means 0.95.
	Level float64
	// Workers and Progress are as in [Options].
	Workers  int
	Progress func(done, total int)
}

// Prediction holds predictions for new rows with bootstrap intervals. All
// slices have one element per new row.
//
// A Prediction is written only by the Predict that returns it and is safe
// to read concurrently afterwards.
type Prediction struct {
	// Fit is the full-data model's prediction ŷ₊.
	Fit []float64
	// MeanLower and MeanUpper bound the mean outcome at the new row: the
	// basic bootstrap interval 2ŷ₊ − ŷ*₊ at the upper and lower quantile.
	MeanLower, MeanUpper []float64
	// Lower and Upper bound a new outcome at the new row: the prediction
	// interval, which also carries the residual noise.
	Lower, Upper []float64
	// Level is the coverage of the intervals.
	Level float64
	// Replicates is the number of replicates run; Used of them were fitted
	// and Failed were not (their reasons are in Errs).
	Replicates, Used, Failed int
	// Errs holds the first few (at most 3) replicate failures.
	Errs []error
	// Excluded lists the rows (1-based) left out of the residual pool
	// because their leverage is 1 (to 1e-8): a row that alone determines a
	// coefficient, such as the only row of a holiday, has a zero residual
	// that says nothing about the noise.
	Excluded []int
	// Warnings flag interval endpoints read from the most extreme
	// replicates (see [ExtremeOrder]); they apply to every row.
	Warnings []Warning
	// Model is the full-data model.
	Model *Model
}

// Predict predicts the outcome at new rows (at.Dates and at.Extra; the
// outcome of at is ignored) from the full-data fit of fs and opts.Fitter to
// d, with a bootstrap interval for the mean outcome and a prediction
// interval for a new outcome.
//
// The method is model-based resampling for prediction in linear
// regression, Davison & Hinkley (1997), "Bootstrap Methods and their
// Application", §6.3.3, Algorithm 6.4. With ŷ = Xβ̂ the full-data fitted
// values, e their residuals and h the leverages of the design X, the
// modified residuals are rⱼ = eⱼ/√(1 − hⱼ), centred on their mean. Each
// replicate draws ε*ⱼ from the centred rⱼ with replacement, sets
// y* = ŷ + ε*, refits the model to (X, y*) and predicts ŷ*₊ at every new
// row; it also draws ε*₊ from the same pool for every new row and records
// the prediction error δ* = ŷ*₊ − (ŷ₊ + ε*₊). The prediction interval is
// ŷ₊ − δ*₍(R+1)(1−α/2)₎ to ŷ₊ − δ*₍(R+1)α/2₎, and the interval for the mean
// is the same with ŷ*₊ − ŷ₊ in place of δ*; order statistics are read by
// the [DavisonHinkley] rule over the R replicates that were fitted.
//
// The feature set is learned once, on all rows: the design is fixed, as
// the method requires, and only the outcome is resampled. The method
// assumes a linear least-squares fit of y on exactly the columns of the
// design (fit.OLS adds nothing to them), with errors of constant variance
// that are independent of one another; with correlated errors (a
// time-ordered outcome) the intervals are too narrow. The leverages are
// computed from the design by a thin SVD, so they account for columns that
// are not estimable.
//
// Predict returns an error if the full-data fit fails, d has case weights
// (the method is stated for unweighted least squares), a new row cannot be
// encoded, fewer than 2 replicates were fitted, or ctx is cancelled (a
// *[StopError]). It panics if d's slices differ in length, fs or
// opts.Fitter is nil, or an option is out of range.
func Predict(ctx context.Context, d Data, fs features.Builder, at Data, opts PredictOptions) (*Prediction, error) {
	n := d.rows("Predict")
	if fs == nil {
		panic("inspect: Predict: nil features.Builder")
	}
	if opts.Fitter == nil {
		panic("inspect: Predict: nil PredictOptions.Fitter")
	}
	if opts.B < 0 {
		panic("inspect: Predict: negative PredictOptions.B")
	}
	b := opts.B
	if b == 0 {
		b = 999
	}
	level := opts.Level
	if level == 0 {
		level = 0.95
	}
	if !(level > 0 && level < 1) {
		return nil, fmt.Errorf("%w: %v", ErrLevel, opts.Level)
	}
	if d.Weights != nil {
		return nil, errors.New("inspect: Predict: case weights are not supported by the residual bootstrap")
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	ru := newRunner(&d, Options{Fitter: opts.Fitter}, nil)
	if err := ru.fitFull(ctx, fs); err != nil {
		return nil, err
	}
	full := ru.full
	x, err := full.Design(d.Dates, d.Extra)
	if err != nil {
		return nil, &ReplicateError{Replicate: -1, Err: err}
	}
	xNew, err := full.Design(at.Dates, at.Extra)
	if err != nil {
		return nil, err
	}
	m := len(at.Dates)
	fitted := full.Predictor.Predict(nil, x)
	fitNew := make([]float64, m)
	if m > 0 {
		full.Predictor.Predict(fitNew, xNew)
	}
	h, err := leverages(x)
	if err != nil {
		return nil, err
	}
	pred := &Prediction{Fit: fitNew, Level: level, Replicates: b, Model: full}
	var pool []float64
	for j := range n {
		if h[j] >= 1-1e-8 {
			pred.Excluded = append(pred.Excluded, j+1)
			continue
		}
		pool = append(pool, (d.Outcome[j]-fitted[j])/math.Sqrt(1-h[j]))
	}
	if len(pool) < 2 {
		return nil, fmt.Errorf("inspect: Predict: %d of %d rows have leverage below 1; the residual pool needs 2", len(pool), n)
	}
	var mean float64
	for _, r := range pool {
		mean += r
	}
	mean /= float64(len(pool))
	for k := range pool {
		pool[k] -= mean
	}

	// mu[k*b+r] is ŷ*₊ − ŷ₊ and delta[k*b+r] is δ* for new row k.
	mu := make([]float64, m*b)
	delta := make([]float64, m*b)
	ok := make([]bool, b)
	eng := (&Options{Workers: opts.Workers, Progress: opts.Progress}).engine(b)
	type payload struct{ mu, delta []float64 }
	newRecord := func() *Record {
		return &Record{payload: &payload{mu: make([]float64, m), delta: make([]float64, m)}}
	}
	newWork := func() workFunc {
		ystar := make([]float64, n)
		pnew := make([]float64, m)
		return func(_ context.Context, r int, rec *Record) {
			stage := "fit"
			defer func() {
				if v := recover(); v != nil {
					rec.panic = &PanicError{Replicate: r, Where: stage, Value: v, Stack: debug.Stack()}
				}
			}()
			g := rng.Replicate(opts.Seed, r)
			for j := range ystar {
				ystar[j] = fitted[j] + pool[g.IntN(len(pool))]
			}
			model, err := opts.Fitter.Fit(x, ystar, nil)
			if err != nil {
				rec.Err = &ReplicateError{Replicate: r, Err: err}
				rec.failed = true
				return
			}
			stage = "predict"
			pl := rec.payload.(*payload)
			if m > 0 {
				model.Predict(pnew, xNew)
			}
			for k := range m {
				if math.IsNaN(pnew[k]) || math.IsInf(pnew[k], 0) {
					rec.Err = &ReplicateError{Replicate: r, Err: fmt.Errorf("inspect: prediction for new row %d is %v", k+1, pnew[k])}
					rec.failed = true
					return
				}
				pl.mu[k] = pnew[k] - fitNew[k]
				pl.delta[k] = pnew[k] - (fitNew[k] + pool[g.IntN(len(pool))])
			}
		}
	}
	deliver := func(rec *Record) error {
		r := rec.Replicate
		if rec.Err != nil {
			pred.Failed++
			if len(pred.Errs) < 3 {
				pred.Errs = append(pred.Errs, rec.Err)
			}
			return nil
		}
		ok[r] = true
		pl := rec.payload.(*payload)
		for k := range m {
			mu[k*b+r] = pl.mu[k]
			delta[k*b+r] = pl.delta[k]
		}
		return nil
	}
	if _, err := eng.run(ctx, newWork, newRecord, deliver); err != nil {
		return nil, err
	}
	pred.Used = b - pred.Failed
	if pred.Used < 2 {
		return nil, &TooFewError{Name: "prediction", Replicates: b, Used: pred.Used, Failed: pred.Failed, First: pred.Errs}
	}
	alpha := (1 - level) / 2
	for _, e := range []struct {
		p   float64
		end End
	}{{alpha, UpperEnd}, {1 - alpha, LowerEnd}} {
		if in, need := interior(e.p, pred.Used, DavisonHinkley); !in {
			pred.Warnings = append(pred.Warnings, Warning{Kind: ExtremeOrder, End: e.end, Used: pred.Used, Need: need})
		}
	}
	pred.MeanLower, pred.MeanUpper = make([]float64, m), make([]float64, m)
	pred.Lower, pred.Upper = make([]float64, m), make([]float64, m)
	vals := make([]float64, 0, pred.Used)
	for k := range m {
		for _, src := range []struct {
			v      []float64
			lo, hi []float64
		}{{mu, pred.MeanLower, pred.MeanUpper}, {delta, pred.Lower, pred.Upper}} {
			vals = vals[:0]
			for r, good := range ok {
				if good {
					vals = append(vals, src.v[k*b+r])
				}
			}
			slices.Sort(vals)
			src.lo[k] = fitNew[k] - Quantile(1-alpha, DavisonHinkley, vals)
			src.hi[k] = fitNew[k] - Quantile(alpha, DavisonHinkley, vals)
		}
	}
	return pred, nil
}

// leverages returns the diagonal of the hat matrix of x, from a thin SVD
// with the rank tolerance max(n, p)·ε·σ₁.
func leverages(x *features.Table) ([]float64, error) {
	n, p := x.Dims()
	var svd mat.SVD
	if !svd.Factorize(x.DenseTo(nil), mat.SVDThinU) {
		return nil, errors.New("inspect: Predict: the SVD of the design did not converge")
	}
	rank := svd.Rank(float64(max(n, p)) * 0x1p-52)
	var u mat.Dense
	svd.UTo(&u)
	h := make([]float64, n)
	for j := range n {
		for k := range rank {
			v := u.At(j, k)
			h[j] += v * v
		}
	}
	return h, nil
}
