package holiday_test

import (
	"testing"
	"time"

	"github.com/google/go-cmp/cmp"

	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/holiday"
)

// TestColumnsAdaptive checks that holiday columns say they learn nothing
// from the dates and keep that promise: learned from two dates with no
// holiday among them, they encode a year of dates exactly as when learned
// from the whole year.
func TestColumnsAdaptive(t *testing.T) {
	gb, err := holiday.Country("GB")
	if err != nil {
		t.Fatal(err)
	}
	c := holiday.Columns{Calendar: gb, Any: holiday.Parts{Indicator: true, Before: 2, Until: 10}, Bridge: true}
	if features.Adapts(c) {
		t.Fatal("Adapts(Columns) got true, want false")
	}
	year := make([]time.Time, 365)
	for i := range year {
		year[i] = time.Date(2024, 1, 1+i, 0, 0, 0, 0, time.UTC)
	}
	full, err := c.Learn(year)
	if err != nil {
		t.Fatal(err)
	}
	part, err := c.Learn([]time.Time{year[40], year[40], year[41]})
	if err != nil {
		t.Fatal(err)
	}
	want, err := features.Apply(full, year)
	if err != nil {
		t.Fatal(err)
	}
	got, err := features.Apply(part, year)
	if err != nil {
		t.Fatal(err)
	}
	if diff := cmp.Diff(want.Names(), got.Names()); diff != "" {
		t.Fatalf("names (-full +subset):\n%s", diff)
	}
	for j := range want.Width() {
		if diff := cmp.Diff(want.Column(j), got.Column(j)); diff != "" {
			t.Errorf("column %q (-full +subset):\n%s", want.Name(j), diff)
		}
	}
}
