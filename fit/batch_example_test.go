package fit_test

import (
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"

	"github.com/kalends/kalends/fit"
	"github.com/kalends/kalends/internal/rng"
	"gonum.org/v1/gonum/mat"
)

// invented returns an invented series: an intercept and a year trend.
func invented(n int) (*mat.Dense, []float64) {
	rnd := rand.New(rand.NewPCG(1, 2))
	x := mat.NewDense(n, 2, nil)
	y := make([]float64, n)
	for i := range n {
		year := 2010 + 10*float64(i)/float64(n)
		x.SetRow(i, []float64{1, year})
		y[i] = 200 + 3*(year-2010) + 5*rnd.NormFloat64()
	}
	return x, y
}

// ExampleBatch_Fit bootstraps the slope of a trend with 500 ordinary
// bootstrap replicates in one batched fit.
func ExampleBatch_Fit() {
	x, y := invented(300)
	n := len(y)
	const seed = 42
	counts := func(r int, dst []int32) {
		clear(dst)
		g := rng.Replicate(seed, r)
		for range n {
			dst[g.IntN(n)]++
		}
	}
	f, err := fit.Batch{OutOfBag: true}.Fit(x, y, nil, 500, counts)
	if err != nil {
		fmt.Println(err)
		return
	}
	var s, ss, se, oob float64
	for r := range f.B {
		b := f.Replicate(r)[1]
		s += b
		ss += b * b
		se += f.StdErr[r*f.P+1]
		oob += f.OutOfBagRMSE[r]
	}
	m := float64(f.B)
	fmt.Printf("bootstrap SE of the slope %.2f, mean classical SE %.2f\n", math.Sqrt(ss/m-(s/m)*(s/m)), se/m)
	fmt.Printf("mean out-of-bag RMSE %.1f\n", oob/m)
	// Output:
	// bootstrap SE of the slope 0.10, mean classical SE 0.09
	// mean out-of-bag RMSE 4.8
}

// ExampleAccumulator shows two shards of the data accumulated apart,
// shipped as bytes and merged: the result is bit-identical to one pass.
func ExampleAccumulator() {
	x, y := invented(300)
	keys := make([]uint64, len(y))
	for i := range keys {
		keys[i] = uint64(i) // each row's own key, e.g. its row number
	}
	std, _ := fit.LearnStandardization(x, y, nil) // learned once, shipped to every shard
	const seed, B = 7, 100

	shard := func(lo, hi int) []byte {
		a, _ := fit.NewAccumulator(std, seed, B)
		a.Add(mat.DenseCopyOf(x.Slice(lo, hi, 0, 2)), y[lo:hi], nil, keys[lo:hi])
		b, _ := a.MarshalBinary()
		return b
	}
	var merged, other fit.Accumulator
	merged.UnmarshalBinary(shard(0, 40))
	other.UnmarshalBinary(shard(40, 300))
	if err := merged.Merge(&other); err != nil {
		fmt.Println(err)
		return
	}
	onePass, _ := fit.NewAccumulator(std, seed, B)
	onePass.Add(x, y, nil, keys)
	a, _ := merged.MarshalBinary()
	b, _ := onePass.MarshalBinary()
	fmt.Println("identical:", bytes.Equal(a, b))

	reps, full := merged.Solve(0)
	fmt.Printf("whole-data slope %.2f; replicate 0 slope %.2f\n", full.Coef[1], reps.Replicate(0)[1])
	// Output:
	// identical: true
	// whole-data slope 3.09; replicate 0 slope 2.90
}
