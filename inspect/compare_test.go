package inspect_test

import (
	"context"
	"errors"
	"strings"
	"testing"
	"time"

	"github.com/google/go-cmp/cmp"

	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/inspect"
)

// TestCompareSameSplits checks that both sides are measured on the very
// same replicates: each side's metrics equal, bit for bit, those of a Run
// of that feature set alone with the same seed.
func TestCompareSameSplits(t *testing.T) {
	d := testData(200)
	a := calBuilder{cols: []string{"intercept", "trend", "sin", "cos", "weekend"}}
	b := calBuilder{cols: allCols}
	opts := inspect.Options{Fitter: ols{}, Scheme: bootstrap{B: 40}, Seed: 11, Workers: 3}
	c, err := inspect.Compare(context.Background(), d, a, b, opts)
	if err != nil {
		t.Fatal(err)
	}
	for _, side := range []struct {
		name string
		fs   calBuilder
		got  []inspect.Metrics
	}{{"A", a, c.A}, {"B", b, c.B}} {
		m := inspect.KeepMetrics()
		if _, err := inspect.Run(context.Background(), d, side.fs, opts, m); err != nil {
			t.Fatal(err)
		}
		if diff := cmp.Diff(m.Values(), side.got); diff != "" {
			t.Errorf("%s (-Run +Compare):\n%s", side.name, diff)
		}
	}
	// The outcome has a December effect of 12 with noise σ = 4, so the
	// set with the December column predicts held-out rows better in
	// nearly every replicate.
	s, err := c.Summary(0.95)
	if err != nil {
		t.Fatal(err)
	}
	iv, _ := s.Interval(inspect.Percentile)
	if iv.Err != nil || !(iv.Upper < 0) || s.Used != 40 || s.Replicates != 40 {
		t.Errorf("summary %+v, interval %+v; want an interval below 0 resting on 40 replicates", s, iv)
	}
	if !(c.FullB.RMSE < c.FullA.RMSE) {
		t.Errorf("apparent RMSE: A %v, B %v; want B smaller", c.FullA.RMSE, c.FullB.RMSE)
	}
}

// failFirstTwice fails to learn when the first row's date is in bag twice
// or more.
type failFirstTwice struct {
	calBuilder
	first time.Time
}

var errTwice = errors.New("first row drawn twice")

func (f failFirstTwice) Learn(dates []time.Time) (features.Encoder, error) {
	k := 0
	for _, t := range dates {
		if t.Equal(f.first) {
			k++
		}
	}
	if k >= 2 {
		return nil, errTwice
	}
	return f.calBuilder.Learn(dates)
}

func TestCompareFailureCountsForBoth(t *testing.T) {
	d := testData(40)
	a := calBuilder{cols: allCols[:4]}
	b := failFirstTwice{calBuilder{cols: allCols}, d.Dates[0]}
	scheme := bootstrap{B: 30}
	c, err := inspect.Compare(context.Background(), d, a, b, inspect.Options{Fitter: ols{}, Scheme: scheme, Seed: 2, Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	plan, _ := scheme.Plan(40, 2)
	failed := 0
	for r := range 30 {
		twice := plan.Split(r, nil).Counts[0] >= 2
		err := c.Errs[r]
		if twice != (err != nil) {
			t.Errorf("replicate %d: first row count ≥ 2 is %v, error %v", r, twice, err)
		}
		if twice {
			failed++
			if !errors.Is(err, errTwice) || !strings.Contains(err.Error(), "features B: ") || c.A[r] != (inspect.Metrics{}) {
				t.Errorf("replicate %d: got %v and A %+v; want B's failure and no A metrics", r, err, c.A[r])
			}
		}
	}
	if failed == 0 || c.Failed != failed {
		t.Errorf("Failed %d, want %d (> 0)", c.Failed, failed)
	}
	s, err := c.Summary(0.9)
	if err != nil {
		t.Fatal(err)
	}
	if s.Failed != failed || s.Used != 30-failed {
		t.Errorf("summary rests on %d used, %d failed; want %d, %d", s.Used, s.Failed, 30-failed, failed)
	}
}
