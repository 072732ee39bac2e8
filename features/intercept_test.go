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

// failing is an encoder that always fails, to check that a joined encoder
// leaves dst unchanged when a later member fails.
type failing struct{}

func (failing) Learn([]time.Time) (features.Encoder, error) { return failing{}, nil }
func (failing) Names() []string                             { return []string{"never"} }
func (failing) Encode(*features.Table, []time.Time) error {
	return fmt.Errorf("failing: no columns")
}

func TestJoinEncodeLeavesDstOnError(t *testing.T) {
	dates := []time.Time{time.Date(2024, 5, 2, 0, 0, 0, 0, time.UTC)}
	enc, err := features.Join(features.Intercept{}, failing{}).Learn(dates)
	if err != nil {
		t.Fatal(err)
	}
	dst := features.NewTable(1)
	if err := enc.Encode(dst, dates); err == nil {
		t.Fatal("got no error from a failing member")
	}
	if dst.Width() != 0 {
		t.Errorf("dst has %d columns %v after a failed Encode, want none", dst.Width(), dst.Names())
	}
}
