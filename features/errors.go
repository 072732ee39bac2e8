package features

import (
	"errors"
	"fmt"
	"strings"
	"time"
)

// Errors a [DateError] unwraps to.
var (
	// ErrZeroDate means a date was the zero time.Time, which almost always
	// marks a value that was never set.
	ErrZeroDate = errors.New("features: zero time.Time")
	// ErrYearRange means a date's civil year, in the location in use, is
	// outside 1..9999, the years this package supports.
	ErrYearRange = errors.New("features: year outside 1..9999")
	// ErrUnseenLevel means an indicator part took a level on a date that
	// Learn never saw, and [Set.ZeroUnseen] was not set.
	ErrUnseenLevel = errors.New("features: level not seen by Learn")
)

// DateError reports a date that could not be encoded.
type DateError struct {
	Row  int       // 1-based position of the date in the slice given
	Date time.Time // the date as given
	Err  error     // ErrZeroDate, ErrYearRange or ErrUnseenLevel, wrapped with detail
}

// Error returns a message naming the row, the date and the trouble.
func (e *DateError) Error() string {
	return fmt.Sprintf("features: row %d (%s): %s", e.Row, e.Date.Format(time.RFC3339Nano),
		strings.TrimPrefix(e.Err.Error(), "features: "))
}

// Unwrap returns e.Err.
func (e *DateError) Unwrap() error { return e.Err }
