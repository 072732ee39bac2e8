package holiday

import "time"

// daysFromCivil returns the number of days from 1970-01-01 to the given
// proleptic Gregorian date (H. Hinnant, "chrono-compatible low-level date
// algorithms", days_from_civil). It accepts any month/day normalisation
// that time.Date would not; callers pass valid dates.
func daysFromCivil(y int, m time.Month, d int) int {
	if m <= 2 {
		y--
	}
	era := y
	if era < 0 {
		era -= 399
	}
	era /= 400
	yoe := y - era*400
	mp := (int(m) + 9) % 12
	doy := (153*mp+2)/5 + d - 1
	doe := yoe*365 + yoe/4 - yoe/100 + doy
	return era*146097 + doe - 719468
}

// civilFromDays is the inverse of daysFromCivil.
func civilFromDays(z int) (int, time.Month, int) {
	z += 719468
	era := z
	if era < 0 {
		era -= 146096
	}
	era /= 146097
	doe := z - era*146097
	yoe := (doe - doe/1460 + doe/36524 - doe/146096) / 365
	y := yoe + era*400
	doy := doe - (365*yoe + yoe/4 - yoe/100)
	mp := (5*doy + 2) / 153
	d := doy - (153*mp+2)/5 + 1
	m := mp + 3
	if m > 12 {
		m -= 12
	}
	if m <= 2 {
		y++
	}
	return y, time.Month(m), d
}

// weekdayOf returns the weekday of a day number (1970-01-01 was a Thursday).
func weekdayOf(z int) time.Weekday {
	w := (z + 4) % 7
	if w < 0 {
		w += 7
	}
	return time.Weekday(w)
}

// dayOf returns the day number of t's civil date in t's own location.
func dayOf(t time.Time) int {
	y, m, d := t.Date()
	return daysFromCivil(y, m, d)
}

// civilTime returns day number z as 00:00 UTC.
func civilTime(z int) time.Time {
	return time.Unix(int64(z)*86400, 0).UTC()
}

// daysIn returns the number of days of month m in year y.
func daysIn(y int, m time.Month) int {
	if m == 12 {
		return daysFromCivil(y+1, 1, 1) - daysFromCivil(y, 12, 1)
	}
	return daysFromCivil(y, m+1, 1) - daysFromCivil(y, m, 1)
}

// Easter returns the date of Western (Gregorian) Easter Sunday in year, at
// 00:00 UTC, by the anonymous Gregorian algorithm as given in J. Meeus,
// Astronomical Algorithms (2nd ed., 1998), chapter 8. It is valid for every
// Gregorian year (1583 on).
func Easter(year int) time.Time { return civilTime(easterDay(year)) }

// OrthodoxEaster returns the date of Orthodox Easter Sunday in year, as a
// Gregorian date at 00:00 UTC. It computes Easter on the Julian calendar
// by Meeus' Julian algorithm (Astronomical Algorithms, chapter 8) and
// converts that Julian date to the Gregorian calendar through the Julian
// Day Number, so the result is right for every year, not only 1900–2099
// where the Julian-to-Gregorian difference is 13 days.
func OrthodoxEaster(year int) time.Time { return civilTime(orthodoxEasterDay(year)) }

func easterDay(y int) int {
	a := y % 19
	b := y / 100
	c := y % 100
	d := b / 4
	e := b % 4
	f := (b + 8) / 25
	g := (b - f + 1) / 3
	h := (19*a + b - d - g + 15) % 30
	i := c / 4
	k := c % 4
	l := (32 + 2*e + 2*i - h - k) % 7
	m := (a + 11*h + 22*l) / 451
	n := h + l - 7*m + 114
	return daysFromCivil(y, time.Month(n/31), n%31+1)
}

func orthodoxEasterDay(y int) int {
	a := y % 4
	b := y % 7
	c := y % 19
	d := (19*c + 15) % 30
	e := (2*a + 4*b - d + 34) % 7
	n := d + e + 114
	month, day := n/31, n%31+1
	// Julian calendar date → Julian Day Number (Richards' algorithm, as in
	// the Explanatory Supplement to the Astronomical Almanac), → day number.
	aa := (14 - month) / 12
	yy := y + 4800 - aa
	mm := month + 12*aa - 3
	jdn := day + (153*mm+2)/5 + 365*yy + yy/4 - 32083
	return jdn - 2440588
}
