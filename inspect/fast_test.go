package inspect_test

// The batched least-squares path of Run against refitting every replicate.

import (
	"context"
	"errors"
	"math"
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

// fastDesign is realDesign with features.Intercept, so that the whole
// design learns nothing from the rows (features.Adapts is false) and Run
// may take its batched path.
func fastDesign(t testing.TB) features.Builder {
	t.Helper()
	gb, err := holiday.Country("GB")
	if err != nil {
		t.Fatal(err)
	}
	return features.Join(features.Intercept{},
		features.Set{
			Parts: []features.Spec{{Part: features.Weekend}, {Part: features.Month, Encoding: features.Cyclic}},
			Trend: &features.Trend{Origin: time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC), Unit: features.Years},
		},
		holiday.Columns{Calendar: gb, Any: holiday.Parts{Indicator: true}})
}

// pathRun is one run's kept values.
type pathRun struct {
	res  *inspect.Result
	coef *inspect.Kept[[]fit.Coefficient]
	met  *inspect.Kept[inspect.Metrics]
}

func runPath(t *testing.T, d inspect.Data, fs features.Builder, opts inspect.Options, refit bool) pathRun {
	t.Helper()
	opts.Refit = refit
	pr := pathRun{coef: inspect.KeepCoefficients(), met: inspect.KeepMetrics()}
	var err error
	if pr.res, err = inspect.Run(context.Background(), d, fs, opts, pr.coef, pr.met); err != nil {
		t.Fatal(err)
	}
	return pr
}

// rel is |got − want| relative to max(|want|, floor), a NaN floor read as
// 0; it is 0 when both are NaN and +Inf when only one is.
func rel(got, want, floor float64) float64 {
	switch gn, wn := math.IsNaN(got), math.IsNaN(want); {
	case gn && wn:
		return 0
	case gn || wn:
		return math.Inf(1)
	}
	if math.IsNaN(floor) {
		floor = 0
	}
	return math.Abs(got-want) / max(math.Abs(want), floor)
}

// agreeSummaries checks that two summaries of the same statistic agree to
// tol relative and count the same replicates.
func agreeSummaries(t *testing.T, got, want inspect.Summary, tol float64) {
	t.Helper()
	if got.Replicates != want.Replicates || got.Used != want.Used || got.Failed != want.Failed || got.NotEstimable != want.NotEstimable {
		t.Errorf("%s: replicates/used/failed/not estimable got %d/%d/%d/%d, want %d/%d/%d/%d", want.Name,
			got.Replicates, got.Used, got.Failed, got.NotEstimable, want.Replicates, want.Used, want.Failed, want.NotEstimable)
	}
	floor := want.StdErr
	for _, f := range []struct {
		name      string
		got, want float64
	}{
		{"estimate", got.Estimate, want.Estimate}, {"mean", got.Mean, want.Mean},
		{"bias", got.Bias, want.Bias}, {"std error", got.StdErr, want.StdErr},
	} {
		if d := rel(f.got, f.want, floor); d > tol {
			t.Errorf("%s: %s got %v, want %v (relative difference %.2g)", want.Name, f.name, f.got, f.want, d)
		}
	}
	if len(got.Intervals) != len(want.Intervals) {
		t.Fatalf("%s: got %d intervals, want %d", want.Name, len(got.Intervals), len(want.Intervals))
	}
	for k, wi := range want.Intervals {
		gi := got.Intervals[k]
		if gi.Method != wi.Method || gi.Used != wi.Used || (gi.Err == nil) != (wi.Err == nil) {
			t.Errorf("%s %v: got method %v, used %d, err %v; want %v, %d, %v", want.Name, wi.Method, gi.Method, gi.Used, gi.Err, wi.Method, wi.Used, wi.Err)
			continue
		}
		if d := max(rel(gi.Lower, wi.Lower, floor), rel(gi.Upper, wi.Upper, floor)); d > tol {
			t.Errorf("%s %v: got [%v, %v], want [%v, %v] (relative difference %.2g)", want.Name, wi.Method, gi.Lower, gi.Upper, wi.Lower, wi.Upper, d)
		}
	}
}

