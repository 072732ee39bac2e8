package inspect_test

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"slices"
	"strconv"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"github.com/google/go-cmp/cmp"
	"github.com/google/go-cmp/cmp/cmpopts"
	"gonum.org/v1/gonum/mat"

	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/fit"
	"github.com/kalends/kalends/inspect"
	"github.com/kalends/kalends/resample"
)

func testData(n int) inspect.Data {
	dates, y := simulate(n, 4, 1)
	return inspect.Data{Dates: dates, Outcome: y}
}

// goroutineID returns the current goroutine's number from its stack header.
func goroutineID() int {
	buf := make([]byte, 64)
	buf = buf[:runtime.Stack(buf, false)]
	f := strings.Fields(string(buf))
	id, _ := strconv.Atoi(f[1])
	return id
}

// checkNoLeak fails if the goroutine count does not come back to before
// within a second (goleak-style, without the dependency).
func checkNoLeak(t *testing.T, before int) {
	t.Helper()
	deadline := time.Now().Add(time.Second)
	for {
		now := runtime.NumGoroutine()
		if now <= before {
			return
		}
		if time.Now().After(deadline) {
			buf := make([]byte, 1<<16)
			t.Fatalf("goroutines: got %d, want ≤ %d\n%s", now, before, buf[:runtime.Stack(buf, true)])
		}
		time.Sleep(5 * time.Millisecond)
	}
}

func mustPanic(f func()) (v any) {
	defer func() { v = recover() }()
	f()
	return nil
}

// collected is everything a run keeps, for comparisons.
type collected struct {
	Coef     [][]fit.Coefficient
	CoefErrs []string
	Acc      []inspect.Metrics
	Pred     []inspect.OutOfBag
	Errs     []string
	Full     []fit.Coefficient
}

func errStrings(errs []error) []string {
	out := make([]string, len(errs))
	for i, err := range errs {
		if err != nil {
			out[i] = err.Error()
		}
	}
	return out
}

func runAll(t *testing.T, d inspect.Data, fs features.Builder, opts inspect.Options) collected {
	t.Helper()
	coef, acc, pred := inspect.KeepCoefficients(), inspect.KeepMetrics(), inspect.KeepOutOfBag()
	res, err := inspect.Run(context.Background(), d, fs, opts, coef, acc, pred)
	if err != nil {
		t.Fatal(err)
	}
	full, err := coef.Full()
	if err != nil {
		t.Fatal(err)
	}
	return collected{coef.Values(), errStrings(coef.Errs()), acc.Values(), pred.Values(), errStrings(res.Errs), full}
}

func TestRunSameForAnyWorkers(t *testing.T) {
	d := testData(60)
	fs := calBuilder{cols: allCols, dropAbsent: true}
	base := inspect.Options{Fitter: ols{}, Scheme: bootstrap{B: 40}, Seed: 7}
	want := runAll(t, d, fs, base)
	for _, w := range []int{2, 8, 0} {
		opts := base
		opts.Workers = w
		opts.Buffer = 3
		got := runAll(t, d, fs, opts)
		if diff := cmp.Diff(want, got, cmpopts.EquateNaNs()); diff != "" {
			t.Errorf("Workers %d (-Workers 1 +Workers %d):\n%s", w, w, diff)
		}
	}
	// A different seed must give different replicates, or the test above
	// proves nothing.
	other := base
	other.Seed = 8
	if got := runAll(t, d, fs, other); cmp.Equal(want.Acc, got.Acc) {
		t.Error("seeds 7 and 8 gave the same replicates")
	}
}

