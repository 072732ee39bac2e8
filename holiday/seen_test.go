package holiday

import (
	"strings"
	"testing"
	"time"

	"github.com/google/go-cmp/cmp"
	"github.com/kalends/kalends/features"
)

// dateRange returns every date from..to inclusive.
func dateRange(from, to time.Time) []time.Time {
	var out []time.Time
	for t := from; !t.After(to); t = t.AddDate(0, 0, 1) {
		out = append(out, t)
	}
	return out
}

// publishedOn returns the slugs of the holidays of gbPublished (the UK
// government's list) whose day off is one of dates, in the order of
// names, which must be the calendar's own order.
func publishedOn(dates []time.Time, names []string) []string {
	on := map[string]bool{}
	for _, t := range dates {
		for _, p := range gbPublished {
			if strings.HasPrefix(p, t.Format(time.DateOnly)+" ") {
				on[p[len(time.DateOnly)+1:]] = true
			}
		}
	}
	var out []string
	for _, n := range names {
		if on[n] {
			out = append(out, Slug(n))
		}
	}
	return out
}

// TestColumnsSeen checks Seen against the published England and Wales
// days off: only the holidays observed on one of the learning dates get a
// column, and none of those columns is all zeros on those dates; without
// Seen every holiday of the calendar gets one.
func TestColumnsSeen(t *testing.T) {
	gb := mustCountry(t, "GB")
	tests := []struct {
		name  string
		dates []time.Time
	}{
		// New Year's Day 2022 was observed on 3 January, before the
		// range; Christmas Day 2022 on the 27th, inside it.
		{"March to December 2022", dateRange(d(2022, 3, 1), d(2022, 12, 31))},
		{"2019 to 2026", dateRange(d(2019, 1, 1), d(2026, 12, 31))},
		{"Thursdays of 2023", func() []time.Time {
			var out []time.Time
			for _, t := range dateRange(d(2023, 1, 1), d(2023, 12, 31)) {
				if t.Weekday() == time.Thursday {
					out = append(out, t)
				}
			}
			return out
		}()},
		{"one day off, repeated", []time.Time{d(2023, 5, 8), d(2023, 5, 8)}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			want := publishedOn(tt.dates, gb.Names())
			enc, err := Columns{Calendar: gb, Each: Parts{Indicator: true}, Seen: true}.Learn(tt.dates)
			if err != nil {
				t.Fatal(err)
			}
			if diff := cmp.Diff(want, enc.Names(), cmpEmpty); diff != "" {
				t.Errorf("Seen columns (-published +got):\n%s", diff)
			}
			x, err := features.Apply(enc, tt.dates)
			if err != nil {
				t.Fatal(err)
			}
			for j := range x.Width() {
				if allZero(x.Column(j)) {
					t.Errorf("column %q is all zeros on the learning dates", x.Name(j))
				}
			}
			all, err := Columns{Calendar: gb, Each: Parts{Indicator: true}}.Learn(tt.dates)
			if err != nil {
				t.Fatal(err)
			}
			if got, want := len(all.Names()), len(gb.Names()); got != want {
				t.Errorf("without Seen: got %d columns, want one per calendar holiday, %d", got, want)
			}
		})
	}
}

var cmpEmpty = cmp.Transformer("empty", func(s []string) []string {
	if len(s) == 0 {
		return nil
	}
	return s
})

func allZero(col []float64) bool {
	for _, v := range col {
		if v != 0 {
			return false
		}
	}
	return true
}

// TestColumnsSeenActual checks that Seen looks at the date Actual chooses:
// Christmas Day 2022 fell on Sunday 25 December and was observed on
// Tuesday 27 December (gbPublished, "Christmas Day (substitute day)").
func TestColumnsSeenActual(t *testing.T) {
	gb := mustCountry(t, "GB")
	tests := []struct {
		name   string
		date   time.Time
		actual bool
		want   []string
	}{
		{"observed date, observed columns", d(2022, 12, 27), false, []string{"christmas_day"}},
		{"observed date, actual columns", d(2022, 12, 27), true, nil},
		{"actual date, actual columns", d(2022, 12, 25), true, []string{"christmas_day"}},
		{"actual date, observed columns", d(2022, 12, 25), false, nil},
		{"Boxing Day on its own date", d(2022, 12, 26), false, []string{"boxing_day"}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			enc, err := Columns{Calendar: gb, Each: Parts{Indicator: true}, Actual: tt.actual, Seen: true}.Learn([]time.Time{tt.date})
			if err != nil {
				t.Fatal(err)
			}
			if diff := cmp.Diff(tt.want, enc.Names(), cmpEmpty); diff != "" {
				t.Errorf("columns (-want +got):\n%s", diff)
			}
		})
	}
}

// TestColumnsSeenScope checks what Seen leaves alone: Names still selects,
// any_holiday and business_day still cover every holiday selected, and
// Seen makes Columns adaptive while the default is not.
func TestColumnsSeenScope(t *testing.T) {
	gb := mustCountry(t, "GB")
	learn := dateRange(d(2024, 12, 20), d(2024, 12, 31)) // Christmas and Boxing Day 2024
	c := Columns{Calendar: gb, Names: []string{"Boxing Day", "Easter Monday"}, Each: Parts{Indicator: true},
		Any: Parts{Indicator: true}, Business: true, Seen: true}
	enc, err := c.Learn(learn)
	if err != nil {
		t.Fatal(err)
	}
	if diff := cmp.Diff([]string{"boxing_day", "any_holiday", "business_day"}, enc.Names()); diff != "" {
		t.Errorf("names (-want +got):\n%s", diff)
	}
	// Easter Monday 2025 (21 April) has no column of its own but is still
	// a holiday for any_holiday and not a business day.
	x, err := features.Apply(enc, []time.Time{d(2025, 4, 21), d(2025, 4, 22)})
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		col  string
		want []float64
	}{
		{"boxing_day", []float64{0, 0}},
		{"any_holiday", []float64{1, 0}},
		{"business_day", []float64{0, 1}},
	} {
		got, _ := x.Lookup(tc.col)
		if diff := cmp.Diff(tc.want, got); diff != "" {
			t.Errorf("%s on 21 and 22 April 2025 (-want +got):\n%s", tc.col, diff)
		}
	}
	if !features.Adapts(c) {
		t.Error("Adapts(Columns{Seen: true}): got false, want true")
	}
	c.Seen = false
	if features.Adapts(c) {
		t.Error("Adapts(Columns{}): got true, want false")
	}
	// No holiday among the dates: no per-holiday column, and no error.
	enc, err = Columns{Calendar: gb, Each: Parts{Indicator: true}, Seen: true}.Learn(dateRange(d(2024, 7, 1), d(2024, 7, 31)))
	if err != nil || len(enc.Names()) != 0 {
		t.Errorf("July 2024: got %v, %v; want no columns and no error", enc.Names(), err)
	}
}
