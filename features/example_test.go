package features_test

import (
	"fmt"
	"time"

	"github.com/kalends/kalends/features"
)

func date(y int, m time.Month, d int) time.Time { return time.Date(y, m, d, 0, 0, 0, 0, time.UTC) }

// A Set learns on one run of dates and applies unchanged to others.
func ExampleSet() {
	set := features.Set{
		Parts: []features.Spec{
			{Part: features.Month},
			{Part: features.Weekday},
			{Part: features.ISOWeek},
			{Part: features.Weekend},
		},
		Trend: &features.Trend{Origin: date(2024, 1, 1), Unit: features.Days},
	}
	enc, err := set.Learn([]time.Time{date(2024, 1, 4), date(2024, 1, 11)})
	if err != nil {
		fmt.Println(err)
		return
	}
	tab, err := features.Apply(enc, []time.Time{date(2024, 3, 2), date(2024, 12, 30)})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(tab.Names())
	for i := range tab.Rows() {
		for j := range tab.Width() {
			fmt.Printf("%6g", tab.At(i, j))
		}
		fmt.Println()
	}
	// Output:
	// [month weekday isoweek weekend trend.days]
	//      3     6     9     1    61
	//     12     1     1     0   364
}

// Indicator columns are the levels seen by Learn; a reference level is
// left out so that the columns are not collinear with an intercept.
func ExampleSet_indicator() {
	set := features.Set{Parts: []features.Spec{
		{Part: features.Weekday, Encoding: features.Indicator, Reference: "Monday"},
	}}
	// Learn on Monday 1 to Wednesday 3 January 2024.
	enc, err := set.Learn([]time.Time{date(2024, 1, 1), date(2024, 1, 2), date(2024, 1, 3)})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(enc.Names())
	tab, _ := features.Apply(enc, []time.Time{date(2024, 1, 8), date(2024, 1, 10)})
	fmt.Println(tab.Column(0), tab.Column(1))

	// A Sunday was never seen: an error naming the row, unless ZeroUnseen.
	_, err = features.Apply(enc, []time.Time{date(2024, 1, 9), date(2024, 1, 7)})
	fmt.Println(err)
	set.ZeroUnseen = true
	enc, _ = set.Learn([]time.Time{date(2024, 1, 1), date(2024, 1, 2), date(2024, 1, 3)})
	tab, _ = features.Apply(enc, []time.Time{date(2024, 1, 9), date(2024, 1, 7)})
	fmt.Println(tab.Column(0), tab.Column(1))
	// Output:
	// [weekday=Tuesday weekday=Wednesday]
	// [0 0] [0 1]
	// features: row 2 (2024-01-07T00:00:00Z): level not seen by Learn: weekday=Sunday
	// [1 0] [0 0]
}

// Cyclic encoding places a part on a circle, so that December sits next
// to January and 31 December next to 1 January.
func ExampleSet_cyclic() {
	set := features.Set{Parts: []features.Spec{{Part: features.Month, Encoding: features.Cyclic}}}
	dates := []time.Time{date(2023, 1, 15), date(2023, 4, 15), date(2023, 7, 15), date(2023, 12, 15)}
	enc, _ := set.Learn(dates)
	tab, _ := features.Apply(enc, dates)
	for i, d := range dates {
		fmt.Printf("%-9s %s=%+.3f %s=%+.3f\n", d.Month(), tab.Name(0), tab.At(i, 0), tab.Name(1), tab.At(i, 1))
	}
	// Output:
	// January   month.sin=+0.000 month.cos=+1.000
	// April     month.sin=+1.000 month.cos=+0.000
	// July      month.sin=+0.000 month.cos=-1.000
	// December  month.sin=-0.500 month.cos=+0.866
}

// Join combines builders into one design; here two Sets, as a calendar
// Set and a holiday builder would be combined.
func ExampleJoin() {
	season := features.Set{Parts: []features.Spec{{Part: features.Quarter, Encoding: features.Indicator, Reference: "1"}}}
	trend := features.Set{Trend: &features.Trend{Origin: date(2020, 1, 1), Unit: features.Years}, Date: true}
	dates := []time.Time{date(2020, 2, 1), date(2020, 5, 1), date(2021, 8, 1)}
	enc, err := features.Join(season, trend).Learn(dates)
	if err != nil {
		fmt.Println(err)
		return
	}
	tab, _ := features.Apply(enc, dates)
	fmt.Println(tab.Names())
	fmt.Printf("%.4f %v\n", tab.Column(2), tab.Column(3))
	// Output:
	// [quarter=2 quarter=3 trend.years date]
	// [0.0847 0.3306 1.5808] [18293 18383 18840]
}

// DenseTo copies a table into a row-major gonum matrix.
func ExampleTable_DenseTo() {
	set := features.Set{Parts: []features.Spec{{Part: features.Month}, {Part: features.Day}}}
	dates := []time.Time{date(2024, 2, 29), date(2024, 3, 1)}
	enc, _ := set.Learn(dates)
	tab, _ := features.Apply(enc, dates)
	m := tab.DenseTo(nil)
	r, c := m.Dims()
	fmt.Println(r, c, m.RawRowView(0), m.RawRowView(1))
	// Output:
	// 2 2 [2 29] [3 1]
}

// A Table is a set of named columns of equal length.
func ExampleTable() {
	t := features.NewTable(3)
	if err := t.Append("audience", []float64{120, 135, 128}); err != nil {
		fmt.Println(err)
		return
	}
	_ = t.Append("weekend", []float64{0, 1, 0})
	fmt.Println(t.Dims())
	fmt.Println(t.Names(), t.Index("weekend"), t.Index("month"))
	col, ok := t.Lookup("audience")
	fmt.Println(col, ok, t.At(1, 1))
	fmt.Println(t.Append("weekend", []float64{1, 1, 1}))
	fmt.Println(t.Append("short", []float64{1}))

	u := features.NewTable(3)
	_ = u.Append("trend", []float64{0, 1, 2})
	_ = t.Join(u) // shares u's column
	fmt.Println(t.Names())
	// Output:
	// 3 2
	// [audience weekend] 1 -1
	// [120 135 128] true 1
	// features: column "weekend": name already in the table
	// features: column "short": 1 values, table has 3 rows
	// [audience weekend trend]
}