// TestRunReplicateIsMaterialisedFit checks that a replicate fitted through
// counts as frequency weights equals the fit on the resample with every row
// copied count times, learned on the copied dates, and that its out-of-bag
// predictions are that model's predictions for the held-out dates.
func TestRunReplicateIsMaterialisedFit(t *testing.T) {
	d := testData(50)
	fs := calBuilder{cols: allCols}
	scheme := bootstrap{B: 5}
	coef, pred := inspect.KeepCoefficients(), inspect.KeepOutOfBag()
	if _, err := inspect.Run(context.Background(), d, fs, inspect.Options{Fitter: ols{}, Scheme: scheme, Seed: 3}, coef, pred); err != nil {
		t.Fatal(err)
	}
	plan, _ := scheme.Plan(len(d.Dates), 3)
	const tol = 1e-9 // relative; the two fits sum the same terms in different orders
	for r := range plan.Len() {
		sp := plan.Split(r, nil)
		enc, m := copiedFit(t, d, fs, ols{}, sp)
		for j, c := range m.(fit.Coefficients).Coefficients() {
			got := coef.Values()[r][j]
			if math.Abs(got.Estimate-c.Estimate) > tol*math.Max(1, math.Abs(c.Estimate)) ||
				math.Abs(got.StdErr-c.StdErr) > tol*math.Max(1, c.StdErr) {
				t.Errorf("replicate %d, %s: got %v ± %v, want %v ± %v", r, c.Name, got.Estimate, got.StdErr, c.Estimate, c.StdErr)
			}
		}
		var outDates []time.Time
		for _, i := range sp.Out {
			outDates = append(outDates, d.Dates[i])
		}
		xo, _ := features.Apply(enc, outDates)
		want := m.Predict(nil, xo)
		p := pred.Values()[r]
		if !slices.Equal(p.Rows, sp.Out) {
			t.Fatalf("replicate %d: out rows %v, want %v", r, p.Rows, sp.Out)
		}
		for k := range want {
			if math.Abs(p.Pred[k]-want[k]) > tol*math.Abs(want[k]) {
				t.Errorf("replicate %d, row %d: predicted %v, want %v", r, sp.Out[k], p.Pred[k], want[k])
			}
		}
	}
}

// singularOdd fails every fit on an odd number of distinct rows.
type singularOdd struct{ ols }

func (s singularOdd) FrequencyWeighted() fit.Fitter { return s }

func (s singularOdd) Fit(x mat.Matrix, y, w []float64) (fit.Predictor, error) {
	if n, _ := x.Dims(); n%2 == 1 {
		return nil, &fit.ConditionError{Cond: 3.2e17}
	}
	return s.ols.Fit(x, y, w)
}

func TestRunFailedFitIsRecorded(t *testing.T) {
	d := testData(40)
	scheme := bootstrap{B: 30}
	acc := inspect.KeepMetrics()
	res, err := inspect.Run(context.Background(), d, calBuilder{cols: allCols[:4]},
		inspect.Options{Fitter: singularOdd{}, Scheme: scheme, Seed: 5, Workers: 3}, acc)
	if err != nil {
		t.Fatal(err)
	}
	plan, _ := scheme.Plan(40, 5)
	wantFailed := 0
	for r := range plan.Len() {
		sp := plan.Split(r, nil)
		odd := len(sp.InBag(nil))%2 == 1
		err := res.Errs[r]
		if !odd {
			if err != nil {
				t.Errorf("replicate %d: unexpected error %v", r, err)
			}
			continue
		}
		wantFailed++
		if !errors.Is(err, fit.ErrSingular) {
			t.Errorf("replicate %d: errors.Is(%v, fit.ErrSingular) = false", r, err)
		}
		var re *inspect.ReplicateError
		if !errors.As(err, &re) || re.Replicate != r {
			t.Errorf("replicate %d: got %#v, want a *ReplicateError for it", r, err)
		}
		if got, want := err.Error(), fmt.Sprintf("replicate %d: fit: singular design (condition 3.2e+17)", r); got != want {
			t.Errorf("message: got %q, want %q", got, want)
		}
		if acc.Errs()[r] != err {
			t.Errorf("replicate %d: Keeper error %v, want the replicate's %v", r, acc.Errs()[r], err)
		}
	}
	if wantFailed == 0 || wantFailed == plan.Len() {
		t.Fatalf("test data gave %d failures of %d; want some of each", wantFailed, plan.Len())
	}
	ok, failed := acc.Count()
	if res.Failed != wantFailed || failed != wantFailed || ok != plan.Len()-wantFailed || res.Finished != plan.Len() {
		t.Errorf("Failed %d, Keeper (%d ok, %d failed), Finished %d; want %d failed of %d", res.Failed, ok, failed, res.Finished, wantFailed, plan.Len())
	}
	if vals, reps := acc.OK(); len(vals) != ok || len(reps) != ok {
		t.Errorf("OK: %d values, %d replicates, want %d", len(vals), len(reps), ok)
	}
}

