package features_test

import (
	"testing"
	"time"

	"github.com/kalends/kalends/features"
)

// benchDates returns n instants 25 hours and 1 minute apart from
// 2000-01-01 in loc: every one on a different civil day and clock time,
// so nothing can be reused from one date to the next but the zone period.
func benchDates(n int, loc *time.Location) []time.Time {
	dates := make([]time.Time, n)
	t0 := time.Date(2000, 1, 1, 0, 0, 0, 0, loc)
	for i := range dates {
		dates[i] = t0.Add(time.Duration(i) * (25*time.Hour + time.Minute))
	}
	return dates
}

func benchmarkPlain(b *testing.B, loc *time.Location) {
	dates := benchDates(1_000_000, loc)
	set := features.Set{Parts: []features.Spec{
		{Part: features.Year}, {Part: features.Month}, {Part: features.Weekday},
		{Part: features.YearDay}, {Part: features.ISOWeek},
	}}
	enc, err := set.Learn(dates[:1000])
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		if _, err := features.Apply(enc, dates); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(len(dates))*float64(b.N)/b.Elapsed().Seconds(), "dates/s")
}

// BenchmarkEncodePlain1M encodes 1,000,000 UTC dates as year, month,
// weekday, day of year and ISO week, plain numbers.
func BenchmarkEncodePlain1M(b *testing.B) { benchmarkPlain(b, time.UTC) }

// BenchmarkEncodePlain1MNewYork is the same in America/New_York, which
// exercises the zone-offset cache.
func BenchmarkEncodePlain1MNewYork(b *testing.B) {
	loc, err := time.LoadLocation("America/New_York")
	if err != nil {
		b.Skip(err)
	}
	benchmarkPlain(b, loc)
}

// TestEncodeAllocsIndependentOfN checks that the number of allocations of
// an Encode does not grow with the number of dates.
func TestEncodeAllocsIndependentOfN(t *testing.T) {
	set := features.Set{Parts: []features.Spec{
		{Part: features.Year}, {Part: features.Month}, {Part: features.Weekday},
		{Part: features.YearDay}, {Part: features.ISOWeek},
	}}
	allocs := func(n int) float64 {
		dates := benchDates(n, time.UTC)
		enc, err := set.Learn(dates[:1])
		if err != nil {
			t.Fatal(err)
		}
		// Many runs, so that a stray runtime allocation (AllocsPerRun
		// counts every goroutine's) is lost in the integer average.
		return testing.AllocsPerRun(50, func() { features.Apply(enc, dates) })
	}
	if small, large := allocs(10), allocs(50_000); small != large {
		t.Errorf("allocations per Encode: got %v for 10 dates and %v for 50000, want equal", small, large)
	}
}
