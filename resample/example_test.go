package resample_test

import (
	"fmt"
	"math"
	"math/rand/v2"

	"github.com/kalends/kalends/resample"
)

// A stratified bootstrap keeps every stratum's size in every replicate,
// so the two holiday rows are always two rows, never zero or five.
func ExampleBootstrap_stratified() {
	// Invented: ten shows, two of them on public holidays.
	day := []string{"plain", "plain", "holiday", "plain", "plain", "plain", "holiday", "plain", "plain", "plain"}
	p, err := resample.Bootstrap{B: 1000, Strata: resample.ByLabel(day)}.Plan(len(day), 42)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, c := range p.(resample.Partitioned).Classes() {
		fmt.Printf("stratum %s: rows %v\n", c.Label, c.Rows)
	}
	for r, s := range resample.All(p) {
		if r == 3 {
			break
		}
		fmt.Printf("replicate %d: holiday rows drawn %d times\n", r, s.Counts[2]+s.Counts[6])
	}
	// Output:
	// stratum holiday: rows [2 6]
	// stratum plain: rows [0 1 3 4 5 7 8 9]
	// replicate 0: holiday rows drawn 2 times
	// replicate 1: holiday rows drawn 2 times
	// replicate 2: holiday rows drawn 2 times
}

// Quantile strata cut a numeric column; cells too small are merged and
// the merge is reported.
func ExampleQuantiles() {
	// Invented: audience (thousands) per broadcast, with ties at 5.
	audience := []float64{5, 5, 5, 5, 5, 5, 7.5, 12, 3.1, 5}
	classes, err := resample.Quantiles{Values: audience, K: 4, MinRows: 2}.Classes(len(audience))
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, c := range classes {
		fmt.Printf("%s (cells %v): rows %v\n", c.Label, c.Cells, c.Rows)
	}
	// Output:
	// q1 (cells [1]): rows [0 1 2 3 4 5 8 9]
	// q2+q3+q4 (cells [2 3 4]): rows [6 7]
}

// A stationary bootstrap resamples time-ordered rows in blocks; with
// Mean 0 the mean block length is chosen from the series by the
// Politis–White rule.
func ExampleStationary() {
	// Invented: a slowly drifting daily residual series of 60 days.
	resid := make([]float64, 60)
	for t := range resid {
		resid[t] = math.Sin(float64(t)/4) + 0.3*math.Cos(float64(t)*1.7)
	}
	p, err := resample.Stationary{B: 500, Series: resid}.Plan(len(resid), 7)
	if err != nil {
		fmt.Println(err)
		return
	}
	sb, cb, _ := resample.BlockLength(resid)
	fmt.Printf("stationary %.2f, circular %.2f\n", sb, cb)
	fmt.Printf("plan uses mean block length %.2f\n", p.(resample.Blocked).BlockLength())
	s := p.Split(0, nil)
	var total int32
	for _, c := range s.Counts {
		total += c
	}
	fmt.Println("rows drawn:", total, "out of bag:", len(s.Out) > 0)
	// Output:
	// stationary 4.21, circular 4.82
	// plan uses mean block length 4.21
	// rows drawn: 60 out of bag: true
}

// Moving blocks of fixed length keep neighbouring rows together.
func ExampleMovingBlock() {
	p, err := resample.MovingBlock{B: 100, Length: 3}.Plan(9, 1)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(p.Len(), "replicates of blocks of", p.(resample.Blocked).BlockLength())
	// Output:
	// 100 replicates of blocks of 3
}

// Repeated stratified k-fold: each row is held out once per repeat.
func ExampleKFold() {
	kind := []int{0, 0, 1, 0, 1, 0, 0, 1, 0}
	p, err := resample.KFold{K: 3, Repeats: 2, Strata: resample.ByLabel(kind)}.Plan(len(kind), 5)
	if err != nil {
		fmt.Println(err)
		return
	}
	for r, s := range resample.All(p) {
		ones := 0
		for _, i := range s.Out {
			ones += kind[i]
		}
		fmt.Printf("repeat %d fold %d: %d test rows, %d of kind 1\n", r/3, r%3, len(s.Out), ones)
	}
	// Output:
	// repeat 0 fold 0: 3 test rows, 1 of kind 1
	// repeat 0 fold 1: 3 test rows, 1 of kind 1
	// repeat 0 fold 2: 3 test rows, 1 of kind 1
	// repeat 1 fold 0: 3 test rows, 1 of kind 1
	// repeat 1 fold 1: 3 test rows, 1 of kind 1
	// repeat 1 fold 2: 3 test rows, 1 of kind 1
}

// A rolling origin trains on the past and tests on the future, with a gap
// between them.
func ExampleRollingOrigin() {
	p, err := resample.RollingOrigin{Window: 4, Horizon: 2, Gap: 1, Step: 2}.Plan(12, 0)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, s := range resample.All(p) {
		fmt.Println("train", s.InBag(nil), "test", s.Out)
	}
	// Output:
	// train [0 1 2 3] test [5 6]
	// train [0 1 2 3 4 5] test [7 8]
	// train [0 1 2 3 4 5 6 7] test [9 10]
}

