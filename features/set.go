package features

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"
	"sync"
	"time"
)

var _ Builder = Set{}

// Set is a calendar feature set: the parts to make, each in its encoding,
// an optional trend and the date itself. It is a [Builder]; its zero value
// makes no columns, and Learn rejects it.
//
// Columns come in the order of Parts, then the trend, then the date. A Set
// is only read by Learn, so one Set may be learned from many goroutines at
// once; the [Encoder] Learn returns keeps its own copy of everything it
// needs and is immutable and safe for concurrent use.
type Set struct {
	// Parts lists the calendar parts to make. A part may appear once.
	Parts []Spec

	// Trend, if not nil, adds the time elapsed since Trend.Origin. The
	// origin is read in the same location as the dates.
	Trend *Trend

	// Date adds the civil date itself as a column named "date": the
	// number of days since 1970-01-01, time of day dropped.
	Date bool

	// Location is where dates are read as civil dates (and clock times,
	// for the trend). Nil means each value's own location, so a time made
	// with time.Date(..., loc) keeps the date it was written with; callers
	// who want UTC set time.UTC or convert first.
	Location *time.Location

	// ZeroUnseen makes a level that Learn did not see give a row of zeros
	// in that part's Indicator columns. By default such a date is an
	// error ([ErrUnseenLevel]) naming its row and the level.
	ZeroUnseen bool
}

// Learn checks the configuration, reads dates, and returns an Encoder
// whose Indicator columns are the levels seen in dates. It returns an
// error naming the option for a part listed twice, an encoding a part
// cannot take, a bad Reference or a zero Trend.Origin; an error for no
// dates or a Set that makes no columns; and a [*DateError] naming the
// 1-based row for a zero date or a year outside 1..9999. Learn panics
// if a Part, Encoding or TrendUnit is not one of the defined values.
func (s Set) Learn(dates []time.Time) (Encoder, error) {
	e, err := s.compile()
	if err != nil {
		return nil, err
	}
	if len(dates) == 0 {
		return nil, errors.New("features: Learn: no dates")
	}
	seen := make([][]bool, len(e.jobs))
	for k, j := range e.jobs {
		if j.kind == kindIndicator {
			lo, hi := j.part.levelRange()
			seen[k] = make([]bool, hi-lo+1)
		}
	}
	var c civil
	var zc zoneCache
	for i, t := range dates {
		if st := c.read(t, e.loc, &zc); st != dateOK {
			return nil, dateError(i, t, e.loc, st)
		}
		for k, j := range e.jobs {
			if j.kind == kindIndicator {
				lo, _ := j.part.levelRange()
				seen[k][int(c.v[j.part])-lo] = true
			}
		}
	}
	for k := range e.jobs {
		j := &e.jobs[k]
		if j.kind != kindIndicator {
			continue
		}
		if err := j.learnLevels(seen[k], s.Parts[j.spec].Reference, j.spec); err != nil {
			return nil, err
		}
	}
	e.layout()
	return e, nil
}

// layout numbers the jobs' columns in job order, once their names are
// known, and lists them in e.names.
func (e *calendar) layout() {
	for k := range e.jobs {
		j := &e.jobs[k]
		j.first = len(e.names)
		e.names = append(e.names, j.names...)
	}
}

type jobKind uint8

const (
	kindNumber jobKind = iota
	kindIndicator
	kindCyclic
	kindTrend
	kindDate
)

// job makes the columns of one Spec, of the trend or of the date.
type job struct {
	kind  jobKind
	part  Part
	spec  int // index in Set.Parts
	first int // index of the job's first column in the encoder's columns
	names []string

	// Indicator: slot[v-lo] is the job's column for level v, or one of
	// slotUnseen, slotReference.
	lo   int32
	slot []int16
}

const (
	slotUnseen    = -1
	slotReference = -2
)

// calendar is the Encoder a Set learns.
type calendar struct {
	loc        *time.Location
	zeroUnseen bool
	jobs       []job
	names      []string
	unit       TrendUnit
	origin     float64 // origin in the trend's unit
}

