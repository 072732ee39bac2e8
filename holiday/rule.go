package holiday

import (
	"fmt"
	"slices"
	"time"
)

// Kind says how a [Rule] places its holiday in a year.
type Kind int

const (
	// Fixed is the same month and day every year (Month, Day). A rule for
	// 29 February occurs in leap years only.
	Fixed Kind = iota
	// NthWeekday is the N-th Weekday of Month: N = 1…5 counts from the
	// start of the month, N = -1…-5 from its end (-1 is the last). A year
	// whose month has no fifth such weekday has no occurrence.
	NthWeekday
	// EasterOffset is Offset days after Western Easter Sunday ([Easter]);
	// Offset may be negative (Good Friday is -2).
	EasterOffset
	// OrthodoxOffset is Offset days after Orthodox Easter Sunday
	// ([OrthodoxEaster]).
	OrthodoxOffset
	// OneOff is the explicit list of Dates, for days declared for one
	// year only.
	OneOff
)

var kindNames = [...]string{"Fixed", "NthWeekday", "EasterOffset", "OrthodoxOffset", "OneOff"}

// String returns the constant's name.
func (k Kind) String() string {
	if k < 0 || int(k) >= len(kindNames) {
		return fmt.Sprintf("Kind(%d)", int(k))
	}
	return kindNames[k]
}

// Substitution says which day off a holiday gives when it falls on a
// weekend (Saturday or Sunday).
type Substitution int

const (
	// NoSubstitute keeps the day off on the actual date, weekend or not.
	NoSubstitute Substitution = iota
	// NextWeekday moves a Saturday or Sunday holiday to the first
	// following Monday–Friday that is not already a day off of the same
	// calendar (the England and Wales "substitute day" rule: with
	// Christmas on a Saturday and Boxing Day on a Sunday the days off are
	// Monday and Tuesday).
	NextWeekday
	// NearestWeekday moves a Saturday holiday to the Friday before and a
	// Sunday holiday to the Monday after (the US federal rule). It does
	// not check for collisions.
	NearestWeekday
	// SundayToMonday moves a Sunday holiday to the following Monday, or
	// to the first later day that is not already a day off of the same
	// calendar; a Saturday holiday is not moved (as in Japan).
	SundayToMonday
)

var substitutionNames = [...]string{"NoSubstitute", "NextWeekday", "NearestWeekday", "SundayToMonday"}

// String returns the constant's name.
func (s Substitution) String() string {
	if s < 0 || int(s) >= len(substitutionNames) {
		return fmt.Sprintf("Substitution(%d)", int(s))
	}
	return substitutionNames[s]
}

// Rule declares one custom holiday as data. Which fields are read depends
// on Kind; the others must be zero. Rules are checked by [New], which
// copies them. The zero value is not a valid rule: it has no Name, Month
// or Day.
type Rule struct {
	Name string // required; identifies the holiday and its columns
	Kind Kind

	Month   time.Month   // Fixed, NthWeekday
	Day     int          // Fixed: day of month
	Weekday time.Weekday // NthWeekday
	N       int          // NthWeekday: 1…5 or -1…-5
	Offset  int          // EasterOffset, OrthodoxOffset: days after Easter Sunday
	// Dates lists the days of a OneOff holiday; only each date's year,
	// month and day in its own location are used.
	Dates []time.Time

	Substitute Substitution // weekend rule; zero is NoSubstitute

	// From and To bound the years (inclusive) in which the rule exists;
	// zero means unbounded. They do not apply to OneOff rules.
	From, To int
}

