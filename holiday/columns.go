package holiday

import (
	"fmt"
	"math"
	"math/bits"
	"slices"
	"strconv"
	"time"

	"github.com/kalends/kalends/features"
)

var (
	_ features.Builder = Columns{}
	_ features.Encoder = (*encoder)(nil)
)

// Parts selects the columns made for each holiday ([Columns.Each]) or for
// any holiday ([Columns.Any]). The zero value makes none.
type Parts struct {
	// Indicator makes a 0/1 column that is 1 on the holiday.
	Indicator bool
	// Before and After, when positive, make window indicators: 1 on the
	// Before days preceding an occurrence (not the day itself), and on the
	// After days following one. With Before 3, a holiday on a Friday
	// marks Tuesday, Wednesday and Thursday.
	Before, After int
	// Until and Since, when positive, make distance columns: the number
	// of days to the next occurrence (0 on the day itself) and since the
	// last one, capped at Until or Since days. Occurrences in the years
	// just outside MinYear…MaxYear count, so distances near the ends are
	// right; a distance with no occurrence in MinYear-1…MaxYear+1 is
	// capped.
	Until, Since int
}

func (p Parts) zero() bool { return p == Parts{} }

// Columns makes holiday columns from dates; it is a [features.Builder], so
// it joins the calendar parts of package features in one design through
// [features.Join].
//
// By default Learn records the holidays of the calendar itself (every name
// it has in MinYear…MaxYear, or those listed in Names), never those that
// happen to occur among the dates it is given, so a design learned on
// in-bag rows and applied to out-of-bag rows always has the same columns.
// A holiday absent from the learning rows gives a column of zeros there; a
// fit should be ready for that (drop it or regularise), or set Seen.
//
// Column names, with Prefix in front of each and S the [Slug] of a
// holiday's name, in this order: for each holiday, S (Indicator),
// S_before_K and S_after_K (window), S_days_until and S_days_since
// (distance); then any_holiday, any_holiday_before_K, any_holiday_after_K,
// any_holiday_days_until, any_holiday_days_since; then bridge_day and
// business_day. Holidays come in the order of [Almanac.Names].
//
// A date's holidays are looked up by its year, month and day in its own
// location (call t.UTC() first if dates are instants in UTC). Each value
// is read from a table indexed by day, so encoding costs O(1) per date.
//
// A holiday coefficient measures an association between the day and the
// outcome in the data at hand, not the effect the holiday causes: other
// things that move with the calendar (school terms, promotions, weather)
// are mixed into it.
//
// The zero value has no calendar; Learn reports that. If Each and Any are
// both zero and Bridge and Business are false, Learn makes an indicator
// per holiday and an any-holiday indicator. Columns is a plain value and
// safe for concurrent use.
type Columns struct {
	// Calendar is the calendar whose holidays are used. An *Almanac is
	// tabulated once; any other Calendar is tabulated with [Combine] on
	// every Learn.
	Calendar Calendar
	// Names restricts the holidays to those named (exact names as in
	// [Almanac.Names]), in the calendar's order; nil means all. It applies
	// to Each and Any, not to Bridge and Business, which use every day off.
	Names []string
	// Actual places Each and Any columns on actual dates; false (the
	// default) places them on observed dates, the days off.
	Actual bool
	// Each selects the columns made for every holiday, Any those made for
	// "any holiday".
	Each, Any Parts
	// Bridge makes bridge_day: 1 on a Monday–Friday that is not a day off
	// and lies between a day off and a Saturday or Sunday (a Friday after
	// a Thursday holiday, a Monday before a Tuesday holiday).
	Bridge bool
	// Business makes business_day: 1 on a Monday–Friday that is not a day
	// off (an observed date of any holiday of the calendar).
	Business bool
	// Prefix is put in front of every column name, to keep them apart
	// from other columns of the design.
	Prefix string
	// Seen keeps, for the Each columns, only the holidays that fall on at
	// least one of the dates given to Learn (on their observed date, or
	// their actual date with Actual), so that a design has no all-zero
	// per-holiday columns for the data at hand. Any, Bridge and Business
	// still use every holiday selected.
	//
	// With Seen the learned columns depend on the learning rows. In a
	// resampling run, which learns the design on each replicate's in-bag
	// rows, a holiday absent from them is a missing column in that
	// replicate: its coefficient is reported as not estimable there, and
	// an out-of-bag row on that holiday is encoded as an ordinary day. The
	// default, false, makes a column for every holiday of the calendar (or
	// of Names), so the columns never depend on the rows.
	Seen bool
}

