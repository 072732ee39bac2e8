package resample_test

import (
	"slices"
	"testing"

	"github.com/kalends/kalends/resample"
)

// TestKFoldPartition checks the definition of k-fold cross-validation
// (Stone 1974; Hastie, Tibshirani & Friedman 2009, §7.10): in each repeat
// every row is held out in exactly one fold, fold sizes differ by at most
// one, training rows are the complement, and with strata each stratum's
// share of a fold is ⌊n_h/K⌋ or ⌈n_h/K⌉.
func TestKFoldPartition(t *testing.T) {
	labels := []string{"x", "y", "x", "x", "z", "y", "x", "x", "y", "x", "x", "z", "x", "y", "solo", "x", "y"}
	n := len(labels)
	tests := []struct {
		name string
		f    resample.KFold
		k    int
		reps int
	}{
		{name: "default", f: resample.KFold{}, k: 5, reps: 1},
		{name: "k=n", f: resample.KFold{K: n}, k: n, reps: 1},
		{name: "3x4 repeated", f: resample.KFold{K: 3, Repeats: 4}, k: 3, reps: 4},
		{name: "stratified 4x2", f: resample.KFold{K: 4, Repeats: 2, Strata: resample.ByLabel(labels)}, k: 4, reps: 2},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			p := mustPlan(t, tt.f, n, 77)
			if p.Len() != tt.k*tt.reps {
				t.Fatalf("Len: got %d, want %d", p.Len(), tt.k*tt.reps)
			}
			var classes []resample.Class
			if sp, ok := p.(resample.Partitioned); ok {
				classes = sp.Classes()
			}
			var assignments [][]int
			for q := range tt.reps {
				fold := make([]int, n)
				for i := range fold {
					fold[i] = -1
				}
				for f := range tt.k {
					s := p.Split(q*tt.k+f, nil)
					if s.Replicate != q*tt.k+f {
						t.Fatalf("Replicate: got %d, want %d", s.Replicate, q*tt.k+f)
					}
					if sz := len(s.Out); sz != n/tt.k && sz != (n+tt.k-1)/tt.k {
						t.Errorf("repeat %d fold %d: %d rows, want %d or %d", q, f, sz, n/tt.k, (n+tt.k-1)/tt.k)
					}
					if !slices.IsSorted(s.Out) {
						t.Errorf("repeat %d fold %d: Out %v not increasing", q, f, s.Out)
					}
					for _, i := range s.Out {
						if fold[i] != -1 {
							t.Fatalf("repeat %d: row %d in folds %d and %d", q, i, fold[i], f)
						}
						fold[i] = f
					}
					for i, c := range s.Counts {
						if in := slices.Contains(s.Out, i); (c == 1) == in || c > 1 {
							t.Fatalf("repeat %d fold %d row %d: count %d, held out %v", q, f, i, c, in)
						}
					}
					for _, c := range classes {
						var in int
						for _, i := range c.Rows {
							if s.Counts[i] == 0 {
								in++
							}
						}
						lo, hi := len(c.Rows)/tt.k, (len(c.Rows)+tt.k-1)/tt.k
						if in < lo || in > hi {
							t.Errorf("repeat %d fold %d stratum %q: %d rows, want %d to %d", q, f, c.Label, in, lo, hi)
						}
					}
				}
				for i, f := range fold {
					if f < 0 {
						t.Fatalf("repeat %d: row %d never held out", q, i)
					}
				}
				assignments = append(assignments, fold)
			}
			for q := 1; q < len(assignments) && tt.k < n; q++ {
				if slices.Equal(assignments[0], assignments[q]) {
					t.Errorf("repeats 0 and %d have the same folds", q)
				}
			}
		})
	}
}

// TestRollingOrigin checks rolling-origin splits against hand-written
// train and test rows for small cases (definition: Tashman 2000, Int. J.
// Forecasting 16, 437–450).
func TestRollingOrigin(t *testing.T) {
	type tr struct{ Train, Test []int }
	tests := []struct {
		name string
		o    resample.RollingOrigin
		n    int
		want []tr
	}{
		{
			name: "expanding", o: resample.RollingOrigin{Window: 3, Horizon: 2}, n: 7,
			want: []tr{
				{[]int{0, 1, 2}, []int{3, 4}},
				{[]int{0, 1, 2, 3}, []int{4, 5}},
				{[]int{0, 1, 2, 3, 4}, []int{5, 6}},
			},
		},
		{
			name: "sliding gap step", o: resample.RollingOrigin{Window: 3, Horizon: 1, Gap: 1, Step: 2, Sliding: true}, n: 10,
			want: []tr{
				{[]int{0, 1, 2}, []int{4}},
				{[]int{2, 3, 4}, []int{6}},
				{[]int{4, 5, 6}, []int{8}},
			},
		},
		{
			name: "zero value", o: resample.RollingOrigin{}, n: 5,
			want: []tr{
				{[]int{0, 1, 2}, []int{3}},
				{[]int{0, 1, 2, 3}, []int{4}},
			},
		},
		{
			name: "exact fit", o: resample.RollingOrigin{Window: 2, Horizon: 2, Gap: 1}, n: 5,
			want: []tr{{[]int{0, 1}, []int{3, 4}}},
		},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			p := mustPlan(t, tt.o, tt.n, 0)
			var got []tr
			for _, s := range resample.All(p) {
				got = append(got, tr{s.InBag(nil), slices.Clone(s.Out)})
			}
			if d := cmpDiff(tt.want, got); d != "" {
				t.Errorf("splits (-want +got):\n%s", d)
			}
		})
	}
}
