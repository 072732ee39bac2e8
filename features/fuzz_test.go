package features_test

import (
	"errors"
	"math"
	"strings"
	"testing"
	"time"

	"github.com/kalends/kalends/features"
)

// fuzzZones are the locations FuzzCalendar reads instants in; index 0 is
// "the value's own location" (UTC for time.Unix values).
var fuzzZones = []string{
	"", "UTC", "America/New_York", "Pacific/Kiritimati", "Pacific/Pago_Pago", "Pacific/Apia",
	"Australia/Lord_Howe", "Asia/Kathmandu", "Pacific/Chatham", "America/St_Johns", "Europe/Dublin",
	"Antarctica/Troll", "America/Scoresbysund",
}

// fuzzSet asks for every part, in an encoding chosen so that all three
// appear, plus a trend and the date.
func fuzzSet(loc *time.Location, origin time.Time) features.Set {
	specs := allNumber()
	cyc := map[features.Part]bool{features.Month: true, features.YearDay: true, features.ISOWeek: true, features.Day: true, features.Quarter: true}
	for i := range specs {
		switch {
		case specs[i].Part == features.Weekday:
			specs[i].Encoding = features.Indicator
		case cyc[specs[i].Part]:
			specs[i].Encoding = features.Cyclic
		}
	}
	// Number columns for the parts shown cyclic above come from a second set.
	return features.Set{Parts: specs, Trend: &features.Trend{Origin: origin}, Date: true, Location: loc}
}

