package fit

import (
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// benchDesign returns an n×p design (intercept and p−1 normal columns) and
// an outcome with normal noise, from a fixed seed.
func benchDesign(n, p int) (*mat.Dense, []float64) {
	r := rand.New(rand.NewPCG(1, 2))
	x := mat.NewDense(n, p, nil)
	y := make([]float64, n)
	for i := range n {
		x.Set(i, 0, 1)
		s := 0.0
		for j := 1; j < p; j++ {
			v := r.NormFloat64()
			x.Set(i, j, v)
			s += float64(j) * v
		}
		y[i] = s + r.NormFloat64()
	}
	return x, y
}

func benchOLS(b *testing.B, n, p int, o OLS) {
	x, y := benchDesign(n, p)
	b.ReportAllocs()
	for b.Loop() {
		m, err := o.FitOLS(x, y, nil)
		if err != nil {
			b.Fatal(err)
		}
		_ = m.Coefficients()
		_ = m.PValues(nil)
		_ = m.Statistics()
	}
}

func BenchmarkOLS_n100000_p12(b *testing.B)     { benchOLS(b, 100000, 12, OLS{}) }
func BenchmarkOLS_n200_p6(b *testing.B)         { benchOLS(b, 200, 6, OLS{}) }
func BenchmarkOLS_n100000_p12_HC3(b *testing.B) { benchOLS(b, 100000, 12, OLS{Cov: HC3}) }
func BenchmarkOLS_n200_p6_HC3(b *testing.B)     { benchOLS(b, 200, 6, OLS{Cov: HC3}) }