// Learn checks the configuration and dates and returns the encoder. Errors
// match [ErrColumns] (a negative width or horizon, an unknown or repeated
// name, two holidays whose names give the same column name), [ErrEmpty]
// (the calendar, or the holidays selected by Names, are none),
// [ErrCalendar] (from tabulating a Calendar of your own), or are
// [*DateError] for a date outside MinYear…MaxYear. The dates are not
// otherwise used, unless Seen is set.
func (c Columns) Learn(dates []time.Time) (features.Encoder, error) {
	if c.Calendar == nil {
		return nil, fmt.Errorf("%w: no calendar", ErrColumns)
	}
	for _, f := range []struct {
		name string
		v    int
	}{
		{"Each.Before", c.Each.Before}, {"Each.After", c.Each.After}, {"Each.Until", c.Each.Until},
		{"Each.Since", c.Each.Since}, {"Any.Before", c.Any.Before}, {"Any.After", c.Any.After},
		{"Any.Until", c.Any.Until}, {"Any.Since", c.Any.Since},
	} {
		if f.v < 0 {
			return nil, fmt.Errorf("%w: %s is %d; windows and horizons must be ≥ 0", ErrColumns, f.name, f.v)
		}
	}
	a, ok := c.Calendar.(*Almanac)
	if !ok || a == nil {
		var err error
		if a, err = Combine(c.Calendar); err != nil {
			return nil, err
		}
	}
	t := a.table()
	all := a.Names()
	if len(all) == 0 {
		return nil, fmt.Errorf("%w: calendar %q has no holidays in %d…%d", ErrEmpty, a.code, MinYear, MaxYear)
	}
	sel := all
	if c.Names != nil {
		want := make(map[string]bool, len(c.Names))
		for _, n := range c.Names {
			if _, ok := t.index[n]; !ok || !slices.Contains(all, n) {
				return nil, fmt.Errorf("%w: calendar %q has no holiday named %q", ErrColumns, a.code, n)
			}
			if want[n] {
				return nil, fmt.Errorf("%w: holiday %q is named twice in Names", ErrColumns, n)
			}
			want[n] = true
		}
		sel = slices.DeleteFunc(slices.Clone(all), func(n string) bool { return !want[n] })
		if len(sel) == 0 {
			return nil, fmt.Errorf("%w: Names selects no holidays", ErrEmpty)
		}
	}
	for i, d := range dates {
		if y := d.Year(); y < MinYear || y > MaxYear {
			return nil, &DateError{Row: i + 1, Date: d}
		}
	}
	if c.Each.zero() && c.Any.zero() && !c.Bridge && !c.Business {
		c.Each.Indicator, c.Any.Indicator = true, true
	}

	e := &encoder{tab: t}
	mask := t.obs
	if c.Actual {
		mask = t.act
	}
	add := func(name string, o op) { e.names = append(e.names, c.Prefix+name); e.ops = append(e.ops, o) }
	parts := func(stem string, set []uint64, p Parts) {
		if p.zero() {
			return
		}
		var d *distance
		if p.Before > 0 || p.After > 0 || p.Until > 0 || p.Since > 0 {
			d = a.distance(set, !c.Actual)
		}
		if p.Indicator {
			add(stem, op{kind: opIndicator, mask: mask, set: set})
		}
		if p.Before > 0 {
			add(stem+"_before_"+strconv.Itoa(p.Before), op{kind: opBefore, dist: d, k: p.Before})
		}
		if p.After > 0 {
			add(stem+"_after_"+strconv.Itoa(p.After), op{kind: opAfter, dist: d, k: p.After})
		}
		if p.Until > 0 {
			add(stem+"_days_until", op{kind: opUntil, mask: mask, set: set, dist: d, k: p.Until})
		}
		if p.Since > 0 {
			add(stem+"_days_since", op{kind: opSince, mask: mask, set: set, dist: d, k: p.Since})
		}
	}
	var onDates []uint64 // with Seen, the holidays on one of the dates
	if c.Seen {
		onDates = make([]uint64, t.nw)
		for _, d := range dates {
			z := dayOf(d) - baseDay
			for w, bits := range mask[z*t.nw : (z+1)*t.nw] {
				onDates[w] |= bits
			}
		}
	}
	anySet := make([]uint64, t.nw)
	for _, n := range sel {
		k := t.index[n]
		one := make([]uint64, t.nw)
		one[k/64] = 1 << (k % 64)
		anySet[k/64] |= 1 << (k % 64)
		if onDates == nil || onDates[k/64]&one[k/64] != 0 {
			parts(Slug(n), one, c.Each)
		}
	}
	parts("any_holiday", anySet, c.Any)
	if c.Bridge {
		add("bridge_day", op{kind: opBridge})
	}
	if c.Business {
		add("business_day", op{kind: opBusiness})
	}
	seen := make(map[string]int, len(e.names))
	for i, n := range e.names {
		if j, dup := seen[n]; dup {
			return nil, fmt.Errorf("%w: columns %d and %d are both named %q (holiday names that give the same Slug, or a name that clashes with any_holiday, bridge_day or business_day)", ErrColumns, j+1, i+1, n)
		}
		seen[n] = i
	}
	return e, nil
}

