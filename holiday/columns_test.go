package holiday

import (
	"errors"
	"math/rand/v2"
	"slices"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/google/go-cmp/cmp"
	"github.com/kalends/kalends/features"
)

func days(from time.Time, n int) []time.Time {
	out := make([]time.Time, n)
	for i := range out {
		out[i] = from.AddDate(0, 0, i)
	}
	return out
}

func encode(t *testing.T, c Columns, dates []time.Time) *features.Table {
	t.Helper()
	e, err := c.Learn(dates)
	if err != nil {
		t.Fatal(err)
	}
	tab, err := features.Apply(e, dates)
	if err != nil {
		t.Fatal(err)
	}
	return tab
}

func col(t *testing.T, tab *features.Table, name string) []float64 {
	t.Helper()
	v, ok := tab.Lookup(name)
	if !ok {
		t.Fatalf("no column %q in %q", name, tab.Names())
	}
	return v
}

func TestSlug(t *testing.T) {
	for _, tt := range []struct{ name, in, want string }{
		{"apostrophe", "New Year's Day", "new_years_day"},
		{"curly apostrophe", "New Year’s Day", "new_years_day"},
		{"French accents", "Fête du Travail", "fete_du_travail"},
		{"French", "Lundi de Pâques", "lundi_de_paques"},
		{"German sharp s", "Buß- und Bettag", "buss_und_bettag"},
		{"Danish", "Store bededag Ø", "store_bededag_o"},
		{"Greek, letter by letter", "Δευτέρα του Πάσχα", "deytera_toy_pascha"},
		{"Cyrillic", "День праці", "den_pratsi"},
		{"combined code", "AU-NSW: Labour Day", "au_nsw_labour_day"},
		{"punctuation runs", "  Martin Luther King Jr. Day ", "martin_luther_king_jr_day"},
		{"leading digit", "1. Mai", "h_1_mai"},
		{"Thai gets a hash", "วันจักรี", "h_" + Slug("วันจักรี")[2:]},
	} {
		t.Run(tt.name, func(t *testing.T) {
			if got := Slug(tt.in); got != tt.want {
				t.Errorf("Slug(%q) = %q, want %q", tt.in, got, tt.want)
			}
		})
	}
	th := Slug("วันจักรี")
	if len(th) != len("h_")+8 || Slug("วันแม่แห่งชาติ") == th {
		t.Errorf("Thai slugs %q and %q: want h_ and 8 distinct hex digits", th, Slug("วันแม่แห่งชาติ"))
	}
}

func TestLearnErrors(t *testing.T) {
	gb := mustCountry(t, "GB")
	ok := []time.Time{d(2024, 1, 1)}
	for _, tt := range []struct {
		name  string
		c     Columns
		dates []time.Time
		want  error
		msg   string
	}{
		{"no calendar", Columns{}, ok, ErrColumns, "no calendar"},
		{"negative window", Columns{Calendar: gb, Each: Parts{Before: -1}}, ok, ErrColumns, "Each.Before is -1"},
		{"negative horizon", Columns{Calendar: gb, Any: Parts{Until: -7}}, ok, ErrColumns, "Any.Until is -7"},
		{"unknown name", Columns{Calendar: gb, Names: []string{"Thanksgiving Day"}}, ok, ErrColumns, `no holiday named "Thanksgiving Day"`},
		{"name twice", Columns{Calendar: gb, Names: []string{"Boxing Day", "Boxing Day"}}, ok, ErrColumns, "named twice"},
		{"empty calendar", Columns{Calendar: plain{}}, ok, ErrEmpty, "no holidays"},
		{"empty selection", Columns{Calendar: gb, Names: []string{}}, ok, ErrEmpty, "selects no holidays"},
		{"date too early", Columns{Calendar: gb}, []time.Time{d(2024, 1, 1), d(1899, 12, 31)}, ErrOutOfRange, "row 2: date 1899-12-31"},
		{"clashing column names", Columns{Calendar: plain{
			{Name: "Fête", Date: d(2024, 6, 1), Observed: d(2024, 6, 1)},
			{Name: "Fete", Date: d(2024, 7, 1), Observed: d(2024, 7, 1)},
		}}, ok, ErrColumns, `both named "fete"`},
	} {
		t.Run(tt.name, func(t *testing.T) {
			_, err := tt.c.Learn(tt.dates)
			if !errors.Is(err, tt.want) || !strings.Contains(err.Error(), tt.msg) {
				t.Errorf("got %v, want %v containing %q", err, tt.want, tt.msg)
			}
		})
	}
}

