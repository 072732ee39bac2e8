package inspect

import (
	"math"
	"testing"

	"github.com/kalends/kalends/features"
)

// TestLeverages checks the hat values of a straight-line design against
// the textbook formula hᵢ = 1/n + (xᵢ − x̄)²/Σ(xⱼ − x̄)² (e.g. Davison &
// Hinkley 1997, §6.2; any regression text), and a duplicated column
// (rank 2 of 3) against the same values.
func TestLeverages(t *testing.T) {
	xs := []float64{1, 2, 4, 7, 11, 16}
	n := len(xs)
	ones := make([]float64, n)
	twice := make([]float64, n)
	var mean float64
	for i, x := range xs {
		ones[i] = 1
		twice[i] = 2 * x
		mean += x / float64(n)
	}
	var sxx float64
	for _, x := range xs {
		sxx += (x - mean) * (x - mean)
	}
	for _, tt := range []struct {
		name string
		cols [][]float64
	}{
		{"full rank", [][]float64{ones, xs}},
		{"collinear column", [][]float64{ones, xs, twice}},
	} {
		t.Run(tt.name, func(t *testing.T) {
			tab := features.NewTable(n)
			for j, c := range tt.cols {
				tab.Append(string(rune('a'+j)), c)
			}
			h, err := leverages(tab)
			if err != nil {
				t.Fatal(err)
			}
			for i, x := range xs {
				want := 1/float64(n) + (x-mean)*(x-mean)/sxx
				if math.Abs(h[i]-want) > 1e-12 {
					t.Errorf("h[%d] = %v, want %v", i, h[i], want)
				}
			}
		})
	}
}
