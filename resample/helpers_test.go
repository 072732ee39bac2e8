package resample_test

import (
	"fmt"
	"slices"
	"testing"

	"github.com/google/go-cmp/cmp"
	"github.com/google/go-cmp/cmp/cmpopts"

	"github.com/kalends/kalends/resample"
)

// mustPlan calls s.Plan and fails the test on error.
func mustPlan(t testing.TB, s resample.Scheme, n int, seed uint64) resample.Plan {
	t.Helper()
	p, err := s.Plan(n, seed)
	if err != nil {
		t.Fatalf("%T.Plan(%d, %d): %v", s, n, seed, err)
	}
	return p
}

// clone returns a deep copy of s.
func clone(s *resample.Split) resample.Split {
	return resample.Split{
		Replicate: s.Replicate,
		Counts:    slices.Clone(s.Counts),
		Weights:   slices.Clone(s.Weights),
		Out:       slices.Clone(s.Out),
	}
}

// panics runs f and returns the panic message, or "" if f did not panic.
func panics(f func()) (msg string) {
	defer func() {
		if r := recover(); r != nil {
			msg = fmt.Sprint(r)
		}
	}()
	f()
	return ""
}

// seq returns 0, 1, …, n−1.
func seq(n int) []int {
	s := make([]int, n)
	for i := range s {
		s[i] = i
	}
	return s
}

// cmpDiff is cmp.Diff treating nil and empty slices alike.
func cmpDiff(want, got any) string {
	return cmp.Diff(want, got, cmpopts.EquateEmpty())
}
