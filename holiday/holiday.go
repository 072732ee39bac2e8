package holiday

import (
	"errors"
	"fmt"
	"slices"
	"strings"
	"sync"
	"time"
)

// MinYear and MaxYear bound the years every calendar of this package
// covers. [Almanac.Holidays] answers nil outside them and encoders return
// a [*DateError] for dates outside them. Internally each calendar also
// computes MinYear-1 and MaxYear+1, so observed dates that spill across
// the first or last New Year and distances near the ends are right.
const (
	MinYear = 1900
	MaxYear = 2149
)

// Errors returned by this package. Each error it returns matches one of
// these with [errors.Is].
var (
	ErrUnknownCode = errors.New("holiday: unknown calendar code")
	ErrRule        = errors.New("holiday: bad rule")
	ErrCalendar    = errors.New("holiday: bad calendar")
	ErrEmpty       = errors.New("holiday: calendar has no holidays")
	ErrColumns     = errors.New("holiday: bad column configuration")
	ErrOutOfRange  = errors.New("holiday: date outside the covered years")
)

// RuleError reports a bad custom [Rule]. It matches [ErrRule].
type RuleError struct {
	Index int    // 1-based position of the rule in the list given to New
	Name  string // the rule's name
	Err   error  // what was wrong
}

// Error returns "holiday: rule N ("name"): what was wrong".
func (e *RuleError) Error() string {
	return fmt.Sprintf("holiday: rule %d (%q): %v", e.Index, e.Name, e.Err)
}

// Unwrap returns e.Err.
func (e *RuleError) Unwrap() error { return e.Err }

// Is reports whether target is ErrRule.
func (e *RuleError) Is(target error) bool { return target == ErrRule }

// DateError reports a date that cannot be encoded. It matches
// [ErrOutOfRange].
type DateError struct {
	Row  int       // 1-based row of the date
	Date time.Time // the date as given
}

// Error returns a message naming the row and the date.
func (e *DateError) Error() string {
	return fmt.Sprintf("holiday: row %d: date %s is outside the covered years %d…%d",
		e.Row, e.Date.Format(time.DateOnly), MinYear, MaxYear)
}

// Is reports whether target is ErrOutOfRange.
func (e *DateError) Is(target error) bool { return target == ErrOutOfRange }

// Holiday is one occurrence of a holiday.
type Holiday struct {
	Name string
	// Date is the actual (calendar) date at 00:00 UTC; only its year,
	// month and day carry meaning.
	Date time.Time
	// Observed is the day off at 00:00 UTC: Date itself, or the substitute
	// day when the holiday falls on a weekend. It can lie in the year
	// before or after Date (New Year's Day 2022 was observed on 31
	// December 2021 in the US).
	Observed time.Time
}

// Calendar gives the holidays of a year. Holidays returns the occurrences
// whose actual date lies in year, sorted by date, or nil for a year it does
// not cover; the caller may modify the slice. A name may occur more than
// once in a year (a one-off list, or two calendars that observe the same
// holiday on different days). Implementations must be deterministic and
// safe for concurrent use.
type Calendar interface {
	Holidays(year int) []Holiday
}

// Almanac is a calendar that computes every year from MinYear-1 to
// MaxYear+1 once, on first use, in one goroutine, and then answers
// per-year and per-day questions from tables. The calendars returned by
// [Country], [New] and [Combine] are Almanacs. An Almanac is immutable
// and safe for concurrent use; the zero value is not usable.
type Almanac struct {
	code    string
	compute func() [][]Holiday // years firstYear…lastYear
	once    sync.Once
	tab     *table

	mu    sync.Mutex
	dists map[distKey]*distance
}

var _ Calendar = (*Almanac)(nil)

const (
	firstYear = MinYear - 1
	lastYear  = MaxYear + 1
)

var (
	baseDay = daysFromCivil(firstYear, 1, 1)
	numDays = daysFromCivil(lastYear+1, 1, 1) - baseDay
)

// table is an Almanac's precomputed state.
type table struct {
	years [][]Holiday    // firstYear…lastYear
	names []string       // distinct names, in order of first occurrence
	index map[string]int // name → position in names
	nw    int            // uint64 words per day in act and obs
	act   []uint64       // day×nw bitmask of names on their actual date
	obs   []uint64       // day×nw bitmask of names on their observed date
	shown []string       // distinct names of MinYear…MaxYear, in order of first occurrence
	// on maps a day number to the occurrences on it (actual or
	// observed), for Almanac.On.
	on map[int][]Holiday
}

