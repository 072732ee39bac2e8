package fit

import (
	"math/rand/v2"
	"testing"

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

func benchBatch(b *testing.B, n, p, reps int) {
	x, y := batchBenchDesign(n, p)
	counts := multinomialCounts(n, 1)
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
// ordinary-bootstrap counts (10⁸ draws).
func BenchmarkBatchOLS100k(b *testing.B) { benchBatch(b, 100_000, 12, 1000) }

// BenchmarkBatchOLSSmall: n = 1,000, p = 4, B = 10,000.
func BenchmarkBatchOLSSmall(b *testing.B) { benchBatch(b, 1000, 4, 10_000) }

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
				if _, err := (OLS{Weights: Frequency}).FitLinear(x, y, w); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkBatchCounts100k is the cost of drawing the counts alone in
// BenchmarkBatchOLS100k, on two goroutines.
func BenchmarkBatchCounts100k(b *testing.B) {
	const n, reps = 100_000, 1000
	counts := multinomialCounts(n, 1)
	for range b.N {
		parallel(2, reps, func(_ int, next func() (int, bool)) {
			c := make([]int32, n)
			for r, ok := next(); ok; r, ok = next() {
				counts(r, c)
			}
		})
	}
}