// Poisson bootstrap counts depend only on (seed, replicate, row key), so
// shards can be resampled apart and agree with the whole.
func ExamplePoissonCount() {
	keys := []uint64{101, 102, 103, 104, 105, 106}
	whole, _ := resample.Poisson{B: 10, Keys: keys}.Plan(len(keys), 9)
	shard, _ := resample.Poisson{B: 10, Keys: keys[3:]}.Plan(3, 9)
	fmt.Println(whole.Split(4, nil).Counts[3:])
	fmt.Println(shard.Split(4, nil).Counts)
	fmt.Println(resample.PoissonCount(9, 4, 104), resample.PoissonCount(9, 4, 105), resample.PoissonCount(9, 4, 106))
	// Output:
	// [1 3 0]
	// [1 3 0]
	// 1 3 0
}

// The balanced bootstrap draws every row exactly B times over all
// replicates.
func ExampleBalanced() {
	p, _ := resample.Balanced{B: 50}.Plan(8, 3)
	total := make([]int32, 8)
	for _, s := range resample.All(p) {
		for i, c := range s.Counts {
			total[i] += c
		}
	}
	fmt.Println(total)
	// Output:
	// [50 50 50 50 50 50 50 50]
}

// The Bayesian bootstrap weights rows instead of copying them.
func ExampleBayesian() {
	p, _ := resample.Bayesian{B: 200}.Plan(5, 11)
	s := p.Split(0, nil)
	var sum float64
	for _, w := range s.Weights {
		sum += w
	}
	fmt.Printf("counts nil: %v, weights sum to %.6f, out of bag: %d\n", s.Counts == nil, sum, len(s.Out))
	// Output:
	// counts nil: true, weights sum to 1.000000, out of bag: 0
}

// Grouped draws whole groups, such as whole seasons.
func ExampleGrouped() {
	season := []string{"2023", "2023", "2023", "2024", "2024", "2025", "2025", "2025"}
	p, _ := resample.Grouped{B: 100, Groups: resample.ByLabel(season)}.Plan(len(season), 2)
	s := p.Split(0, nil)
	fmt.Println(s.Counts[0] == s.Counts[1] && s.Counts[1] == s.Counts[2], s.Counts[3] == s.Counts[4])
	// Output:
	// true true
}

// The ordinary bootstrap: counts per row and the out-of-bag rows, made
// lazily one replicate at a time.
func ExampleBootstrap() {
	p, _ := resample.Bootstrap{B: 2000}.Plan(200, 1)
	var oob float64
	for _, s := range resample.All(p) {
		oob += float64(len(s.Out)) / 200
	}
	fmt.Printf("mean out-of-bag share %.2f (expected %.2f)\n", oob/2000, math.Pow(1-1.0/200, 200))
	// Output:
	// mean out-of-bag share 0.37 (expected 0.37)
}

// All loops over a plan's replicates with one reused Split; stopping
// early is allowed.
func ExampleAll() {
	p, _ := resample.Bootstrap{B: 100}.Plan(5, 3)
	for r, s := range resample.All(p) {
		var sum int32
		for _, c := range s.Counts {
			sum += c
		}
		fmt.Println("replicate", r, "draws", sum)
		if r == 1 {
			break
		}
	}
	// Output:
	// replicate 0 draws 5
	// replicate 1 draws 5
}

// ByLabel strata come in sorted label order, whatever the row order.
func ExampleByLabel() {
	classes, _ := resample.ByLabel([]string{"tue", "mon", "tue", "wed"}).Classes(4)
	for _, c := range classes {
		fmt.Println(c.Label, c.Rows)
	}
	// Output:
	// mon [1]
	// tue [0 2]
	// wed [3]
}

// BlockLength is 1 for a series without dependence and grows with it.
func ExampleBlockLength() {
	// Invented: white noise, and an AR(1) series with coefficient 0.7
	// driven by the same noise.
	g := rand.New(rand.NewPCG(1, 2))
	noise := make([]float64, 300)
	ar := make([]float64, 300)
	for t := range noise {
		noise[t] = g.NormFloat64()
		ar[t] = noise[t]
		if t > 0 {
			ar[t] += 0.7 * ar[t-1]
		}
	}
	for _, x := range [][]float64{noise, ar} {
		sb, cb, err := resample.BlockLength(x)
		if err != nil {
			fmt.Println(err)
			continue
		}
		fmt.Printf("stationary %.1f circular %.1f\n", sb, cb)
	}
	_, _, err := resample.BlockLength([]float64{1, 2, 3})
	fmt.Println(err)
	// Output:
	// stationary 1.0 circular 1.0
	// stationary 10.5 circular 12.0
	// resample: BlockLength: 3 values, need at least 10
}

// A circular block bootstrap gives every row the same chance of being
// drawn, end rows included.
func ExampleCircularBlock() {
	p, _ := resample.CircularBlock{B: 3000, Length: 4}.Plan(10, 8)
	total := make([]int32, 10)
	for _, s := range resample.All(p) {
		for i, c := range s.Counts {
			total[i] += c
		}
	}
	fmt.Printf("row 0 %.2f, row 5 %.2f, row 9 %.2f draws per replicate\n",
		float64(total[0])/3000, float64(total[5])/3000, float64(total[9])/3000)
	// Output:
	// row 0 1.00, row 5 1.04, row 9 0.98 draws per replicate
}
