package fit_test

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"

	"github.com/kalends/kalends/fit"
)

// glmBenchData returns an n×p design (intercept and p−1 normal columns
// scaled by 0.3) and a Poisson outcome drawn with a log-linear mean, from
// a fixed seed.
func glmBenchData(n, p int) (*mat.Dense, []float64) {
	r := rand.New(rand.NewPCG(5, 6))
	x := mat.NewDense(n, p, nil)
	y := make([]float64, n)
	for i := range n {
		x.Set(i, 0, 1)
		eta := 0.5
		for j := 1; j < p; j++ {
			v := 0.3 * r.NormFloat64()
			x.Set(i, j, v)
			eta += v * float64(j%3) / 2
		}
		// Poisson draw by inversion (small means)
		mu, u := math.Exp(eta), r.Float64()
		k, pk := 0.0, math.Exp(-math.Exp(eta))
		for c := pk; u > c; c += pk {
			k++
			pk *= mu / k
		}
		y[i] = k
	}
	return x, y
}

func benchGLM(b *testing.B, g fit.GLM, n, p int) {
	x, y := glmBenchData(n, p)
	b.ReportAllocs()
	for b.Loop() {
		m, err := g.FitGLM(x, y, nil)
		if err != nil {
			b.Fatal(err)
		}
		_ = m.PValues(nil)
	}
}

func BenchmarkGLM_Poisson_n10000_p6(b *testing.B) {
	benchGLM(b, fit.GLM{Family: fit.Poisson}, 10000, 6)
}

func BenchmarkGLM_Poisson_n200_p6(b *testing.B) {
	benchGLM(b, fit.GLM{Family: fit.Poisson}, 200, 6)
}

func BenchmarkRidge_n10000_p6(b *testing.B) {
	x, y := glmBenchData(10000, 6)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := (fit.Ridge{Lambda: 1}).FitRidge(x, y, nil); err != nil {
			b.Fatal(err)
		}
	}
}
