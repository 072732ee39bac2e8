package holiday_test

import (
	"strings"
	"testing"
	"time"

	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/holiday"
)

// A table of the wrong row count is a caller bug: Encode panics, as the
// features encoders do, with the package prefix.
func TestEncodeRowMismatchPanics(t *testing.T) {
	gb, err := holiday.Country("GB")
	if err != nil {
		t.Fatal(err)
	}
	enc, err := holiday.Columns{Calendar: gb}.Learn(nil)
	if err != nil {
		t.Fatal(err)
	}
	dst := features.NewTable(3)
	if err := dst.Append("x", []float64{1, 2, 3}); err != nil {
		t.Fatal(err)
	}
	defer func() {
		r := recover()
		msg, _ := r.(string)
		if !strings.HasPrefix(msg, "holiday: ") {
			t.Errorf("recovered %v, want a panic starting \"holiday: \"", r)
		}
	}()
	_ = enc.Encode(dst, []time.Time{time.Date(2024, 1, 1, 0, 0, 0, 0, time.UTC)})
	t.Error("Encode returned; want a panic")
}
