package inspect_test

import (
	"context"
	"fmt"

	"github.com/kalends/kalends/fit"
	"github.com/kalends/kalends/inspect"
	"github.com/kalends/kalends/resample"
)

// Do the public-holiday columns help predict shows the fit has not seen?
// Both designs are fitted on the very same 500 bootstrap replicates and
// scored on each replicate's out-of-bag shows.
func ExampleCompare() {
	d := exampleData()
	c, err := inspect.Compare(context.Background(), d, exampleDesign(false), exampleDesign(true),
		inspect.Options{Fitter: fit.OLS{}, Scheme: resample.Bootstrap{B: 500}, Seed: 5})
	if err != nil {
		fmt.Println(err)
		return
	}
	s, err := c.Summary(0.95)
	if err != nil {
		fmt.Println(err)
		return
	}
	iv := s.Intervals[0]
	fmt.Printf("out-of-bag RMSE, with minus without holidays: %.2f, 95%% of replicates in [%.2f, %.2f]\n", s.Estimate, iv.Lower, iv.Upper)
	fmt.Printf("rests on %d of %d replicates (%d failed)\n", s.Used, s.Replicates, s.Failed)
	// Only a handful of shows fall on a holiday, so the gain in predicting
	// unseen shows is small and the interval straddles zero, although the
	// holiday coefficient itself is clearly positive (see ExampleRun).

	// Output:
	// out-of-bag RMSE, with minus without holidays: -0.05, 95% of replicates in [-0.25, 0.06]
	// rests on 500 of 500 replicates (0 failed)
}