func TestRunFullDataFailure(t *testing.T) {
	d := testData(41) // odd: the full-data fit fails
	_, err := inspect.Run(context.Background(), d, calBuilder{cols: allCols[:2]},
		inspect.Options{Fitter: singularOdd{}, Scheme: bootstrap{B: 3}})
	if !errors.Is(err, fit.ErrSingular) || !strings.HasPrefix(err.Error(), "full-data fit: ") {
		t.Errorf("got %v, want a full-data singular error", err)
	}
}

func TestRunCallbackErrors(t *testing.T) {
	d := testData(40)
	errOdd := errors.New("odd replicate")
	odd := inspect.Keep("odd", func(_ context.Context, r *inspect.Replicate) (int, error) {
		if r.ID%2 == 1 {
			return 0, errOdd
		}
		return r.ID, nil
	})
	fs := calBuilder{cols: allCols[:4]}
	opts := inspect.Options{Fitter: ols{}, Scheme: bootstrap{B: 10}, Workers: 4}
	res, err := inspect.Run(context.Background(), d, fs, opts, odd)
	if err != nil {
		t.Fatal(err)
	}
	for r, e := range odd.Errs() {
		if (r%2 == 1) != errors.Is(e, errOdd) {
			t.Errorf("replicate %d: error %v", r, e)
		}
		if r%2 == 0 && odd.Values()[r] != r {
			t.Errorf("replicate %d: value %d", r, odd.Values()[r])
		}
	}
	if res.Failed != 0 {
		t.Errorf("Failed = %d, want 0 (callback failures are the Keeper's)", res.Failed)
	}
	if got, want := odd.Errs()[3].Error(), `replicate 3: inspect: callback "odd": odd replicate`; got != want {
		t.Errorf("message: got %q, want %q", got, want)
	}

	// StopOnError, sequential: replicate 0 succeeds, 1 fails and stops.
	opts.Workers, opts.StopOnError = 1, true
	res, err = inspect.Run(context.Background(), d, fs, opts, odd)
	var se *inspect.StopError
	if !errors.As(err, &se) || !errors.Is(err, errOdd) {
		t.Fatalf("got %v, want a *StopError wrapping the callback error", err)
	}
	if res.Finished != 2 || se.Finished != 2 || se.Total != 10 {
		t.Errorf("Finished %d (StopError %d of %d), want 2 of 10", res.Finished, se.Finished, se.Total)
	}
	if odd.Errs()[2] != inspect.ErrNotRun {
		t.Errorf("replicate 2: got %v, want ErrNotRun", odd.Errs()[2])
	}

	// StopOnError, parallel: stops early, and no goroutine is left.
	before := runtime.NumGoroutine()
	opts.Workers = 4
	opts.Scheme = bootstrap{B: 200}
	res, err = inspect.Run(context.Background(), d, fs, opts, odd)
	if !errors.Is(err, errOdd) || res.Finished >= 200 {
		t.Errorf("got %v after %d replicates, want an early stop", err, res.Finished)
	}
	checkNoLeak(t, before)
}

func TestRunCancel(t *testing.T) {
	for _, workers := range []int{1, 4} {
		t.Run(fmt.Sprintf("workers=%d", workers), func(t *testing.T) {
			d := testData(40)
			before := runtime.NumGoroutine()
			ctx, cancel := context.WithCancel(context.Background())
			defer cancel()
			opts := inspect.Options{Fitter: ols{}, Scheme: bootstrap{B: 1000}, Workers: workers,
				Progress: func(done, _ int) {
					if done == 10 {
						cancel()
					}
				}}
			acc := inspect.KeepMetrics()
			res, err := inspect.Run(ctx, d, calBuilder{cols: allCols[:4]}, opts, acc)
			if !errors.Is(err, context.Canceled) {
				t.Fatalf("got %v, want context.Canceled", err)
			}
			var se *inspect.StopError
			if !errors.As(err, &se) || se.Finished != res.Finished {
				t.Errorf("got %v, want a *StopError with Finished %d", err, res.Finished)
			}
			// Promptly: at most the replicates in progress finish after
			// the cancel.
			if res.Finished < 10 || res.Finished > 10+2*workers {
				t.Errorf("Finished %d, want 10 to %d", res.Finished, 10+2*workers)
			}
			notRun := 0
			for _, e := range res.Errs {
				if e == inspect.ErrNotRun {
					notRun++
				}
			}
			ok, _ := acc.Count()
			if notRun != 1000-res.Finished || ok != res.Finished {
				t.Errorf("%d ErrNotRun and %d kept for %d finished of 1000", notRun, ok, res.Finished)
			}
			checkNoLeak(t, before)
		})
	}
}

