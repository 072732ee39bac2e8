package inspect_test

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/fit"
	"github.com/kalends/kalends/inspect"
	"github.com/kalends/kalends/resample"
)

// TestWithJackknife checks the leave-one-out values against closed-form
// simple-regression slopes computed here without the run (the textbook
// least-squares slope Sxy/Sxx), and that BCa then has an acceleration.
func TestWithJackknife(t *testing.T) {
	g := rand.New(rand.NewPCG(3, 4))
	var d inspect.Data
	for i := range 40 {
		d.Dates = append(d.Dates, time.Date(2023, 1, 1+3*i, 0, 0, 0, 0, time.UTC))
	}
	trend := features.Set{Trend: &features.Trend{Origin: d.Dates[0], Unit: features.Days}}
	for i := range d.Dates {
		d.Outcome = append(d.Outcome, 10+0.2*float64(3*i)+g.NormFloat64()*(1+float64(i)/10))
	}
	fs := features.Join(features.Intercept{}, trend)
	ctx := context.Background()
	boot := inspect.KeepCoefficients()
	if _, err := inspect.Run(ctx, d, fs, inspect.Options{Fitter: fit.OLS{}, Scheme: resample.Bootstrap{B: 499}, Seed: 5}, boot); err != nil {
		t.Fatal(err)
	}
	jack := inspect.KeepCoefficients()
	if _, err := inspect.Run(ctx, d, fs, inspect.Options{Fitter: fit.OLS{}, Scheme: resample.Jackknife{}}, jack); err != nil {
		t.Fatal(err)
	}
	stats, err := inspect.CoefficientStatistics(boot)
	if err != nil {
		t.Fatal(err)
	}
	if err := inspect.WithJackknife(stats, jack); err != nil {
		t.Fatal(err)
	}
	slope := stats[1]
	if len(slope.Jackknife) != len(d.Dates) {
		t.Fatalf("%d jackknife values, want %d", len(slope.Jackknife), len(d.Dates))
	}
	for leave := range d.Dates {
		var sx, sy, n float64
		for i := range d.Dates {
			if i != leave {
				sx += float64(3 * i)
				sy += d.Outcome[i]
				n++
			}
		}
		mx, my := sx/n, sy/n
		var sxy, sxx float64
		for i := range d.Dates {
			if i != leave {
				dx := float64(3*i) - mx
				sxy += dx * (d.Outcome[i] - my)
				sxx += dx * dx
			}
		}
		if want, got := sxy/sxx, slope.Jackknife[leave]; math.Abs(got-want) > 1e-10*math.Abs(want) {
			t.Errorf("leave out row %d: slope %v, want %v", leave+1, got, want)
		}
	}
	s, err := inspect.Summarize(slope, inspect.Config{Methods: []inspect.Method{inspect.BCa}})
	if err != nil {
		t.Fatal(err)
	}
	iv, _ := s.Interval(inspect.BCa)
	if iv.Err != nil || math.IsNaN(iv.Acceleration) || iv.Acceleration == 0 {
		t.Errorf("BCa interval: err %v, acceleration %v; want an acceleration from the jackknife", iv.Err, iv.Acceleration)
	}
	if !(iv.Lower < slope.Estimate && slope.Estimate < iv.Upper) {
		t.Errorf("BCa interval [%v, %v] does not contain the estimate %v", iv.Lower, iv.Upper, slope.Estimate)
	}

	bad := append([]inspect.Statistic(nil), stats...)
	bad[0].Name = "no such column"
	if err := inspect.WithJackknife(bad, jack); err == nil {
		t.Error("unknown statistic name: got no error")
	}
}

// BCa needs the leave-one-out estimates: a second run over
// resample.Jackknife on the same data and design provides them.
func ExampleWithJackknife() {
	var d inspect.Data
	for i := range 30 {
		d.Dates = append(d.Dates, time.Date(2024, 1, 4+7*i, 20, 0, 0, 0, time.UTC))
		d.Outcome = append(d.Outcome, 50+0.3*float64(i)+float64((i*7)%5)-2)
	}
	fs := features.Join(features.Intercept{}, features.Set{Trend: &features.Trend{Origin: d.Dates[0], Unit: features.Days}})
	ctx := context.Background()

	boot, jack := inspect.KeepCoefficients(), inspect.KeepCoefficients()
	if _, err := inspect.Run(ctx, d, fs, inspect.Options{Fitter: fit.OLS{}, Scheme: resample.Bootstrap{B: 999}, Seed: 11}, boot); err != nil {
		panic(err)
	}
	if _, err := inspect.Run(ctx, d, fs, inspect.Options{Fitter: fit.OLS{}, Scheme: resample.Jackknife{}}, jack); err != nil {
		panic(err)
	}
	stats, _ := inspect.CoefficientStatistics(boot)
	if err := inspect.WithJackknife(stats, jack); err != nil {
		panic(err)
	}
	s, _ := inspect.Summarize(stats[1], inspect.Config{Methods: []inspect.Method{inspect.BCa}})
	iv, _ := s.Interval(inspect.BCa)
	fmt.Printf("%s: %.4f per day, 95%% BCa [%.4f, %.4f] from %d replicates\n", s.Name, s.Estimate, iv.Lower, iv.Upper, iv.Used)
	// Output: trend.days: 0.0448 per day, 95% BCa [0.0356, 0.0534] from 999 replicates
}
