package features_test

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/google/go-cmp/cmp"
	"github.com/kalends/kalends/features"
)

func marshalDay(y int, m time.Month, d int) time.Time {
	return time.Date(y, m, d, 0, 0, 0, 0, time.UTC)
}

// everyDays returns n dates, one every step days from start.
func everyDays(start time.Time, n, step int) []time.Time {
	out := make([]time.Time, n)
	for i := range out {
		out[i] = start.AddDate(0, 0, i*step)
	}
	return out
}

// sameEncoding reports the first difference between two encoders applied
// to dates: names, errors, or a value that is not bit-identical.
func sameEncoding(t *testing.T, want, got features.Encoder, dates []time.Time) {
	t.Helper()
	if diff := cmp.Diff(want.Names(), got.Names()); diff != "" {
		t.Fatalf("names (-want +got):\n%s", diff)
	}
	wt, werr := features.Apply(want, dates)
	gt, gerr := features.Apply(got, dates)
	if (werr == nil) != (gerr == nil) || (werr != nil && werr.Error() != gerr.Error()) {
		t.Fatalf("Apply error: got %v, want %v", gerr, werr)
	}
	if werr != nil {
		return
	}
	for j := range wt.Width() {
		for i := range wt.Rows() {
			if a, b := wt.At(i, j), gt.At(i, j); math.Float64bits(a) != math.Float64bits(b) {
				t.Fatalf("row %d, column %q: got %v, want %v", i+1, wt.Name(j), b, a)
			}
		}
	}
}

func TestMarshalEncoderRoundTrip(t *testing.T) {
	ny, err := time.LoadLocation("America/New_York")
	if err != nil {
		t.Skipf("no time zone database: %v", err)
	}
	gappy := []time.Time{marshalDay(2023, 1, 9), marshalDay(2023, 3, 14), marshalDay(2024, 5, 1), marshalDay(2024, 11, 30)}
	indicators := features.Set{Parts: []features.Spec{
		{Part: features.Month, Encoding: features.Indicator, Reference: "March"},
		{Part: features.Weekday, Encoding: features.Indicator},
		{Part: features.Year, Encoding: features.Indicator, Reference: "2024"},
		{Part: features.ISOWeek, Encoding: features.Indicator},
		{Part: features.DaysInMonth, Encoding: features.Indicator},
	}, Location: time.UTC}
	zeroUnseen := indicators
	zeroUnseen.ZeroUnseen = true
	numbers := features.Set{Parts: []features.Spec{
		{Part: features.Year},
		{Part: features.Quarter, Encoding: features.Cyclic},
		{Part: features.Day, Encoding: features.Cyclic},
		{Part: features.YearDay, Encoding: features.Cyclic},
		{Part: features.ISOWeek, Encoding: features.Cyclic},
		{Part: features.Weekend},
		{Part: features.MonthEnd},
		{Part: features.ISOYear},
	}, Date: true, Location: time.UTC}
	zoned := features.Set{
		Parts:    []features.Spec{{Part: features.Weekday, Encoding: features.Cyclic}},
		Trend:    &features.Trend{Origin: time.Date(2023, 7, 15, 13, 30, 0, 0, ny), Unit: features.Years},
		Date:     true,
		Location: ny,
	}
	ownZones := features.Set{
		Parts: []features.Spec{{Part: features.Month, Encoding: features.Indicator}},
		Trend: &features.Trend{Origin: time.Date(2020, 2, 29, 6, 0, 0, 0, time.FixedZone("A", 3600)), Unit: features.Days},
	}
	trendOnly := features.Set{Trend: &features.Trend{Origin: marshalDay(2000, 1, 1), Unit: features.Years}, Location: time.UTC}
	apply := append(everyDays(marshalDay(2023, 1, 1), 120, 5), time.Date(2024, 3, 10, 1, 59, 0, 0, ny), time.Date(2024, 3, 10, 3, 1, 0, 0, ny))
	for _, tc := range []struct {
		name         string
		b            features.Builder
		learn, apply []time.Time
	}{
		{name: "indicators with gaps, unseen level an error", b: indicators, learn: gappy, apply: apply},
		{name: "indicators with gaps, seen levels only", b: indicators, learn: gappy, apply: gappy},
		{name: "indicators, unseen levels zero", b: zeroUnseen, learn: gappy, apply: apply},
		{name: "numbers, flags, cyclic and date", b: numbers, learn: gappy, apply: apply},
		{name: "trend in years in a named zone", b: zoned, learn: gappy, apply: apply},
		{name: "trend in days, each date's own zone", b: ownZones, learn: everyDays(marshalDay(2023, 1, 1), 400, 1), apply: apply},
		{name: "trend only", b: trendOnly, learn: gappy, apply: apply},
		{name: "join", b: features.Join(indicators, features.Join(trendOnly, numbers)), learn: everyDays(marshalDay(2023, 1, 1), 800, 1), apply: apply},
	} {
		t.Run(tc.name, func(t *testing.T) {
			want, err := tc.b.Learn(tc.learn)
			if err != nil {
				t.Fatal(err)
			}
			data, err := features.MarshalEncoder(want)
			if err != nil {
				t.Fatal(err)
			}
			got, err := features.UnmarshalEncoder(data)
			if err != nil {
				t.Fatalf("UnmarshalEncoder: %v\n%s", err, data)
			}
			sameEncoding(t, want, got, tc.apply)
			again, err := features.MarshalEncoder(got)
			if err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(again, data) {
				t.Errorf("second round trip changed the JSON:\n%s\nwant\n%s", again, data)
			}
		})
	}
}

