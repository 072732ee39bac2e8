// Package quantile holds the sample-quantile rule shared by kalends'
// packages.
package quantile

import "math"

// R7 returns the p quantile of sorted values by definition 7 of Hyndman &
// Fan (1996), the default of R's quantile and numpy's percentile: linear
// interpolation between the order statistics at h = (n−1)p. sorted must be
// non-empty and in increasing order, and p in [0, 1]; the callers check.
func R7(sorted []float64, p float64) float64 {
	h := float64(len(sorted)-1) * p
	lo := math.Floor(h)
	i := int(lo)
	if i+1 >= len(sorted) {
		return sorted[len(sorted)-1]
	}
	return sorted[i] + (h-lo)*(sorted[i+1]-sorted[i])
}
