package holiday

import (
	"errors"
	"slices"
	"strings"
	"testing"
	"time"

	"github.com/google/go-cmp/cmp"
)

func TestCombineMergesDuplicates(t *testing.T) {
	// DE-BY contains the national list, so DE+DE-BY is DE-BY.
	c, err := Combine(mustCountry(t, "DE"), mustCountry(t, "DE-BY"))
	if err != nil {
		t.Fatal(err)
	}
	by := mustCountry(t, "DE-BY")
	for _, y := range []int{2017, 2024} {
		if diff := cmp.Diff(by.Holidays(y), c.Holidays(y)); diff != "" {
			t.Errorf("%d: DE+DE-BY differs from DE-BY (-want +got):\n%s", y, diff)
		}
	}
	if c.Code() != "DE+DE-BY" {
		t.Errorf("code %q, want DE+DE-BY", c.Code())
	}
}

func TestCombineTwoCountries(t *testing.T) {
	c, err := Combine(mustCountry(t, "GB"), mustCountry(t, "US"))
	if err != nil {
		t.Fatal(err)
	}
	// Christmas 2021 (Saturday): one name, one actual date, two days off
	// (GB Monday 27, US Friday 24).
	var obs []string
	for _, h := range c.Holidays(2021) {
		if h.Name == "Christmas Day" {
			obs = append(obs, h.Observed.Format(time.DateOnly))
		}
	}
	slices.Sort(obs)
	if diff := cmp.Diff([]string{"2021-12-24", "2021-12-27"}, obs); diff != "" {
		t.Errorf("Christmas 2021 observed (-want +got):\n%s", diff)
	}
	// Christmas 2024 (Wednesday) is kept once.
	n := 0
	for _, h := range c.Holidays(2024) {
		if h.Name == "Christmas Day" {
			n++
		}
	}
	if n != 1 {
		t.Errorf("Christmas 2024: %d occurrences, want 1", n)
	}
}

func TestCombineRenamesClashes(t *testing.T) {
	// "Labour Day" is the first Monday of October in NSW and the second
	// Monday of March in Victoria: two holidays, so both are renamed.
	c, err := Combine(mustCountry(t, "AU-NSW"), mustCountry(t, "AU-VIC"))
	if err != nil {
		t.Fatal(err)
	}
	names := c.Names()
	for _, want := range []string{"AU-NSW: Labour Day", "AU-VIC: Labour Day", "Christmas Day"} {
		if !slices.Contains(names, want) {
			t.Errorf("names %q lack %q", names, want)
		}
	}
	if slices.Contains(names, "Labour Day") {
		t.Errorf("names %q still have the ambiguous \"Labour Day\"", names)
	}
}

// plain is a Calendar of our own type, without a code.
type plain []Holiday

func (p plain) Holidays(year int) []Holiday {
	var out []Holiday
	for _, h := range p {
		if h.Date.Year() == year {
			out = append(out, h)
		}
	}
	return out
}

func TestCombineErrors(t *testing.T) {
	a := plain{{Name: "Fair", Date: d(2024, 6, 1), Observed: d(2024, 6, 1)}}
	b := plain{{Name: "Fair", Date: d(2024, 6, 8), Observed: d(2024, 6, 8)}}
	for _, tt := range []struct {
		name  string
		parts []Calendar
		want  error
		msg   string
	}{
		{"none", nil, ErrEmpty, "no calendars"},
		{"clash without codes", []Calendar{a, b}, ErrCalendar, "has no code"},
		{"empty name", []Calendar{plain{{Date: d(2024, 1, 1), Observed: d(2024, 1, 1)}}}, ErrCalendar, "empty name"},
		{"observed far away", []Calendar{plain{{Name: "X", Date: d(2024, 1, 1), Observed: d(2026, 1, 1)}}}, ErrCalendar, "days away"},
	} {
		t.Run(tt.name, func(t *testing.T) {
			_, err := Combine(tt.parts...)
			if !errors.Is(err, tt.want) || !strings.Contains(err.Error(), tt.msg) {
				t.Errorf("got %v, want %v containing %q", err, tt.want, tt.msg)
			}
		})
	}
	same := mustCountry(t, "AU-NSW")
	if _, err := Combine(same, same, mustCountry(t, "AU-VIC")); !errors.Is(err, ErrCalendar) {
		t.Errorf("two parts with one code and a clash: got %v, want ErrCalendar", err)
	}
}

func TestCombineCustomOneOff(t *testing.T) {
	// A one-off day declared by the user, added to a national calendar.
	extra, err := New("EXTRA", Rule{Name: "Town Fair", Kind: OneOff, Dates: []time.Time{d(2025, 6, 13)}})
	if err != nil {
		t.Fatal(err)
	}
	c, err := Combine(mustCountry(t, "GB"), extra)
	if err != nil {
		t.Fatal(err)
	}
	got := dayOffs(c, d(2025, 6, 1), d(2025, 6, 30))
	if diff := cmp.Diff([]string{"2025-06-13 Town Fair"}, got); diff != "" {
		t.Errorf("(-want +got):\n%s", diff)
	}
}

// TestStateFuneralAsCustom declares the 19 September 2022 bank holiday as
// a user's one-off rule on top of rickar/cal's own gb list (which lacks it)
// and checks that the result matches the published 2022 list.
func TestStateFuneralAsCustom(t *testing.T) {
	srcs := snapshot(gbHolidaysRaw())
	raw := &Almanac{code: "GB-RAW", compute: func() [][]Holiday { return computeYears(srcs, firstYear, lastYear) }}
	funeral, err := New("GB-EXTRA", Rule{Name: "State Funeral of Queen Elizabeth II", Kind: OneOff,
		Dates: []time.Time{time.Date(2022, 9, 19, 9, 30, 0, 0, time.FixedZone("BST", 3600))}})
	if err != nil {
		t.Fatal(err)
	}
	c, err := Combine(raw, funeral)
	if err != nil {
		t.Fatal(err)
	}
	var want []string
	for _, s := range gbPublished {
		if strings.HasPrefix(s, "2022-0") {
			want = append(want, s)
		}
	}
	got := dayOffs(c, d(2022, 1, 1), d(2022, 9, 30))
	if diff := cmp.Diff(want, got); diff != "" {
		t.Errorf("(-want +got):\n%s", diff)
	}
}
