package features_test

import (
	"errors"
	"math"
	"slices"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/google/go-cmp/cmp"

	"github.com/kalends/kalends/features"
)

func days(from, to time.Time) []time.Time {
	var ds []time.Time
	for d := from; !d.After(to); d = d.AddDate(0, 0, 1) {
		ds = append(ds, d)
	}
	return ds
}

func TestColumnNames(t *testing.T) {
	set := features.Set{
		Parts: []features.Spec{
			{Part: features.Year, Encoding: features.Indicator, Reference: "2019"},
			{Part: features.Month, Encoding: features.Indicator},
			{Part: features.Weekday, Encoding: features.Cyclic},
			{Part: features.Quarter},
			{Part: features.Weekend},
		},
		Trend: &features.Trend{Origin: day(2019, 1, 1), Unit: features.Years},
		Date:  true,
	}
	dates := []time.Time{day(2019, 1, 7), day(2020, 3, 10), day(2021, 12, 25), day(2021, 3, 1)}
	enc, err := set.Learn(dates)
	if err != nil {
		t.Fatal(err)
	}
	want := []string{
		"year=2020", "year=2021",
		"month=January", "month=March", "month=December",
		"weekday.sin", "weekday.cos", "quarter", "weekend", "trend.years", "date",
	}
	if diff := cmp.Diff(want, enc.Names()); diff != "" {
		t.Errorf("Names (-want +got):\n%s", diff)
	}
	names := enc.Names()
	names[0] = "changed"
	if got := enc.Names()[0]; got != "year=2020" {
		t.Errorf("Names after changing the returned slice: got %q, want %q", got, "year=2020")
	}
	tab, err := features.Apply(enc, dates)
	if err != nil {
		t.Fatal(err)
	}
	if diff := cmp.Diff(want, tab.Names()); diff != "" {
		t.Errorf("table names (-want +got):\n%s", diff)
	}
}

// TestIndicatorLevelNames learns every level of each part and checks the
// names, their order and their uniqueness.
func TestIndicatorLevelNames(t *testing.T) {
	dates := days(day(2015, 1, 1), day(2026, 12, 31))
	months := []string{"January", "February", "March", "April", "May", "June", "July",
		"August", "September", "October", "November", "December"}
	weekdays := []string{"Monday", "Tuesday", "Wednesday", "Thursday", "Friday", "Saturday", "Sunday"}
	numbers := func(lo, hi int) []string {
		var s []string
		for v := lo; v <= hi; v++ {
			s = append(s, strconv.Itoa(v))
		}
		return s
	}
	tests := []struct {
		name   string
		part   features.Part
		levels []string
	}{
		{"year", features.Year, numbers(2015, 2026)},
		{"quarter", features.Quarter, numbers(1, 4)},
		{"month", features.Month, months},
		{"isoweek", features.ISOWeek, numbers(1, 53)},
		{"isoyear", features.ISOYear, numbers(2015, 2026)}, // 2015-01-01 is in 2015-W01; 2026-12-31 in 2026-W53
		{"day", features.Day, numbers(1, 31)},
		{"yearday", features.YearDay, numbers(1, 366)},
		{"weekday", features.Weekday, weekdays},
		{"monthweek", features.MonthWeek, numbers(1, 5)},
		{"daysinmonth", features.DaysInMonth, numbers(28, 31)},
	}
	all := make(map[string]bool)
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := tt.part.String(); got != tt.name {
				t.Errorf("String: got %q, want %q", got, tt.name)
			}
			tab := encode(t, features.Set{Parts: []features.Spec{{Part: tt.part, Encoding: features.Indicator}}}, dates)
			var want []string
			for _, l := range tt.levels {
				want = append(want, tt.name+"="+l)
			}
			if diff := cmp.Diff(want, tab.Names()); diff != "" {
				t.Errorf("names (-want +got):\n%s", diff)
			}
			for _, n := range tab.Names() {
				if all[n] {
					t.Errorf("name %q made twice", n)
				}
				all[n] = true
			}
			// Exactly one indicator is 1 in each row.
			for i := range dates {
				sum := 0.0
				for j := range tab.Width() {
					sum += tab.At(i, j)
				}
				if sum != 1 {
					t.Fatalf("row %d: indicators sum to %v, want 1", i+1, sum)
				}
			}
		})
	}
}