func TestRunCancelledBefore(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err := inspect.Run(ctx, testData(20), calBuilder{cols: allCols[:2]}, inspect.Options{Fitter: ols{}, Scheme: bootstrap{B: 5}})
	if !errors.Is(err, context.Canceled) {
		t.Errorf("got %v, want context.Canceled", err)
	}
}

func TestRunProgress(t *testing.T) {
	caller := goroutineID()
	var got []int
	var wrong atomic.Int32
	opts := inspect.Options{Fitter: ols{}, Scheme: bootstrap{B: 25}, Workers: 4,
		Progress: func(done, total int) {
			if total != 25 || goroutineID() != caller {
				wrong.Add(1)
			}
			got = append(got, done)
		}}
	if _, err := inspect.Run(context.Background(), testData(30), calBuilder{cols: allCols[:3]}, opts); err != nil {
		t.Fatal(err)
	}
	want := make([]int, 25)
	for i := range want {
		want[i] = i + 1
	}
	if diff := cmp.Diff(want, got); diff != "" {
		t.Errorf("progress calls (-want +got):\n%s", diff)
	}
	if wrong.Load() != 0 {
		t.Errorf("%d progress calls off the caller's goroutine or with a wrong total", wrong.Load())
	}
}

func TestRunPanic(t *testing.T) {
	boom := func(_ context.Context, r *inspect.Replicate) (int, error) {
		if r.ID == 5 {
			panic("boom")
		}
		return r.ID, nil
	}
	for _, workers := range []int{1, 4} {
		t.Run(fmt.Sprintf("workers=%d", workers), func(t *testing.T) {
			before := runtime.NumGoroutine()
			v := mustPanic(func() {
				inspect.Run(context.Background(), testData(30), calBuilder{cols: allCols[:3]},
					inspect.Options{Fitter: ols{}, Scheme: bootstrap{B: 40}, Workers: workers},
					inspect.Keep("boom", boom))
			})
			pe, ok := v.(inspect.PanicError)
			if !ok {
				t.Fatalf("recovered %#v, want an inspect.PanicError", v)
			}
			if pe.Value != "boom" || pe.Replicate != 5 || pe.Where != `callback "boom"` {
				t.Errorf("got %+v, want boom in callback \"boom\" at replicate 5", pe)
			}
			// The original stack names the panicking callback.
			if !bytes.Contains(pe.Stack, []byte("TestRunPanic.func1")) {
				t.Errorf("stack does not name the callback:\n%s", pe.Stack)
			}
			checkNoLeak(t, before)
		})
	}

	t.Run("recorded", func(t *testing.T) {
		k := inspect.Keep("boom", boom)
		res, err := inspect.Run(context.Background(), testData(30), calBuilder{cols: allCols[:3]},
			inspect.Options{Fitter: ols{}, Scheme: bootstrap{B: 10}, Workers: 3, RecordPanics: true}, k)
		if err != nil || res.Finished != 10 {
			t.Fatalf("got %v after %d replicates, want a full run", err, res.Finished)
		}
		var pe inspect.PanicError
		if !errors.As(k.Errs()[5], &pe) || pe.Value != "boom" {
			t.Errorf("replicate 5: got %v, want a recorded PanicError", k.Errs()[5])
		}
		if ok, failed := k.Count(); ok != 9 || failed != 1 {
			t.Errorf("Count = %d, %d; want 9, 1", ok, failed)
		}
	})

	t.Run("fitter", func(t *testing.T) {
		bad := fit.FitterFunc(func(x mat.Matrix, y, w []float64) (fit.Predictor, error) {
			if w != nil {
				panic("fitter boom")
			}
			return ols{}.Fit(x, y, w)
		})
		v := mustPanic(func() {
			inspect.Run(context.Background(), testData(30), calBuilder{cols: allCols[:3]},
				inspect.Options{Fitter: bad, Scheme: bootstrap{B: 10}, Workers: 2})
		})
		if pe, ok := v.(inspect.PanicError); !ok || pe.Where != "fit" || pe.Value != "fitter boom" {
			t.Errorf("recovered %#v, want a PanicError in fit", v)
		}
	})
}

