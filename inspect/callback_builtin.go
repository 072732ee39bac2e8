package inspect

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"

	"github.com/kalends/kalends/fit"
)

// KeepCoefficients returns a Keeper of every replicate's coefficients
// (the fitted model must implement [fit.Coefficients]), aligned to the
// full-data design: element j belongs to the full-data column j, whatever
// columns the replicate's own feature set made. A column the replicate did
// not make, or could not estimate, has Estimable false and NaN estimate
// and standard error; the summaries count those replicates as not
// estimable rather than dropping them. A replicate that made a column the
// full-data fit did not have fails with an error naming it.
func KeepCoefficients() *Kept[[]fit.Coefficient] {
	k := Keep("coefficients", coefficients)
	k.b.builtin = coefficientsKeeper
	return k
}

func coefficients(_ context.Context, r *Replicate) ([]fit.Coefficient, error) {
	c, ok := r.Fitted.(fit.Coefficients)
	if !ok {
		return nil, fmt.Errorf("the fitted model (%T) does not report coefficients", r.Fitted)
	}
	got := c.Coefficients()
	names := r.Design.Names()
	if len(got) != len(names) {
		return nil, fmt.Errorf("the fitted model reports %d coefficients for %d design columns", len(got), len(names))
	}
	out := make([]fit.Coefficient, len(got))
	if r.Full == nil || slices.Equal(names, r.Full.names) {
		for j, cf := range got {
			cf.Name = names[j]
			out[j] = cf
		}
		return out, nil
	}
	want := r.Full.names
	out = make([]fit.Coefficient, len(want))
	for j, name := range want {
		out[j] = fit.Coefficient{Name: name, Estimate: math.NaN(), StdErr: math.NaN()}
	}
	for j, name := range names {
		k := slices.Index(want, name)
		if k < 0 {
			return nil, fmt.Errorf("column %q is not in the full-data design", name)
		}
		cf := got[j]
		cf.Name = name
		out[k] = cf
	}
	return out, nil
}

// KeepMetrics returns a Keeper of every replicate's out-of-bag [Metrics],
// from [Measure] (unweighted, even when the data has case weights). Its
// full-data value ([Kept.Full]) is the apparent error, measured on the
// rows the model was fitted to. When the out-of-bag outcomes have no
// spread, R2 is NaN and the other metrics are kept; a summary then counts
// that R2 as not estimable. A replicate with no out-of-bag rows fails with
// an error saying so.
func KeepMetrics() *Kept[Metrics] {
	k := Keep("metrics", func(_ context.Context, r *Replicate) (Metrics, error) {
		m, err := Measure(r.Outcome, r.Predicted)
		if err != nil && errors.Is(err, ErrNoVariance) {
			return m, nil
		}
		return m, err
	})
	k.b.builtin = metricsKeeper
	return k
}

// KeepOutOfBag returns a Keeper of every replicate's out-of-bag
// predictions, in the form [Estimate632] and [MeanOutOfBag] take (a failed
// replicate's zero value adds nothing to them). Its full-data value holds
// the fitted values of every row. It keeps about 0.37·n values per
// bootstrap replicate, so its memory grows as B·n.
func KeepOutOfBag() *Kept[OutOfBag] {
	return Keep("out-of-bag", func(_ context.Context, r *Replicate) (OutOfBag, error) {
		return OutOfBag{Rows: slices.Clone(r.Rows), Pred: slices.Clone(r.Predicted)}, nil
	})
}

// KeepModels returns a Keeper of every replicate's learned feature set and
// fitted model, as a [Model]. Models can be large; keep them only when
// needed.
func KeepModels() *Kept[*Model] {
	return Keep("models", func(_ context.Context, r *Replicate) (*Model, error) {
		m := &Model{Encoder: r.Encoder, Predictor: r.Fitted, names: r.Design.Names()}
		if r.Full != nil {
			m.extra = r.Full.extra
		} else {
			m.extra = extraOf(m.names, r.Encoder.Names())
		}
		return m, nil
	})
}

// extraOf returns the names after the encoder's own.
func extraOf(all, learned []string) []string {
	if len(all) == len(learned) {
		return nil
	}
	return all[len(learned):]
}

// StatisticOf turns the values kept by k into a [Statistic] for
// [Summarize] through f: Estimate is f of the full-data value, Values[r]
// is f of replicate r's value and Errs are k's errors, so the summary
// counts every failed replicate. It returns the full-data error if the
// callback failed there. After a streamed run, which keeps no values, it
// returns an error.
func StatisticOf[T any](k *Kept[T], name string, f func(T) float64) (Statistic, error) {
	full, err := k.Full()
	if err != nil {
		return Statistic{}, err
	}
	if k.vals == nil {
		return Statistic{}, fmt.Errorf("inspect: Kept %q holds no values (never run, or streamed)", k.b.name)
	}
	s := Statistic{Name: name, Estimate: f(full), Values: make([]float64, len(k.vals)), Errs: k.errs}
	for r, v := range k.vals {
		if k.errs[r] == nil {
			s.Values[r] = f(v)
		}
	}
	return s, nil
}

// CoefficientStatistics turns the values kept by a [KeepCoefficients]
// Keeper into one [Statistic] per full-data design column, in design
// order: Estimate and StdErr from the full-data fit, Values and StdErrs
// from the replicates (NaN where the coefficient was not estimable, which
// the summary counts as such), Errs from the Keeper. It returns an error
// as [StatisticOf] does. A coefficient the full-data fit could not
// estimate gets a NaN Estimate, which Summarize reports as an error for
// that statistic alone.
func CoefficientStatistics(k *Kept[[]fit.Coefficient]) ([]Statistic, error) {
	full, err := k.Full()
	if err != nil {
		return nil, err
	}
	if k.vals == nil {
		return nil, fmt.Errorf("inspect: Kept %q holds no values (never run, or streamed)", k.b.name)
	}
	out := make([]Statistic, len(full))
	for j, c := range full {
		if !c.Estimable {
			c.Estimate, c.StdErr = math.NaN(), 0
		}
		s := Statistic{Name: c.Name, Estimate: c.Estimate, StdErr: c.StdErr, Errs: k.errs,
			Values: make([]float64, len(k.vals)), StdErrs: make([]float64, len(k.vals))}
		for r, cs := range k.vals {
			if k.errs[r] != nil {
				continue
			}
			v, se := cs[j].Estimate, cs[j].StdErr
			if !cs[j].Estimable {
				v, se = math.NaN(), math.NaN()
			}
			s.Values[r], s.StdErrs[r] = v, se
		}
		out[j] = s
	}
	return out, nil
}
