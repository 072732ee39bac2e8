//go:build ignore

// ferry_tickets_gen.go writes ferry_tickets.csv, the sample input of
// examples/fromcsv: invented daily ticket sales of a fictional community
// ferry to a fictional island (the Skelly Isle ferry), 2019–2024. Nothing in
// it is real. Run from the repository root:
//
//	go run testdata/ferry_tickets_gen.go
//
// The process, with t the day, m its month and e AR(1) noise:
//
//	tickets = 150 + 45·[Sat or Sun] + 40·cos(2π(m−7)/12)     summer peak in July
//	        + 35·[England & Wales bank holiday, observed]
//	        + 120·[Skelly Regatta: second Saturday of August]
//	        − 3·rain_mm + 10·(sailings − 4) + e
//	e_t = 0.4·e_{t−1} + N(0, 12²)
//
// rounded to whole tickets, with rain_mm drawn as 0 on 60% of days and
// otherwise exponential with mean 6 (one decimal), and sailings 4 a day from
// April to October and 3 otherwise, 2 on 30 invented storm days. The ferry
// does not sail on Christmas Day, so that date is missing.
package main

import (
	"fmt"
	"log"
	"math"
	"math/rand/v2"
	"os"
	"time"

	"github.com/kalends/kalends/holiday"
)

func main() {
	gb, err := holiday.Country("GB")
	if err != nil {
		log.Fatal(err)
	}
	g := rand.New(rand.NewPCG(1847, 2))
	f, err := os.Create("testdata/ferry_tickets.csv")
	if err != nil {
		log.Fatal(err)
	}
	fmt.Fprintln(f, "# Invented data: daily tickets of a fictional island ferry, made by testdata/ferry_tickets_gen.go (Go 1.26); see its comment.")
	fmt.Fprintln(f, "date,tickets,rain_mm,sailings")
	storms := map[int]bool{}
	for len(storms) < 30 {
		storms[g.IntN(2192)] = true
	}
	e := 0.0
	for i, t := 0, time.Date(2019, 1, 1, 0, 0, 0, 0, time.UTC); t.Year() < 2025; i, t = i+1, t.AddDate(0, 0, 1) {
		e = 0.4*e + 12*g.NormFloat64()
		if t.Month() == time.December && t.Day() == 25 {
			continue
		}
		rain := 0.0
		if g.Float64() >= 0.6 {
			rain = math.Round(g.ExpFloat64()*60) / 10
		}
		sailings := 3
		if t.Month() >= time.April && t.Month() <= time.October {
			sailings = 4
		}
		if storms[i] {
			sailings = 2
		}
		y := 150 + 40*math.Cos(2*math.Pi*float64(t.Month()-7)/12) - 3*rain + 10*float64(sailings-4) + e
		if t.Weekday() == time.Saturday || t.Weekday() == time.Sunday {
			y += 45
		}
		if gb.DayOff(t) {
			y += 35
		}
		if t.Month() == time.August && t.Weekday() == time.Saturday && t.Day() > 7 && t.Day() <= 14 {
			y += 120
		}
		fmt.Fprintf(f, "%s,%d,%.1f,%d\n", t.Format(time.DateOnly), int(math.Round(max(y, 0))), rain, sailings)
	}
	if err := f.Close(); err != nil {
		log.Fatal(err)
	}
}