// goldenSet is the Set behind testdata/encoder_v1.json.
var goldenSet = features.Set{
	Parts: []features.Spec{
		{Part: features.Weekday, Encoding: features.Indicator, Reference: "Tuesday"},
		{Part: features.Month, Encoding: features.Cyclic},
	},
	Trend:    &features.Trend{Origin: marshalDay(2024, 1, 1), Unit: features.Years},
	Location: time.UTC,
}

// TestEncoderFormatV1 pins version 1 of the format: the writer's output,
// and what a reader makes of a stored file.
func TestEncoderFormatV1(t *testing.T) {
	path := filepath.Join("testdata", "encoder_v1.json")
	stored, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	// Learned on Tuesday 2 to Sunday 7 January 2024 and Thursday 7 March
	// 2024: no Monday.
	enc, err := goldenSet.Learn(append(everyDays(marshalDay(2024, 1, 2), 6, 1), marshalDay(2024, 3, 7)))
	if err != nil {
		t.Fatal(err)
	}
	data, err := features.MarshalEncoder(enc)
	if err != nil {
		t.Fatal(err)
	}
	if diff := cmp.Diff(string(stored), string(data)+"\n"); diff != "" {
		t.Errorf("MarshalEncoder output differs from %s (-stored +got):\n%s", path, diff)
	}
	dec, err := features.UnmarshalEncoder(stored)
	if err != nil {
		t.Fatal(err)
	}
	// 1 March 2024 was a Friday; Tuesday 2 July 2024 is day 184 of the
	// leap year 2024, so the trend in years from 1 January is 183/366 =
	// 0.5; month 7 has angle 2π·6/12 = π (sin 0, cos −1).
	tab, err := features.Apply(dec, []time.Time{marshalDay(2024, 3, 1), marshalDay(2024, 7, 2)})
	if err != nil {
		t.Fatal(err)
	}
	wantNames := []string{"weekday=Wednesday", "weekday=Thursday", "weekday=Friday", "weekday=Saturday", "weekday=Sunday",
		"month.sin", "month.cos", "trend.years"}
	if diff := cmp.Diff(wantNames, tab.Names()); diff != "" {
		t.Fatalf("names (-want +got):\n%s", diff)
	}
	for _, c := range []struct {
		name      string
		row       int
		col       string
		want, tol float64
	}{
		{name: "Friday indicator on a Friday", row: 0, col: "weekday=Friday", want: 1},
		{name: "Wednesday indicator on a Friday", row: 0, col: "weekday=Wednesday", want: 0},
		{name: "Tuesday (the reference) has no column", row: 1, col: "weekday=Sunday", want: 0},
		{name: "trend on 2 July 2024", row: 1, col: "trend.years", want: 0.5, tol: 1e-15},
		{name: "month.sin in July", row: 1, col: "month.sin", want: 0, tol: 1e-15},
		{name: "month.cos in July", row: 1, col: "month.cos", want: -1, tol: 1e-15},
	} {
		got := tab.Column(tab.Index(c.col))[c.row]
		if math.Abs(got-c.want) > c.tol {
			t.Errorf("%s: got %v, want %v (tolerance %g)", c.name, got, c.want, c.tol)
		}
	}
	// 1 July 2024 is a Monday, which Learn never saw.
	if _, err := features.Apply(dec, []time.Time{marshalDay(2024, 7, 1)}); err == nil || !errors.Is(err, features.ErrUnseenLevel) {
		t.Errorf("Monday: got error %v, want one wrapping ErrUnseenLevel", err)
	}
}