// TestRunBatchedAgreesWithRefit runs the same data through the batched
// path and through refitting every replicate (Options.Refit) and checks
// that every replicate's kept values agree to 1e-9 (coefficients relative
// to max(|β|, SE)), that the not-estimable coefficients and failures are
// the same, and that the summaries (percentile, basic, normal and
// studentized intervals of every coefficient, and of the out-of-bag RMSE,
// MAE and R²) agree to 1e-9 relative.
func TestRunBatchedAgreesWithRefit(t *testing.T) {
	tests := []struct {
		name            string
		n, B            int
		scheme          resample.Scheme
		fitter          fit.Fitter // nil means fit.OLS{}
		wantNotEstim    bool       // some replicate misses the holiday
		wantFailed      bool       // some replicate fails
		wantMetricsFail bool       // some replicate has no out-of-bag rows
	}{
		{name: "ordinary bootstrap", n: 150, B: 300, scheme: resample.Bootstrap{B: 300}, wantNotEstim: true},
		{name: "few rows", n: 9, B: 400, scheme: resample.Bootstrap{B: 400}, wantFailed: true, wantNotEstim: true},
		{name: "poisson bootstrap", n: 80, B: 200, scheme: resample.Poisson{B: 200}, wantNotEstim: true},
		{name: "k-fold", n: 100, B: 5, scheme: resample.KFold{K: 5}},
		{name: "some replicates without out-of-bag rows", n: 60, B: 100, scheme: everyTenth{B: 100}, wantNotEstim: true, wantMetricsFail: true},
		{name: "ridge", n: 150, B: 300, scheme: resample.Bootstrap{B: 300}, fitter: fit.Ridge{Lambda: 4}, wantNotEstim: true},
		{name: "ridge, few rows", n: 9, B: 200, scheme: resample.Bootstrap{B: 200}, fitter: &fit.Ridge{Lambda: 0.5}, wantNotEstim: true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			d := realData(t, tt.n, 4)
			fs := fastDesign(t)
			opts := inspect.Options{Fitter: tt.fitter, Scheme: tt.scheme, Seed: 21, Workers: 2}
			if opts.Fitter == nil {
				opts.Fitter = fit.OLS{}
			}
			fast := runPath(t, d, fs, opts, false)
			slow := runPath(t, d, fs, opts, true)
			if fast.res.Finished != slow.res.Finished || fast.res.Failed != slow.res.Failed {
				t.Fatalf("finished/failed got %d/%d, want %d/%d", fast.res.Finished, fast.res.Failed, slow.res.Finished, slow.res.Failed)
			}
			if tt.wantFailed != (slow.res.Failed > 0) {
				t.Errorf("refit: %d failed replicates; the case wants some: %v", slow.res.Failed, tt.wantFailed)
			}
			if _, failed := slow.met.Count(); tt.wantMetricsFail != (failed > slow.res.Failed) {
				t.Errorf("refit: %d metrics failures beside %d failed replicates; the case wants some: %v", failed, slow.res.Failed, tt.wantMetricsFail)
			}
			for r := range tt.B {
				if fe, se := fast.met.Errs()[r], slow.met.Errs()[r]; fe != nil && se != nil && fe.Error() != se.Error() {
					t.Errorf("replicate %d: metrics error got %q, want %q", r, fe, se)
				}
				if fe, se := fast.res.Errs[r], slow.res.Errs[r]; (fe == nil) != (se == nil) || fe != nil && fe.Error() != se.Error() {
					t.Fatalf("replicate %d: got error %v, want %v", r, fe, se)
				}
				if fe, se := fast.met.Errs()[r], slow.met.Errs()[r]; (fe == nil) != (se == nil) {
					t.Fatalf("replicate %d: metrics error got %v, want %v", r, fe, se)
				}
			}
			// Replicate by replicate.
			notEstim := 0
			var maxCoef, maxMet float64
			for r, want := range slow.coef.Values() {
				got := fast.coef.Values()[r]
				if len(got) != len(want) {
					t.Fatalf("replicate %d: got %d coefficients, want %d", r, len(got), len(want))
				}
				for j, w := range want {
					g := got[j]
					if g.Name != w.Name || g.Estimable != w.Estimable {
						t.Fatalf("replicate %d column %d: got %q estimable %v, want %q %v", r, j, g.Name, g.Estimable, w.Name, w.Estimable)
					}
					if !w.Estimable {
						notEstim++
						if !math.IsNaN(g.Estimate) || !math.IsNaN(g.StdErr) {
							t.Fatalf("replicate %d column %d: got %v (se %v), want NaN", r, j, g.Estimate, g.StdErr)
						}
						continue
					}
					maxCoef = max(maxCoef, rel(g.Estimate, w.Estimate, w.StdErr), rel(g.StdErr, w.StdErr, 0))
					if math.IsNaN(w.StdErr) != math.IsNaN(g.StdErr) {
						t.Fatalf("replicate %d column %d: got standard error %v, want %v", r, j, g.StdErr, w.StdErr)
					}
				}
				if slow.met.Errs()[r] != nil {
					continue
				}
				gm, wm := fast.met.Values()[r], slow.met.Values()[r]
				if gm.N != wm.N {
					t.Fatalf("replicate %d: out-of-bag rows got %d, want %d", r, gm.N, wm.N)
				}
				maxMet = max(maxMet, rel(gm.RMSE, wm.RMSE, 0), rel(gm.MAE, wm.MAE, 0), rel(gm.R2, wm.R2, 1))
			}
			t.Logf("max relative difference: coefficients and SEs %.2g, metrics %.2g; %d not-estimable coefficients", maxCoef, maxMet, notEstim)
			if maxCoef > 1e-9 || maxMet > 1e-9 {
				t.Errorf("got max relative differences %.3g (coefficients) and %.3g (metrics), want ≤ 1e-9", maxCoef, maxMet)
			}
			if tt.wantNotEstim != (notEstim > 0) {
				t.Errorf("got %d not-estimable coefficients; the case wants some: %v", notEstim, tt.wantNotEstim)
			}
			// Summaries.
			fc, err := inspect.CoefficientStatistics(fast.coef)
			if err != nil {
				t.Fatal(err)
			}
			sc, err := inspect.CoefficientStatistics(slow.coef)
			if err != nil {
				t.Fatal(err)
			}
			for _, m := range []struct {
				name string
				f    func(inspect.Metrics) float64
			}{
				{"rmse", func(m inspect.Metrics) float64 { return m.RMSE }},
				{"mae", func(m inspect.Metrics) float64 { return m.MAE }},
				{"r2", func(m inspect.Metrics) float64 { return m.R2 }},
			} {
				a, err := inspect.StatisticOf(fast.met, m.name, m.f)
				if err != nil {
					t.Fatal(err)
				}
				b, err := inspect.StatisticOf(slow.met, m.name, m.f)
				if err != nil {
					t.Fatal(err)
				}
				fc, sc = append(fc, a), append(sc, b)
			}
			for j := range sc {
				want, werr := inspect.Summarize(sc[j], inspect.Config{})
				got, gerr := inspect.Summarize(fc[j], inspect.Config{})
				if (werr == nil) != (gerr == nil) {
					t.Fatalf("%s: summary error got %v, want %v", sc[j].Name, gerr, werr)
				}
				if werr != nil {
					continue
				}
				agreeSummaries(t, got, want, 1e-9)
			}
		})
	}
}

