package holiday

import (
	"sync"
	"testing"
	"time"

	"github.com/google/go-cmp/cmp"
)

// TestOnPublished checks On and DayOff on every day of 2019–2026 against
// gbPublished, the UK government's list of England and Wales days off:
// DayOff is true exactly on the listed dates, and the holidays On gives
// with that day as their observed date are the ones listed for it.
func TestOnPublished(t *testing.T) {
	gb := mustCountry(t, "GB")
	want := map[string][]string{} // date → names listed for it
	for _, p := range gbPublished {
		day, name := p[:len(time.DateOnly)], p[len(time.DateOnly)+1:]
		want[day] = append(want[day], name)
	}
	offs := 0
	for day := d(2019, 1, 1); day.Year() <= 2026; day = day.AddDate(0, 0, 1) {
		key := day.Format(time.DateOnly)
		var got []string
		for _, h := range gb.On(day) {
			if h.Observed.Equal(day) {
				got = append(got, h.Name)
			}
			if !h.Observed.Equal(day) && !h.Date.Equal(day) {
				t.Errorf("On(%s) gave %s, actual %s, observed %s: neither is the day", key, h.Name,
					h.Date.Format(time.DateOnly), h.Observed.Format(time.DateOnly))
			}
		}
		if diff := cmp.Diff(want[key], got); diff != "" {
			t.Errorf("On(%s), observed that day (-published +got):\n%s", key, diff)
		}
		if got, want := gb.DayOff(day), want[key] != nil; got != want {
			t.Errorf("DayOff(%s): got %t, want %t", key, got, want)
		}
		if want[key] != nil {
			offs++
		}
	}
	if offs != len(gbPublished) {
		t.Errorf("found %d days off, want %d (no two published holidays share a day)", offs, len(gbPublished))
	}
}

func TestOnCases(t *testing.T) {
	gb := mustCountry(t, "GB")
	plusOne := time.FixedZone("UTC+1", 3600)
	tests := []struct {
		name   string
		date   time.Time
		want   []Holiday
		dayOff bool
	}{
		// Christmas Day 2022 fell on a Sunday; Boxing Day took Monday
		// the 26th and Christmas the substitute Tuesday the 27th
		// (gbPublished: "Christmas Day (substitute day)").
		{"actual date, not a day off", d(2022, 12, 25),
			[]Holiday{{Name: "Christmas Day", Date: d(2022, 12, 25), Observed: d(2022, 12, 27)}}, false},
		{"substitute day", d(2022, 12, 27),
			[]Holiday{{Name: "Christmas Day", Date: d(2022, 12, 25), Observed: d(2022, 12, 27)}}, true},
		{"actual and observed", d(2022, 12, 26),
			[]Holiday{{Name: "Boxing Day", Date: d(2022, 12, 26), Observed: d(2022, 12, 26)}}, true},
		{"ordinary day", d(2022, 12, 28), nil, false},
		// 00:30 on 26 December at UTC+1 is still 25 December in UTC.
		{"civil date in its own location", time.Date(2022, 12, 26, 0, 30, 0, 0, plusOne),
			[]Holiday{{Name: "Boxing Day", Date: d(2022, 12, 26), Observed: d(2022, 12, 26)}}, true},
		{"before MinYear", d(MinYear-1, 12, 25), nil, false},
		{"after MaxYear", d(MaxYear+1, 1, 1), nil, false},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if diff := cmp.Diff(tt.want, gb.On(tt.date)); diff != "" {
				t.Errorf("On (-want +got):\n%s", diff)
			}
			if got := gb.DayOff(tt.date); got != tt.dayOff {
				t.Errorf("DayOff: got %t, want %t", got, tt.dayOff)
			}
		})
	}
	// The caller may modify the slice.
	gb.On(d(2022, 12, 26))[0].Name = "changed"
	if got := gb.On(d(2022, 12, 26))[0].Name; got != "Boxing Day" {
		t.Errorf("after modifying a result: got %q, want Boxing Day", got)
	}
}

// TestOnConcurrent calls On and DayOff from many goroutines on a calendar
// not yet used, so that its table is built during the calls; run it with
// -race.
func TestOnConcurrent(t *testing.T) {
	a, err := Country("DE-BY")
	if err != nil {
		t.Fatal(err)
	}
	ref, _ := Country("DE-BY")
	var wg sync.WaitGroup
	errs := make([]string, 8)
	for g := range 8 {
		wg.Go(func() {
			for k := range 400 {
				day := d(2020, 1, 1).AddDate(0, 0, (g*400+k)%1500)
				if diff := cmp.Diff(ref.On(day), a.On(day)); diff != "" {
					errs[g] = day.Format(time.DateOnly) + ": " + diff
					return
				}
				if a.DayOff(day) != ref.DayOff(day) {
					errs[g] = day.Format(time.DateOnly) + ": DayOff differs"
					return
				}
			}
		})
	}
	wg.Wait()
	for g, e := range errs {
		if e != "" {
			t.Errorf("goroutine %d: %s", g, e)
		}
	}
}
