package inspect_test

import (
	"fmt"
	"math/rand/v2"
	"os"

	"github.com/kalends/kalends/inspect"
)

// bootMean returns b bootstrap replicates of the mean of x and its
// jackknife (leave-one-out) means, drawing from a seeded generator.
func bootMean(x []float64, b int, seed uint64) (vals, jack []float64) {
	g := rand.New(rand.NewPCG(seed, 1))
	mean := func(idx func(int) int, n int) float64 {
		var s float64
		for k := range n {
			s += x[idx(k)]
		}
		return s / float64(n)
	}
	for range b {
		vals = append(vals, mean(func(int) int { return g.IntN(len(x)) }, len(x)))
	}
	for i := range x {
		jack = append(jack, mean(func(k int) int {
			if k >= i {
				return k + 1
			}
			return k
		}, len(x)-1))
	}
	return vals, jack
}

func ExampleSummarize() {
	// Invented: visitors at twelve evening markets.
	visitors := []float64{412, 388, 455, 501, 397, 430, 610, 420, 385, 468, 445, 402}
	vals, jack := bootMean(visitors, 1999, 7)
	s, err := inspect.Summarize(inspect.Statistic{
		Name: "mean visitors", Estimate: 442.75, Values: vals, Jackknife: jack,
	}, inspect.Config{Level: 0.95})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s: bias %.2f, standard error %.2f, %d replicates\n", s.Name, s.Bias, s.StdErr, s.Used)
	for _, iv := range s.Intervals {
		fmt.Printf("%-10v [%.1f, %.1f]\n", iv.Method, iv.Lower, iv.Upper)
	}
	// Output:
	// mean visitors: bias 0.29, standard error 17.11, 1999 replicates
	// percentile [413.9, 480.9]
	// basic      [404.6, 471.6]
	// normal     [408.9, 476.0]
	// BCa        [417.5, 496.4]
}

func ExampleSummarize_tooFewReplicates() {
	// With 30 replicates a 95% percentile endpoint lies on the extremes.
	vals, _ := bootMean([]float64{3, 5, 4, 8, 6, 5, 7, 2}, 30, 1)
	s, _ := inspect.Summarize(inspect.Statistic{Name: "m", Estimate: 5, Values: vals},
		inspect.Config{Methods: []inspect.Method{inspect.Percentile}})
	for _, w := range s.Intervals[0].Warnings {
		fmt.Println(w)
	}
	// Output:
	// lower endpoint on the most extreme replicates: 30 used, at least 40 needed for this level
	// upper endpoint on the most extreme replicates: 30 used, at least 40 needed for this level
}

func ExampleEstimate632() {
	observed := []float64{1, 2, 4}
	fitted := []float64{1.5, 2, 3.5} // full-data model
	oob := []inspect.OutOfBag{       // each replicate's held-out rows
		{Rows: []int{0}, Pred: []float64{2}},
		{Rows: []int{1, 2}, Pred: []float64{3, 3}},
		{Rows: []int{0, 2}, Pred: []float64{3, 5}},
	}
	e, err := inspect.Estimate632(observed, fitted, oob)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("apparent %.4f, out-of-bag %.4f, .632 %.4f, .632+ %.4f\n", e.Apparent, e.OutOfBag, e.Err632, e.Err632Plus)
	// Output:
	// apparent 0.1667, out-of-bag 1.5000, .632 1.0093, .632+ 1.2645
}

func ExampleTable_WriteTo() {
	vals, jack := bootMean([]float64{412, 388, 455, 501, 397, 430, 610, 420, 385, 468, 445, 402}, 999, 7)
	s, _ := inspect.Summarize(inspect.Statistic{Name: "mean", Estimate: 442.75, Values: vals, Jackknife: jack},
		inspect.Config{Level: 0.9, Methods: []inspect.Method{inspect.Percentile, inspect.BCa}})
	inspect.Table{s}.WriteTo(os.Stdout)
	// Output:
	// statistic  method      level   lower   upper  estimate       bias  std.error     used  failed  not estimable  notes
	// mean       percentile    90%  417.17  472.58    442.75  -0.017684       17.1  999/999       0              0
	// mean       BCa           90%  421.12  483.56    442.75  -0.017684       17.1  999/999       0              0
}