func TestIndicatorReference(t *testing.T) {
	dates := days(day(2024, 1, 1), day(2024, 1, 14)) // Monday 1 January to Sunday 14 January
	set := features.Set{Parts: []features.Spec{{Part: features.Weekday, Encoding: features.Indicator, Reference: "Monday"}}}
	tab := encode(t, set, dates)
	want := []string{"weekday=Tuesday", "weekday=Wednesday", "weekday=Thursday", "weekday=Friday", "weekday=Saturday", "weekday=Sunday"}
	if diff := cmp.Diff(want, tab.Names()); diff != "" {
		t.Fatalf("names (-want +got):\n%s", diff)
	}
	for i, d := range dates {
		for j := range tab.Width() {
			want := 0.0
			if tab.Name(j) == "weekday="+d.Weekday().String() {
				want = 1
			}
			if got := tab.At(i, j); got != want {
				t.Errorf("%s %s: got %v, want %v", d.Format(time.DateOnly), tab.Name(j), got, want)
			}
		}
	}
}

func TestUnseenLevel(t *testing.T) {
	learn := []time.Time{day(2019, 1, 10), day(2019, 6, 10), day(2021, 3, 1)}
	tests := []struct {
		name  string
		part  features.Part
		apply []time.Time
		row   int    // 1-based row of the error
		level string // named in the error (and all zero with ZeroUnseen)
	}{
		{"month between seen levels", features.Month, []time.Time{day(2019, 1, 2), day(2020, 4, 5)}, 2, "month=April"},
		{"month after seen levels", features.Month, []time.Time{day(2019, 1, 2), day(2020, 6, 1), day(2020, 7, 5)}, 3, "month=July"},
		{"year in a gap", features.Year, []time.Time{day(2020, 5, 5), day(2019, 2, 2)}, 1, "year=2020"},
		{"year after", features.Year, []time.Time{day(2030, 5, 5)}, 1, "year=2030"},
		{"year before", features.Year, []time.Time{day(2021, 5, 5), day(1999, 5, 5)}, 2, "year=1999"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			set := features.Set{Parts: []features.Spec{{Part: tt.part, Encoding: features.Indicator}}}
			enc, err := set.Learn(learn)
			if err != nil {
				t.Fatal(err)
			}
			dst := features.NewTable(len(tt.apply))
			err = enc.Encode(dst, tt.apply)
			var de *features.DateError
			if !errors.As(err, &de) || !errors.Is(err, features.ErrUnseenLevel) {
				t.Fatalf("got error %v, want a *DateError wrapping ErrUnseenLevel", err)
			}
			if de.Row != tt.row || !de.Date.Equal(tt.apply[tt.row-1]) {
				t.Errorf("got row %d date %v, want row %d date %v", de.Row, de.Date, tt.row, tt.apply[tt.row-1])
			}
			if msg := err.Error(); !strings.Contains(msg, "row "+strconv.Itoa(tt.row)) || !strings.Contains(msg, tt.level) {
				t.Errorf("message %q does not name row %d and %s", msg, tt.row, tt.level)
			}
			if dst.Width() != 0 {
				t.Errorf("dst has %d columns after an error, want 0", dst.Width())
			}

			set.ZeroUnseen = true
			enc, err = set.Learn(learn)
			if err != nil {
				t.Fatal(err)
			}
			tab, err := features.Apply(enc, tt.apply)
			if err != nil {
				t.Fatalf("ZeroUnseen: %v", err)
			}
			for i := range tt.apply {
				sum := 0.0
				for j := range tab.Width() {
					sum += tab.At(i, j)
				}
				want := 1.0
				if i+1 == tt.row {
					want = 0
				}
				if sum != want {
					t.Errorf("ZeroUnseen row %d: indicators sum to %v, want %v", i+1, sum, want)
				}
			}
		})
	}
}

