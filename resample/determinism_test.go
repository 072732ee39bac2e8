package resample_test

import (
	"slices"
	"sync"
	"testing"

	"github.com/kalends/kalends/resample"
)

// schemes returns one of every scheme over n = 60 rows.
func schemes() (n int, list []struct {
	name   string
	scheme resample.Scheme
}) {
	n = 60
	labels := make([]string, n)
	values := make([]float64, n)
	series := make([]float64, n)
	keys := make([]uint64, n)
	for i := range n {
		labels[i] = string(rune('a' + i%7))
		values[i] = float64((i * 37) % 23)
		series[i] = float64((i*i)%11) + float64(i%5)
		keys[i] = uint64(1000 + 3*i)
	}
	list = []struct {
		name   string
		scheme resample.Scheme
	}{
		{"bootstrap", resample.Bootstrap{B: 40}},
		{"stratified labels", resample.Bootstrap{B: 40, Strata: resample.ByLabel(labels)}},
		{"stratified quantiles", resample.Bootstrap{B: 40, Strata: resample.Quantiles{Values: values, K: 5}}},
		{"balanced", resample.Balanced{B: 40}},
		{"moving block", resample.MovingBlock{B: 40, Length: 6}},
		{"circular block auto", resample.CircularBlock{B: 40, Series: series}},
		{"stationary", resample.Stationary{B: 40, Mean: 4.2}},
		{"grouped", resample.Grouped{B: 40, Groups: resample.ByLabel(labels)}},
		{"bayesian", resample.Bayesian{B: 40}},
		{"poisson", resample.Poisson{B: 40}},
		{"poisson keyed", resample.Poisson{B: 40, Keys: keys}},
		{"k-fold", resample.KFold{K: 6, Repeats: 5}},
		{"stratified k-fold", resample.KFold{K: 4, Repeats: 3, Strata: resample.ByLabel(labels)}},
		{"rolling origin", resample.RollingOrigin{Window: 20, Horizon: 3, Gap: 2, Step: 2, Sliding: true}},
	}
	return n, list
}

// TestDeterminism checks that a replicate depends only on (seed, r): made
// in order, in reverse, concurrently from 8 goroutines each reusing its
// own dst, or alone from a fresh plan, the splits are identical.
func TestDeterminism(t *testing.T) {
	n, list := schemes()
	const seed = 20260101
	for _, tt := range list {
		t.Run(tt.name, func(t *testing.T) {
			p := mustPlan(t, tt.scheme, n, seed)
			b := p.Len()
			want := make([]resample.Split, b)
			for r, s := range resample.All(p) {
				want[r] = clone(s)
			}

			reversed := make([]resample.Split, b)
			var dst *resample.Split
			for r := b - 1; r >= 0; r-- {
				dst = p.Split(r, dst)
				reversed[r] = clone(dst)
			}
			if d := cmpDiff(want, reversed); d != "" {
				t.Errorf("reversed order (-want +got):\n%s", d)
			}

			concurrent := make([]resample.Split, b)
			var wg sync.WaitGroup
			for w := range 8 {
				wg.Go(func() {
					var dst *resample.Split
					for r := w; r < b; r += 8 {
						dst = p.Split(r, dst)
						concurrent[r] = clone(dst)
					}
				})
			}
			wg.Wait()
			if d := cmpDiff(want, concurrent); d != "" {
				t.Errorf("8 goroutines (-want +got):\n%s", d)
			}

			alone := mustPlan(t, tt.scheme, n, seed).Split(b/2, nil)
			if d := cmpDiff(want[b/2], clone(alone)); d != "" {
				t.Errorf("replicate %d alone (-want +got):\n%s", b/2, d)
			}
		})
	}
}

// TestSeedMatters checks that another seed gives other replicates (every
// random scheme), so the seed is really used.
func TestSeedMatters(t *testing.T) {
	n, list := schemes()
	for _, tt := range list {
		if tt.name == "rolling origin" {
			continue // uses no randomness
		}
		t.Run(tt.name, func(t *testing.T) {
			a := mustPlan(t, tt.scheme, n, 1).Split(0, nil)
			b := mustPlan(t, tt.scheme, n, 2).Split(0, nil)
			if slices.Equal(a.Counts, b.Counts) && slices.Equal(a.Weights, b.Weights) {
				t.Errorf("seeds 1 and 2 give the same replicate 0")
			}
		})
	}
}

// TestReuseAcrossSchemes checks that a dst last filled by a weighting
// scheme is cleanly refilled by a counting one and back.
func TestReuseAcrossSchemes(t *testing.T) {
	boot := mustPlan(t, resample.Bootstrap{B: 2}, 10, 4)
	bayes := mustPlan(t, resample.Bayesian{B: 2}, 10, 4)
	dst := bayes.Split(0, nil)
	dst = boot.Split(1, dst)
	if d := cmpDiff(clone(boot.Split(1, nil)), clone(dst)); d != "" {
		t.Errorf("bootstrap into a Bayesian dst (-want +got):\n%s", d)
	}
	dst = bayes.Split(1, dst)
	if d := cmpDiff(clone(bayes.Split(1, nil)), clone(dst)); d != "" {
		t.Errorf("Bayesian into a bootstrap dst (-want +got):\n%s", d)
	}
}

// TestOneStratumIsOrdinary checks that a stratified bootstrap with a
// single stratum draws exactly the ordinary bootstrap's replicates: both
// follow the same documented draw rule (two 32-bit words per Uint64,
// Lemire's method), one through rng.Halves and one through its unrolled
// hot loop.
func TestOneStratumIsOrdinary(t *testing.T) {
	for _, n := range []int{1, 2, 3, 17, 1000} {
		same := make([]string, n)
		plain := mustPlan(t, resample.Bootstrap{B: 20}, n, 6)
		strat := mustPlan(t, resample.Bootstrap{B: 20, Strata: resample.ByLabel(same)}, n, 6)
		for r := range 20 {
			if d := cmpDiff(clone(plain.Split(r, nil)), clone(strat.Split(r, nil))); d != "" {
				t.Fatalf("n=%d replicate %d (-ordinary +one stratum):\n%s", n, r, d)
			}
		}
	}
}