// TestRunBatchedWorkers checks that the batched path gives bit-identical
// values for any number of workers, and the same Progress sequence.
func TestRunBatchedWorkers(t *testing.T) {
	d := realData(t, 120, 5)
	fs := fastDesign(t)
	var want []fit.Coefficient
	var wantM []inspect.Metrics
	for _, w := range []int{1, 2, 5} {
		var done []int
		opts := inspect.Options{Fitter: fit.OLS{}, Scheme: resample.Bootstrap{B: 1500}, Seed: 3, Workers: w,
			Progress: func(k, total int) { done = append(done, k) }}
		pr := runPath(t, d, fs, opts, false)
		var got []fit.Coefficient
		for _, c := range pr.coef.Values() {
			got = append(got, c...)
		}
		for k, v := range done {
			if v != k+1 {
				t.Fatalf("workers %d: progress call %d got done = %d, want %d", w, k+1, v, k+1)
			}
		}
		if len(done) != 1500 {
			t.Fatalf("workers %d: got %d progress calls, want 1500", w, len(done))
		}
		if want == nil {
			want, wantM = got, pr.met.Values()
			continue
		}
		if diff := cmp.Diff(want, got, cmpopts.EquateNaNs()); diff != "" {
			t.Errorf("coefficients (-Workers 1 +Workers %d):\n%s", w, diff)
		}
		if diff := cmp.Diff(wantM, pr.met.Values(), cmpopts.EquateNaNs()); diff != "" {
			t.Errorf("metrics (-Workers 1 +Workers %d):\n%s", w, diff)
		}
	}
}

// everyTenth is a bootstrap whose every tenth replicate has every row
// once, so no row is out of bag.
type everyTenth struct{ B int }

type everyTenthPlan struct{ resample.Plan }

func (e everyTenth) Plan(n int, seed uint64) (resample.Plan, error) {
	p, err := resample.Bootstrap{B: e.B}.Plan(n, seed)
	return everyTenthPlan{p}, err
}