func TestCyclic(t *testing.T) {
	angle := func(k, period float64) [2]float64 {
		s, c := math.Sincos(2 * math.Pi * k / period)
		return [2]float64{s, c}
	}
	tests := []struct {
		name string
		part features.Part
		date time.Time
		want [2]float64 // sin, cos
	}{
		{"March is 2/12 of a turn", features.Month, day(2021, 3, 9), [2]float64{math.Sqrt(3) / 2, 0.5}},
		{"January is angle 0", features.Month, day(2021, 1, 31), [2]float64{0, 1}},
		{"Monday is angle 0", features.Weekday, day(2024, 1, 1), [2]float64{0, 1}},
		{"Thursday is 3/7", features.Weekday, day(2024, 1, 4), angle(3, 7)},
		{"fourth quarter", features.Quarter, day(2021, 11, 1), [2]float64{-1, 0}},
		{"31 December of a leap year", features.YearDay, day(2020, 12, 31), angle(365, 366)},
		{"31 December of a common year", features.YearDay, day(2021, 12, 31), angle(364, 365)},
		{"1 March of a leap year", features.YearDay, day(2020, 3, 1), angle(60, 366)},
		{"ISO week 53 of a 53-week year", features.ISOWeek, day(2020, 12, 31), angle(52, 53)},
		{"ISO week 52 of a 52-week year", features.ISOWeek, day(2021, 12, 31), angle(51, 52)},
		{"29 February", features.Day, day(2020, 2, 29), angle(28, 29)},
		{"30 April", features.Day, day(2021, 4, 30), angle(29, 30)},
	}
	const tol = 1e-15
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			tab := encode(t, features.Set{Parts: []features.Spec{{Part: tt.part, Encoding: features.Cyclic}}}, []time.Time{tt.date})
			got := [2]float64{col(t, tab, tt.part.String()+".sin")[0], col(t, tab, tt.part.String()+".cos")[0]}
			if math.Abs(got[0]-tt.want[0]) > tol || math.Abs(got[1]-tt.want[1]) > tol {
				t.Errorf("sin, cos: got %v, want %v (±%g)", got, tt.want, tol)
			}
		})
	}
}

func TestTrendAndDate(t *testing.T) {
	tests := []struct {
		name   string
		origin time.Time
		unit   features.TrendUnit
		date   time.Time
		trend  float64
		days   float64 // the date column
	}{
		{"60 days to 1 March of a leap year", day(2020, 1, 1), features.Days, day(2020, 3, 1), 60, 18322},
		{"half a day", day(2020, 1, 1), features.Days, time.Date(2020, 1, 1, 12, 0, 0, 0, time.UTC), 0.5, 18262},
		{"before the origin", day(2020, 1, 1), features.Days, day(2019, 12, 30), -2, 18260},
		{"one and a half years", day(2020, 1, 1), features.Years, time.Date(2021, 7, 2, 12, 0, 0, 0, time.UTC), 1.5, 18810},
		{"leap year counts 1", day(2020, 1, 1), features.Years, day(2021, 1, 1), 1, 18628},
		{"epoch", day(1970, 1, 1), features.Days, time.Date(1970, 1, 1, 23, 59, 0, 0, time.UTC), (23*60 + 59) / 1440.0, 0},
		{"day before the epoch", day(1970, 1, 1), features.Days, time.Date(1969, 12, 31, 6, 0, 0, 0, time.UTC), -0.75, -1},
		{"origin in another zone is read in its own", time.Date(2020, 1, 1, 0, 0, 0, 0, time.FixedZone("x", 5*3600)), features.Days, day(2020, 1, 2), 1, 18263},
	}
	const tol = 1e-9
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			set := features.Set{Trend: &features.Trend{Origin: tt.origin, Unit: tt.unit}, Date: true}
			tab := encode(t, set, []time.Time{tt.date})
			if got := col(t, tab, "trend."+tt.unit.String())[0]; math.Abs(got-tt.trend) > tol {
				t.Errorf("trend: got %v, want %v (±%g)", got, tt.trend, tol)
			}
			// The date column agrees with Unix days of the civil date at midnight UTC.
			y, m, d := tt.date.Date()
			if got, want := col(t, tab, "date")[0], float64(time.Date(y, m, d, 0, 0, 0, 0, time.UTC).Unix()/86400); got != want || got != tt.days {
				t.Errorf("date: got %v, want %v and %v", got, want, tt.days)
			}
		})
	}
}