type opKind uint8

const (
	opIndicator opKind = iota
	opBefore
	opAfter
	opUntil
	opSince
	opBridge
	opBusiness
)

type op struct {
	kind opKind
	mask []uint64 // per-day bitmask table (act or obs)
	set  []uint64 // the holidays of this column
	dist *distance
	k    int // window width or horizon
}

type encoder struct {
	tab   *table
	names []string
	ops   []op
}

// Names returns the column names, in order.
func (e *encoder) Names() []string { return slices.Clone(e.names) }

var bit01 = [2]float64{0, 1}

// Encode appends the columns to dst. It returns a [*DateError] for the
// first date outside MinYear…MaxYear, and an error if dst already has one
// of the column names; dst is unchanged on error. It panics, as the
// features encoders do, if dst already has columns and a row count other
// than len(dates).
func (e *encoder) Encode(dst *features.Table, dates []time.Time) error {
	if dst.Width() > 0 && dst.Rows() != len(dates) {
		panic(fmt.Sprintf("holiday: Encode: dst has %d rows, %d dates", dst.Rows(), len(dates)))
	}
	for _, n := range e.names {
		if dst.Index(n) >= 0 {
			return fmt.Errorf("holiday: encode: column %q is already in the table", n)
		}
	}
	idx := make([]int32, len(dates))
	lo, hi := daysFromCivil(MinYear, 1, 1)-baseDay, daysFromCivil(MaxYear+1, 1, 1)-baseDay
	for i, t := range dates {
		var z int
		if t.Location() == time.UTC {
			// Fast path: the civil day of a UTC time is its Unix day.
			u := t.Unix()
			q := u / 86400
			if u%86400 < 0 {
				q--
			}
			z = int(q) - baseDay
		} else {
			y, m, d := t.Date()
			z = daysFromCivil(y, m, d) - baseDay
		}
		if z < lo || z >= hi {
			return &DateError{Row: i + 1, Date: t}
		}
		idx[i] = int32(z)
	}
	nw := e.tab.nw
	cols := make([][]float64, len(e.ops))
	backing := make([]float64, len(e.ops)*len(dates))
	for j, o := range e.ops {
		col := backing[j*len(dates) : (j+1)*len(dates) : (j+1)*len(dates)]
		cols[j] = col
		switch o.kind {
		case opIndicator:
			if nw == 1 {
				m, s := o.mask, o.set[0]
				if s&(s-1) == 0 { // one holiday: shift its bit down
					sh := uint(bits.TrailingZeros64(s))
					for i, z := range idx {
						col[i] = bit01[(m[z]>>sh)&1]
					}
				} else {
					for i, z := range idx {
						col[i] = bit01[b2i(m[z]&s != 0)]
					}
				}
			} else {
				for i, z := range idx {
					col[i] = bit01[b2i(member(o.mask, o.set, int(z), nw))]
				}
			}
		case opBefore:
			next, k := o.dist.next, int32(o.k)
			for i, z := range idx {
				col[i] = bit01[b2i(next[z] <= k)]
			}
		case opAfter:
			prev, k := o.dist.prev, int32(o.k)
			for i, z := range idx {
				col[i] = bit01[b2i(prev[z] <= k)]
			}
		case opUntil, opSince:
			arr := o.dist.next
			if o.kind == opSince {
				arr = o.dist.prev
			}
			h := int32(o.k)
			for i, z := range idx {
				v := min(arr[z], h)
				if member(o.mask, o.set, int(z), nw) {
					v = 0
				}
				col[i] = float64(v)
			}
		case opBridge:
			for i, z := range idx {
				col[i] = bit01[b2i(e.bridge(int(z)))]
			}
		case opBusiness:
			for i, z := range idx {
				col[i] = bit01[b2i(e.business(int(z)))]
			}
		}
	}
	for j, n := range e.names {
		if err := dst.Append(n, cols[j]); err != nil {
			return err
		}
	}
	return nil
}

