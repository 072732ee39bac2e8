package holiday

import (
	"slices"
	"time"

	"github.com/rickar/cal/v2"
)

// source is one holiday definition of an Almanac: a private copy of a
// rickar/cal holiday, or one of our rules.
type source struct {
	h *cal.Holiday // private copy; never one of rickar/cal's package vars
	// orthodox marks a rickar/cal holiday found to lie a fixed number of
	// days (offset) from Orthodox Easter; outside 1900–2099, where
	// rickar/cal's Julian-to-Gregorian shift of 13 days is wrong, the date
	// is recomputed from OrthodoxEaster.
	orthodox bool
	offset   int
	r        *Rule
}

// snapshot returns private copies of hs, so that nothing of ours reads or
// writes rickar/cal's shared package variables after this call. (A
// rickar/cal HolidayFn receives the pointer it is called on; jp's vernal
// equinox function writes to it, so calling Calc on a package var from
// several goroutines is a data race. Calc on a private copy is not.)
func snapshot(hs []*cal.Holiday) []source {
	out := make([]source, len(hs))
	for i, h := range hs {
		c := *h
		out[i] = source{h: &c}
	}
	return out
}

// markOrthodox detects which sources lie a constant number of days from
// Orthodox Easter over 1990–2060 and marks them for the post-2099 fix.
func markOrthodox(srcs []source) {
	for i := range srcs {
		s := &srcs[i]
		if s.h == nil {
			continue
		}
		n, off, same := 0, 0, true
		for y := 1990; y <= 2060 && same; y++ {
			c := *s.h
			act, _ := c.Calc(y)
			if act.IsZero() {
				continue
			}
			d := dayOf(act) - orthodoxEasterDay(y)
			if n > 0 && d != off {
				same = false
			}
			n, off = n+1, d
		}
		if same && n >= 20 {
			s.orthodox, s.offset = true, off
		}
	}
}

// occurrence is an entry of computeYears' working list.
type occurrence struct {
	name     string
	act, obs int
	pending  Substitution // NextWeekday or SundayToMonday still to place
}

func isWeekend(z int) bool {
	w := weekdayOf(z)
	return w == time.Saturday || w == time.Sunday
}

// rawYear appends to dst the occurrences of srcs whose actual date lies in
// year, with NextWeekday and SundayToMonday substitutes not yet placed.
func rawYear(dst []occurrence, srcs []source, year int) []occurrence {
	var buf []int
	for _, s := range srcs {
		if s.h != nil {
			c := *s.h
			a, o := c.Calc(year)
			if a.IsZero() {
				continue
			}
			act, obs := dayOf(a), dayOf(o)
			if s.orthodox && (year < 1900 || year > 2099) {
				act = orthodoxEasterDay(year) + s.offset
				obs = act
				for _, alt := range c.Observed {
					if alt.Day == weekdayOf(act) {
						obs = act + alt.Offset
						break
					}
				}
			}
			dst = append(dst, occurrence{name: c.Name, act: act, obs: obs})
			continue
		}
		buf = s.r.occurrences(buf[:0], year)
		for _, z := range buf {
			o := occurrence{name: s.r.Name, act: z, obs: z}
			switch w := weekdayOf(z); s.r.Substitute {
			case NearestWeekday:
				if w == time.Saturday {
					o.obs = z - 1
				} else if w == time.Sunday {
					o.obs = z + 1
				}
			case NextWeekday:
				if w == time.Saturday || w == time.Sunday {
					o.pending = NextWeekday
				}
			case SundayToMonday:
				if w == time.Sunday {
					o.pending = SundayToMonday
				}
			}
			dst = append(dst, o)
		}
	}
	return dst
}

// computeYears returns, for each year from first to last, the holidays of
// srcs whose actual date lies in that year, sorted by actual date.
//
// Rules with NextWeekday and SundayToMonday are placed last, year by year
// (earlier years first) and within a year in source order, on the first
// day that is not already a day off: neither another holiday's fixed day
// off, in any year, nor a substitute placed before. So a late-December
// substitute that spills into January skips the next year's days off, and
// the next year's substitutes skip it. The years first−1 and last+1 are
// computed too, for the days off they contribute.
func computeYears(srcs []source, first, last int) [][]Holiday {
	occs := make([][]occurrence, last-first+3) // first−1 … last+1
	for i := range occs {
		occs[i] = rawYear(nil, srcs, first-1+i)
	}
	taken := make(map[int]bool)
	for _, year := range occs {
		for _, o := range year {
			if o.pending == NoSubstitute {
				taken[o.obs] = true
			}
		}
	}
	for _, year := range occs {
		for i := range year {
			o := &year[i]
			if o.pending == NoSubstitute {
				continue
			}
			z := o.act + 1
			for taken[z] || (o.pending == NextWeekday && isWeekend(z)) {
				z++
			}
			o.obs = z
			taken[z] = true
		}
	}
	out := make([][]Holiday, last-first+1)
	for i := range out {
		year := occs[i+1]
		slices.SortStableFunc(year, func(a, b occurrence) int { return a.act - b.act })
		hs := make([]Holiday, len(year))
		for k, o := range year {
			hs[k] = Holiday{Name: o.name, Date: civilTime(o.act), Observed: civilTime(o.obs)}
		}
		out[i] = hs
	}
	return out
}
