package features_test

import (
	"fmt"
	"testing"
	"time"

	"github.com/kalends/kalends/features"
)

func TestIntercept(t *testing.T) {
	dates := []time.Time{
		time.Date(2024, 1, 4, 20, 0, 0, 0, time.UTC),
		time.Date(2024, 1, 11, 20, 0, 0, 0, time.UTC),
		time.Date(2024, 1, 18, 20, 0, 0, 0, time.UTC),
	}
	enc, err := features.Join(features.Intercept{}, features.Set{Parts: []features.Spec{{Part: features.Year}}}).Learn(dates)
	if err != nil {
		t.Fatal(err)
	}
	tab, err := features.Apply(enc, dates)
	if err != nil {
		t.Fatal(err)
	}
	if got := tab.Name(0); got != features.InterceptName {
		t.Fatalf("first column %q, want %q", got, features.InterceptName)
	}
	for i, v := range tab.Column(0) {
		if v != 1 {
			t.Errorf("row %d: intercept %v, want 1", i+1, v)
		}
	}
	if _, err := features.Join(features.Intercept{}, features.Intercept{}).Learn(dates); err == nil {
		t.Error("joining two intercepts: got no error, want a duplicate-name error")
	}
}

func ExampleIntercept() {
	dates := []time.Time{
		time.Date(2024, 3, 7, 20, 0, 0, 0, time.UTC),
		time.Date(2024, 3, 14, 20, 0, 0, 0, time.UTC),
	}
	design := features.Join(features.Intercept{}, features.Set{Parts: []features.Spec{{Part: features.Month}}})
	enc, err := design.Learn(dates)
	if err != nil {
		panic(err)
	}
	fmt.Println(enc.Names())
	// Output: [intercept month]
}
