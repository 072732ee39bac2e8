package inspect_test

import (
	"context"
	"fmt"
	"math/rand/v2"
	"time"

	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/fit"
	"github.com/kalends/kalends/holiday"
	"github.com/kalends/kalends/inspect"
	"github.com/kalends/kalends/resample"
)

// exampleData is an invented show's audience (thousands) on 150 dates
// every 4 days from 2022-01-03: weekends and public holidays draw more.
func exampleData() inspect.Data {
	g := rand.New(rand.NewPCG(7, 7))
	gb, _ := holiday.Country("GB")
	hol, _ := holiday.Columns{Calendar: gb, Any: holiday.Parts{Indicator: true}}.Learn(nil)
	d := inspect.Data{}
	for i := range 150 {
		t := time.Date(2022, 1, 3+4*i, 0, 0, 0, 0, time.UTC)
		d.Dates = append(d.Dates, t)
	}
	x, _ := features.Apply(hol, d.Dates)
	anyHoliday, _ := x.Lookup("any_holiday")
	for i, t := range d.Dates {
		y := 40 + 2*g.NormFloat64()
		if wd := t.Weekday(); wd == time.Saturday || wd == time.Sunday {
			y += 6
		}
		d.Outcome = append(d.Outcome, y+9*anyHoliday[i])
	}
	return d
}

// exampleDesign is an intercept, a weekend flag and a public-holiday flag.
// (intercept is a one-column Builder of ones defined in this package's
// tests: fit.OLS adds no intercept of its own.)
func exampleDesign(withHolidays bool) features.Builder {
	cal := features.Set{Parts: []features.Spec{{Part: features.Weekend}}}
	if !withHolidays {
		return features.Join(intercept{}, cal)
	}
	gb, _ := holiday.Country("GB")
	return features.Join(intercept{}, cal, holiday.Columns{Calendar: gb, Any: holiday.Parts{Indicator: true}})
}

// A run keeps the built-in coefficients and a statistic of our own: the
// mean out-of-bag residual on weekend rows.
func ExampleRun() {
	d := exampleData()
	coef := inspect.KeepCoefficients()
	weekendBias := inspect.Keep("weekend residual", func(_ context.Context, r *inspect.Replicate) (float64, error) {
		wk, _ := r.Design.Lookup("weekend")
		var sum float64
		var k int
		for i := range r.Rows {
			if wk[i] == 1 {
				sum += r.Outcome[i] - r.Predicted[i]
				k++
			}
		}
		if k == 0 {
			return 0, fmt.Errorf("no weekend row out of bag")
		}
		return sum / float64(k), nil
	})
	res, err := inspect.Run(context.Background(), d, exampleDesign(true),
		inspect.Options{Fitter: fit.OLS{}, Scheme: resample.Bootstrap{B: 400}, Seed: 1}, coef, weekendBias)
	if err != nil {
		fmt.Println(err)
		return
	}
	stats, _ := inspect.CoefficientStatistics(coef)
	for _, st := range stats[1:] {
		s, err := inspect.Summarize(st, inspect.Config{Methods: []inspect.Method{inspect.Percentile}})
		if err != nil {
			fmt.Println(err)
			continue
		}
		iv := s.Intervals[0]
		fmt.Printf("%-11s %5.1f  95%% [%4.1f, %4.1f]  from %d of %d replicates (%d not estimable)\n",
			s.Name, s.Estimate, iv.Lower, iv.Upper, s.Used, s.Replicates, s.NotEstimable)
	}
	ok, failed := weekendBias.Count()
	fmt.Printf("weekend residual kept for %d replicates, %d failed; %d of %d replicates delivered\n", ok, failed, res.Finished, res.Total)
	// Output:
	// weekend       5.2  95% [ 4.5,  5.9]  from 400 of 400 replicates (0 not estimable)
	// any_holiday   6.4  95% [ 3.9,  9.0]  from 340 of 400 replicates (60 not estimable)
	// weekend residual kept for 400 replicates, 0 failed; 400 of 400 replicates delivered
}