type foreignEncoder struct{}

func (foreignEncoder) Names() []string                                 { return []string{"x"} }
func (foreignEncoder) Encode(dst *features.Table, _ []time.Time) error { return nil }

func TestMarshalEncoderErrors(t *testing.T) {
	learn := func(s features.Set) features.Encoder {
		e, err := s.Learn([]time.Time{marshalDay(2024, 1, 1)})
		if err != nil {
			t.Fatal(err)
		}
		return e
	}
	month := []features.Spec{{Part: features.Month}}
	for _, tc := range []struct {
		name string
		e    features.Encoder
		want string
	}{
		{name: "local time", e: learn(features.Set{Parts: month, Location: time.Local}), want: "time.Local"},
		{name: "fixed zone", e: learn(features.Set{Parts: month, Location: time.FixedZone("UTC+5", 5*3600)}), want: `"UTC+5" cannot be loaded`},
		{name: "foreign encoder", e: foreignEncoder{}, want: "features_test.foreignEncoder"},
		{name: "foreign encoder in a join", e: mustLearn(t, features.Join(features.Set{Parts: month}, builderOf{foreignEncoder{}})), want: "foreignEncoder"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := features.MarshalEncoder(tc.e)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("got error %v, want one containing %q", err, tc.want)
			}
		})
	}
}

type builderOf struct{ e features.Encoder }

func (b builderOf) Learn([]time.Time) (features.Encoder, error) { return b.e, nil }

func mustLearn(t *testing.T, b features.Builder) features.Encoder {
	t.Helper()
	e, err := b.Learn([]time.Time{marshalDay(2024, 1, 1)})
	if err != nil {
		t.Fatal(err)
	}
	return e
}

func TestUnmarshalEncoderErrors(t *testing.T) {
	good, err := os.ReadFile(filepath.Join("testdata", "encoder_v1.json"))
	if err != nil {
		t.Fatal(err)
	}
	if _, err := features.UnmarshalEncoder(good); err != nil {
		t.Fatalf("the stored file: %v", err)
	}
	edit := func(old, new string) string {
		if !strings.Contains(string(good), old) {
			t.Fatalf("%q not in the stored file", old)
		}
		return strings.Replace(string(good), old, new, 1)
	}
	for _, tc := range []struct {
		name, data, want string
	}{
		{name: "not JSON", data: "{", want: "unexpected end"},
		{name: "other format", data: edit(`"kalends features encoder"`, `"something else"`), want: `format "something else"`},
		{name: "version 2", data: edit(`"version": 1`, `"version": 2`), want: "version 2, this build reads version 1"},
		{name: "no version", data: edit(`"version": 1,`, ``), want: "version 0"},
		{name: "unknown member", data: edit(`"kind": "calendar",`, `"kind": "calendar", "holidays": true,`), want: `unknown field "holidays"`},
		{name: "unknown kind", data: edit(`"kind": "calendar"`, `"kind": "lunar"`), want: `unknown kind "lunar"`},
		{name: "no location", data: edit(`"location": "UTC",`, ``), want: "no location"},
		{name: "unknown location", data: edit(`"location": "UTC"`, `"location": "Nowhere/Atlantis"`), want: "location"},
		{name: "unknown part", data: edit(`"part": "weekday"`, `"part": "dayofweek"`), want: `unknown part "dayofweek"`},
		{name: "unknown encoding", data: edit(`"encoding": "cyclic"`, `"encoding": "spline"`), want: `unknown encoding "spline"`},
		{name: "unknown level", data: edit(`"Wednesday"`, `"Wednesdays"`), want: `"Wednesdays" is not a level of weekday`},
		{name: "levels out of order", data: edit(`"Wednesday",`, `"Thursday", "Wednesday",`), want: "ascending"},
		{name: "reference among levels", data: edit(`"Wednesday",`, `"Tuesday", "Wednesday",`), want: `reference "Tuesday" also listed`},
		{name: "bad reference", data: edit(`"reference": "Tuesday"`, `"reference": "Someday"`), want: "Someday"},
		{name: "levels on a cyclic part", data: edit(`"encoding": "cyclic"`, `"encoding": "cyclic", "levels": ["1"]`), want: "levels given for cyclic"},
		{name: "unknown trend unit", data: edit(`"unit": "years"`, `"unit": "weeks"`), want: `unknown unit "weeks"`},
		{name: "columns do not match", data: edit(`"trend.years"`, `"trend.days"`), want: "do not match"},
		{name: "trailing data", data: string(good) + "{}", want: "after top-level value"},
		{name: "null encoder", data: `{"format": "kalends features encoder", "version": 1, "encoder": null}`, want: "no encoder"},
		{name: "empty join", data: `{"format": "kalends features encoder", "version": 1, "encoder": {"kind": "join"}}`, want: "no members"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			e, err := features.UnmarshalEncoder([]byte(tc.data))
			if err == nil {
				t.Fatalf("got encoder %v and no error, want an error containing %q", e, tc.want)
			}
			if !errors.Is(err, features.ErrEncoderFormat) || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("got error %v, want one wrapping ErrEncoderFormat containing %q", err, tc.want)
			}
		})
	}
}