func TestEncodeErrors(t *testing.T) {
	e, err := Columns{Calendar: mustCountry(t, "GB")}.Learn(nil)
	if err != nil {
		t.Fatal(err)
	}
	_, err = features.Apply(e, []time.Time{d(2024, 1, 1), d(2024, 1, 2), d(2150, 1, 1)})
	var de *DateError
	if !errors.As(err, &de) || de.Row != 3 || !errors.Is(err, ErrOutOfRange) {
		t.Errorf("got %v, want a *DateError for row 3", err)
	}
	tab := features.NewTable(1)
	if err := e.Encode(tab, []time.Time{d(2024, 1, 1)}); err != nil {
		t.Fatal(err)
	}
	if err := e.Encode(tab, []time.Time{d(2024, 1, 1)}); err == nil || tab.Width() != len(e.Names()) {
		t.Errorf("encoding twice into one table: got %v and %d columns, want an error and %d", err, tab.Width(), len(e.Names()))
	}
}

// TestColumnsIndependentOfLearnRows: the columns are the calendar's, not
// those of the holidays that occur among the learning rows.
func TestColumnsIndependentOfLearnRows(t *testing.T) {
	c := Columns{Calendar: mustCountry(t, "GB"), Each: Parts{Indicator: true, Until: 30}, Any: Parts{Indicator: true}}
	a, err := c.Learn(days(d(1995, 3, 1), 10)) // no holiday at all
	if err != nil {
		t.Fatal(err)
	}
	b, err := c.Learn(days(d(2022, 9, 1), 60)) // holds the one-off funeral day
	if err != nil {
		t.Fatal(err)
	}
	if diff := cmp.Diff(a.Names(), b.Names()); diff != "" {
		t.Errorf("names depend on the learn rows (-first +second):\n%s", diff)
	}
	if !slices.Contains(a.Names(), "state_funeral_of_queen_elizabeth_ii") {
		t.Errorf("names %q lack the 2022 one-off", a.Names())
	}
}

func TestColumnNames(t *testing.T) {
	us := mustCountry(t, "US")
	e, err := Columns{Calendar: us, Names: []string{"Juneteenth", "Christmas Day"}, Prefix: "h_",
		Each: Parts{Indicator: true, Before: 2, After: 1, Until: 10, Since: 5},
		Any:  Parts{Indicator: true, Until: 30}, Bridge: true, Business: true}.Learn(nil)
	if err != nil {
		t.Fatal(err)
	}
	want := []string{
		// calendar order (first occurrence), not the order of Names
		"h_christmas_day", "h_christmas_day_before_2", "h_christmas_day_after_1", "h_christmas_day_days_until", "h_christmas_day_days_since",
		"h_juneteenth", "h_juneteenth_before_2", "h_juneteenth_after_1", "h_juneteenth_days_until", "h_juneteenth_days_since",
		"h_any_holiday", "h_any_holiday_days_until", "h_bridge_day", "h_business_day",
	}
	if diff := cmp.Diff(want, e.Names()); diff != "" {
		t.Errorf("(-want +got):\n%s", diff)
	}
	def, err := Columns{Calendar: us}.Learn(nil)
	if err != nil {
		t.Fatal(err)
	}
	if n := def.Names(); len(n) != 12 || n[len(n)-1] != "any_holiday" {
		t.Errorf("default columns %q, want 11 indicators and any_holiday", n)
	}
}

// TestColumnValues checks values around Christmas 2022 in England and
// Wales: Christmas Sunday 25 (observed Tuesday 27), Boxing Day Monday 26,
// New Year's Day Sunday 1 January 2023 (observed Monday 2).
func TestColumnValues(t *testing.T) {
	dates := days(d(2022, 12, 20), 16) // 20 Dec … 4 Jan
	gb := mustCountry(t, "GB")
	obs := encode(t, Columns{Calendar: gb, Names: []string{"Christmas Day", "New Year's Day"},
		Each: Parts{Indicator: true, After: 6, Until: 3, Since: 4},
		Any:  Parts{Indicator: true, Before: 1, Until: 100}, Bridge: true, Business: true}, dates)
	act := encode(t, Columns{Calendar: gb, Names: []string{"Christmas Day"}, Actual: true,
		Each: Parts{Indicator: true}}, dates)
	//             20 21 22 23 24 25 26 27 28 29 30 31  1  2  3  4
	for _, tt := range []struct {
		name string
		tab  *features.Table
		want []float64
	}{
		{"christmas_day", obs, []float64{0, 0, 0, 0, 0, 0, 0, 1, 0, 0, 0, 0, 0, 0, 0, 0}},
		{"christmas_day_after_6", obs, []float64{0, 0, 0, 0, 0, 0, 0, 0, 1, 1, 1, 1, 1, 1, 0, 0}},
		{"christmas_day_days_until", obs, []float64{3, 3, 3, 3, 3, 2, 1, 0, 3, 3, 3, 3, 3, 3, 3, 3}},
		{"christmas_day_days_since", obs, []float64{4, 4, 4, 4, 4, 4, 4, 0, 1, 2, 3, 4, 4, 4, 4, 4}},
		{"new_years_day", obs, []float64{0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 1, 0, 0}},
		// any = Christmas or New Year only (Names), on observed dates
		{"any_holiday", obs, []float64{0, 0, 0, 0, 0, 0, 0, 1, 0, 0, 0, 0, 0, 1, 0, 0}},
		{"any_holiday_before_1", obs, []float64{0, 0, 0, 0, 0, 0, 1, 0, 0, 0, 0, 0, 1, 0, 0, 0}},
		{"any_holiday_days_until", obs, []float64{7, 6, 5, 4, 3, 2, 1, 0, 5, 4, 3, 2, 1, 0, 100, 100}},
		// Bridge and business days use every day off (Boxing Day too).
		{"business_day", obs, []float64{1, 1, 1, 1, 0, 0, 0, 0, 1, 1, 1, 0, 0, 0, 1, 1}},
		{"bridge_day", obs, []float64{0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0}},
		{"christmas_day", act, []float64{0, 0, 0, 0, 0, 1, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0}},
	} {
		t.Run(tt.name, func(t *testing.T) {
			if diff := cmp.Diff(tt.want, col(t, tt.tab, tt.name)); diff != "" {
				t.Errorf("(-want +got):\n%s", diff)
			}
		})
	}
	// From 3 January 2023 the next of the two named holidays is Christmas
	// 2023, beyond the horizon of 100 days.
}

