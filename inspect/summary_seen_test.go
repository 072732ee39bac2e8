package inspect_test

import (
	"context"
	"errors"
	"math/rand/v2"
	"testing"
	"time"

	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/fit"
	"github.com/kalends/kalends/holiday"
	"github.com/kalends/kalends/inspect"
	"github.com/kalends/kalends/resample"
)

// TestSeenHolidayColumns runs a bootstrap on holiday columns learned with
// and without holiday.Columns.Seen, on invented data: an audience every
// 3 days through 2022–2023, which meets only some England and Wales days
// off. Without Seen, the holidays none of the rows falls on are not
// estimable on the full data (ErrNotEstimable); with Seen they have no
// column, and a holiday the rows meet once is not estimable in exactly
// the replicates that did not draw that row.
func TestSeenHolidayColumns(t *testing.T) {
	gb, err := holiday.Country("GB")
	if err != nil {
		t.Fatal(err)
	}
	var d inspect.Data
	for i := range 240 {
		d.Dates = append(d.Dates, time.Date(2022, 1, 1, 0, 0, 0, 0, time.UTC).AddDate(0, 0, 3*i))
	}
	g := rand.New(rand.NewPCG(5, 6))
	for range d.Dates {
		d.Outcome = append(d.Outcome, 30+2*g.NormFloat64())
	}
	scheme := resample.Bootstrap{B: 200}
	const seed = 11

	run := func(seen bool) []inspect.Statistic {
		design := features.Join(features.Intercept{}, holiday.Columns{Calendar: gb, Each: holiday.Parts{Indicator: true}, Seen: seen})
		coef := inspect.KeepCoefficients()
		if _, err := inspect.Run(context.Background(), d, design, inspect.Options{Fitter: fit.OLS{}, Scheme: scheme, Seed: seed}, coef); err != nil {
			t.Fatal(err)
		}
		stats, err := inspect.CoefficientStatistics(coef)
		if err != nil {
			t.Fatal(err)
		}
		return stats
	}

	// Without Seen: at least one holiday has no row, and Summarize says
	// it is not estimable on the full data.
	absent := 0
	for _, st := range run(false) {
		if _, err := inspect.Summarize(st, inspect.Config{}); errors.Is(err, inspect.ErrNotEstimable) {
			absent++
		}
	}
	if absent == 0 {
		t.Fatal("without Seen: got no holiday without rows, want some (the data meet only some days off)")
	}

	// With Seen: every column is estimable on the full data, and a
	// holiday's not-estimable replicates are those that drew none of its
	// rows.
	x, err := func() (*features.Table, error) {
		enc, err := holiday.Columns{Calendar: gb, Each: holiday.Parts{Indicator: true}, Seen: true}.Learn(d.Dates)
		if err != nil {
			return nil, err
		}
		return features.Apply(enc, d.Dates)
	}()
	if err != nil {
		t.Fatal(err)
	}
	plan, err := scheme.Plan(len(d.Dates), seed)
	if err != nil {
		t.Fatal(err)
	}
	stats := run(true)
	if got, want := len(stats), 1+x.Width(); got != want {
		t.Fatalf("with Seen: got %d coefficients, want the intercept and %d seen holidays", got, x.Width())
	}
	checked := 0
	for _, st := range stats[1:] {
		s, err := inspect.Summarize(st, inspect.Config{})
		if errors.Is(err, inspect.ErrEstimate) {
			t.Errorf("with Seen: %v", err)
			continue
		}
		col, _ := x.Lookup(st.Name)
		missing := 0
		for _, sp := range resample.All(plan) {
			drawn := false
			for i, v := range col {
				if v == 1 && sp.Counts[i] > 0 {
					drawn = true
				}
			}
			if !drawn {
				missing++
			}
		}
		if got := s.NotEstimable; err == nil && got != missing {
			t.Errorf("%s: got %d not-estimable replicates, want the %d that drew none of its rows", st.Name, got, missing)
		}
		if missing > 0 {
			checked++
		}
	}
	if checked == 0 {
		t.Error("no seen holiday was missing from any replicate; the test checks nothing")
	}
}
