package holiday

import (
	"math/rand/v2"
	"testing"
	"time"

	"github.com/kalends/kalends/features"
)

// BenchmarkHolidayColumns1M encodes 1,000,000 dates over 1990–2030 into an
// indicator per England and Wales holiday, any_holiday and
// any_holiday_days_until. The dates/s metric is the figure to quote.
func BenchmarkHolidayColumns1M(b *testing.B) {
	const n = 1_000_000
	r := rand.New(rand.NewPCG(3, 4))
	span := daysFromCivil(2031, 1, 1) - daysFromCivil(1990, 1, 1)
	dates := make([]time.Time, n)
	for i := range dates {
		dates[i] = d(1990, 1, 1).AddDate(0, 0, r.IntN(span))
	}
	e, err := Columns{Calendar: mustCountry(b, "GB"), Each: Parts{Indicator: true},
		Any: Parts{Indicator: true, Until: 60}}.Learn(dates[:10])
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		if _, err := features.Apply(e, dates); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "dates/s")
}

// BenchmarkAlmanacOn looks up random days of 1990–2030 with On and
// DayOff; the cost per look-up should not depend on the date.
func BenchmarkAlmanacOn(b *testing.B) {
	r := rand.New(rand.NewPCG(5, 6))
	span := daysFromCivil(2031, 1, 1) - daysFromCivil(1990, 1, 1)
	dates := make([]time.Time, 4096)
	for i := range dates {
		dates[i] = d(1990, 1, 1).AddDate(0, 0, r.IntN(span))
	}
	gb := mustCountry(b, "GB")
	gb.DayOff(dates[0]) // tabulate before timing
	b.Run("On", func(b *testing.B) {
		b.ReportAllocs()
		i := 0
		for b.Loop() {
			_ = gb.On(dates[i%len(dates)])
			i++
		}
	})
	b.Run("DayOff", func(b *testing.B) {
		b.ReportAllocs()
		i := 0
		for b.Loop() {
			_ = gb.DayOff(dates[i%len(dates)])
			i++
		}
	})
}
