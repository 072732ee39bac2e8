package features_test

import (
	"math"
	"testing"
	"time"

	"github.com/kalends/kalends/features"
)

// Zone facts used below come from the IANA tz database as shipped with Go
// (time/tzdata), and each test also checks them against the time package.

// TestDSTChangeDays reads dates on either side of America/New_York's
// spring-forward (2021-03-14, 02:00 EST → 03:00 EDT) and fall-back
// (2021-11-07, 02:00 EDT → 01:00 EST) in their own location.
func TestDSTChangeDays(t *testing.T) {
	ny := mustLoad(t, "America/New_York")
	at := func(m time.Month, d, h, min int) time.Time { return time.Date(2021, m, d, h, min, 0, 0, ny) }
	fallFirst := at(11, 7, 1, 30)          // 01:30 EDT
	fallSecond := fallFirst.Add(time.Hour) // 01:30 EST, the clock repeated
	if fallSecond.Hour() != 1 || fallSecond.Day() != 7 {
		t.Fatalf("test setup: got %v, want the repeated 01:30", fallSecond)
	}
	tests := []struct {
		name      string
		date      time.Time
		origin    time.Time
		day, wd   float64
		trendDays float64 // civil clock: a day is 1 even when it has 23 or 25 hours
	}{
		{"spring: midnight", at(3, 14, 0, 0), at(3, 13, 0, 0), 14, 7, 1},
		{"spring: 01:59 EST", at(3, 14, 1, 59), at(3, 13, 0, 0), 14, 7, 1 + (1*60+59)/1440.0},
		{"spring: 03:00 EDT", at(3, 14, 3, 0), at(3, 13, 0, 0), 14, 7, 1 + 3/24.0},
		{"spring: 23:59 EDT", at(3, 14, 23, 59), at(3, 13, 0, 0), 14, 7, 1 + (23*60+59)/1440.0},
		{"spring: next midnight", at(3, 15, 0, 0), at(3, 13, 0, 0), 15, 1, 2},
		{"fall: 00:00 EDT", at(11, 7, 0, 0), at(11, 6, 0, 0), 7, 7, 1},
		{"fall: first 01:30", fallFirst, at(11, 6, 0, 0), 7, 7, 1 + 1.5/24},
		{"fall: repeated 01:30", fallSecond, at(11, 6, 0, 0), 7, 7, 1 + 1.5/24},
		{"fall: 23:00 EST", at(11, 7, 23, 0), at(11, 6, 0, 0), 7, 7, 1 + 23/24.0},
		{"fall: next midnight", at(11, 8, 0, 0), at(11, 6, 0, 0), 8, 1, 2},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			set := features.Set{
				Parts: []features.Spec{{Part: features.Day}, {Part: features.Weekday}},
				Trend: &features.Trend{Origin: tt.origin},
			}
			tab := encode(t, set, []time.Time{tt.date})
			if got, want := col(t, tab, "day")[0], float64(tt.date.Day()); got != want {
				t.Errorf("day: got %v, want %v (time package)", got, want)
			}
			if got := col(t, tab, "day")[0]; got != tt.day {
				t.Errorf("day: got %v, want %v", got, tt.day)
			}
			if got := col(t, tab, "weekday")[0]; got != tt.wd {
				t.Errorf("weekday: got %v, want %v", got, tt.wd)
			}
			if got := col(t, tab, "trend.days")[0]; math.Abs(got-tt.trendDays) > 1e-9 {
				t.Errorf("trend.days: got %v, want %v (±1e-9)", got, tt.trendDays)
			}
		})
	}
}

