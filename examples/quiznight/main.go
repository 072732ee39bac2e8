// Command quiznight turns the broadcast dates of an invented weekly radio
// quiz into calendar feature columns and prints them as a table.
//
// The scenario is made up: Harrowmere Community Radio, a fictional
// regional station, has broadcast a live quiz every Thursday at 20:00
// (Irish time) since January 2010, with a break in August and none between
// Christmas Eve and New Year's Day. No audience figures are involved yet.
package main

import (
	"fmt"
	"log"
	"math"
	"os"
	"strings"
	"text/tabwriter"
	"time"
	_ "time/tzdata" // the Europe/Dublin zone on machines without a zoneinfo database

	"github.com/kalends/kalends/features"
)

// broadcastDates returns the start of every quiz night: each Thursday at
// 20:00 Europe/Dublin from 7 January 2010 to the end of 2024, except in
// August and from 24 December to 1 January.
func broadcastDates(loc *time.Location) []time.Time {
	var dates []time.Time
	for d := time.Date(2010, 1, 7, 20, 0, 0, 0, loc); d.Year() < 2025; d = d.AddDate(0, 0, 7) {
		holidayBreak := (d.Month() == time.December && d.Day() >= 24) || (d.Month() == time.January && d.Day() == 1)
		if d.Month() == time.August || holidayBreak {
			continue
		}
		dates = append(dates, d)
	}
	return dates
}

func main() {
	loc, err := time.LoadLocation("Europe/Dublin")
	if err != nil {
		log.Fatal(err)
	}
	dates := broadcastDates(loc)
	set := features.Set{
		Parts: []features.Spec{
			{Part: features.Year},
			{Part: features.Quarter, Encoding: features.Indicator, Reference: "1"},
			{Part: features.Month, Encoding: features.Cyclic},
			{Part: features.ISOWeek},
			{Part: features.MonthWeek},
			{Part: features.MonthEnd},
		},
		Trend: &features.Trend{Origin: dates[0], Unit: features.Years},
	}
	enc, err := set.Learn(dates)
	if err != nil {
		log.Fatal(err)
	}
	tab, err := features.Apply(enc, dates)
	if err != nil {
		log.Fatal(err)
	}

	fmt.Println("Harrowmere Community Radio (fictional), Thursday Quiz Night: one row per broadcast,")
	fmt.Println("the calendar feature columns kalends made from its date (quarter 1 is the reference level)")
	fmt.Println()
	shown := min(15, tab.Rows())
	w := tabwriter.NewWriter(os.Stdout, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(w, "broadcast\t"+strings.Join(tab.Names(), "\t")+"\t")
	cells := make([][]string, shown)
	for j := range tab.Width() {
		format := "%.0f" // whole numbers as such, fractions to 3 places
		for _, v := range tab.Column(j)[:shown] {
			if v != math.Trunc(v) {
				format = "%.3f"
			}
		}
		for i := range cells {
			cells[i] = append(cells[i], fmt.Sprintf(format, tab.At(i, j)))
		}
	}
	for i, row := range cells {
		fmt.Fprintln(w, dates[i].Format("2006-01-02 15:04")+"\t"+strings.Join(row, "\t")+"\t")
	}
	if err := w.Flush(); err != nil {
		log.Fatal(err)
	}
	fmt.Printf("\nFirst %d rows shown; %d rows (broadcasts %s to %s) × %d columns in all.\n",
		shown, tab.Rows(), dates[0].Format(time.DateOnly), dates[len(dates)-1].Format(time.DateOnly), tab.Width())
}
