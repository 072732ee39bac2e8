package features_test

import (
	"testing"
	"time"
	_ "time/tzdata" // zones for the location tests on machines without a zoneinfo database

	"github.com/kalends/kalends/features"
)

// allNumber asks for every part as a plain number.
func allNumber() []features.Spec {
	parts := []features.Part{
		features.Year, features.Quarter, features.Month, features.ISOWeek, features.ISOYear,
		features.Day, features.YearDay, features.Weekday, features.MonthWeek, features.Weekend,
		features.MonthStart, features.MonthEnd, features.DaysInMonth, features.LeapYear,
	}
	specs := make([]features.Spec, len(parts))
	for i, p := range parts {
		specs[i] = features.Spec{Part: p}
	}
	return specs
}

// encode learns set on dates, applies it to the same dates and returns the
// table; it fails the test on any error.
func encode(t testing.TB, set features.Set, dates []time.Time) *features.Table {
	t.Helper()
	enc, err := set.Learn(dates)
	if err != nil {
		t.Fatalf("Learn: %v", err)
	}
	tab, err := features.Apply(enc, dates)
	if err != nil {
		t.Fatalf("Apply: %v", err)
	}
	return tab
}

// col returns the named column or fails the test.
func col(t testing.TB, tab *features.Table, name string) []float64 {
	t.Helper()
	c, ok := tab.Lookup(name)
	if !ok {
		t.Fatalf("no column %q in %v", name, tab.Names())
	}
	return c
}

func mustLoad(t testing.TB, name string) *time.Location {
	t.Helper()
	loc, err := time.LoadLocation(name)
	if err != nil {
		t.Fatalf("LoadLocation(%q): %v", name, err)
	}
	return loc
}

func day(y int, m time.Month, d int) time.Time { return time.Date(y, m, d, 0, 0, 0, 0, time.UTC) }

// TestISOWeekDateExamples checks the ISO 8601 week-date examples.
// Source: ISO 8601:2004 week-date rules (week 1 is the week holding the
// year's first Thursday; weeks start on Monday = 1). The four examples are
// widely published; they were recalled from memory, not copied from the
// standard's text.
func TestISOWeekDateExamples(t *testing.T) {
	tests := []struct {
		name                   string
		date                   time.Time
		isoYear, week, weekday float64
	}{
		{"2005-01-01 is 2004-W53-6", day(2005, 1, 1), 2004, 53, 6},
		{"2007-01-01 is 2007-W01-1", day(2007, 1, 1), 2007, 1, 1},
		{"2008-12-29 is 2009-W01-1", day(2008, 12, 29), 2009, 1, 1},
		{"2010-01-03 is 2009-W53-7", day(2010, 1, 3), 2009, 53, 7},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			tab := encode(t, features.Set{Parts: allNumber()}, []time.Time{tt.date})
			got := [3]float64{col(t, tab, "isoyear")[0], col(t, tab, "isoweek")[0], col(t, tab, "weekday")[0]}
			want := [3]float64{tt.isoYear, tt.week, tt.weekday}
			if got != want {
				t.Errorf("got %v-W%v-%v, want %v-W%v-%v", got[0], got[1], got[2], want[0], want[1], want[2])
			}
		})
	}
}

// TestLeapYears checks the Gregorian rule: a year divisible by 4 is leap,
// except centuries, except centuries divisible by 400 (Gregorian calendar,
// Inter gravissimas, 1582): 1900 not leap, 2000 leap, 2100 not leap.
func TestLeapYears(t *testing.T) {
	tests := []struct {
		name string
		year int
		leap bool
	}{
		{"1900 is not leap", 1900, false},
		{"2000 is leap", 2000, true},
		{"2100 is not leap", 2100, false},
		{"2024 is leap", 2024, true},
		{"2023 is not leap", 2023, false},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			dates := []time.Time{day(tt.year, 2, 1), day(tt.year, 12, 31)}
			tab := encode(t, features.Set{Parts: allNumber()}, dates)
			wantFeb, wantLen, wantFlag := 28.0, 365.0, 0.0
			if tt.leap {
				wantFeb, wantLen, wantFlag = 29, 366, 1
			}
			if got := col(t, tab, "daysinmonth")[0]; got != wantFeb {
				t.Errorf("days in February: got %v, want %v", got, wantFeb)
			}
			if got := col(t, tab, "yearday")[1]; got != wantLen {
				t.Errorf("day of year of 31 December: got %v, want %v", got, wantLen)
			}
			for i, got := range col(t, tab, "leapyear") {
				if got != wantFlag {
					t.Errorf("leapyear row %d: got %v, want %v", i+1, got, wantFlag)
				}
			}
		})
	}
}