// TestDateLine reads one instant on either side of the date line: at
// 2021-06-15 12:00 UTC it is 2021-06-16 02:00 (Wednesday) in
// Pacific/Kiritimati (UTC+14) and 2021-06-15 01:00 (Tuesday) in
// Pacific/Pago_Pago (UTC−11). It also crosses the day Kiritimati skipped
// (1994-12-31, when it moved from UTC−10 to UTC+14) and the one Samoa
// skipped (Pacific/Apia, 2011-12-30).
func TestDateLine(t *testing.T) {
	kir := mustLoad(t, "Pacific/Kiritimati")
	pago := mustLoad(t, "Pacific/Pago_Pago")
	apia := mustLoad(t, "Pacific/Apia")
	instant := time.Date(2021, 6, 15, 12, 0, 0, 0, time.UTC)
	tests := []struct {
		name     string
		date     time.Time
		loc      *time.Location // Set.Location
		y, m, d  float64
		weekday  float64
		yearDay  float64
		dateDays float64 // days since 1970-01-01 of the civil date (checked with Python 3 datetime.date subtraction)
	}{
		{"UTC", instant, nil, 2021, 6, 15, 2, 166, 18793},
		{"Kiritimati, own location", instant.In(kir), nil, 2021, 6, 16, 3, 167, 18794},
		{"Pago Pago, own location", instant.In(pago), nil, 2021, 6, 15, 2, 166, 18793},
		{"Kiritimati by Set.Location", instant, kir, 2021, 6, 16, 3, 167, 18794},
		{"Pago Pago by Set.Location", instant.In(kir), pago, 2021, 6, 15, 2, 166, 18793},
		{"UTC by Set.Location", instant.In(kir), time.UTC, 2021, 6, 15, 2, 166, 18793},
		{"Kiritimati, last second before the skipped day", time.Date(1994, 12, 31, 9, 59, 59, 0, time.UTC), kir, 1994, 12, 30, 5, 364, 9129},
		{"Kiritimati, first second after the skipped day", time.Date(1994, 12, 31, 10, 0, 0, 0, time.UTC), kir, 1995, 1, 1, 7, 1, 9131},
		{"Apia, before the skipped day", time.Date(2011, 12, 30, 9, 59, 59, 0, time.UTC), apia, 2011, 12, 29, 4, 363, 15337},
		{"Apia, after the skipped day", time.Date(2011, 12, 30, 10, 0, 0, 0, time.UTC), apia, 2011, 12, 31, 6, 365, 15339},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			set := features.Set{Parts: allNumber(), Date: true, Location: tt.loc}
			tab := encode(t, set, []time.Time{tt.date})
			got := [6]float64{col(t, tab, "year")[0], col(t, tab, "month")[0], col(t, tab, "day")[0],
				col(t, tab, "weekday")[0], col(t, tab, "yearday")[0], col(t, tab, "date")[0]}
			want := [6]float64{tt.y, tt.m, tt.d, tt.weekday, tt.yearDay, tt.dateDays}
			if got != want {
				t.Errorf("year, month, day, weekday, yearday, date: got %v, want %v", got, want)
			}
			local := tt.date
			if tt.loc != nil {
				local = tt.date.In(tt.loc)
			}
			if ref := timeParts(local); ref[0] != got[0] || ref[2] != got[1] || ref[5] != got[2] {
				t.Errorf("time package reads %v; got %v-%v-%v", local, got[0], got[1], got[2])
			}
		})
	}
}

// TestZoneRunsMatchTime encodes a long series of hourly instants across
// many zone transitions in one call, so the zone-offset cache is reused
// and invalidated many times, and compares every part with the time
// package.
func TestZoneRunsMatchTime(t *testing.T) {
	for _, name := range []string{"America/New_York", "Australia/Lord_Howe", "Pacific/Chatham", "Asia/Kathmandu", "Pacific/Apia", "Europe/Dublin"} {
		t.Run(name, func(t *testing.T) {
			loc := mustLoad(t, name)
			var dates []time.Time
			for d := time.Date(2009, 12, 25, 0, 0, 0, 0, time.UTC); d.Year() < 2013; d = d.Add(5*time.Hour + 7*time.Minute) {
				dates = append(dates, d)
			}
			set := features.Set{Parts: allNumber(), Location: loc}
			tab := encode(t, set, dates)
			for i, d := range dates {
				want := timeParts(d.In(loc))
				for j := range want {
					if got := tab.Column(j)[i]; got != want[j] {
						t.Fatalf("%v: %s got %v, want %v (time package)", d.In(loc), tab.Name(j), got, want[j])
					}
				}
			}
		})
	}
}
