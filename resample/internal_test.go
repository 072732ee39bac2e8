package resample

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"github.com/kalends/kalends/internal/rng"
)

// TestFeistelBijection checks that the cycle-walking Feistel network is a
// permutation of [0, size) for small sizes, including 1 and sizes just
// above and below powers of four.
func TestFeistelBijection(t *testing.T) {
	for _, size := range []uint64{1, 2, 3, 4, 5, 15, 16, 17, 63, 64, 65, 255, 256, 257, 1000, 4097} {
		f := newFeistel(size, rng.Stream(size, purposeBalanced))
		seen := make([]bool, size)
		for x := range size {
			y := f.at(x)
			if y >= size || seen[y] {
				t.Fatalf("size %d: π(%d) = %d is out of range or repeated", size, x, y)
			}
			seen[y] = true
		}
	}
}

// TestStationaryGeometric checks the stationary bootstrap's block lengths
// before the last block is cut: geometric with P(L = k) = p(1−p)^(k−1)
// and mean 1/p (Politis & Romano 1994, J. Amer. Statist. Assoc. 89,
// 1303–1313, §2), by Pearson's chi-square test at level 0.001 and by the
// sample mean within 4 standard errors (Var L = (1−p)/p²).
func TestStationaryGeometric(t *testing.T) {
	tests := []struct {
		name string
		mean float64
	}{
		{name: "mean 1", mean: 1},
		{name: "mean 2.5", mean: 2.5},
		{name: "mean 8", mean: 8},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			const n, b = 500, 200
			pl, err := Stationary{B: b, Mean: tt.mean}.Plan(n, 17)
			if err != nil {
				t.Fatal(err)
			}
			p := pl.(blockPlan)
			prob := 1 / tt.mean
			const cells = 12 // 1, …, 11, ≥ 12
			obs := make([]int, cells)
			var total, sum float64
			for r := range b {
				p.rawBlocks(r, func(start, length, left int) bool {
					if start < 0 || start >= n {
						t.Fatalf("replicate %d: start %d out of range", r, start)
					}
					obs[min(length, cells)-1]++
					total++
					sum += float64(length)
					return length < left
				})
			}
			mean := sum / total
			if se := math.Sqrt((1 - prob) / (prob * prob) / total); math.Abs(mean-tt.mean) > 4*se+1e-12 {
				t.Errorf("mean length: got %.4f, want %.4f ± %.4f", mean, tt.mean, 4*se)
			}
			if tt.mean == 1 {
				if obs[0] != int(total) {
					t.Errorf("mean 1: lengths %v, want all 1", obs)
				}
				return
			}
			exp := make([]float64, cells)
			for k := 1; k < cells; k++ {
				exp[k-1] = total * prob * math.Pow(1-prob, float64(k-1))
			}
			exp[cells-1] = total * math.Pow(1-prob, cells-1)
			var x float64
			for i, o := range obs {
				d := float64(o) - exp[i]
				x += d * d / exp[i]
			}
			if c := (distuv.ChiSquared{K: cells - 1}).Quantile(1 - 0.001); x > c {
				t.Errorf("lengths %v: chi-square %.2f > %.2f (df %d, level 0.001)", obs, x, c, cells-1)
			}
		})
	}
}
