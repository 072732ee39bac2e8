package resample_test

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/kalends/kalends/resample"
)

// TestPlanErrors checks that data problems give an *InputError that
// unwraps to the right sentinel and names the option and row.
func TestPlanErrors(t *testing.T) {
	nan := []float64{1, 2, math.NaN(), 4, 5, 6, 7, 8, 9, 10, 11}
	series := []float64{1, 3, 2, 5, 4, 6, 5, 8, 7, 9, 8, 10}
	tests := []struct {
		name   string
		scheme resample.Scheme
		n      int
		want   error
		msg    string // substring of the message
	}{
		{name: "no rows", scheme: resample.Bootstrap{}, n: 0, want: resample.ErrNoRows, msg: "resample: Bootstrap: no rows"},
		{name: "no rows k-fold", scheme: resample.KFold{}, n: 0, want: resample.ErrNoRows, msg: "KFold"},
		{name: "label length", scheme: resample.Bootstrap{Strata: resample.ByLabel([]string{"a", "b"})}, n: 3, want: resample.ErrLength, msg: "ByLabel: 2 labels for 3 rows"},
		{name: "group length", scheme: resample.Grouped{Groups: resample.ByLabel([]int{1, 1, 2})}, n: 4, want: resample.ErrLength, msg: "3 labels for 4 rows"},
		{name: "NaN label", scheme: resample.Bootstrap{Strata: resample.ByLabel([]float64{1, math.NaN()})}, n: 2, want: resample.ErrBadValue, msg: "ByLabel row 2: NaN label"},
		{name: "NaN quantile value", scheme: resample.Bootstrap{Strata: resample.Quantiles{Values: nan}}, n: len(nan), want: resample.ErrBadValue, msg: "Quantiles.Values row 3: value NaN"},
		{name: "Inf quantile value", scheme: resample.KFold{Strata: resample.Quantiles{Values: []float64{1, math.Inf(1)}}, K: 2}, n: 2, want: resample.ErrBadValue, msg: "row 2: value +Inf"},
		{name: "quantile length", scheme: resample.Bootstrap{Strata: resample.Quantiles{Values: nan}}, n: 4, want: resample.ErrLength, msg: "Quantiles.Values: 11 values for 4 rows"},
		{name: "poisson keys", scheme: resample.Poisson{Keys: []uint64{1}}, n: 2, want: resample.ErrLength, msg: "Poisson.Keys: 1 keys for 2 rows"},
		{name: "block too long", scheme: resample.MovingBlock{Length: 6}, n: 5, want: resample.ErrTooFewRows, msg: "MovingBlock.Length: block length 6 exceeds the 5 rows"},
		{name: "circular too long", scheme: resample.CircularBlock{Length: 6}, n: 5, want: resample.ErrTooFewRows, msg: "CircularBlock.Length"},
		{name: "mean too long", scheme: resample.Stationary{Mean: 5.5}, n: 5, want: resample.ErrTooFewRows, msg: "Stationary.Mean"},
		{name: "auto without series", scheme: resample.Stationary{}, n: 12, want: resample.ErrLength, msg: "Stationary.Series: 0 values for 12 rows"},
		{name: "auto series NaN", scheme: resample.CircularBlock{Series: append(series[:11:11], math.NaN())}, n: 12, want: resample.ErrBadValue, msg: "CircularBlock.Series row 12"},
		{name: "auto series short", scheme: resample.MovingBlock{Series: series[:5]}, n: 5, want: resample.ErrTooFewRows, msg: "MovingBlock.Series: 5 values, need at least 10"},
		{name: "auto series constant", scheme: resample.Stationary{Series: make([]float64, 12)}, n: 12, want: resample.ErrBadValue, msg: "constant series"},
		{name: "k > n", scheme: resample.KFold{K: 6}, n: 5, want: resample.ErrTooFewRows, msg: "KFold.K: 6 folds for 5 rows"},
		{name: "window too long", scheme: resample.RollingOrigin{Window: 8, Horizon: 2, Gap: 1}, n: 10, want: resample.ErrTooFewRows, msg: "window 8 + gap 1 + horizon 2 exceeds the 10 rows"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			p, err := tt.scheme.Plan(tt.n, 1)
			if err == nil {
				t.Fatalf("got plan %v, want error %v", p, tt.want)
			}
			if !errors.Is(err, tt.want) {
				t.Errorf("got error %v, want one wrapping %v", err, tt.want)
			}
			var ie *resample.InputError
			if !errors.As(err, &ie) {
				t.Errorf("got %T, want *resample.InputError", err)
			}
			if !strings.Contains(err.Error(), tt.msg) {
				t.Errorf("got message %q, want it to contain %q", err, tt.msg)
			}
		})
	}
}