// compile checks s and turns it into jobs, Indicator levels not yet known.
func (s Set) compile() (*calendar, error) {
	e := &calendar{loc: s.Location, zeroUnseen: s.ZeroUnseen}
	where := make(map[Part]int)
	for i, sp := range s.Parts {
		if !sp.Part.valid() {
			panic(fmt.Sprintf("features: Parts[%d]: invalid Part %d", i, int(sp.Part)))
		}
		if !sp.Encoding.valid() {
			panic(fmt.Sprintf("features: Parts[%d]: invalid Encoding %d", i, int(sp.Encoding)))
		}
		if prev, dup := where[sp.Part]; dup {
			return nil, fmt.Errorf("features: Parts[%d]: %v listed twice (also Parts[%d])", i, sp.Part, prev)
		}
		where[sp.Part] = i
		if !sp.Part.accepts(sp.Encoding) {
			return nil, fmt.Errorf("features: Parts[%d]: %v cannot take %v encoding", i, sp.Part, sp.Encoding)
		}
		if sp.Reference != "" && sp.Encoding != Indicator {
			return nil, fmt.Errorf("features: Parts[%d]: Reference %q given for %v encoding; only indicator columns have one", i, sp.Reference, sp.Encoding)
		}
		j := job{part: sp.Part, spec: i}
		name := sp.Part.String()
		switch sp.Encoding {
		case Number:
			j.kind, j.names = kindNumber, []string{name}
		case Indicator:
			j.kind = kindIndicator
			if sp.Reference != "" {
				if _, ok := sp.Part.parseLabel(sp.Reference); !ok {
					return nil, fmt.Errorf("features: Parts[%d]: Reference %q is not a level of %v", i, sp.Reference, sp.Part)
				}
			}
		case Cyclic:
			j.kind, j.names = kindCyclic, []string{name + ".sin", name + ".cos"}
		}
		e.jobs = append(e.jobs, j)
	}
	if s.Trend != nil {
		u := s.Trend.Unit
		if u != Days && u != Years {
			panic(fmt.Sprintf("features: Trend.Unit: invalid TrendUnit %d", int(u)))
		}
		o := s.Trend.Origin
		if o.IsZero() {
			return nil, errors.New("features: Trend.Origin: zero time.Time")
		}
		var c civil
		var zc zoneCache
		if st := c.read(o, s.Location, &zc); st != dateOK {
			return nil, fmt.Errorf("features: Trend.Origin: %w", dateError(0, o, s.Location, st).Err)
		}
		e.unit, e.origin = u, trendValue(&c, u)
		e.jobs = append(e.jobs, job{kind: kindTrend, spec: -1, names: []string{"trend." + u.String()}})
	}
	if s.Date {
		e.jobs = append(e.jobs, job{kind: kindDate, spec: -1, names: []string{"date"}})
	}
	if len(e.jobs) == 0 {
		return nil, errors.New("features: Set makes no columns (no Parts, Trend or Date)")
	}
	return e, nil
}

// learnLevels makes the indicator columns of the levels seen.
func (j *job) learnLevels(seen []bool, ref string, spec int) error {
	lo, _ := j.part.levelRange()
	first, last := -1, -1
	for k, ok := range seen {
		if ok {
			if first < 0 {
				first = k
			}
			last = k
		}
	}
	j.lo = int32(lo + first)
	j.slot = make([]int16, last-first+1)
	refLevel := math.MinInt
	if ref != "" {
		refLevel, _ = j.part.parseLabel(ref)
		if refLevel < lo+first || refLevel > lo+last || !seen[refLevel-lo] {
			return fmt.Errorf("features: Parts[%d]: Reference %q: %v level not among the dates given to Learn", spec, ref, j.part)
		}
	}
	for k := first; k <= last; k++ {
		v := lo + k
		switch {
		case !seen[k]:
			j.slot[k-first] = slotUnseen
		case v == refLevel:
			j.slot[k-first] = slotReference
		default:
			j.slot[k-first] = int16(len(j.names))
			j.names = append(j.names, j.part.String()+"="+j.part.label(v))
		}
	}
	return nil
}

func trendValue(c *civil, u TrendUnit) float64 {
	if u == Years {
		diy := 365.0
		if c.v[LeapYear] == 1 {
			diy = 366
		}
		return float64(c.v[Year]) + (float64(c.v[YearDay]-1)+c.dayFraction())/diy
	}
	return float64(c.days) + c.dayFraction()
}

func dateError(i int, t time.Time, loc *time.Location, st dateStatus) *DateError {
	e := &DateError{Row: i + 1, Date: t}
	switch st {
	case dateZero:
		e.Err = ErrZeroDate
	default:
		if loc == nil {
			loc = t.Location()
		}
		e.Err = fmt.Errorf("%w: year %d", ErrYearRange, t.In(loc).Year())
	}
	return e
}

