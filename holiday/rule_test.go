package holiday

import (
	"errors"
	"strings"
	"testing"
	"time"

	"github.com/google/go-cmp/cmp"
)

// occ formats a calendar's holidays of one year as "date→observed name".
func occ(a Calendar, year int) []string {
	var out []string
	for _, h := range a.Holidays(year) {
		out = append(out, h.Date.Format("2006-01-02")+"→"+h.Observed.Format("01-02")+" "+h.Name)
	}
	return out
}

// TestRuleKinds checks each kind of rule against dates read off a printed
// calendar (weekdays of 2024–2027 were checked with `cal`/`ncal`).
func TestRuleKinds(t *testing.T) {
	for _, tt := range []struct {
		name string
		rule Rule
		year int
		want []string
	}{
		{"fixed", Rule{Name: "F", Month: time.July, Day: 14}, 2024, []string{"2024-07-14→07-14 F"}},
		{"29 February in a leap year", Rule{Name: "L", Month: time.February, Day: 29}, 2024, []string{"2024-02-29→02-29 L"}},
		{"29 February in a common year", Rule{Name: "L", Month: time.February, Day: 29}, 2025, nil},
		{"2nd Monday of October", Rule{Name: "T", Kind: NthWeekday, Month: time.October, Weekday: time.Monday, N: 2}, 2024, []string{"2024-10-14→10-14 T"}},
		{"last Monday of May", Rule{Name: "M", Kind: NthWeekday, Month: time.May, Weekday: time.Monday, N: -1}, 2024, []string{"2024-05-27→05-27 M"}},
		{"second-to-last Friday of November", Rule{Name: "P", Kind: NthWeekday, Month: time.November, Weekday: time.Friday, N: -2}, 2024, []string{"2024-11-22→11-22 P"}},
		{"4th Thursday of November", Rule{Name: "G", Kind: NthWeekday, Month: time.November, Weekday: time.Thursday, N: 4}, 2025, []string{"2025-11-27→11-27 G"}},
		{"5th Monday of September 2024 exists", Rule{Name: "Q", Kind: NthWeekday, Month: time.September, Weekday: time.Monday, N: 5}, 2024, []string{"2024-09-30→09-30 Q"}},
		{"5th Monday of September 2026 does not", Rule{Name: "Q", Kind: NthWeekday, Month: time.September, Weekday: time.Monday, N: 5}, 2026, nil},
		{"Good Friday", Rule{Name: "GF", Kind: EasterOffset, Offset: -2}, 2024, []string{"2024-03-29→03-29 GF"}},
		{"Whit Monday", Rule{Name: "WM", Kind: EasterOffset, Offset: 50}, 2025, []string{"2025-06-09→06-09 WM"}},
		{"Orthodox Good Friday", Rule{Name: "OGF", Kind: OrthodoxOffset, Offset: -2}, 2024, []string{"2024-05-03→05-03 OGF"}},
		{"one-off in its year", Rule{Name: "O", Kind: OneOff, Dates: []time.Time{d(2022, 9, 19), d(2023, 5, 8)}}, 2022, []string{"2022-09-19→09-19 O"}},
		{"one-off elsewhere", Rule{Name: "O", Kind: OneOff, Dates: []time.Time{d(2022, 9, 19)}}, 2021, nil},
		{"before From", Rule{Name: "F", Month: time.June, Day: 19, From: 2021}, 2020, nil},
		{"after To", Rule{Name: "F", Month: time.June, Day: 19, To: 2019}, 2020, nil},
		{"NextWeekday on Saturday", Rule{Name: "S", Month: time.July, Day: 4, Substitute: NextWeekday}, 2026, []string{"2026-07-04→07-06 S"}},
		{"NearestWeekday on Saturday", Rule{Name: "S", Month: time.July, Day: 4, Substitute: NearestWeekday}, 2026, []string{"2026-07-04→07-03 S"}},
		{"NearestWeekday on Sunday", Rule{Name: "S", Month: time.July, Day: 4, Substitute: NearestWeekday}, 2027, []string{"2027-07-04→07-05 S"}},
		{"SundayToMonday on Saturday", Rule{Name: "S", Month: time.July, Day: 4, Substitute: SundayToMonday}, 2026, []string{"2026-07-04→07-04 S"}},
		{"SundayToMonday on Sunday", Rule{Name: "S", Month: time.July, Day: 4, Substitute: SundayToMonday}, 2027, []string{"2027-07-04→07-05 S"}},
		{"NoSubstitute on Sunday", Rule{Name: "S", Month: time.July, Day: 4}, 2027, []string{"2027-07-04→07-04 S"}},
	} {
		t.Run(tt.name, func(t *testing.T) {
			a, err := New("X", tt.rule)
			if err != nil {
				t.Fatal(err)
			}
			if diff := cmp.Diff(tt.want, occ(a, tt.year)); diff != "" {
				t.Errorf("(-want +got):\n%s", diff)
			}
		})
	}
}