// TestPlanPanics checks that caller bugs panic with a "resample: " message.
func TestPlanPanics(t *testing.T) {
	tests := []struct {
		name string
		f    func()
		msg  string
	}{
		{name: "negative B", f: func() { resample.Bootstrap{B: -1}.Plan(5, 0) }, msg: "resample: Bootstrap.B = -1 is negative"},
		{name: "negative balanced B", f: func() { resample.Balanced{B: -2}.Plan(5, 0) }, msg: "Balanced.B"},
		{name: "negative n", f: func() { resample.Bayesian{}.Plan(-1, 0) }, msg: "negative number of rows"},
		{name: "nil groups", f: func() { resample.Grouped{}.Plan(5, 0) }, msg: "resample: Grouped.Groups is nil"},
		{name: "negative length", f: func() { resample.MovingBlock{Length: -1}.Plan(5, 0) }, msg: "resample: MovingBlock.Length = -1"},
		{name: "mean below 1", f: func() { resample.Stationary{Mean: 0.5}.Plan(5, 0) }, msg: "resample: Stationary.Mean = 0.5"},
		{name: "mean NaN", f: func() { resample.Stationary{Mean: math.NaN()}.Plan(5, 0) }, msg: "Stationary.Mean = NaN"},
		{name: "one fold", f: func() { resample.KFold{K: 1}.Plan(5, 0) }, msg: "resample: KFold.K = 1"},
		{name: "negative repeats", f: func() { resample.KFold{Repeats: -1}.Plan(5, 0) }, msg: "KFold.Repeats"},
		{name: "negative horizon", f: func() { resample.RollingOrigin{Horizon: -1}.Plan(5, 0) }, msg: "resample: RollingOrigin.Horizon = -1"},
		{name: "negative quantile K", f: func() { resample.Quantiles{K: -1}.Classes(0) }, msg: "resample: Quantiles.K"},
		{name: "replicate out of range", f: func() {
			p, _ := resample.Bootstrap{B: 3}.Plan(5, 0)
			p.Split(3, nil)
		}, msg: "resample: replicate 3 out of range [0, 3)"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got := panics(tt.f)
			if !strings.Contains(got, tt.msg) {
				t.Errorf("got panic %q, want one containing %q", got, tt.msg)
			}
		})
	}
}

// TestSingleRowStratum checks that a one-row stratum is allowed, reported
// by Partitioned, and keeps its row in every replicate exactly once.
func TestSingleRowStratum(t *testing.T) {
	labels := []string{"a", "a", "a", "lone", "a"}
	p := mustPlan(t, resample.Bootstrap{B: 20, Strata: resample.ByLabel(labels)}, 5, 2)
	var single []string
	for _, c := range p.(resample.Partitioned).Classes() {
		if len(c.Rows) == 1 {
			single = append(single, c.Label)
		}
	}
	if d := cmpDiff([]string{"lone"}, single); d != "" {
		t.Errorf("single-row strata (-want +got):\n%s", d)
	}
	for _, s := range resample.All(p) {
		if s.Counts[3] != 1 {
			t.Fatalf("replicate %d: lone row count %d, want 1", s.Replicate, s.Counts[3])
		}
	}
}
