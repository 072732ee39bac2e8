package holiday_test

import (
	"fmt"
	"time"

	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/holiday"
)

// A national calendar: England and Wales in 2022, with substitute days.
func ExampleCountry() {
	gb, err := holiday.Country("GB")
	if err != nil {
		panic(err)
	}
	for _, h := range gb.Holidays(2022) {
		if h.Date.Month() >= time.September {
			fmt.Println(h.Date.Format("Mon 2 Jan"), "→", h.Observed.Format("Mon 2 Jan"), h.Name)
		}
	}
	// Output:
	// Mon 19 Sep → Mon 19 Sep State Funeral of Queen Elizabeth II
	// Sun 25 Dec → Tue 27 Dec Christmas Day
	// Mon 26 Dec → Mon 26 Dec Boxing Day
}

// A custom calendar with a one-off day, combined with a national one.
func ExampleNew() {
	local, err := holiday.New("TOWN",
		holiday.Rule{Name: "Town Fair", Kind: holiday.NthWeekday, Month: time.June, Weekday: time.Friday, N: 2},
		holiday.Rule{Name: "Jubilee Day", Kind: holiday.OneOff,
			Dates: []time.Time{time.Date(2026, time.July, 3, 0, 0, 0, 0, time.UTC)}},
	)
	if err != nil {
		panic(err)
	}
	us, _ := holiday.Country("US")
	both, err := holiday.Combine(us, local)
	if err != nil {
		panic(err)
	}
	for _, h := range both.Holidays(2026) {
		if m := h.Date.Month(); m == time.June || m == time.July {
			fmt.Println(h.Date.Format(time.DateOnly), h.Observed.Format(time.DateOnly), h.Name)
		}
	}
	// Output:
	// 2026-06-12 2026-06-12 Town Fair
	// 2026-06-19 2026-06-19 Juneteenth
	// 2026-07-03 2026-07-03 Jubilee Day
	// 2026-07-04 2026-07-03 Independence Day
}

// Window and distance columns: the days between Christmas and New Year,
// and the days until the next holiday, capped at 10.
func ExampleColumns() {
	gb, _ := holiday.Country("GB")
	cols := features.Join(
		holiday.Columns{Calendar: gb, Names: []string{"Christmas Day"}, Actual: true, Each: holiday.Parts{After: 6}},
		holiday.Columns{Calendar: gb, Any: holiday.Parts{Until: 10}},
	)
	var dates []time.Time
	for day := 22; day <= 31; day += 3 {
		dates = append(dates, time.Date(2025, time.December, day, 0, 0, 0, 0, time.UTC))
	}
	enc, err := cols.Learn(dates)
	if err != nil {
		panic(err)
	}
	tab, err := features.Apply(enc, dates)
	if err != nil {
		panic(err)
	}
	fmt.Println(tab.Names())
	for i, t := range dates {
		fmt.Println(t.Format("Jan 2"), tab.At(i, 0), tab.At(i, 1))
	}
	// Output:
	// [christmas_day_after_6 any_holiday_days_until]
	// Dec 22 0 3
	// Dec 25 0 0
	// Dec 28 1 4
	// Dec 31 1 1
}

// Seen: only the holidays the dates meet get a column. Spring and summer
// 2024 in England and Wales have three days off.
func ExampleColumns_seen() {
	gb, _ := holiday.Country("GB")
	var dates []time.Time
	for t := time.Date(2024, time.April, 15, 0, 0, 0, 0, time.UTC); t.Month() < time.September; t = t.AddDate(0, 0, 1) {
		dates = append(dates, t)
	}
	every, _ := holiday.Columns{Calendar: gb, Each: holiday.Parts{Indicator: true}}.Learn(dates)
	seen, _ := holiday.Columns{Calendar: gb, Each: holiday.Parts{Indicator: true}, Seen: true}.Learn(dates)
	fmt.Println(len(every.Names()), "columns without Seen")
	fmt.Println(seen.Names())
	// Output:
	// 11 columns without Seen
	// [early_may spring_bank_holiday summer_bank_holiday]
}

// On and DayOff answer for one date from the calendar's table. Christmas
// Day 2022 fell on a Sunday and was observed on Tuesday 27 December.
func ExampleAlmanac_On() {
	gb, _ := holiday.Country("GB")
	for day := 25; day <= 28; day++ {
		t := time.Date(2022, time.December, day, 0, 0, 0, 0, time.UTC)
		fmt.Print(t.Format("Mon 2 Jan: "), gb.DayOff(t))
		for _, h := range gb.On(t) {
			fmt.Printf(", %s (%s, observed %s)", h.Name, h.Date.Format("Jan 2"), h.Observed.Format("Jan 2"))
		}
		fmt.Println()
	}
	// Output:
	// Sun 25 Dec: false, Christmas Day (Dec 25, observed Dec 27)
	// Mon 26 Dec: true, Boxing Day (Dec 26, observed Dec 26)
	// Tue 27 Dec: true, Christmas Day (Dec 25, observed Dec 27)
	// Wed 28 Dec: false
}
