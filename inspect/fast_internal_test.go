package inspect

import (
	"context"
	"math"
	"testing"
	"time"

	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/fit"
	"github.com/kalends/kalends/resample"
)

// TestBatchPathRule checks which runs take the batched path: the rule
// documented on Run, one condition broken at a time.
func TestBatchPathRule(t *testing.T) {
	const n = 60
	d := Data{Dates: make([]time.Time, n), Outcome: make([]float64, n)}
	for i := range n {
		d.Dates[i] = time.Date(2022, 3, 1+3*i, 0, 0, 0, 0, time.UTC)
		d.Outcome[i] = 10 + 0.1*float64(i) + math.Sin(float64(i))
	}
	trend := features.Set{Trend: &features.Trend{Origin: time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC), Unit: features.Years},
		Parts: []features.Spec{{Part: features.Month, Encoding: features.Cyclic}}}
	fixed := features.Join(features.Intercept{}, trend)
	withLevels := features.Join(features.Intercept{}, features.Set{Parts: []features.Spec{{Part: features.Weekday, Encoding: features.Indicator}}})
	weights := make([]float64, n)
	for i := range weights {
		weights[i] = 1
	}
	boot := resample.Bootstrap{B: 20}
	tests := []struct {
		name  string
		fs    features.Builder
		opts  Options
		keep  func() []Keeper
		wts   []float64
		batch bool
	}{
		{name: "OLS, coefficients and metrics", fs: fixed, opts: Options{Fitter: fit.OLS{}, Scheme: boot}, batch: true},
		{name: "pointer to OLS", fs: fixed, opts: Options{Fitter: &fit.OLS{Tol: 1e-10}, Scheme: boot}, batch: true},
		{name: "no keepers", fs: fixed, opts: Options{Fitter: fit.OLS{}, Scheme: boot}, keep: func() []Keeper { return nil }, batch: true},
		{name: "poisson bootstrap", fs: fixed, opts: Options{Fitter: fit.OLS{}, Scheme: resample.Poisson{B: 20}}, batch: true},
		{name: "Refit", fs: fixed, opts: Options{Fitter: fit.OLS{}, Scheme: boot, Refit: true}},
		{name: "case weights", fs: fixed, opts: Options{Fitter: fit.OLS{}, Scheme: boot}, wts: weights},
		{name: "ridge", fs: fixed, opts: Options{Fitter: fit.Ridge{Lambda: 2}, Scheme: boot}, batch: true},
		{name: "HC3 standard errors", fs: fixed, opts: Options{Fitter: fit.OLS{Cov: fit.HC3}, Scheme: boot}},
		{name: "GLM", fs: fixed, opts: Options{Fitter: fit.GLM{Family: fit.Gamma}, Scheme: boot}},
		{name: "indicator levels learned per replicate", fs: withLevels, opts: Options{Fitter: fit.OLS{}, Scheme: boot}},
		{name: "builder without the capability", fs: features.Join(features.Intercept{}, plainBuilder{trend}), opts: Options{Fitter: fit.OLS{}, Scheme: boot}},
		{name: "Bayesian bootstrap", fs: fixed, opts: Options{Fitter: fit.OLS{}, Scheme: resample.Bayesian{B: 20}}},
		{name: "out-of-bag predictions kept", fs: fixed, opts: Options{Fitter: fit.OLS{}, Scheme: boot},
			keep: func() []Keeper { return []Keeper{KeepCoefficients(), KeepOutOfBag()} }},
		{name: "user callback", fs: fixed, opts: Options{Fitter: fit.OLS{}, Scheme: boot},
			keep: func() []Keeper {
				return []Keeper{Keep("n", func(_ context.Context, r *Replicate) (int, error) { return len(r.Rows), nil })}
			}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			dd := d
			dd.Weights = tt.wts
			keep := []Keeper{KeepCoefficients(), KeepMetrics()}
			if tt.keep != nil {
				keep = tt.keep()
			}
			ru := newRunner(&dd, tt.opts, keepers(keep))
			if err := ru.fitFull(context.Background(), tt.fs); err != nil {
				t.Fatal(err)
			}
			plan, err := tt.opts.Scheme.Plan(n, 1)
			if err != nil {
				t.Fatal(err)
			}
			got := ru.batchPath(tt.fs, &tt.opts, plan, 1) != nil
			if got != tt.batch {
				t.Errorf("got batched path %v, want %v", got, tt.batch)
			}
		})
	}
}

// plainBuilder hides a Builder's Adaptive method.
type plainBuilder struct{ b features.Builder }

func (p plainBuilder) Learn(dates []time.Time) (features.Encoder, error) { return p.b.Learn(dates) }