// zellerISO returns the ISO weekday (Monday = 1 .. Sunday = 7) of a
// Gregorian date by Zeller's congruence (Chr. Zeller, "Die Grundaufgaben
// der Kalenderrechnung auf neue und vereinfachte Weise gelöst", 1882):
// h = (q + ⌊13(m+1)/5⌋ + K + ⌊K/4⌋ + ⌊J/4⌋ + 5J) mod 7, with January and
// February counted as months 13 and 14 of the year before, and h = 0 for
// Saturday.
func zellerISO(y, m, q int) int {
	if m < 3 {
		m += 12
		y--
	}
	k, j := y%100, y/100
	h := (q + 13*(m+1)/5 + k + k/4 + j/4 + 5*j) % 7
	return (h+5)%7 + 1
}

// TestEveryDay1900To2100 compares weekday, day of year, ISO week and the
// civil date of every day from 1900-01-01 to 2100-12-31 with the Go
// standard library's time package (a general-purpose reference), and the
// weekday also with Zeller's congruence.
func TestEveryDay1900To2100(t *testing.T) {
	var dates []time.Time
	for d := day(1900, 1, 1); !d.After(day(2100, 12, 31)); d = d.AddDate(0, 0, 1) {
		dates = append(dates, d)
	}
	if len(dates) != 73414 {
		t.Fatalf("got %d days, want 73414", len(dates))
	}
	checkAgainstTime(t, dates)
	wd := col(t, encode(t, features.Set{Parts: []features.Spec{{Part: features.Weekday}}}, dates), "weekday")
	for i, d := range dates {
		y, m, q := d.Date()
		if want := zellerISO(y, int(m), q); wd[i] != float64(want) {
			t.Fatalf("%s: weekday got %v, want %d (Zeller)", d.Format(time.DateOnly), wd[i], want)
		}
	}
}

// TestEveryDayAllYears extends the comparison with the time package to
// every day of years 1 to 9999, in chunks.
func TestEveryDayAllYears(t *testing.T) {
	if testing.Short() {
		t.Skip("3.65 million days; skipped with -short")
	}
	for y := 1; y <= 9999; y += 500 {
		var dates []time.Time
		d0 := day(y, 1, 1)
		if d0.IsZero() {
			d0 = d0.Add(time.Nanosecond) // 0001-01-01 00:00 UTC is the zero time.Time, an error
		}
		for d := d0; d.Year() < y+500 && d.Year() <= 9999; d = d.AddDate(0, 0, 1) {
			dates = append(dates, d)
		}
		checkAgainstTime(t, dates)
	}
}

// checkAgainstTime compares every part of dates with the time package.
func checkAgainstTime(t *testing.T, dates []time.Time) {
	t.Helper()
	tab := encode(t, features.Set{Parts: allNumber()}, dates)
	names := tab.Names()
	if len(names) != 14 {
		t.Fatalf("got %d columns, want 14", len(names))
	}
	cols := make([][]float64, len(names))
	for j := range names {
		cols[j] = tab.Column(j)
	}
	for i, d := range dates {
		want := timeParts(d)
		for j, name := range names {
			if cols[j][i] != want[j] {
				t.Fatalf("%s: %s got %v, want %v (time package)", d.Format(time.RFC3339), name, cols[j][i], want[j])
			}
		}
	}
}

// timeParts computes every part of d from the time package's own methods,
// read in d's location, in the order of allNumber.
func timeParts(d time.Time) [14]float64 {
	y, m, dd := d.Date()
	iy, iw := d.ISOWeek()
	wd := (int(d.Weekday())+6)%7 + 1
	dim := time.Date(y, m+1, 0, 12, 0, 0, 0, time.UTC).Day()
	leap := time.Date(y, 12, 31, 12, 0, 0, 0, time.UTC).YearDay() == 366
	b := func(c bool) float64 {
		if c {
			return 1
		}
		return 0
	}
	return [14]float64{
		float64(y), float64((int(m) + 2) / 3), float64(m), // year, quarter, month
		float64(iw), float64(iy), float64(dd), // isoweek, isoyear, day
		float64(d.YearDay()), float64(wd), float64((dd-1)/7 + 1), // yearday, weekday, monthweek
		b(d.Weekday() == time.Saturday || d.Weekday() == time.Sunday), // weekend
		b(dd == 1), b(dd == dim), float64(dim), b(leap), // monthstart, monthend, daysinmonth, leapyear
	}
}