// TestBridgeDay: Ascension Day 2024 in Germany was Thursday 9 May, so
// Friday 10 May is a bridge day; 3 October 2023 (Tuesday) makes Monday
// 2 October one.
func TestBridgeDay(t *testing.T) {
	de := mustCountry(t, "DE")
	dates := []time.Time{d(2024, 5, 8), d(2024, 5, 9), d(2024, 5, 10), d(2024, 5, 13), d(2023, 10, 2), d(2023, 10, 4)}
	tab := encode(t, Columns{Calendar: de, Bridge: true, Business: true}, dates)
	if diff := cmp.Diff([]float64{0, 0, 1, 0, 1, 0}, col(t, tab, "bridge_day")); diff != "" {
		t.Errorf("bridge_day (-want +got):\n%s", diff)
	}
	if diff := cmp.Diff([]float64{1, 0, 1, 1, 1, 1}, col(t, tab, "business_day")); diff != "" {
		t.Errorf("business_day (-want +got):\n%s", diff)
	}
}

// TestDistancesAgainstNaive compares the table-driven columns with a
// direct computation from Holidays for random dates and for the first and
// last days covered.
func TestDistancesAgainstNaive(t *testing.T) {
	jp := mustCountry(t, "JP")
	r := rand.New(rand.NewPCG(1, 2))
	dates := make([]time.Time, 400)
	for i := range dates {
		dates[i] = d(MinYear, 1, 1).AddDate(0, 0, r.IntN(numDays-732))
	}
	// The first and last days covered, whose distances reach into the
	// extra years MinYear-1 and MaxYear+1 of the table.
	dates = append(dates, d(MinYear, 1, 1), d(MinYear, 1, 2), d(MinYear, 1, 3), d(MinYear, 3, 1),
		d(MaxYear, 11, 30), d(MaxYear, 12, 29), d(MaxYear, 12, 30), d(MaxYear, 12, 31))
	const h = 45
	tab := encode(t, Columns{Calendar: jp, Names: []string{"Vernal Equinox Day"}, Actual: true,
		Each: Parts{Indicator: true, Until: h, Since: h, Before: 9, After: 9}, Any: Parts{Indicator: true, Until: h}}, dates)
	every := encode(t, Columns{Calendar: jp, Any: Parts{Until: h, Since: h}}, dates)
	var eq, all []int
	for y := MinYear - 1; y <= MaxYear+1; y++ {
		for _, x := range jp.table().years[y-firstYear] {
			if x.Name == "Vernal Equinox Day" {
				eq = append(eq, dayOf(x.Date))
			}
			all = append(all, dayOf(x.Observed))
		}
	}
	slices.Sort(all)
	dist := func(set []int, z, dir int) float64 {
		for k := 0; k <= h; k++ {
			if slices.Contains(set, z+dir*k) {
				return float64(k)
			}
		}
		return h
	}
	for i, t0 := range dates {
		z := dayOf(t0)
		in := func(k0, k1, dir int) float64 {
			for k := k0; k <= k1; k++ {
				if slices.Contains(eq, z+dir*k) {
					return 1
				}
			}
			return 0
		}
		for _, c := range []struct {
			name string
			want float64
		}{
			{"vernal_equinox_day", in(0, 0, 1)},
			{"vernal_equinox_day_days_until", dist(eq, z, 1)},
			{"vernal_equinox_day_days_since", dist(eq, z, -1)},
			{"vernal_equinox_day_before_9", in(1, 9, 1)},
			{"vernal_equinox_day_after_9", in(1, 9, -1)},
			{"any_holiday_days_until", dist(eq, z, 1)},
		} {
			if got := col(t, tab, c.name)[i]; got != c.want {
				t.Errorf("%s on %s: got %v, want %v", c.name, t0.Format(time.DateOnly), got, c.want)
			}
		}
		for _, c := range []struct {
			name string
			want float64
		}{
			{"any_holiday_days_until", dist(all, z, 1)},
			{"any_holiday_days_since", dist(all, z, -1)},
		} {
			if got := col(t, every, c.name)[i]; got != c.want {
				t.Errorf("%s on %s: got %v, want %v", c.name, t0.Format(time.DateOnly), got, c.want)
			}
		}
	}
}