// FuzzCalendar reads arbitrary instants in arbitrary locations and checks
// invariants, and every plain part against the time package.
func FuzzCalendar(f *testing.F) {
	f.Add(int64(0), uint32(0), uint8(0), int32(0))
	f.Add(int64(1615705200), uint32(0), uint8(2), int32(0))           // 2021-03-14 07:00 UTC, New York spring-forward
	f.Add(int64(788868000), uint32(0), uint8(3), int32(0))            // 1994-12-31 10:00 UTC, Kiritimati after its skipped day
	f.Add(int64(1325239199), uint32(999999999), uint8(5), int32(0))   // Apia just before its skipped day
	f.Add(int64(253402300799), uint32(999999999), uint8(3), int32(0)) // last nanosecond of 9999 UTC: year 10000 in Kiritimati
	f.Add(int64(-62135596800), uint32(0), uint8(0), int32(0))         // the zero time.Time
	f.Add(int64(-62135596800), uint32(1), uint8(0), int32(0))         // a nanosecond later
	f.Add(int64(951782400), uint32(0), uint8(1), int32(0))            // 2000-02-29
	f.Add(int64(4102444800), uint32(5), uint8(200), int32(-39600))    // 2100-01-01 at a fixed UTC−11
	f.Add(int64(1104537600), uint32(0), uint8(255), int32(50400))     // 2005-01-01 at a fixed UTC+14
	f.Fuzz(func(t *testing.T, sec int64, nsec uint32, zone uint8, fixed int32) {
		var loc *time.Location
		if int(zone) < len(fuzzZones) {
			if name := fuzzZones[zone]; name != "" {
				loc = mustLoad(t, name)
			}
		} else {
			loc = time.FixedZone("fixed", int(fixed%(18*3600)))
		}
		d := time.Unix(sec, int64(nsec%1e9))
		local := d
		if loc != nil {
			local = d.In(loc)
		}
		origin := time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)
		set := fuzzSet(loc, origin)
		plain := features.Set{Parts: allNumber(), Location: loc}

		enc, err := set.Learn([]time.Time{d})
		switch {
		case d.IsZero():
			if !errors.Is(err, features.ErrZeroDate) {
				t.Fatalf("zero time: got %v, want ErrZeroDate", err)
			}
			return
		case local.Year() < 1 || local.Year() > 9999:
			if !errors.Is(err, features.ErrYearRange) {
				t.Fatalf("%v: got %v, want ErrYearRange", local, err)
			}
			return
		case err != nil:
			t.Fatalf("%v: %v", local, err)
		}
		tab, err := features.Apply(enc, []time.Time{d})
		if err != nil {
			t.Fatalf("%v: %v", local, err)
		}
		ptab := encode(t, plain, []time.Time{d})
		v := func(tab *features.Table, name string) float64 { return col(t, tab, name)[0] }

		want := timeParts(local)
		for j := range want {
			if got := ptab.Column(j)[0]; got != want[j] {
				t.Errorf("%v: %s got %v, want %v (time package)", local, ptab.Name(j), got, want[j])
			}
		}
		if m := v(ptab, "month"); m < 1 || m > 12 || v(ptab, "quarter") != math.Ceil(m/3) {
			t.Errorf("month %v, quarter %v", m, v(ptab, "quarter"))
		}
		for _, p := range []string{"month", "yearday", "isoweek", "day", "quarter"} {
			s, c := v(tab, p+".sin"), v(tab, p+".cos")
			if r := s*s + c*c; math.Abs(r-1) > 1e-12 {
				t.Errorf("%s: sin²+cos² = %v, want 1 (±1e-12)", p, r)
			}
		}
		// One weekday indicator is set (the one level learned), and it is
		// Saturday or Sunday exactly when the weekend flag is.
		var on []string
		for _, n := range tab.Names() {
			if strings.HasPrefix(n, "weekday=") && v(tab, n) == 1 {
				on = append(on, strings.TrimPrefix(n, "weekday="))
			}
		}
		if len(on) != 1 {
			t.Fatalf("weekday indicators set: %v, want exactly one", on)
		}
		if weekend := on[0] == "Saturday" || on[0] == "Sunday"; weekend != (v(tab, "weekend") == 1) {
			t.Errorf("weekday=%s but weekend=%v", on[0], v(tab, "weekend"))
		}
		if on[0] != local.Weekday().String() {
			t.Errorf("weekday=%s, want %s", on[0], local.Weekday())
		}
		dim, dd := v(ptab, "daysinmonth"), v(ptab, "day")
		if (v(ptab, "monthend") == 1) != (dd == dim) || (v(ptab, "monthstart") == 1) != (dd == 1) || dim < 28 || dim > 31 {
			t.Errorf("day %v of %v: monthend %v, monthstart %v", dd, dim, v(ptab, "monthend"), v(ptab, "monthstart"))
		}
		if leap := v(ptab, "leapyear"); (v(ptab, "month") == 2) && (dim == 29) != (leap == 1) {
			t.Errorf("February of %v days but leapyear=%v", dim, leap)
		}
		if yd := v(ptab, "yearday"); yd > 365+v(ptab, "leapyear") {
			t.Errorf("yearday %v in a year with leapyear=%v", yd, v(ptab, "leapyear"))
		}
		// The date column is the civil date's Unix day; the trend is the
		// civil clock's days since the origin's, read in the same location.
		cy, cm, cd := local.Date()
		if got, want := v(tab, "date"), float64(time.Date(cy, cm, cd, 0, 0, 0, 0, time.UTC).Unix()/86400); got != want {
			t.Errorf("date: got %v, want %v (%v)", got, want, local)
		}
		originLocal := origin
		if loc != nil {
			originLocal = origin.In(loc)
		}
		if got, want := v(tab, "trend.days"), clockDays(local)-clockDays(originLocal); math.Abs(got-want) > 1e-6 {
			t.Errorf("trend.days: got %v, want %v (±1e-6)", got, want)
		}
	})
}

// clockDays returns the days since 1970-01-01 00:00 of t's civil clock,
// from the time package's Date and Clock.
func clockDays(t time.Time) float64 {
	y, m, d := t.Date()
	h, min, sec := t.Clock()
	return float64(time.Date(y, m, d, 0, 0, 0, 0, time.UTC).Unix()/86400) +
		(float64(h*3600+min*60+sec)+float64(t.Nanosecond())/1e9)/86400
}
