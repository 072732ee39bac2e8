package quantile

import (
	"math"
	"testing"
)

// The expected values are R's quantile(1:10, p, type = 7), recorded in
// ../shared/notes/DEPENDENCIES.md §2.2 (run with R there): 1.225, 5.5 and
// 9.775 for p = 0.025, 0.5 and 0.975; the ends are the minimum and maximum
// by the definition (Hyndman & Fan 1996).
func TestR7(t *testing.T) {
	x := []float64{1, 2, 3, 4, 5, 6, 7, 8, 9, 10}
	for _, tt := range []struct {
		name    string
		p, want float64
	}{
		{"lower 2.5%", 0.025, 1.225},
		{"median", 0.5, 5.5},
		{"upper 97.5%", 0.975, 9.775},
		{"minimum", 0, 1},
		{"maximum", 1, 10},
	} {
		t.Run(tt.name, func(t *testing.T) {
			if got := R7(x, tt.p); math.Abs(got-tt.want) > 1e-12 {
				t.Errorf("R7(1..10, %v) = %v, want %v", tt.p, got, tt.want)
			}
		})
	}
	if got := R7([]float64{4}, 0.3); got != 4 {
		t.Errorf("one value: got %v, want 4", got)
	}
}