// TestLocation: a date's own location decides its civil day.
func TestLocation(t *testing.T) {
	tokyo := time.FixedZone("JST", 9*3600)
	instant := time.Date(2024, 7, 4, 23, 30, 0, 0, time.UTC)
	tab := encode(t, Columns{Calendar: mustCountry(t, "US"), Any: Parts{Indicator: true}},
		[]time.Time{instant, instant.In(tokyo)})
	if diff := cmp.Diff([]float64{1, 0}, col(t, tab, "any_holiday")); diff != "" {
		t.Errorf("(-want +got):\n%s", diff)
	}
}

// constant is a minimal features.Builder standing in for the calendar
// parts of package features.
type constant struct{}

func (constant) Learn([]time.Time) (features.Encoder, error) { return constant{}, nil }
func (constant) Names() []string                             { return []string{"intercept"} }
func (constant) Encode(dst *features.Table, dates []time.Time) error {
	v := make([]float64, len(dates))
	for i := range v {
		v[i] = 1
	}
	return dst.Append("intercept", v)
}

func TestJoin(t *testing.T) {
	b := features.Join(constant{}, Columns{Calendar: mustCountry(t, "FR"), Any: Parts{Indicator: true}})
	dates := []time.Time{d(2024, 5, 1), d(2024, 5, 2)}
	e, err := b.Learn(dates)
	if err != nil {
		t.Fatal(err)
	}
	tab, err := features.Apply(e, dates)
	if err != nil {
		t.Fatal(err)
	}
	if diff := cmp.Diff([]string{"intercept", "any_holiday"}, tab.Names()); diff != "" {
		t.Errorf("(-want +got):\n%s", diff)
	}
	if got := col(t, tab, "any_holiday"); got[0] != 1 || got[1] != 0 {
		t.Errorf("any_holiday = %v, want [1 0] (Fête du Travail on 1 May)", got)
	}
}

// TestConcurrent learns and encodes the same calendars from many
// goroutines (run with -race); every result must equal the serial one.
// JP exercises rickar/cal's vernal equinox function, which mutates the
// holiday it is called on; our copies keep that private. The calendars
// are made fresh so that their tables are built during the test.
func TestConcurrent(t *testing.T) {
	dates := days(d(2019, 1, 1), 800)
	mk := func() []Calendar {
		var out []Calendar
		for _, r := range regions {
			if r.code == "JP" || r.code == "GB" || r.code == "GR" {
				srcs := patch(r.code, snapshot(r.list))
				if r.code == "GR" {
					markOrthodox(srcs)
				}
				out = append(out, &Almanac{code: r.code, compute: func() [][]Holiday { return computeYears(srcs, firstYear, lastYear) }})
			}
		}
		return out
	}
	cfg := func(c Calendar) Columns {
		return Columns{Calendar: c, Each: Parts{Indicator: true, Until: 20}, Any: Parts{Indicator: true, Before: 3, Since: 9}, Bridge: true}
	}
	var want []*features.Table
	for _, c := range mk() {
		want = append(want, encode(t, cfg(c), dates))
	}
	cals := mk()
	var wg sync.WaitGroup
	got := make([]*features.Table, 4*len(cals))
	errs := make([]error, len(got))
	for i := range got {
		wg.Add(1)
		go func() {
			defer wg.Done()
			e, err := cfg(cals[i%len(cals)]).Learn(dates)
			if err == nil {
				got[i], err = features.Apply(e, dates)
			}
			errs[i] = err
		}()
	}
	wg.Wait()
	for i := range got {
		if errs[i] != nil {
			t.Fatal(errs[i])
		}
		w := want[i%len(cals)]
		for j := range w.Width() {
			if diff := cmp.Diff(w.Column(j), got[i].Column(j)); diff != "" {
				t.Fatalf("goroutine %d, column %s (-serial +concurrent):\n%s", i, w.Name(j), diff)
			}
		}
	}
}
