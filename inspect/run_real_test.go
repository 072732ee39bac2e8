package inspect_test

// Runs on the real features, holiday, resample and fit packages.

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"sync"
	"testing"
	"time"

	"github.com/google/go-cmp/cmp"
	"github.com/google/go-cmp/cmp/cmpopts"

	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/fit"
	"github.com/kalends/kalends/holiday"
	"github.com/kalends/kalends/inspect"
	"github.com/kalends/kalends/resample"
)

// intercept is a Builder of one column of ones (features has none; fit.OLS
// adds no intercept of its own).
type intercept struct{}

type interceptEncoder struct{}

func (intercept) Learn([]time.Time) (features.Encoder, error) { return interceptEncoder{}, nil }
func (interceptEncoder) Names() []string                      { return []string{"intercept"} }
func (interceptEncoder) Encode(dst *features.Table, dates []time.Time) error {
	ones := make([]float64, len(dates))
	for i := range ones {
		ones[i] = 1
	}
	return dst.Append("intercept", ones)
}

// realDesign is six columns: intercept, weekend, month.sin, month.cos,
// trend.years and any_holiday (England and Wales public holidays).
func realDesign(t testing.TB) features.Builder {
	t.Helper()
	gb, err := holiday.Country("GB")
	if err != nil {
		t.Fatal(err)
	}
	return features.Join(intercept{},
		features.Set{
			Parts: []features.Spec{{Part: features.Weekend}, {Part: features.Month, Encoding: features.Cyclic}},
			Trend: &features.Trend{Origin: time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC), Unit: features.Years},
		},
		holiday.Columns{Calendar: gb, Any: holiday.Parts{Indicator: true}})
}

// realData is n invented events every 5 days from 2021-01-01 (so about one
// row in 50 is a public holiday), with outcome 200 + 10·weekend +
// 6·month.sin − 4·month.cos + 3·trend.years + 25·any_holiday + N(0, 5²).
func realData(t testing.TB, n int, seed uint64) inspect.Data {
	t.Helper()
	enc, err := realDesign(t).Learn([]time.Time{time.Date(2021, 1, 1, 0, 0, 0, 0, time.UTC)})
	if err != nil {
		t.Fatal(err)
	}
	g := rand.New(rand.NewPCG(seed, 99))
	d := inspect.Data{Dates: make([]time.Time, n), Outcome: make([]float64, n)}
	for i := range n {
		d.Dates[i] = time.Date(2021, 1, 1+5*i, 0, 0, 0, 0, time.UTC)
	}
	x, err := features.Apply(enc, d.Dates)
	if err != nil {
		t.Fatal(err)
	}
	beta := []float64{200, 10, 6, -4, 3, 25}
	for i := range n {
		d.Outcome[i] = 5 * g.NormFloat64()
		for j, b := range beta {
			d.Outcome[i] += b * x.At(i, j)
		}
	}
	return d
}

func TestRunRealPackages(t *testing.T) {
	d := realData(t, 120, 1)
	fs := realDesign(t)
	opts := inspect.Options{Fitter: fit.OLS{}, Scheme: resample.Bootstrap{B: 200}, Seed: 9, Workers: 1}
	run := func(workers int) ([][]fit.Coefficient, []inspect.Metrics, *inspect.Kept[[]fit.Coefficient]) {
		o := opts
		o.Workers = workers
		coef, met := inspect.KeepCoefficients(), inspect.KeepMetrics()
		if _, err := inspect.Run(context.Background(), d, fs, o, coef, met); err != nil {
			t.Fatal(err)
		}
		return coef.Values(), met.Values(), coef
	}
	wantC, wantM, coef := run(1)
	gotC, gotM, _ := run(8)
	if diff := cmp.Diff(wantC, gotC, cmpopts.EquateNaNs()); diff != "" {
		t.Errorf("coefficients (-Workers 1 +Workers 8):\n%s", diff)
	}
	if diff := cmp.Diff(wantM, gotM, cmpopts.EquateNaNs()); diff != "" {
		t.Errorf("metrics (-Workers 1 +Workers 8):\n%s", diff)
	}
	stats, err := inspect.CoefficientStatistics(coef)
	if err != nil {
		t.Fatal(err)
	}
	names := make([]string, len(stats))
	for j, s := range stats {
		names[j] = s.Name
	}
	if diff := cmp.Diff([]string{"intercept", "weekend", "month.sin", "month.cos", "trend.years", "any_holiday"}, names); diff != "" {
		t.Fatalf("statistics (-want +got):\n%s", diff)
	}
	// The holiday column is 1 on few rows, so some replicates cannot
	// estimate it; the summary must count them, not drop them.
	s, err := inspect.Summarize(stats[5], inspect.Config{})
	if err != nil {
		t.Fatal(err)
	}
	if s.Replicates != 200 || s.Used+s.NotEstimable+s.Failed != 200 || s.NotEstimable == 0 {
		t.Errorf("any_holiday: %d replicates, %d used, %d not estimable, %d failed; want 200 with some not estimable",
			s.Replicates, s.Used, s.NotEstimable, s.Failed)
	}
	// The trend (true value 3 per year) is well determined.
	s, err = inspect.Summarize(stats[4], inspect.Config{})
	if err != nil {
		t.Fatal(err)
	}
	iv, _ := s.Interval(inspect.Percentile)
	if s.Used != 200 || !(iv.Lower < 3 && 3 < iv.Upper) {
		t.Errorf("trend.years: %d used, percentile interval [%v, %v]; want 200 used and 3 inside (a 5%% chance of a false alarm at this seed is fixed, not random)", s.Used, iv.Lower, iv.Upper)
	}
}

// TestModelConcurrentPredict is for -race: many goroutines predict from
// one full-data model and from kept replicate models, and must all get
// the answer a single goroutine gets.
func TestModelConcurrentPredict(t *testing.T) {
	d := realData(t, 80, 2)
	models := inspect.KeepModels()
	res, err := inspect.Run(context.Background(), d, realDesign(t), inspect.Options{Fitter: fit.OLS{}, Scheme: resample.Bootstrap{B: 4}, Workers: 2}, models)
	if err != nil {
		t.Fatal(err)
	}
	at := make([]time.Time, 30)
	for i := range at {
		at[i] = time.Date(2023, 12, 20+i, 0, 0, 0, 0, time.UTC)
	}
	all := append([]*inspect.Model{res.Full}, models.Values()...)
	want := make([][]float64, len(all))
	for k, m := range all {
		if want[k], err = m.Predict(nil, at, nil); err != nil {
			t.Fatal(err)
		}
	}
	var wg sync.WaitGroup
	errs := make(chan error, 64)
	for g := range 32 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for rep := range 20 {
				k := (g + rep) % len(all)
				got, err := all[k].Predict(nil, at, nil)
				if err != nil {
					errs <- err
					return
				}
				for i := range got {
					if got[i] != want[k][i] && !(math.IsNaN(got[i]) && math.IsNaN(want[k][i])) {
						errs <- fmt.Errorf("goroutine %d, model %d, date %d: got %v, want %v", g, k, i, got[i], want[k][i])
						return
					}
				}
			}
		}()
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		t.Error(err)
	}
}
