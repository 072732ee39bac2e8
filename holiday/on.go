package holiday

import (
	"slices"
	"time"
)

// On returns the holidays whose actual date or observed date (day off) is
// date's civil date, its year, month and day in its own location: a
// holiday moved off a weekend is returned on both days, so compare
// Holiday.Date and Holiday.Observed to tell which. Holidays come in the
// order of [Almanac.Holidays], earlier years first; On returns nil when
// none falls on the date or the date is outside MinYear…MaxYear. The
// caller may modify the slice.
//
// On reads the table the Almanac computed on first use, so it costs one
// map look-up per date whatever the date, and it is safe for concurrent
// use.
func (a *Almanac) On(date time.Time) []Holiday {
	if y := date.Year(); y < MinYear || y > MaxYear {
		return nil
	}
	return slices.Clone(a.table().on[dayOf(date)])
}

// DayOff reports whether date's civil date (in its own location) is the
// observed date of a holiday of the calendar, as [Columns] reads it for
// business_day. It is false outside MinYear…MaxYear. It reads the table
// the Almanac computed on first use, in constant time without allocating,
// and is safe for concurrent use.
func (a *Almanac) DayOff(date time.Time) bool {
	if y := date.Year(); y < MinYear || y > MaxYear {
		return false
	}
	t := a.table()
	i := dayOf(date) - baseDay
	for _, w := range t.obs[i*t.nw : (i+1)*t.nw] {
		if w != 0 {
			return true
		}
	}
	return false
}
