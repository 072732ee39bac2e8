package features

import (
	"strconv"
	"time"
)

// Part is a calendar part of a date: its year, its month, its ISO week and
// so on. Every part is read from the civil date (and, for [Trend], the
// clock time) in the location chosen by [Set.Location]. Part's String
// method returns the name used for its columns.
//
// Flags (Weekend, MonthStart, MonthEnd, LeapYear) are 1 or 0 and take only
// the [Number] encoding.
type Part int

const (
	// Year is the calendar year, as time.Time.Year.
	Year Part = iota + 1
	// Quarter is the quarter of the calendar year, 1 (January to March) to 4.
	Quarter
	// Month is the month, 1 (January) to 12, as time.Time.Month.
	Month
	// ISOWeek is the ISO 8601 week number, 1 to 53, as the week of
	// time.Time.ISOWeek.
	ISOWeek
	// ISOYear is the ISO 8601 week-numbering year, as the year of
	// time.Time.ISOWeek; it differs from Year for a few days around
	// 1 January.
	ISOYear
	// Day is the day of the month, 1 to 31, as time.Time.Day.
	Day
	// YearDay is the day of the year, 1 to 365 or 366, as time.Time.YearDay.
	YearDay
	// Weekday is the ISO 8601 day of the week, Monday = 1 to Sunday = 7.
	// Note that time.Weekday counts differently (Sunday = 0).
	Weekday
	// MonthWeek is the week of the month counted from the 1st, 1 to 5:
	// days 1–7 are week 1, days 8–14 week 2, and so on.
	MonthWeek
	// Weekend is 1 on Saturday and Sunday, 0 otherwise.
	Weekend
	// MonthStart is 1 on the first day of a month, 0 otherwise.
	MonthStart
	// MonthEnd is 1 on the last day of a month, 0 otherwise.
	MonthEnd
	// DaysInMonth is the length of the date's month, 28 to 31.
	DaysInMonth
	// LeapYear is 1 in a Gregorian leap year, 0 otherwise.
	LeapYear

	numParts = int(LeapYear)
)

var partNames = [...]string{
	Year:        "year",
	Quarter:     "quarter",
	Month:       "month",
	ISOWeek:     "isoweek",
	ISOYear:     "isoyear",
	Day:         "day",
	YearDay:     "yearday",
	Weekday:     "weekday",
	MonthWeek:   "monthweek",
	Weekend:     "weekend",
	MonthStart:  "monthstart",
	MonthEnd:    "monthend",
	DaysInMonth: "daysinmonth",
	LeapYear:    "leapyear",
}

// String returns the part's column name, such as "month" or "isoweek".
func (p Part) String() string {
	if !p.valid() {
		return "Part(" + strconv.Itoa(int(p)) + ")"
	}
	return partNames[p]
}

func (p Part) valid() bool { return p >= Year && p <= LeapYear }

func (p Part) flag() bool {
	return p == Weekend || p == MonthStart || p == MonthEnd || p == LeapYear
}

// levelRange returns the smallest and largest value p can take for a date
// in years 1..9999.
func (p Part) levelRange() (lo, hi int) {
	switch p {
	case Year, ISOYear:
		return 1, 9999
	case Quarter:
		return 1, 4
	case Month:
		return 1, 12
	case ISOWeek:
		return 1, 53
	case Day:
		return 1, 31
	case YearDay:
		return 1, 366
	case Weekday:
		return 1, 7
	case MonthWeek:
		return 1, 5
	case DaysInMonth:
		return 28, 31
	}
	return 0, 1
}

// label returns the name of level v of p as it appears after "=" in an
// indicator column name: month and weekday names for Month and Weekday,
// decimal numbers otherwise.
func (p Part) label(v int) string {
	switch p {
	case Month:
		return time.Month(v).String()
	case Weekday:
		return time.Weekday(v % 7).String()
	}
	return strconv.Itoa(v)
}

// parseLabel returns the level of p named by s, or false if s names none.
func (p Part) parseLabel(s string) (int, bool) {
	lo, hi := p.levelRange()
	switch p {
	case Month, Weekday:
		for v := lo; v <= hi; v++ {
			if p.label(v) == s {
				return v, true
			}
		}
		return 0, false
	}
	v, err := strconv.Atoi(s)
	if err != nil || v < lo || v > hi || strconv.Itoa(v) != s {
		return 0, false
	}
	return v, true
}

// Encoding is the way a part becomes columns.
type Encoding int

const (
	// Number is one column holding the part's value (the zero Encoding).
	Number Encoding = iota
	// Indicator is one 0/1 column per level seen by Learn, in ascending
	// order of level, less the [Spec.Reference] level if one is given.
	Indicator
	// Cyclic is a sine and a cosine column at angle 2π(v−1)/period, where
	// v is the part's value and the period is 4 for Quarter, 12 for
	// Month, 7 for Weekday, the length of the month (28–31) for Day, the
	// length of the year (365 or 366) for YearDay, and the number of weeks
	// in the ISO year (52 or 53) for ISOWeek. No other part takes it.
	Cyclic
)

// String returns "number", "indicator" or "cyclic".
func (e Encoding) String() string {
	switch e {
	case Number:
		return "number"
	case Indicator:
		return "indicator"
	case Cyclic:
		return "cyclic"
	}
	return "Encoding(" + strconv.Itoa(int(e)) + ")"
}

func (e Encoding) valid() bool { return e >= Number && e <= Cyclic }

// accepts reports whether p can be encoded as e.
func (p Part) accepts(e Encoding) bool {
	switch e {
	case Number:
		return true
	case Indicator:
		return !p.flag()
	case Cyclic:
		switch p {
		case Quarter, Month, ISOWeek, Day, YearDay, Weekday:
			return true
		}
	}
	return false
}

// Spec asks for one calendar part in one encoding. Part has no usable zero
// value ([Set.Learn] panics on it); the zero Encoding is [Number].
type Spec struct {
	Part     Part     // the part; required
	Encoding Encoding // zero means Number

	// Reference is the level left out of Indicator columns, written as in
	// the column name after "=" ("January", "Monday", "2019", "3"), so that
	// the remaining columns are not collinear with an intercept. Empty
	// means no level is left out. It must be empty for other encodings.
	Reference string
}

// TrendUnit is the unit of a [Trend] column.
type TrendUnit int

const (
	// Days counts civil days, fractions of a day from the clock time
	// (the zero TrendUnit).
	Days TrendUnit = iota
	// Years counts calendar years: each year counts 1, spread evenly over
	// its 365 or 366 days.
	Years
)

// String returns "days" or "years".
func (u TrendUnit) String() string {
	switch u {
	case Days:
		return "days"
	case Years:
		return "years"
	}
	return "TrendUnit(" + strconv.Itoa(int(u)) + ")"
}

// Trend asks for a column of the time elapsed since Origin, named
// "trend.days" or "trend.years". It is measured on the civil clock of the
// location in use, so a day across a daylight-saving change is still 1
// day; dates before Origin give negative values. The zero value has no
// Origin and [Set.Learn] rejects it.
type Trend struct {
	Origin time.Time // required: the zero time.Time is an error
	Unit   TrendUnit // zero means Days
}