func TestUnmarshalJoinDuplicateColumn(t *testing.T) {
	e := mustLearn(t, features.Set{Parts: []features.Spec{{Part: features.Month}}, Location: time.UTC})
	one, err := features.MarshalEncoder(e)
	if err != nil {
		t.Fatal(err)
	}
	// Splice the calendar twice into a join by hand.
	_, member, _ := strings.Cut(string(one), `"encoder": `)
	member = strings.TrimSuffix(strings.TrimSpace(member), "}")
	data := `{"format": "kalends features encoder", "version": 1, "encoder": {"kind": "join", "members": [` + member + `,` + member + `]}}`
	if _, err := features.UnmarshalEncoder([]byte(data)); err == nil || !strings.Contains(err.Error(), `column "month" made twice`) {
		t.Errorf("got error %v, want one naming the duplicate column", err)
	}
}

// A learned feature set is serialised on one machine and applied on
// another: the columns are the same, bit for bit.
func ExampleMarshalEncoder() {
	set := features.Set{
		Parts:    []features.Spec{{Part: features.Weekday, Encoding: features.Indicator, Reference: "Tuesday"}},
		Trend:    &features.Trend{Origin: time.Date(2024, 1, 1, 0, 0, 0, 0, time.UTC), Unit: features.Days},
		Location: time.UTC,
	}
	// A theatre dark on Mondays: Learn sees Tuesday to Sunday only.
	var seen []time.Time
	for d := 2; d <= 7; d++ {
		seen = append(seen, time.Date(2024, 1, d, 0, 0, 0, 0, time.UTC))
	}
	enc, err := set.Learn(seen)
	if err != nil {
		fmt.Println(err)
		return
	}
	data, err := features.MarshalEncoder(enc)
	if err != nil {
		fmt.Println(err)
		return
	}
	// ... data travels to a worker ...
	dec, err := features.UnmarshalEncoder(data)
	if err != nil {
		fmt.Println(err)
		return
	}
	tab, err := features.Apply(dec, []time.Time{time.Date(2024, 2, 10, 0, 0, 0, 0, time.UTC)})
	if err != nil {
		fmt.Println(err)
		return
	}
	for j := range tab.Width() {
		fmt.Printf("%s=%g\n", tab.Name(j), tab.At(0, j))
	}
	// Output:
	// weekday=Wednesday=0
	// weekday=Thursday=0
	// weekday=Friday=0
	// weekday=Saturday=1
	// weekday=Sunday=0
	// trend.days=40
}
