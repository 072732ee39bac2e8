package inspect_test

import (
	"context"
	"fmt"
	"time"

	"github.com/kalends/kalends/fit"
	"github.com/kalends/kalends/inspect"
)

// Predicting the audience of three upcoming shows: the full-data
// prediction, an interval for the mean audience on such a date, and a
// wider prediction interval for one show's audience.
func ExamplePredict() {
	d := exampleData()
	at := inspect.Data{Dates: []time.Time{
		time.Date(2023, 8, 23, 0, 0, 0, 0, time.UTC), // a Wednesday
		time.Date(2023, 8, 26, 0, 0, 0, 0, time.UTC), // a Saturday
		time.Date(2023, 8, 28, 0, 0, 0, 0, time.UTC), // Summer Bank Holiday
	}}
	p, err := inspect.Predict(context.Background(), d, exampleDesign(true), at,
		inspect.PredictOptions{Fitter: fit.OLS{}, B: 999, Seed: 3})
	if err != nil {
		fmt.Println(err)
		return
	}
	for k, t := range at.Dates {
		fmt.Printf("%s %-9s %4.1f  mean [%4.1f, %4.1f]  new show [%4.1f, %4.1f]\n", t.Format("2006-01-02"), t.Weekday(),
			p.Fit[k], p.MeanLower[k], p.MeanUpper[k], p.Lower[k], p.Upper[k])
	}
	fmt.Printf("%d of %d replicates used; rows out of the residual pool: %v\n", p.Used, p.Replicates, p.Excluded)
	// Output:
	// 2023-08-23 Wednesday 40.1  mean [39.8, 40.5]  new show [35.9, 44.3]
	// 2023-08-26 Saturday  45.4  mean [44.7, 46.0]  new show [40.4, 49.5]
	// 2023-08-28 Monday    46.5  mean [43.6, 49.5]  new show [41.6, 51.4]
	// 999 of 999 replicates used; rows out of the residual pool: []
}