func (p everyTenthPlan) Split(r int, dst *resample.Split) *resample.Split {
	sp := p.Plan.Split(r, dst)
	if r%10 == 0 {
		for i := range sp.Counts {
			sp.Counts[i] = 1
		}
		sp.Out = sp.Out[:0]
	}
	return sp
}

// holdout is a bootstrap whose replicates from From on also hold one
// in-bag row out of Out, so that Out is no longer the rows of count zero:
// the batched path must hand those replicates back to refitting.
type holdout struct {
	B, From int
}

type holdoutPlan struct {
	resample.Plan
	from int
}

func (h holdout) Plan(n int, seed uint64) (resample.Plan, error) {
	p, err := resample.Bootstrap{B: h.B}.Plan(n, seed)
	return holdoutPlan{p, h.From}, err
}

func (p holdoutPlan) Split(r int, dst *resample.Split) *resample.Split {
	sp := p.Plan.Split(r, dst)
	if r < p.from {
		return sp
	}
	for i, c := range sp.Counts {
		if c > 0 { // hold out the first in-bag row as well
			k := 0
			for k < len(sp.Out) && sp.Out[k] < i {
				k++
			}
			sp.Out = append(sp.Out[:k], append([]int{i}, sp.Out[k:]...)...)
			break
		}
	}
	return sp
}

// TestRunBatchedHandsBack checks a run whose splits stop qualifying for the
// batched path part-way: it must agree with refitting everything, and
// replicates from there on must be measured on their own Out rows.
func TestRunBatchedHandsBack(t *testing.T) {
	d := realData(t, 100, 6)
	fs := fastDesign(t)
	opts := inspect.Options{Fitter: fit.OLS{}, Scheme: holdout{B: 1300, From: 1100}, Seed: 8, Workers: 2}
	fast := runPath(t, d, fs, opts, false)
	slow := runPath(t, d, fs, opts, true)
	if fast.res.Finished != 1300 || fast.res.Failed != slow.res.Failed {
		t.Fatalf("finished/failed got %d/%d, want 1300/%d", fast.res.Finished, fast.res.Failed, slow.res.Failed)
	}
	for r, wm := range slow.met.Values() {
		gm := fast.met.Values()[r]
		if gm.N != wm.N || rel(gm.RMSE, wm.RMSE, 0) > 1e-9 {
			t.Fatalf("replicate %d: metrics got %+v, want %+v", r, gm, wm)
		}
	}
}

// TestRunBatchedStops checks cancellation and StopOnError on the batched
// path: a run cancelled from Progress after 10 replicates returns a
// *StopError wrapping context.Canceled with 10 finished and the rest not
// run; a run with failing replicates under StopOnError stops at the first.
func TestRunBatchedStops(t *testing.T) {
	d := realData(t, 100, 7)
	fs := fastDesign(t)
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	opts := inspect.Options{Fitter: fit.OLS{}, Scheme: resample.Bootstrap{B: 500}, Seed: 1,
		Progress: func(done, _ int) {
			if done == 10 {
				cancel()
			}
		}}
	coef := inspect.KeepCoefficients()
	res, err := inspect.Run(ctx, d, fs, opts, coef)
	var se *inspect.StopError
	if !errors.As(err, &se) || !errors.Is(err, context.Canceled) {
		t.Fatalf("got error %v, want a *StopError wrapping context.Canceled", err)
	}
	if res.Finished != 10 || se.Finished != 10 {
		t.Fatalf("got %d (StopError %d) finished, want 10", res.Finished, se.Finished)
	}
	for r, e := range res.Errs {
		if (r < 10) != (e == nil) || (r >= 10 && !errors.Is(e, inspect.ErrNotRun)) {
			t.Fatalf("replicate %d: got error %v", r, e)
		}
	}

	small := realData(t, 9, 4)
	opts = inspect.Options{Fitter: fit.OLS{}, Scheme: resample.Bootstrap{B: 400}, Seed: 21, StopOnError: true}
	res, err = inspect.Run(context.Background(), small, fs, opts, inspect.KeepCoefficients())
	if !errors.As(err, &se) || !errors.Is(err, fit.ErrTooFewRows) {
		t.Fatalf("got error %v, want a *StopError wrapping fit.ErrTooFewRows", err)
	}
	if res.Failed != 1 || res.Errs[res.Finished-1] == nil {
		t.Errorf("got %d failed of %d finished, last error %v; want the run to stop at its first failure", res.Failed, res.Finished, res.Errs[res.Finished-1])
	}
}
