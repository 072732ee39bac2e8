package features_test

import (
	"testing"
	"time"

	"github.com/google/go-cmp/cmp"

	"github.com/kalends/kalends/features"
)

// opaque is a Builder that does not implement features.Adaptive.
type opaque struct{ features.Builder }

// TestAdapts checks which builders say they learn nothing from the dates,
// and, for those, the promise itself: the encoder learned from a few of the
// dates (with repeats) makes the same columns with the same values for all
// of them as the one learned from every date.
func TestAdapts(t *testing.T) {
	trend := &features.Trend{Origin: time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC), Unit: features.Days}
	fixedSet := features.Set{Parts: []features.Spec{{Part: features.Month, Encoding: features.Cyclic}, {Part: features.Weekday}}, Trend: trend, Date: true}
	levels := features.Set{Parts: []features.Spec{{Part: features.Weekday, Encoding: features.Indicator}}}
	tests := []struct {
		name string
		b    features.Builder
		want bool
	}{
		{"intercept", features.Intercept{}, false},
		{"set of numbers, cycles, trend and date", fixedSet, false},
		{"set with indicator columns", levels, true},
		{"join of fixed builders", features.Join(features.Intercept{}, fixedSet), false},
		{"join with an indicator part", features.Join(features.Intercept{}, levels), true},
		{"builder without the method", opaque{features.Intercept{}}, true},
		{"join with a builder without the method", features.Join(fixedSet, opaque{features.Intercept{}}), true},
	}
	all := make([]time.Time, 40)
	for i := range all {
		all[i] = time.Date(2023, 5, 1+2*i, 0, 0, 0, 0, time.UTC)
	}
	some := []time.Time{all[3], all[3], all[17]}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := features.Adapts(tt.b); got != tt.want {
				t.Fatalf("Adapts got %v, want %v", got, tt.want)
			}
			if tt.want {
				return
			}
			full, err := tt.b.Learn(all)
			if err != nil {
				t.Fatal(err)
			}
			part, err := tt.b.Learn(some)
			if err != nil {
				t.Fatal(err)
			}
			want, err := features.Apply(full, all)
			if err != nil {
				t.Fatal(err)
			}
			got, err := features.Apply(part, all)
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
		})
	}
}
