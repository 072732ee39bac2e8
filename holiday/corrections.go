package holiday

import (
	"slices"
	"time"
)

// Corrections to rickar/cal v2.1.26 made in our layer. Each is tested in
// country_test.go: the GB ones by TestGBPublished against the published
// list named below (and TestGBCorrectionsNeeded shows they are still
// needed), the others by TestCorrections; the Orthodox fix is tested by
// TestOrthodoxAfter2099 in easter_test.go.
//
// GB (England and Wales), checked against the UK government's list of
// bank holidays (www.gov.uk/bank-holidays):
//   - 19 September 2022, the Bank Holiday for the State Funeral of Queen
//     Elizabeth II, is missing from rickar/cal; we add it as a OneOff rule.
//   - When Christmas Day falls on a Sunday (2022, 2033), the published
//     list has Boxing Day on Monday 26 December and "Christmas Day
//     (substitute day)" on Tuesday 27; rickar/cal observes Christmas on
//     the 26th and Boxing Day on the 27th. We replace both with NextWeekday
//     rules, which give the published assignment in every year.
//   - rickar/cal calls the moved early May bank holiday of 2020 "VE Day";
//     the published list calls it the early May bank holiday (VE day), so
//     we name it "Early May", as rickar/cal already does for the moved
//     spring bank holiday of 2022, so that one column covers it.
//
// HU and UA: rickar/cal gives two different holidays one name (HU
// "Nemzeti ünnep" on 15 March and 23 October; UA "Різдво" on 7 January and
// 25 December), which would merge them into one column; we add the date to
// the names. (Holidays of two consecutive days under one name, as SI "novo
// leto" on 1 and 2 January, are left as one holiday.)
//
// GR: rickar/cal names New Year's Day (its var Protoxronia) "Xristougenna",
// the name of Christmas; we name it "Protoxronia".
//
// DE: rickar/cal gives some Land holidays before they existed. Berlin's
// Frauentag (8 March) starts in 2019; Mecklenburg-Vorpommern also has it
// from 2023, which rickar/cal lacks; Reformationstag (31 October) is a
// holiday in Bremen, Hamburg, Niedersachsen and Schleswig-Holstein from
// 2018; and 31 October 2017 (500 years of the Reformation) was a one-off
// holiday in every Land. (Recalled from memory of the Länder holiday acts;
// not checked against a second source.)
//
// Orthodox calendars (BG CY GR RO RS UA): rickar/cal turns Julian Easter
// into a Gregorian date by adding 13 days, which is right only for
// 1900–2099. Holidays found to lie a fixed number of days from Orthodox
// Easter are recomputed from [OrthodoxEaster] outside those years (see
// markOrthodox).
func patch(code string, srcs []source) []source {
	byName := func(name string, month time.Month) int {
		return slices.IndexFunc(srcs, func(s source) bool {
			return s.h != nil && s.h.Name == name && (month == 0 || s.h.Month == month)
		})
	}
	rule := func(r Rule) source { return source{r: &r} }
	switch {
	case code == "GB":
		if i := byName("Christmas Day", time.December); i >= 0 {
			srcs[i] = rule(Rule{Name: "Christmas Day", Month: time.December, Day: 25, Substitute: NextWeekday})
		}
		if i := byName("Boxing Day", time.December); i >= 0 {
			srcs[i] = rule(Rule{Name: "Boxing Day", Month: time.December, Day: 26, Substitute: NextWeekday})
		}
		if i := byName("VE Day", time.May); i >= 0 {
			srcs[i].h.Name = "Early May"
		}
		srcs = append(srcs, rule(Rule{Name: "State Funeral of Queen Elizabeth II", Kind: OneOff,
			Dates: []time.Time{time.Date(2022, time.September, 19, 0, 0, 0, 0, time.UTC)}}))
	case code == "HU":
		// rickar/cal names both 15 March and 23 October "Nemzeti ünnep".
		if i := byName("Nemzeti ünnep", time.March); i >= 0 {
			srcs[i].h.Name = "Nemzeti ünnep (március 15.)"
		}
		if i := byName("Nemzeti ünnep", time.October); i >= 0 {
			srcs[i].h.Name = "Nemzeti ünnep (október 23.)"
		}
	case code == "UA":
		// rickar/cal names both 7 January and 25 December "Різдво".
		if i := byName("Різдво", time.January); i >= 0 {
			srcs[i].h.Name = "Різдво (7 січня)"
		}
	case code == "GR":
		if i := byName("Xristougenna", time.January); i >= 0 {
			srcs[i].h.Name = "Protoxronia"
		}
	case len(code) > 3 && code[:3] == "DE-":
		land := code[3:]
		if i := byName("Frauentag", time.March); i >= 0 && land == "BE" {
			srcs[i].h.StartYear = 2019
		}
		if land == "MV" && byName("Frauentag", time.March) < 0 {
			srcs = append(srcs, rule(Rule{Name: "Frauentag", Month: time.March, Day: 8, From: 2023}))
		}
		if i := byName("Reformationstag", time.October); i >= 0 {
			switch land {
			case "HB", "HH", "NI", "SH":
				// The 2017 nationwide one-off, then every year from 2018.
				srcs[i].h.StartYear = 2017
			}
		}
		fallthrough
	case code == "DE":
		if byName("Reformationstag", time.October) < 0 {
			srcs = append(srcs, rule(Rule{Name: "Reformationstag", Kind: OneOff,
				Dates: []time.Time{time.Date(2017, time.October, 31, 0, 0, 0, 0, time.UTC)}}))
		}
	}
	return srcs
}