// TestSubstituteCollisions checks that NextWeekday and SundayToMonday skip
// days already off: the England and Wales Christmas rule (published
// substitutes: 2021 Mon 27 and Tue 28; 2022 Boxing Day Mon 26, Christmas
// Tue 27 — see gbPublished) and Japan's Golden Week (Children's Day on
// Sunday 5 May 2024 → Monday 6; with 3–5 May 2026 on Sun–Tue, the Sunday
// holiday's substitute is Wednesday 6 May, recalled from memory of the
// Cabinet Office list).
func TestSubstituteCollisions(t *testing.T) {
	xmas, err := New("X",
		Rule{Name: "Christmas Day", Month: time.December, Day: 25, Substitute: NextWeekday},
		Rule{Name: "Boxing Day", Month: time.December, Day: 26, Substitute: NextWeekday})
	if err != nil {
		t.Fatal(err)
	}
	golden, err := New("J",
		Rule{Name: "Constitution", Month: time.May, Day: 3, Substitute: SundayToMonday},
		Rule{Name: "Greenery", Month: time.May, Day: 4, Substitute: SundayToMonday},
		Rule{Name: "Children", Month: time.May, Day: 5, Substitute: SundayToMonday})
	if err != nil {
		t.Fatal(err)
	}
	// Substitutes that cross New Year, by the rules' definitions (weekdays
	// checked with Python's datetime): 1 January 2022 is a Saturday,
	// 31 December 2022 is a Saturday, 1 January 2023 a Sunday,
	// 31 December 2023 a Sunday and 1 January 2024 a Monday. The
	// substitute for a late-December holiday must skip the next year's
	// days off, and the next year's substitutes must skip it.
	eve, err := New("E",
		Rule{Name: "New Year's Eve", Month: time.December, Day: 31, Substitute: NextWeekday},
		Rule{Name: "New Year's Day", Month: time.January, Day: 1, Substitute: NextWeekday})
	if err != nil {
		t.Fatal(err)
	}
	eveSunday, err := New("S",
		Rule{Name: "New Year's Eve", Month: time.December, Day: 31, Substitute: SundayToMonday},
		Rule{Name: "New Year's Day", Month: time.January, Day: 1})
	if err != nil {
		t.Fatal(err)
	}
	for _, tt := range []struct {
		name string
		cal  Calendar
		year int
		want []string
	}{
		// 2022: New Year's Day (Saturday) takes Monday 3 January and the Eve
		// (Saturday) Monday 2 January 2023; in 2023 New
		// Year's Day (Sunday) then takes Tuesday 3, and the Eve (Sunday)
		// skips Monday 1 January 2024, New Year's Day, for Tuesday 2.
		{"New Year's Eve Saturday", eve, 2022, []string{"2022-01-01→01-03 New Year's Day", "2022-12-31→01-02 New Year's Eve"}},
		{"New Year's Day after a substitute", eve, 2023, []string{"2023-01-01→01-03 New Year's Day", "2023-12-31→01-02 New Year's Eve"}},
		{"SundayToMonday onto New Year's Day", eveSunday, 2023, []string{"2023-01-01→01-01 New Year's Day", "2023-12-31→01-02 New Year's Eve"}},
		{"Christmas Saturday", xmas, 2021, []string{"2021-12-25→12-27 Christmas Day", "2021-12-26→12-28 Boxing Day"}},
		{"Christmas Sunday", xmas, 2022, []string{"2022-12-25→12-27 Christmas Day", "2022-12-26→12-26 Boxing Day"}},
		{"Christmas Friday", xmas, 2026, []string{"2026-12-25→12-25 Christmas Day", "2026-12-26→12-28 Boxing Day"}},
		{"Golden Week 2024", golden, 2024, []string{"2024-05-03→05-03 Constitution", "2024-05-04→05-04 Greenery", "2024-05-05→05-06 Children"}},
		{"Golden Week 2026", golden, 2026, []string{"2026-05-03→05-06 Constitution", "2026-05-04→05-04 Greenery", "2026-05-05→05-05 Children"}},
	} {
		t.Run(tt.name, func(t *testing.T) {
			if diff := cmp.Diff(tt.want, occ(tt.cal, tt.year)); diff != "" {
				t.Errorf("(-want +got):\n%s", diff)
			}
		})
	}
}