func (a *Almanac) table() *table {
	a.once.Do(func() {
		a.tab = tabulate(a.compute())
	})
	return a.tab
}

func tabulate(years [][]Holiday) *table {
	t := &table{years: years, index: make(map[string]int)}
	for _, hs := range years {
		for _, h := range hs {
			if _, ok := t.index[h.Name]; !ok {
				t.index[h.Name] = len(t.names)
				t.names = append(t.names, h.Name)
			}
		}
	}
	seen := make(map[string]bool)
	for y := MinYear; y <= MaxYear; y++ {
		for _, h := range years[y-firstYear] {
			if !seen[h.Name] {
				seen[h.Name] = true
				t.shown = append(t.shown, h.Name)
			}
		}
	}
	t.nw = max(1, (len(t.names)+63)/64)
	t.act = make([]uint64, numDays*t.nw)
	t.obs = make([]uint64, numDays*t.nw)
	set := func(m []uint64, day, k int) {
		if i := day - baseDay; i >= 0 && i < numDays {
			m[i*t.nw+k/64] |= 1 << (k % 64)
		}
	}
	t.on = make(map[int][]Holiday)
	for _, hs := range years {
		for _, h := range hs {
			k := t.index[h.Name]
			act, obs := dayOf(h.Date), dayOf(h.Observed)
			set(t.act, act, k)
			set(t.obs, obs, k)
			t.on[act] = append(t.on[act], h)
			if obs != act {
				t.on[obs] = append(t.on[obs], h)
			}
		}
	}
	return t
}

// Code returns the code the calendar was made with ("GB", "DE-BY", the
// code given to New, or the codes of a Combine joined by "+").
func (a *Almanac) Code() string { return a.code }

// Holidays returns the holidays whose actual date lies in year, sorted by
// date (ties in the order the calendar defines them), or nil if year is
// outside MinYear…MaxYear. It implements [Calendar].
func (a *Almanac) Holidays(year int) []Holiday {
	if year < MinYear || year > MaxYear {
		return nil
	}
	return slices.Clone(a.table().years[year-firstYear])
}

// Names returns the distinct holiday names the calendar has in
// MinYear…MaxYear, in order of first occurrence. These are the holidays
// that [Columns] makes per-holiday columns for.
func (a *Almanac) Names() []string {
	return slices.Clone(a.table().shown)
}

// New returns a calendar of custom holidays declared as data. It returns a
// [*RuleError] for the first bad rule: an empty name, a date that does not
// exist (30 February), an N outside 1…5 or -5…-1 (a 6th Monday), fields
// that the rule's Kind does not use, or two rules with the same name that
// differ. Rules that are identical are kept once. New panics if a rule has
// an invalid Kind or Substitution. The rules are copied.
func New(code string, rules ...Rule) (*Almanac, error) {
	var srcs []source
	byName := make(map[string]int)
	for i := range rules {
		r := rules[i]
		r.Dates = slices.Clone(r.Dates)
		if err := r.check(); err != nil {
			return nil, &RuleError{Index: i + 1, Name: r.Name, Err: err}
		}
		if j, dup := byName[r.Name]; dup {
			if rules[j].equal(&r) {
				continue
			}
			return nil, &RuleError{Index: i + 1, Name: r.Name,
				Err: fmt.Errorf("rule %d has the same name and a different rule", j+1)}
		}
		byName[r.Name] = i
		srcs = append(srcs, source{r: &r})
	}
	if len(srcs) == 0 {
		return nil, fmt.Errorf("%w: New(%q) was given no rules", ErrEmpty, code)
	}
	return &Almanac{code: code, compute: func() [][]Holiday { return computeYears(srcs, firstYear, lastYear) }}, nil
}

// coder is implemented by calendars that carry a code, such as *Almanac.
type coder interface{ Code() string }

