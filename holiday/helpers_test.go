package holiday

import (
	"github.com/rickar/cal/v2"
	"github.com/rickar/cal/v2/gb"
	"testing"
	"time"
)

func d(y int, m time.Month, day int) time.Time { return time.Date(y, m, day, 0, 0, 0, 0, time.UTC) }

func mustCountry(t testing.TB, code string) *Almanac {
	t.Helper()
	a, err := Country(code)
	if err != nil {
		t.Fatalf("Country(%q): %v", code, err)
	}
	return a
}

// dayOffs returns "date name" for every holiday of a observed in
// from…to (inclusive), in date order.
func dayOffs(a Calendar, from, to time.Time) []string {
	var out []string
	for y := from.Year() - 1; y <= to.Year()+1; y++ {
		for _, h := range a.Holidays(y) {
			if !h.Observed.Before(from) && !h.Observed.After(to) {
				out = append(out, h.Observed.Format(time.DateOnly)+" "+h.Name)
			}
		}
	}
	sortStrings(out)
	return out
}

func sortStrings(s []string) {
	for i := 1; i < len(s); i++ {
		for j := i; j > 0 && s[j] < s[j-1]; j-- {
			s[j], s[j-1] = s[j-1], s[j]
		}
	}
}

func gbHolidaysRaw() []*cal.Holiday { return gb.Holidays }