// TestLearnApplyNoLeak learns on some rows and applies to others: the
// columns are those of the learning rows.
func TestLearnApplyNoLeak(t *testing.T) {
	set := features.Set{Parts: []features.Spec{{Part: features.Year, Encoding: features.Indicator}}, ZeroUnseen: true}
	enc, err := set.Learn([]time.Time{day(2018, 5, 1), day(2019, 5, 1)})
	if err != nil {
		t.Fatal(err)
	}
	tab, err := features.Apply(enc, []time.Time{day(2019, 1, 1), day(2020, 1, 1), day(2018, 1, 1)})
	if err != nil {
		t.Fatal(err)
	}
	if diff := cmp.Diff([]string{"year=2018", "year=2019"}, tab.Names()); diff != "" {
		t.Errorf("names (-want +got):\n%s", diff)
	}
	want := [][]float64{{0, 0, 1}, {1, 0, 0}}
	for j := range want {
		if diff := cmp.Diff(want[j], tab.Column(j)); diff != "" {
			t.Errorf("%s (-want +got):\n%s", tab.Name(j), diff)
		}
	}
}

func TestConfigErrors(t *testing.T) {
	ok := []time.Time{day(2020, 1, 1), day(2020, 2, 1)}
	kir := mustLoad(t, "Pacific/Kiritimati")
	minus11 := time.FixedZone("UTC-11", -11*3600) // Pacific/Pago_Pago had a +12:37 local mean time before 1892
	month := features.Spec{Part: features.Month}
	tests := []struct {
		name  string
		set   features.Set
		dates []time.Time
		want  string // in the message
	}{
		{"empty set", features.Set{}, ok, "features: Set makes no columns"},
		{"no dates", features.Set{Parts: []features.Spec{month}}, nil, "features: Learn: no dates"},
		{"part listed twice", features.Set{Parts: []features.Spec{month, {Part: features.Year}, {Part: features.Month, Encoding: features.Cyclic}}}, ok,
			"features: Parts[2]: month listed twice (also Parts[0])"},
		{"cyclic year", features.Set{Parts: []features.Spec{{Part: features.Year, Encoding: features.Cyclic}}}, ok, "features: Parts[0]: year cannot take cyclic encoding"},
		{"cyclic isoyear", features.Set{Parts: []features.Spec{month, {Part: features.ISOYear, Encoding: features.Cyclic}}}, ok, "features: Parts[1]: isoyear cannot take cyclic encoding"},
		{"indicator flag", features.Set{Parts: []features.Spec{{Part: features.Weekend, Encoding: features.Indicator}}}, ok, "features: Parts[0]: weekend cannot take indicator encoding"},
		{"reference on a number", features.Set{Parts: []features.Spec{{Part: features.Month, Reference: "January"}}}, ok, `features: Parts[0]: Reference "January" given for number encoding`},
		{"reference not a level", features.Set{Parts: []features.Spec{{Part: features.Month, Encoding: features.Indicator, Reference: "Smarch"}}}, ok, `features: Parts[0]: Reference "Smarch" is not a level of month`},
		{"reference as a number for month", features.Set{Parts: []features.Spec{{Part: features.Month, Encoding: features.Indicator, Reference: "1"}}}, ok, `Reference "1" is not a level of month`},
		{"reference not seen", features.Set{Parts: []features.Spec{{Part: features.Month, Encoding: features.Indicator, Reference: "March"}}}, ok, `features: Parts[0]: Reference "March": month level not among the dates given to Learn`},
		{"zero origin", features.Set{Trend: &features.Trend{}}, ok, "features: Trend.Origin: zero time.Time"},
		{"origin after year 9999", features.Set{Trend: &features.Trend{Origin: day(10000, 1, 1)}}, ok, "features: Trend.Origin: features: year outside 1..9999: year 10000"},
		{"zero date", features.Set{Parts: []features.Spec{month}}, []time.Time{day(2020, 1, 1), day(2020, 1, 2), {}}, "features: row 3 (0001-01-01T00:00:00Z): zero time.Time"},
		{"year 10000", features.Set{Parts: []features.Spec{month}}, []time.Time{day(2020, 1, 1), day(10000, 1, 1)}, "features: row 2 (10000-01-01T00:00:00Z): year outside 1..9999: year 10000"},
		{"year 0", features.Set{Parts: []features.Spec{month}}, []time.Time{day(0, 12, 31)}, "features: row 1 (0000-12-31T00:00:00Z): year outside 1..9999: year 0"},
		{"year 10000 only in Kiritimati", features.Set{Parts: []features.Spec{month}, Location: kir}, []time.Time{time.Date(9999, 12, 31, 11, 0, 0, 0, time.UTC)}, "row 1 (9999-12-31T11:00:00Z): year outside 1..9999: year 10000"},
		{"year 0 only at UTC-11", features.Set{Parts: []features.Spec{month}, Location: minus11}, []time.Time{time.Date(1, 1, 1, 5, 0, 0, 0, time.UTC)}, "row 1 (0001-01-01T05:00:00Z): year outside 1..9999: year 0"},
		{"far past", features.Set{Parts: []features.Spec{month}}, []time.Time{time.Unix(math.MinInt64/2, 0)}, "year outside 1..9999"},
		{"absurd fixed zone", features.Set{Parts: []features.Spec{month}, Location: time.FixedZone("far", 1<<50)}, ok, "row 1"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			enc, err := tt.set.Learn(tt.dates)
			if err == nil {
				t.Fatalf("got encoder %v, want an error containing %q", enc, tt.want)
			}
			if !strings.Contains(err.Error(), tt.want) {
				t.Errorf("got error %q, want it to contain %q", err, tt.want)
			}
		})
	}
}

