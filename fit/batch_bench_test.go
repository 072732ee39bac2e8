package fit

import (
	"math/rand/v2"
	"sync"
	"testing"

	"github.com/kalends/kalends/resample"
	"gonum.org/v1/gonum/mat"
)

// batchBenchDesign is an invented design: an intercept, a year-like trend and
// p−2 Gaussian columns, with a linear outcome plus noise.
func batchBenchDesign(n, p int) (*mat.Dense, []float64) {
	rnd := rand.New(rand.NewPCG(uint64(n), uint64(p)))
	data := make([]float64, n*p)
	y := make([]float64, n)
	for i := range n {
		row := data[i*p : (i+1)*p]
		row[0] = 1
		row[1] = 2000 + 30*float64(i)/float64(n)
		s := 3 * (row[1] - 2000)
		for j := 2; j < p; j++ {
			row[j] = rnd.NormFloat64()
			s += float64(j) * row[j]
		}
		y[i] = s + rnd.NormFloat64()
	}
	return mat.NewDense(n, p, data), y
}

// planCounts adapts a resample.Bootstrap plan to a CountsFunc, as a
// resampling run does: each call draws the replicate's split (into a
// pooled Split) and copies its counts.
func planCounts(tb testing.TB, n, reps int, seed uint64) CountsFunc {
	plan, err := resample.Bootstrap{B: reps}.Plan(n, seed)
	if err != nil {
		tb.Fatal(err)
	}
	var pool sync.Pool
	return func(r int, dst []int32) {
		sp, _ := pool.Get().(*resample.Split)
		sp = plan.Split(r, sp)
		copy(dst, sp.Counts)
		pool.Put(sp)
	}
}

func benchBatch(b *testing.B, n, p, reps int, counts CountsFunc) {
	x, y := batchBenchDesign(n, p)
	b.ReportAllocs()
	b.ResetTimer()
	for range b.N {
		f, err := Batch{}.Fit(x, y, nil, reps, counts)
		if err != nil {
			b.Fatal(err)
		}
		for r := range reps {
			if f.Fallback[r] {
				b.Fatalf("replicate %d on the QR path", r)
			}
		}
	}
}

// BenchmarkBatchOLS100k: bootstrap OLS, n = 100,000, p = 12, B = 1,000,
// all coefficients and standard errors kept; the time includes drawing the
// ordinary-bootstrap counts (10⁸ draws) from a resample.Bootstrap plan, as
// in a resampling run.
func BenchmarkBatchOLS100k(b *testing.B) {
	benchBatch(b, 100_000, 12, 1000, planCounts(b, 100_000, 1000, 1))
}

// BenchmarkBatchOLS100kMultinomial is BenchmarkBatchOLS100k with counts
// drawn one row index at a time (rng.Replicate and IntN), a slower
// multinomial draw.
func BenchmarkBatchOLS100kMultinomial(b *testing.B) {
	benchBatch(b, 100_000, 12, 1000, multinomialCounts(100_000, 1))
}

// BenchmarkBatchOLSSmall: n = 1,000, p = 4, B = 10,000, counts from a
// resample.Bootstrap plan.
func BenchmarkBatchOLSSmall(b *testing.B) {
	benchBatch(b, 1000, 4, 10_000, planCounts(b, 1000, 10_000, 1))
}

// BenchmarkBatchGenericSmall is the generic path on the same small data:
// one frequency-weighted QR fit (OLS) per replicate, on two goroutines.
func BenchmarkBatchGenericSmall(b *testing.B) {
	const n, p, reps = 1000, 4, 10_000
	x, y := batchBenchDesign(n, p)
	counts := multinomialCounts(n, 1)
	b.ReportAllocs()
	b.ResetTimer()
	for range b.N {
		parallel(2, reps, func(_ int, next func() (int, bool)) {
			c := make([]int32, n)
			w := make([]float64, n)
			for r, ok := next(); ok; r, ok = next() {
				counts(r, c)
				for i, v := range c {
					w[i] = float64(v)
				}
				if _, err := (OLS{Weights: Frequency}).FitOLS(x, y, w); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkBatchCounts100k is the cost of drawing the counts alone in
// BenchmarkBatchOLS100k (from the plan), on two goroutines.
func BenchmarkBatchCounts100k(b *testing.B) {
	benchCounts(b, planCounts(b, 100_000, 1000, 1))
}

// BenchmarkBatchCounts100kMultinomial is the same for the multinomial
// draw of BenchmarkBatchOLS100kMultinomial.
func BenchmarkBatchCounts100kMultinomial(b *testing.B) {
	benchCounts(b, multinomialCounts(100_000, 1))
}

func benchCounts(b *testing.B, counts CountsFunc) {
	const n, reps = 100_000, 1000
	for range b.N {
		parallel(2, reps, func(_ int, next func() (int, bool)) {
			c := make([]int32, n)
			for r, ok := next(); ok; r, ok = next() {
				counts(r, c)
			}
		})
	}
}