func TestNewErrors(t *testing.T) {
	for _, tt := range []struct {
		name  string
		rules []Rule
		index int
		msg   string
	}{
		{"30 February", []Rule{{Name: "A", Month: time.February, Day: 30}}, 1, "no February 30"},
		{"31 April", []Rule{{Name: "A", Month: time.April, Day: 31}}, 1, "no April 31"},
		{"month 13", []Rule{{Name: "A", Month: 13, Day: 1}}, 1, "month 13"},
		{"6th Monday", []Rule{{Name: "A", Kind: NthWeekday, Month: time.May, Weekday: time.Monday, N: 6}}, 1, "6th Monday"},
		{"0th Monday", []Rule{{Name: "A", Kind: NthWeekday, Month: time.May, Weekday: time.Monday}}, 1, "N = 0"},
		{"empty name", []Rule{{Month: time.May, Day: 1}}, 1, "empty name"},
		{"unused field", []Rule{{Name: "A", Month: time.May, Day: 1, Offset: 3}}, 1, "Offset is set"},
		{"no dates", []Rule{{Name: "A", Kind: OneOff}}, 1, "at least one date"},
		{"date twice", []Rule{{Name: "A", Kind: OneOff, Dates: []time.Time{d(2022, 9, 19), d(2022, 9, 19)}}}, 1, "listed twice"},
		{"date out of range", []Rule{{Name: "A", Kind: OneOff, Dates: []time.Time{d(1850, 1, 1)}}}, 1, "outside 1900…2149"},
		{"From after To", []Rule{{Name: "A", Month: time.May, Day: 1, From: 2020, To: 2010}}, 1, "From 2020 is after To 2010"},
		{"Easter offset too far", []Rule{{Name: "A", Kind: EasterOffset, Offset: 300}}, 1, "outside -80…250"},
		{"same name, different rule", []Rule{
			{Name: "A", Month: time.May, Day: 1},
			{Name: "B", Month: time.May, Day: 2},
			{Name: "A", Month: time.May, Day: 3},
		}, 3, "rule 1 has the same name"},
	} {
		t.Run(tt.name, func(t *testing.T) {
			_, err := New("X", tt.rules...)
			var re *RuleError
			if !errors.As(err, &re) || !errors.Is(err, ErrRule) {
				t.Fatalf("got error %v, want a *RuleError matching ErrRule", err)
			}
			if re.Index != tt.index || !strings.Contains(err.Error(), tt.msg) {
				t.Errorf("got %q (rule %d), want rule %d and %q", err, re.Index, tt.index, tt.msg)
			}
		})
	}
	if _, err := New("X"); !errors.Is(err, ErrEmpty) {
		t.Errorf("New with no rules: got %v, want ErrEmpty", err)
	}
}

func TestNewIdenticalRulesKeptOnce(t *testing.T) {
	r := Rule{Name: "A", Kind: OneOff, Dates: []time.Time{d(2022, 9, 19)}}
	same := Rule{Name: "A", Kind: OneOff, Dates: []time.Time{time.Date(2022, 9, 19, 15, 0, 0, 0, time.UTC)}}
	a, err := New("X", r, same)
	if err != nil {
		t.Fatal(err)
	}
	if got := len(a.Holidays(2022)); got != 1 {
		t.Errorf("got %d holidays, want 1", got)
	}
}

func TestNewPanicsOnBadEnum(t *testing.T) {
	for _, tt := range []struct {
		name string
		rule Rule
	}{
		{"kind", Rule{Name: "A", Kind: 9}},
		{"substitution", Rule{Name: "A", Month: 1, Day: 1, Substitute: -1}},
	} {
		t.Run(tt.name, func(t *testing.T) {
			defer func() {
				if r := recover(); r == nil || !strings.HasPrefix(r.(string), "holiday: ") {
					t.Errorf("got panic %v, want one starting \"holiday: \"", r)
				}
			}()
			New("X", tt.rule)
		})
	}
}

func TestEnumStrings(t *testing.T) {
	for _, tt := range []struct{ got, want string }{
		{Fixed.String(), "Fixed"}, {OneOff.String(), "OneOff"}, {Kind(7).String(), "Kind(7)"},
		{NextWeekday.String(), "NextWeekday"}, {SundayToMonday.String(), "SundayToMonday"},
		{Substitution(9).String(), "Substitution(9)"},
	} {
		if tt.got != tt.want {
			t.Errorf("got %q, want %q", tt.got, tt.want)
		}
	}
}