func TestDateErrorSentinels(t *testing.T) {
	set := features.Set{Parts: []features.Spec{{Part: features.Day}}}
	enc, err := set.Learn([]time.Time{day(2020, 1, 1)})
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name  string
		dates []time.Time
		row   int
		is    error
	}{
		{"zero", []time.Time{day(2020, 1, 1), {}}, 2, features.ErrZeroDate},
		{"year", []time.Time{day(12000, 1, 1)}, 1, features.ErrYearRange},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := features.Apply(enc, tt.dates)
			var de *features.DateError
			if !errors.As(err, &de) || !errors.Is(err, tt.is) || de.Row != tt.row {
				t.Errorf("got %v, want a *DateError at row %d wrapping %v", err, tt.row, tt.is)
			}
		})
	}
}

func panics(f func()) (msg string) {
	defer func() {
		if r := recover(); r != nil {
			msg, _ = r.(string)
			if msg == "" {
				msg = "panic"
			}
		}
	}()
	f()
	return ""
}

func TestMisusePanics(t *testing.T) {
	ok := []time.Time{day(2020, 1, 1)}
	enc, err := features.Set{Parts: []features.Spec{{Part: features.Day}}}.Learn(ok)
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name string
		f    func()
		want string
	}{
		{"invalid part", func() { features.Set{Parts: []features.Spec{{Part: 99}}}.Learn(ok) }, "features: Parts[0]: invalid Part 99"},
		{"part zero", func() { features.Set{Parts: []features.Spec{{}}}.Learn(ok) }, "features: Parts[0]: invalid Part 0"},
		{"invalid encoding", func() { features.Set{Parts: []features.Spec{{Part: features.Day, Encoding: 7}}}.Learn(ok) }, "features: Parts[0]: invalid Encoding 7"},
		{"invalid trend unit", func() { features.Set{Trend: &features.Trend{Origin: ok[0], Unit: 5}}.Learn(ok) }, "features: Trend.Unit: invalid TrendUnit 5"},
		{"row count mismatch", func() { enc.Encode(features.NewTable(3), ok) }, "features: Encode: dst has 3 rows, 1 dates"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := panics(tt.f); got != tt.want {
				t.Errorf("got panic %q, want %q", got, tt.want)
			}
		})
	}
}