func b2i(b bool) int {
	if b {
		return 1
	}
	return 0
}

func member(mask, set []uint64, z, nw int) bool {
	row := mask[z*nw : z*nw+nw]
	for w, s := range set {
		if row[w]&s != 0 {
			return true
		}
	}
	return false
}

// dayOff reports whether table day i is the observed date of any holiday.
func (e *encoder) dayOff(i int) bool {
	for _, w := range e.tab.obs[i*e.tab.nw : (i+1)*e.tab.nw] {
		if w != 0 {
			return true
		}
	}
	return false
}

func (e *encoder) business(i int) bool { return !isWeekend(i+baseDay) && !e.dayOff(i) }

func (e *encoder) bridge(i int) bool {
	if !e.business(i) {
		return false
	}
	before, after := i-1, i+1
	return (e.dayOff(before) && isWeekend(after+baseDay)) || (isWeekend(before+baseDay) && e.dayOff(after))
}

// distance holds, for every table day, the days to the next occurrence
// strictly after it and since the last one strictly before it, or
// math.MaxInt32 when there is none in the table.
type distance struct {
	next, prev []int32
}

type distKey struct {
	set      string
	observed bool
}

// distance returns the (cached) distance table of the holidays in set.
func (a *Almanac) distance(set []uint64, observed bool) *distance {
	key := distKey{fmt.Sprint(set), observed}
	a.mu.Lock()
	defer a.mu.Unlock()
	if d, ok := a.dists[key]; ok {
		return d
	}
	t := a.table()
	mask := t.act
	if observed {
		mask = t.obs
	}
	d := &distance{next: make([]int32, numDays), prev: make([]int32, numDays)}
	last := -1
	for i := range numDays {
		d.prev[i] = math.MaxInt32
		if last >= 0 {
			d.prev[i] = int32(i - last)
		}
		if member(mask, set, i, t.nw) {
			last = i
		}
	}
	last = -1
	for i := numDays - 1; i >= 0; i-- {
		d.next[i] = math.MaxInt32
		if last >= 0 {
			d.next[i] = int32(last - i)
		}
		if member(mask, set, i, t.nw) {
			last = i
		}
	}
	if a.dists == nil {
		a.dists = make(map[distKey]*distance)
	}
	a.dists[key] = d
	return d
}