// Names returns the column names, in column order.
func (e *calendar) Names() []string { return slices.Clone(e.names) }

// block is the number of dates read before their columns are written.
const block = 256

// Encode appends e's columns for dates to dst. On error dst is unchanged.
// It panics if dst's row count is fixed and differs from len(dates).
func (e *calendar) Encode(dst *Table, dates []time.Time) error {
	n := len(dates)
	if dst.fixed && dst.rows != n {
		panic(fmt.Sprintf("features: Encode: dst has %d rows, %d dates", dst.rows, n))
	}
	for _, name := range e.names {
		if _, dup := dst.index[name]; dup {
			return fmt.Errorf("features: Encode: column %q already in dst", name)
		}
	}
	w := len(e.names)
	backing := make([]float64, n*w)
	cols := make([][]float64, w)
	for k := range cols {
		cols[k] = backing[k*n : (k+1)*n : (k+1)*n]
	}
	var buf [block]civil
	var zc zoneCache
	for off := 0; off < n; off += block {
		b := buf[:min(block, n-off)]
		ds := dates[off : off+len(b)]
		for i := range b {
			if st := b[i].read(ds[i], e.loc, &zc); st != dateOK {
				return dateError(off+i, ds[i], e.loc, st)
			}
		}
		for k := range e.jobs {
			if err := e.jobs[k].write(e, cols, b, off, dates); err != nil {
				return err
			}
		}
	}
	for k, name := range e.names {
		if err := dst.Append(name, cols[k]); err != nil {
			return err // unreachable: names and lengths were checked
		}
	}
	return nil
}

// write fills the job's columns for the block b of dates starting at row off.
func (j *job) write(e *calendar, cols [][]float64, b []civil, off int, dates []time.Time) error {
	switch j.kind {
	case kindNumber:
		col := cols[j.first][off : off+len(b)]
		p := j.part
		for i := range b {
			col[i] = float64(b[i].v[p])
		}
	case kindIndicator:
		p := j.part
		for i := range b {
			s := int16(slotUnseen)
			if k := uint(b[i].v[p] - j.lo); k < uint(len(j.slot)) {
				s = j.slot[k]
			}
			switch {
			case s >= 0:
				cols[j.first+int(s)][off+i] = 1
			case s == slotUnseen && !e.zeroUnseen:
				return &DateError{Row: off + i + 1, Date: dates[off+i],
					Err: fmt.Errorf("%w: %v=%s", ErrUnseenLevel, p, p.label(int(b[i].v[p])))}
			}
		}
	case kindCyclic:
		sin := cols[j.first][off : off+len(b)]
		cos := cols[j.first+1][off : off+len(b)]
		tabs := cycleTables()
		p := j.part
		for i := range b {
			var period int32
			switch p {
			case Quarter:
				period = 4
			case Month:
				period = 12
			case Weekday:
				period = 7
			case Day:
				period = b[i].v[DaysInMonth]
			case YearDay:
				period = 365 + b[i].v[LeapYear]
			case ISOWeek:
				period = isoWeeks(uint32(b[i].v[ISOYear]))
			}
			sc := tabs[period][b[i].v[p]-1]
			sin[i], cos[i] = sc[0], sc[1]
		}
	case kindTrend:
		col := cols[j.first][off : off+len(b)]
		for i := range b {
			col[i] = trendValue(&b[i], e.unit) - e.origin
		}
	case kindDate:
		col := cols[j.first][off : off+len(b)]
		for i := range b {
			col[i] = float64(b[i].days)
		}
	}
	return nil
}

// cycleTables returns, for each period a Cyclic part can have, the sine
// and cosine of 2πk/period for k = 0..period-1.
var cycleTables = sync.OnceValue(func() [][][2]float64 {
	tabs := make([][][2]float64, 367)
	for _, p := range []int{4, 7, 12, 28, 29, 30, 31, 52, 53, 365, 366} {
		t := make([][2]float64, p)
		for k := range t {
			t[k][0], t[k][1] = math.Sincos(2 * math.Pi * float64(k) / float64(p))
		}
		tabs[p] = t
	}
	return tabs
})

// String describes the encoder by its column names.
func (e *calendar) String() string {
	return "features.Set encoder [" + strings.Join(e.names, " ") + "]"
}
