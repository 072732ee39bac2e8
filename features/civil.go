package features

import (
	"math"
	"time"
)

// Civil day numbers (days since 1970-01-01) of the first and last day of
// the supported years 1..9999.
const (
	minDay = -719162 // 0001-01-01
	maxDay = 2932896 // 9999-12-31

	secPerDay = 86400
	// The local clock, in seconds since 1970-01-01 00:00, of the first and
	// last second of the supported days.
	minLocal = minDay * secPerDay
	maxLocal = (maxDay+1)*secPerDay - 1
	// Instants this far outside the supported days cannot reach them with
	// any real zone offset; the bounds keep sec+offset from overflowing
	// (a time.FixedZone may have any offset, so local is checked again).
	minSec = minLocal - 1<<40
	maxSec = maxLocal + 1<<40
)

// civil holds everything this package derives from one date.
type civil struct {
	v     [numParts + 1]int32 // value of each Part, indexed by Part
	days  int64               // civil day number, days since 1970-01-01
	local int64               // local clock, seconds since 1970-01-01 00:00
	nsec  int32               // nanoseconds within the second
}

// zoneCache remembers the UTC offset of the last zone period seen, so that
// runs of dates in one period cost no zone lookup.
type zoneCache struct {
	loc        *time.Location
	start, end int64 // the period, unix seconds [start, end)
	off        int64
}

func (z *zoneCache) offset(t time.Time, loc *time.Location, sec int64) int64 {
	if loc == time.UTC {
		return 0
	}
	if loc == z.loc && sec >= z.start && sec < z.end {
		return z.off
	}
	return z.lookup(t, loc)
}

func (z *zoneCache) lookup(t time.Time, loc *time.Location) int64 {
	tl := t.In(loc)
	_, off := tl.Zone()
	start, end := tl.ZoneBounds()
	z.loc, z.off = loc, int64(off)
	if z.off < -1<<39 || z.off > 1<<39 {
		// An absurd time.FixedZone offset: push every date out of range
		// without overflowing sec+offset.
		z.off = 1 << 41
	}
	z.start, z.end = math.MinInt64, math.MaxInt64
	if !start.IsZero() {
		z.start = start.Unix()
	}
	if !end.IsZero() {
		z.end = end.Unix()
	}
	return z.off
}

// dateStatus says why a date could not be read.
type dateStatus uint8

const (
	dateOK dateStatus = iota
	dateZero
	dateRange
)

// read fills c from t read in loc (t's own location if loc is nil).
func (c *civil) read(t time.Time, loc *time.Location, zc *zoneCache) dateStatus {
	if t.IsZero() {
		return dateZero
	}
	sec := t.Unix()
	if sec < minSec || sec > maxSec {
		return dateRange
	}
	if loc == nil {
		loc = t.Location()
	}
	local := sec + zc.offset(t, loc, sec)
	if local < minLocal || local > maxLocal {
		return dateRange
	}
	// Floor division by a day, unsigned: local-minLocal is never negative.
	days := int64(uint64(local-minLocal)/secPerDay) + minDay
	c.days = days
	c.local, c.nsec = local, int32(t.Nanosecond())
	c.fromDays(days)
	return dateOK
}

var (
	monthDays  = [13]int32{0, 31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31}
	quarterOf  = [13]int32{0, 1, 1, 1, 2, 2, 2, 3, 3, 3, 4, 4, 4}
	monthWeeks = [32]int32{0, 1, 1, 1, 1, 1, 1, 1, 2, 2, 2, 2, 2, 2, 2, 3, 3, 3, 3, 3, 3, 3, 4, 4, 4, 4, 4, 4, 4, 5, 5, 5}
)

// fromDays fills c.v from a civil day number in minDay..maxDay.
//
// Year, month and day follow Neri and Schneider's days-to-date algorithm
// ("Euclidean affine functions and their application to calendar
// algorithms", Software: Practice and Experience 53(4), 2023), which
// computes the same thing as Howard Hinnant's civil_from_days with a
// shorter chain of dependent operations. The shift by 719468 days
// (1970-01-01 → 0000-03-01) keeps every count non-negative in this range,
// so all arithmetic is unsigned 32-bit.
func (c *civil) fromDays(days int64) {
	n := uint32(days + 719468) // days since 0000-03-01
	n1 := 4*n + 3
	cent := n1 / 146097 // century of the March-based year
	nc := n1 % 146097 / 4
	p2 := uint64(2939745) * uint64(4*nc+3)
	z := uint32(p2 >> 32)          // year of the century
	ny := uint32(p2) / 2939745 / 4 // day of the March-based year, 0..365
	n3 := 2141*ny + 197913
	m := n3 >> 16             // month, 3..14
	d := (n3&0xffff)/2141 + 1 // day of month, 1..31
	var jan uint32            // 1 in January and February
	if ny >= 306 {
		jan = 1
		m -= 12
	}
	y := 100*cent + z + jan
	// Leap year, without dividing: y = 100·cg + zg.
	zg, cg := z+jan, cent
	if zg == 100 {
		zg, cg = 0, cg+1
	}
	var leap uint32
	if (zg != 0 && zg&3 == 0) || (zg == 0 && cg&3 == 0) {
		leap = 1
	}
	var yday uint32
	if jan == 1 {
		yday = ny - 305
	} else {
		yday = ny + 60 + leap
	}
	wd := (n+2)%7 + 1 // ISO weekday: 0000-03-01 was a Wednesday
	iy := y
	w := (int32(yday) - int32(wd) + 10) / 7
	if w < 1 {
		iy--
		w = isoWeeks(iy)
	} else if w == 53 && isoWeeks(y) == 52 {
		iy++
		w = 1
	}
	dim := monthDays[m]
	if m == 2 {
		dim += int32(leap)
	}

	v := &c.v
	v[Year] = int32(y)
	v[Quarter] = quarterOf[m]
	v[Month] = int32(m)
	v[ISOWeek] = w
	v[ISOYear] = int32(iy)
	v[Day] = int32(d)
	v[YearDay] = int32(yday)
	v[Weekday] = int32(wd)
	v[MonthWeek] = monthWeeks[d]
	v[Weekend] = b2i(wd >= 6)
	v[MonthStart] = b2i(d == 1)
	v[MonthEnd] = b2i(int32(d) == dim)
	v[DaysInMonth] = dim
	v[LeapYear] = int32(leap)
}

func b2i(b bool) int32 {
	if b {
		return 1
	}
	return 0
}

// isoWeeks returns the number of ISO weeks, 52 or 53, of ISO year y ≥ 1:
// 53 when 1 January is a Thursday, or a Wednesday in a leap year.
func isoWeeks(y uint32) int32 {
	p := func(y uint32) uint32 { return (y + y/4 - y/100 + y/400) % 7 }
	if p(y) == 4 || p(y-1) == 3 {
		return 53
	}
	return 52
}

// dayFraction is the fraction of the local day elapsed at c.
func (c *civil) dayFraction() float64 {
	return (float64(c.local-c.days*secPerDay) + float64(c.nsec)/1e9) / secPerDay
}