// Combine returns a calendar with the holidays of all parts, for an
// audience that spans a national and a regional calendar or two countries.
// Occurrences equal in name, date and observed date are kept once. A name
// that two parts share but place on different actual dates in some year
// is a different holiday in each: it is renamed "CODE: Name" in every
// part that has it (CODE from the part's Code method), so column names
// stay unique. Combine computes all years at once and returns an error
// (matching [ErrCalendar]) if a part returns a holiday with an empty name
// or a date outside the year asked for, or if a rename is needed and a
// part has no code or two parts share one. A single part is allowed:
// Combine(c) tabulates a Calendar of your own type.
func Combine(parts ...Calendar) (*Almanac, error) {
	if len(parts) == 0 {
		return nil, fmt.Errorf("%w: Combine was given no calendars", ErrEmpty)
	}
	codes := make([]string, len(parts))
	perPart := make([][][]Holiday, len(parts))
	for p, c := range parts {
		if cc, ok := c.(coder); ok {
			codes[p] = cc.Code()
		}
		perPart[p] = make([][]Holiday, lastYear-firstYear+1)
		for y := firstYear; y <= lastYear; y++ {
			var hs []Holiday
			if a, ok := c.(*Almanac); ok {
				hs = slices.Clone(a.table().years[y-firstYear])
			} else {
				hs = c.Holidays(y)
			}
			for _, h := range hs {
				if h.Name == "" {
					return nil, fmt.Errorf("%w: calendar %d: year %d: a holiday has an empty name", ErrCalendar, p+1, y)
				}
				if h.Date.Year() != y {
					return nil, fmt.Errorf("%w: calendar %d: year %d: %q is dated %s", ErrCalendar, p+1, y, h.Name, h.Date.Format(time.DateOnly))
				}
				if d := dayOf(h.Observed) - dayOf(h.Date); d < -366 || d > 366 {
					return nil, fmt.Errorf("%w: calendar %d: %q on %s is observed %d days away", ErrCalendar, p+1, h.Name, h.Date.Format(time.DateOnly), d)
				}
			}
			perPart[p][y-firstYear] = hs
		}
	}
	// Find names placed on different actual dates by different parts.
	type key struct {
		name string
		year int
	}
	dates := make([]map[key][]int, len(parts))
	for p := range parts {
		dates[p] = make(map[key][]int)
		for yi, hs := range perPart[p] {
			for _, h := range hs {
				k := key{h.Name, yi}
				dates[p][k] = append(dates[p][k], dayOf(h.Date))
			}
		}
	}
	clash := make(map[string]bool)
	for p := range parts {
		for q := p + 1; q < len(parts); q++ {
			for k, dp := range dates[p] {
				dq, ok := dates[q][k]
				if !ok || clash[k.name] {
					continue
				}
				a, b := slices.Clone(dp), slices.Clone(dq)
				slices.Sort(a)
				slices.Sort(b)
				if !slices.Equal(slices.Compact(a), slices.Compact(b)) {
					clash[k.name] = true
				}
			}
		}
	}
	if len(clash) > 0 {
		seen := make(map[string]int)
		for p, c := range codes {
			if c == "" {
				return nil, fmt.Errorf("%w: calendar %d has no code, and holidays named %s must be told apart", ErrCalendar, p+1, quoted(clash))
			}
			if q, dup := seen[c]; dup {
				return nil, fmt.Errorf("%w: calendars %d and %d share the code %q, and holidays named %s must be told apart", ErrCalendar, q+1, p+1, c, quoted(clash))
			}
			seen[c] = p
		}
	}
	type occKey struct {
		name     string
		act, obs int
	}
	years := make([][]Holiday, lastYear-firstYear+1)
	for yi := range years {
		var out []Holiday
		seen := make(map[occKey]bool)
		for p := range parts {
			for _, h := range perPart[p][yi] {
				if clash[h.Name] {
					h.Name = codes[p] + ": " + h.Name
				}
				h.Date, h.Observed = civilTime(dayOf(h.Date)), civilTime(dayOf(h.Observed))
				k := occKey{h.Name, dayOf(h.Date), dayOf(h.Observed)}
				if !seen[k] {
					seen[k] = true
					out = append(out, h)
				}
			}
		}
		slices.SortStableFunc(out, func(a, b Holiday) int { return a.Date.Compare(b.Date) })
		years[yi] = out
	}
	a := &Almanac{code: strings.Join(codes, "+")}
	a.once.Do(func() { a.tab = tabulate(years) })
	return a, nil
}

func quoted(set map[string]bool) string {
	names := make([]string, 0, len(set))
	for n := range set {
		names = append(names, fmt.Sprintf("%q", n))
	}
	slices.Sort(names)
	return strings.Join(names, ", ")
}