func TestRunMisuse(t *testing.T) {
	d := testData(20)
	fs := calBuilder{cols: allCols[:2]}
	ok := inspect.Options{Fitter: ols{}, Scheme: bootstrap{B: 2}}
	k := inspect.KeepMetrics()
	tests := []struct {
		name string
		run  func()
		want string
	}{
		{"outcome length", func() {
			inspect.Run(context.Background(), inspect.Data{Dates: d.Dates, Outcome: d.Outcome[:3]}, fs, ok)
		}, "inspect: Run: 20 dates but 3 outcomes"},
		{"weights length", func() {
			inspect.Run(context.Background(), inspect.Data{Dates: d.Dates, Outcome: d.Outcome, Weights: []float64{1}}, fs, ok)
		}, "inspect: Run: 20 dates but 1 weights"},
		{"nil builder", func() { inspect.Run(context.Background(), d, nil, ok) }, "inspect: Run: nil features.Builder"},
		{"nil fitter", func() { inspect.Run(context.Background(), d, fs, inspect.Options{Scheme: bootstrap{B: 1}}) }, "inspect: Run: nil Options.Fitter"},
		{"nil scheme", func() { inspect.Run(context.Background(), d, fs, inspect.Options{Fitter: ols{}}) }, "inspect: Run: nil Options.Scheme"},
		{"negative workers", func() {
			o := ok
			o.Workers = -1
			inspect.Run(context.Background(), d, fs, o)
		}, "inspect: negative Options.Workers"},
		{"bad order", func() {
			o := ok
			o.Order = 7
			inspect.Run(context.Background(), d, fs, o)
		}, "inspect: invalid Options.Order 7"},
		{"duplicate keeper", func() { inspect.Run(context.Background(), d, fs, ok, k, k) }, `inspect: two Keepers named "metrics"`},
		{"empty keep name", func() { inspect.Keep("", func(context.Context, *inspect.Replicate) (int, error) { return 0, nil }) }, "inspect: Keep: empty name"},
		{"nil callback", func() { inspect.Keep[int]("x", nil) }, "inspect: Keep: nil callback"},
		{"kept in use", func() {
			inner := inspect.Keep("inner", func(ctx context.Context, r *inspect.Replicate) (int, error) {
				if r.ID == -1 {
					inspect.Run(ctx, d, fs, ok, k)
				}
				return 0, nil
			})
			inspect.Run(context.Background(), d, fs, ok, k, inner)
		}, `inspect: Run: Kept "metrics" is in use by another run`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			v := mustPanic(tt.run)
			msg := fmt.Sprint(v)
			if pe, ok := v.(inspect.PanicError); ok {
				msg = fmt.Sprint(pe.Value)
			}
			if msg != tt.want {
				t.Errorf("panic: got %q, want %q", msg, tt.want)
			}
		})
	}
}

// TestRunCoefficientsAligned checks that a replicate whose feature set
// left out a column reports that column as not estimable, by name, in
// full-data order.
func TestRunCoefficientsAligned(t *testing.T) {
	// Only 2 of 32 rows are in December, so some replicates miss both.
	start := time.Date(2022, 11, 1, 0, 0, 0, 0, time.UTC)
	var d inspect.Data
	for i := range 32 {
		t := start.AddDate(0, 0, i)
		d.Dates = append(d.Dates, t)
		d.Outcome = append(d.Outcome, float64(i%5)+3*calValue("december", t, 0))
	}
	fs := calBuilder{cols: []string{"intercept", "trend", "december"}, dropAbsent: true}
	coef := inspect.KeepCoefficients()
	if _, err := inspect.Run(context.Background(), d, fs, inspect.Options{Fitter: ols{}, Scheme: bootstrap{B: 60}, Seed: 2}, coef); err != nil {
		t.Fatal(err)
	}
	missing := 0
	for r, cs := range coef.Values() {
		if coef.Errs()[r] != nil {
			continue
		}
		names := []string{cs[0].Name, cs[1].Name, cs[2].Name}
		if diff := cmp.Diff([]string{"intercept", "trend", "december"}, names); diff != "" {
			t.Fatalf("replicate %d names (-want +got):\n%s", r, diff)
		}
		if !cs[2].Estimable {
			missing++
			if !math.IsNaN(cs[2].Estimate) || !math.IsNaN(cs[2].StdErr) {
				t.Errorf("replicate %d: not estimable but %v ± %v", r, cs[2].Estimate, cs[2].StdErr)
			}
			if !cs[0].Estimable || !cs[1].Estimable {
				t.Errorf("replicate %d: the other coefficients lost their status", r)
			}
		}
	}
	if missing == 0 {
		t.Error("no replicate missed December; the test proves nothing")
	}
}