// check validates r and returns a description of the first problem.
// It panics on an invalid Kind or Substitution (caller bugs).
func (r *Rule) check() error {
	if r.Kind < Fixed || r.Kind > OneOff {
		panic(fmt.Sprintf("holiday: rule %q: invalid Kind %d", r.Name, int(r.Kind)))
	}
	if r.Substitute < NoSubstitute || r.Substitute > SundayToMonday {
		panic(fmt.Sprintf("holiday: rule %q: invalid Substitution %d", r.Name, int(r.Substitute)))
	}
	if r.Name == "" {
		return fmt.Errorf("empty name")
	}
	month := func() error {
		if r.Month < time.January || r.Month > time.December {
			return fmt.Errorf("month %d is not 1…12", int(r.Month))
		}
		return nil
	}
	zero := func(what string, ok bool) error {
		if !ok {
			return fmt.Errorf("%s is set but not used by a %v rule", what, r.Kind)
		}
		return nil
	}
	var errs []error
	switch r.Kind {
	case Fixed:
		errs = append(errs, month())
		if errs[0] == nil && (r.Day < 1 || r.Day > daysIn(2000, r.Month)) {
			errs = append(errs, fmt.Errorf("there is no %s %d", r.Month, r.Day))
		}
		errs = append(errs, zero("Weekday", r.Weekday == 0), zero("N", r.N == 0),
			zero("Offset", r.Offset == 0), zero("Dates", r.Dates == nil))
	case NthWeekday:
		errs = append(errs, month())
		if r.Weekday < time.Sunday || r.Weekday > time.Saturday {
			errs = append(errs, fmt.Errorf("weekday %d is not 0…6", int(r.Weekday)))
		}
		if r.N == 0 || r.N > 5 || r.N < -5 {
			errs = append(errs, fmt.Errorf("N = %d: a month has no %s %s (N must be 1…5, or -1…-5 counting from the end)", r.N, ordinal(r.N), r.Weekday))
		}
		errs = append(errs, zero("Day", r.Day == 0), zero("Offset", r.Offset == 0), zero("Dates", r.Dates == nil))
	case EasterOffset, OrthodoxOffset:
		if r.Offset < -80 || r.Offset > 250 {
			// Easter is 22 March…25 April, so these keep the date in Easter's year.
			errs = append(errs, fmt.Errorf("offset %d days is outside -80…250", r.Offset))
		}
		errs = append(errs, zero("Month", r.Month == 0), zero("Day", r.Day == 0),
			zero("Weekday", r.Weekday == 0), zero("N", r.N == 0), zero("Dates", r.Dates == nil))
	case OneOff:
		if len(r.Dates) == 0 {
			errs = append(errs, fmt.Errorf("a OneOff rule needs at least one date"))
		}
		seen := make(map[int]bool)
		for i, t := range r.Dates {
			z := dayOf(t)
			if y := t.Year(); y < MinYear || y > MaxYear {
				errs = append(errs, fmt.Errorf("date %d (%s) is outside %d…%d", i+1, t.Format(time.DateOnly), MinYear, MaxYear))
			}
			if seen[z] {
				errs = append(errs, fmt.Errorf("date %d (%s) is listed twice", i+1, t.Format(time.DateOnly)))
			}
			seen[z] = true
		}
		errs = append(errs, zero("Month", r.Month == 0), zero("Day", r.Day == 0), zero("Weekday", r.Weekday == 0),
			zero("N", r.N == 0), zero("Offset", r.Offset == 0), zero("From", r.From == 0), zero("To", r.To == 0))
	}
	if r.From != 0 && r.To != 0 && r.From > r.To {
		errs = append(errs, fmt.Errorf("From %d is after To %d", r.From, r.To))
	}
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	return nil
}

func ordinal(n int) string {
	if n < 0 {
		return fmt.Sprintf("%s-from-last", ordinal(-n))
	}
	suffix := "th"
	switch {
	case n%100 >= 11 && n%100 <= 13:
	case n%10 == 1:
		suffix = "st"
	case n%10 == 2:
		suffix = "nd"
	case n%10 == 3:
		suffix = "rd"
	}
	return fmt.Sprintf("%d%s", n, suffix)
}

// equal reports whether two rules are the same rule (dates compared as
// civil dates).
func (r *Rule) equal(s *Rule) bool {
	if r.Name != s.Name || r.Kind != s.Kind || r.Month != s.Month || r.Day != s.Day || r.Weekday != s.Weekday ||
		r.N != s.N || r.Offset != s.Offset || r.Substitute != s.Substitute || r.From != s.From || r.To != s.To ||
		len(r.Dates) != len(s.Dates) {
		return false
	}
	a, b := civilDays(r.Dates), civilDays(s.Dates)
	return slices.Equal(a, b)
}

func civilDays(ts []time.Time) []int {
	out := make([]int, len(ts))
	for i, t := range ts {
		out[i] = dayOf(t)
	}
	slices.Sort(out)
	return out
}

// occurrences appends the day numbers of r's actual dates in year.
func (r *Rule) occurrences(dst []int, year int) []int {
	if r.Kind != OneOff && ((r.From != 0 && year < r.From) || (r.To != 0 && year > r.To)) {
		return dst
	}
	switch r.Kind {
	case Fixed:
		if r.Day <= daysIn(year, r.Month) {
			dst = append(dst, daysFromCivil(year, r.Month, r.Day))
		}
	case NthWeekday:
		if r.N > 0 {
			first := daysFromCivil(year, r.Month, 1)
			z := first + (int(r.Weekday)-int(weekdayOf(first))+7)%7 + 7*(r.N-1)
			if z < first+daysIn(year, r.Month) {
				dst = append(dst, z)
			}
		} else {
			first := daysFromCivil(year, r.Month, 1)
			last := first + daysIn(year, r.Month) - 1
			z := last - (int(weekdayOf(last))-int(r.Weekday)+7)%7 - 7*(-r.N-1)
			if z >= first {
				dst = append(dst, z)
			}
		}
	case EasterOffset:
		dst = append(dst, easterDay(year)+r.Offset)
	case OrthodoxOffset:
		dst = append(dst, orthodoxEasterDay(year)+r.Offset)
	case OneOff:
		for _, z := range civilDays(r.Dates) {
			if y, _, _ := civilFromDays(z); y == year {
				dst = append(dst, z)
			}
		}
	}
	return dst
}
