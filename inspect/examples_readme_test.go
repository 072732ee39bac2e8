package inspect_test

// The snippets of the README's package tour, kept here as Examples so that
// they compile and their output stays true. Each Example's body is what the
// README shows.

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

func Example_tourFeatures() {
	dates := []time.Time{
		time.Date(2024, 12, 24, 0, 0, 0, 0, time.UTC),
		time.Date(2024, 12, 25, 0, 0, 0, 0, time.UTC),
		time.Date(2024, 12, 28, 0, 0, 0, 0, time.UTC),
	}
	set := features.Set{Parts: []features.Spec{
		{Part: features.Weekend},
		{Part: features.Month, Encoding: features.Cyclic},
	}}
	enc, err := set.Learn(dates)
	if err != nil {
		fmt.Println(err)
		return
	}
	tab, _ := features.Apply(enc, dates)
	fmt.Println(tab.Names())
	for i := range tab.Rows() {
		fmt.Printf("%s  %.0f  %.3f  %.3f\n", dates[i].Format("Mon 02 Jan"), tab.At(i, 0), tab.At(i, 1), tab.At(i, 2))
	}
	// Output:
	// [weekend month.sin month.cos]
	// Tue 24 Dec  0  -0.500  0.866
	// Wed 25 Dec  0  -0.500  0.866
	// Sat 28 Dec  1  -0.500  0.866
}

func Example_tourHoliday() {
	gb, err := holiday.Country("GB") // England and Wales
	if err != nil {
		fmt.Println(err)
		return
	}
	cols := holiday.Columns{Calendar: gb, Names: []string{"Christmas Day", "Boxing Day"},
		Each: holiday.Parts{Indicator: true}}
	enc, _ := cols.Learn(nil)
	dates := []time.Time{
		time.Date(2021, 12, 25, 0, 0, 0, 0, time.UTC), // a Saturday: the day off moves
		time.Date(2021, 12, 27, 0, 0, 0, 0, time.UTC),
		time.Date(2021, 12, 28, 0, 0, 0, 0, time.UTC),
	}
	tab, _ := features.Apply(enc, dates)
	fmt.Println(tab.Names())
	for i, d := range dates {
		fmt.Println(d.Format("Mon 02 Jan 2006"), tab.At(i, 0), tab.At(i, 1))
	}
	// Output:
	// [christmas_day boxing_day]
	// Sat 25 Dec 2021 0 0
	// Mon 27 Dec 2021 1 0
	// Tue 28 Dec 2021 0 1
}

func Example_tourResample() {
	plan, err := resample.Stationary{B: 3, Mean: 4}.Plan(20, 42)
	if err != nil {
		fmt.Println(err)
		return
	}
	for r, s := range resample.All(plan) {
		fmt.Printf("replicate %d: counts %v, out of bag %v\n", r, s.Counts, s.Out)
	}
	// Output:
	// replicate 0: counts [1 1 1 1 1 1 1 1 0 0 0 1 1 1 1 2 2 2 1 1], out of bag [8 9 10]
	// replicate 1: counts [1 1 0 0 1 1 2 1 1 1 2 2 2 2 1 1 1 0 0 0], out of bag [2 3 17 18 19]
	// replicate 2: counts [0 2 2 2 2 2 1 1 0 0 0 1 2 1 1 0 0 1 1 1], out of bag [0 8 9 10 15 16]
}

func Example_tourFit() {
	x := features.NewTable(5)
	x.Append("intercept", []float64{1, 1, 1, 1, 1})
	x.Append("holiday", []float64{0, 0, 1, 0, 1})
	y := []float64{40, 42, 51, 41, 53}
	m, err := fit.OLS{}.FitOLS(x, y, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, c := range m.Coefficients() {
		fmt.Printf("%-9s %6.2f  (standard error %.2f)\n", c.Name, c.Estimate, c.StdErr)
	}
	// By hand: the intercept is the mean of the ordinary days (41), the
	// holiday coefficient the holidays' mean less that (52 − 41); the
	// residuals −1, 1, 0, −1, 1 give s² = 4/3 on 3 degrees of freedom, so
	// the standard errors are s·√(1/3) = 0.67 and s·√(1/3 + 1/2) = 1.05.

	// Output:
	// intercept  41.00  (standard error 0.67)
	// holiday    11.00  (standard error 1.05)
}

func Example_tourInspect() {
	// Invented: an audience (thousands) every 5 days, with 8 more on
	// England & Wales bank holidays.
	gb, _ := holiday.Country("GB")
	bankHoliday := holiday.Columns{Calendar: gb, Any: holiday.Parts{Indicator: true}}
	var d inspect.Data
	for i := range 200 {
		d.Dates = append(d.Dates, time.Date(2022, 1, 3, 0, 0, 0, 0, time.UTC).AddDate(0, 0, 5*i))
	}
	enc, _ := bankHoliday.Learn(nil)
	x, _ := features.Apply(enc, d.Dates)
	g := rand.New(rand.NewPCG(1, 2))
	for _, h := range x.Column(0) {
		d.Outcome = append(d.Outcome, 30+8*h+2*g.NormFloat64())
	}
	design := features.Join(features.Intercept{}, bankHoliday)
	coef := inspect.KeepCoefficients()
	_, err := inspect.Run(context.Background(), d, design,
		inspect.Options{Fitter: fit.OLS{}, Scheme: resample.Bootstrap{B: 999}, Seed: 7}, coef)
	if err != nil {
		fmt.Println(err)
		return
	}
	stats, _ := inspect.CoefficientStatistics(coef)
	for _, st := range stats {
		s, _ := inspect.Summarize(st, inspect.Config{Methods: []inspect.Method{inspect.Percentile}})
		iv := s.Intervals[0]
		fmt.Printf("%-12s %5.2f  95%% [%5.2f, %5.2f]  estimable in %d of %d replicates\n",
			s.Name, s.Estimate, iv.Lower, iv.Upper, s.Used, s.Replicates)
	}
	// The true values are 30 and 8. A replicate that drew none of the
	// holiday rows cannot estimate the holiday coefficient.

	// Output:
	// intercept    29.87  95% [29.58, 30.13]  estimable in 999 of 999 replicates
	// any_holiday   8.21  95% [ 6.24,  9.85]  estimable in 989 of 999 replicates
}