// weightScheme is a Bayesian-bootstrap-like scheme with weights.
type weightScheme struct{}

type weightPlan struct{ n int }

func (weightScheme) Plan(n int, _ uint64) (resample.Plan, error) { return weightPlan{n}, nil }
func (p weightPlan) Len() int                                    { return 3 }
func (p weightPlan) Split(r int, dst *resample.Split) *resample.Split {
	if dst == nil {
		dst = &resample.Split{}
	}
	dst.Replicate, dst.Counts, dst.Out = r, nil, nil
	dst.Weights = make([]float64, p.n)
	for i := range dst.Weights {
		if i%3 != r {
			dst.Weights[i] = float64(1 + i%4)
		} else {
			dst.Out = append(dst.Out, i)
		}
	}
	return dst
}

// TestRunWeights checks that a weighting scheme's weights, times the data's
// case weights, reach the estimator, by comparing with a direct weighted
// fit.
func TestRunWeights(t *testing.T) {
	d := testData(30)
	d.Weights = make([]float64, 30)
	for i := range d.Weights {
		d.Weights[i] = 0.5 + float64(i%2)
	}
	fs := calBuilder{cols: allCols[:3]}
	coef := inspect.KeepCoefficients()
	if _, err := inspect.Run(context.Background(), d, fs, inspect.Options{Fitter: ols{}, Scheme: weightScheme{}}, coef); err != nil {
		t.Fatal(err)
	}
	sp := weightPlan{30}.Split(1, nil)
	var dates []time.Time
	var y, w []float64
	for i, wi := range sp.Weights {
		if wi != 0 {
			dates = append(dates, d.Dates[i])
			y = append(y, d.Outcome[i])
			w = append(w, wi*d.Weights[i])
		}
	}
	enc, _ := fs.Learn(dates)
	x, _ := features.Apply(enc, dates)
	m, err := ols{}.Fit(x, y, w)
	if err != nil {
		t.Fatal(err)
	}
	want := m.(fit.Coefficients).Coefficients()
	for j := range want {
		want[j].Name = x.Name(j)
	}
	if diff := cmp.Diff(want, coef.Values()[1], cmpopts.EquateApprox(1e-12, 0)); diff != "" {
		t.Errorf("replicate 1 (-direct +run):\n%s", diff)
	}
}

func TestRunExtraColumns(t *testing.T) {
	d := testData(40)
	extra := features.NewTable(40)
	price := make([]float64, 40)
	for i := range price {
		price[i] = float64(i % 7)
		d.Outcome[i] += 2 * price[i]
	}
	extra.Append("price", price)
	d.Extra = extra
	fs := calBuilder{cols: allCols}
	coef, models := inspect.KeepCoefficients(), inspect.KeepModels()
	res, err := inspect.Run(context.Background(), d, fs, inspect.Options{Fitter: ols{}, Scheme: bootstrap{B: 4}, Workers: 2}, coef, models)
	if err != nil {
		t.Fatal(err)
	}
	if diff := cmp.Diff(append(slices.Clone(allCols), "price"), res.Full.Names()); diff != "" {
		t.Errorf("names (-want +got):\n%s", diff)
	}
	full, _ := coef.Full()
	if p := full[len(full)-1]; p.Name != "price" || math.Abs(p.Estimate-2) > 0.5 {
		t.Errorf("price coefficient %+v, want about 2", p)
	}
	// A kept replicate model needs the extra column to predict.
	m := models.Values()[0]
	if _, err := m.Predict(nil, d.Dates[:2], nil); err == nil {
		t.Error("predict without the extra column: no error")
	}
	newExtra := features.NewTable(2)
	newExtra.Append("price", []float64{1, 2})
	if got, err := m.Predict(nil, d.Dates[:2], newExtra); err != nil || len(got) != 2 {
		t.Errorf("predict: %v, %v", got, err)
	}
}