func TestEncodeIntoTable(t *testing.T) {
	dates := []time.Time{day(2020, 1, 1), day(2020, 1, 2)}
	enc, err := features.Set{Parts: []features.Spec{{Part: features.Day}}}.Learn(dates)
	if err != nil {
		t.Fatal(err)
	}
	t.Run("zero table takes the row count", func(t *testing.T) {
		var dst features.Table
		if err := enc.Encode(&dst, dates); err != nil {
			t.Fatal(err)
		}
		if r, c := dst.Dims(); r != 2 || c != 1 {
			t.Errorf("got %d×%d, want 2×1", r, c)
		}
	})
	t.Run("name clash leaves dst unchanged", func(t *testing.T) {
		dst := features.NewTable(2)
		if err := dst.Append("day", []float64{7, 8}); err != nil {
			t.Fatal(err)
		}
		err := enc.Encode(dst, dates)
		if err == nil || !strings.Contains(err.Error(), `column "day" already in dst`) {
			t.Errorf("got %v, want a name clash error", err)
		}
		if dst.Width() != 1 || dst.At(0, 0) != 7 {
			t.Errorf("dst changed: %v", dst.Names())
		}
	})
	t.Run("empty dates", func(t *testing.T) {
		tab, err := features.Apply(enc, nil)
		if err != nil || tab.Rows() != 0 || tab.Width() != 1 {
			t.Errorf("got %v rows, %v columns, error %v; want 0, 1, nil", tab.Rows(), tab.Width(), err)
		}
	})
}

// TestConcurrentEncode shares one Encoder among goroutines and requires
// the same table as a serial run (run with -race).
func TestConcurrentEncode(t *testing.T) {
	ny := mustLoad(t, "America/New_York")
	var dates []time.Time
	for d := time.Date(2018, 1, 1, 6, 0, 0, 0, ny); d.Year() < 2021; d = d.Add(13 * time.Hour) {
		dates = append(dates, d)
	}
	set := features.Set{
		Parts: []features.Spec{
			{Part: features.Month, Encoding: features.Indicator, Reference: "January"},
			{Part: features.YearDay, Encoding: features.Cyclic},
			{Part: features.ISOWeek},
		},
		Trend: &features.Trend{Origin: dates[0]},
	}
	enc, err := set.Learn(dates)
	if err != nil {
		t.Fatal(err)
	}
	want, err := features.Apply(enc, dates)
	if err != nil {
		t.Fatal(err)
	}
	const workers = 8
	got := make([]*features.Table, workers)
	errs := make([]error, workers)
	var wg sync.WaitGroup
	for w := range workers {
		wg.Go(func() { got[w], errs[w] = features.Apply(enc, dates) })
	}
	wg.Wait()
	for w := range workers {
		if errs[w] != nil {
			t.Fatalf("worker %d: %v", w, errs[w])
		}
		for j := range want.Width() {
			if !slices.Equal(want.Column(j), got[w].Column(j)) {
				t.Errorf("worker %d column %s differs from the serial run", w, want.Name(j))
			}
		}
	}
}

func TestEnumStrings(t *testing.T) {
	tests := []struct {
		name string
		got  string
		want string
	}{
		{"Number", features.Number.String(), "number"},
		{"Indicator", features.Indicator.String(), "indicator"},
		{"Cyclic", features.Cyclic.String(), "cyclic"},
		{"bad Encoding", features.Encoding(9).String(), "Encoding(9)"},
		{"Days", features.Days.String(), "days"},
		{"Years", features.Years.String(), "years"},
		{"bad TrendUnit", features.TrendUnit(-1).String(), "TrendUnit(-1)"},
		{"bad Part", features.Part(0).String(), "Part(0)"},
		{"DaysInMonth", features.DaysInMonth.String(), "daysinmonth"},
		{"LeapYear", features.LeapYear.String(), "leapyear"},
		{"MonthStart", features.MonthStart.String(), "monthstart"},
		{"MonthEnd", features.MonthEnd.String(), "monthend"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if tt.got != tt.want {
				t.Errorf("got %q, want %q", tt.got, tt.want)
			}
		})
	}
}
