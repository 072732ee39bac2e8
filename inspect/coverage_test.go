package inspect_test

import (
	"sync"
	"testing"

	"github.com/kalends/kalends/inspect"
	"github.com/kalends/kalends/internal/rng"
)

// slope is the closed-form least-squares slope of y on x with frequency
// weights f (nil means all ones).
func slope(x, y, f []float64) float64 {
	var m, mx, my float64
	for i := range x {
		w := 1.0
		if f != nil {
			w = f[i]
		}
		m += w
		mx += w * x[i]
		my += w * y[i]
	}
	mx /= m
	my /= m
	var sxx, sxy float64
	for i := range x {
		w := 1.0
		if f != nil {
			w = f[i]
		}
		sxx += w * (x[i] - mx) * (x[i] - mx)
		sxy += w * (x[i] - mx) * (y[i] - my)
	}
	return sxy / sxx
}

// TestCoverage is a coverage simulation: 2,000 data sets of n = 50 rows,
// x uniform on [0, 10], y = 2 + 0.5x + ε with ε ~ N(0, 1); for each, B =
// 999 case-resampling (pairs) bootstrap replicates of the OLS slope and
// nominal 95% percentile and BCa intervals (BCa acceleration from the
// jackknife). Both must cover the true slope 0.5 in 93–97% of data sets.
// Data set d draws from rng.Replicate(seed, d) with seed 20240611, so the
// result does not depend on the number of workers. Monte Carlo standard
// error of a coverage near 0.95 is about 0.005. We use n = 50 because at
// n = 30 both intervals cover only about 93.1% (measured with 4,000 data
// sets), the known small-sample undercoverage of percentile-type
// intervals, which would sit on the edge of the band.
func TestCoverage(t *testing.T) {
	if testing.Short() {
		t.Skip("coverage simulation skipped under -short")
	}
	const (
		sets   = 2000
		n      = 50
		b      = 999
		seed   = 20240611
		truth  = 0.5
		level  = 0.95
		minCov = 0.93
		maxCov = 0.97
	)
	methods := []inspect.Method{inspect.Percentile, inspect.BCa}
	covered := make([][2]bool, sets)
	errs := make([]error, sets)
	var wg sync.WaitGroup
	next := make(chan int)
	for range 2 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			x, y, f := make([]float64, n), make([]float64, n), make([]float64, n)
			vals, jack := make([]float64, b), make([]float64, n)
			for d := range next {
				g := rng.Replicate(seed, d)
				for i := range x {
					x[i] = 10 * g.Float64()
					y[i] = 2 + truth*x[i] + g.NormFloat64()
				}
				for r := range vals {
					clear(f)
					for range n {
						f[g.IntN(n)]++
					}
					vals[r] = slope(x, y, f)
				}
				for i := range jack {
					for k := range f {
						f[k] = 1
					}
					f[i] = 0
					jack[i] = slope(x, y, f)
				}
				s, err := inspect.Summarize(inspect.Statistic{Estimate: slope(x, y, nil), Values: vals, Jackknife: jack},
					inspect.Config{Level: level, Methods: methods})
				if err != nil {
					errs[d] = err
					continue
				}
				for k, iv := range s.Intervals {
					if iv.Err != nil {
						errs[d] = iv.Err
					}
					covered[d][k] = iv.Lower <= truth && truth <= iv.Upper
				}
			}
		}()
	}
	for d := range sets {
		next <- d
	}
	close(next)
	wg.Wait()
	var hits [2]int
	for d := range sets {
		if errs[d] != nil {
			t.Fatalf("data set %d: %v", d, errs[d])
		}
		for k := range hits {
			if covered[d][k] {
				hits[k]++
			}
		}
	}
	for k, m := range methods {
		cov := float64(hits[k]) / sets
		t.Logf("%v: coverage %.3f (%d of %d)", m, cov, hits[k], sets)
		if cov < minCov || cov > maxCov {
			t.Errorf("%v: got coverage %.3f, want within [%.2f, %.2f]", m, cov, minCov, maxCov)
		}
	}
}
