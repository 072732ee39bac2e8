package resample_test

import (
	"testing"

	"github.com/kalends/kalends/resample"
)

// BenchmarkBootstrap1000x100k makes 1,000 ordinary bootstrap replicates
// over 100,000 rows (counts plus out-of-bag list), one op being all 1,000,
// reusing one Split as a caller looping with All would.
func BenchmarkBootstrap1000x100k(b *testing.B) {
	const n, reps = 100_000, 1000
	p := mustPlan(b, resample.Bootstrap{B: reps}, n, 1)
	var s *resample.Split
	for b.Loop() {
		for r := range reps {
			s = p.Split(r, s)
		}
	}
	_ = s
}

// benchScheme times b.N replicates of a scheme over 100,000 rows.
func benchScheme(b *testing.B, sc resample.Scheme) {
	const n = 100_000
	p := mustPlan(b, sc, n, 1)
	var s *resample.Split
	r := 0
	for b.Loop() {
		s = p.Split(r%p.Len(), s)
		r++
	}
}

func BenchmarkSplit100k(b *testing.B) {
	labels := make([]int, 100_000)
	for i := range labels {
		labels[i] = i % 12
	}
	for _, bb := range []struct {
		name string
		s    resample.Scheme
	}{
		{"bootstrap", resample.Bootstrap{}},
		{"stratified", resample.Bootstrap{Strata: resample.ByLabel(labels)}},
		{"balanced", resample.Balanced{}},
		{"stationary", resample.Stationary{Mean: 10}},
		{"bayesian", resample.Bayesian{}},
		{"poisson", resample.Poisson{}},
		{"kfold", resample.KFold{K: 10}},
	} {
		b.Run(bb.name, func(b *testing.B) { benchScheme(b, bb.s) })
	}
}
