package resample

import (
	"errors"
	"strconv"
)

// Sentinel errors returned, wrapped in an [*InputError], for data problems.
var (
	// ErrNoRows means a plan was asked for zero rows.
	ErrNoRows = errors.New("resample: no rows")
	// ErrLength means a column (labels, values, keys, series) does not have
	// one entry per row.
	ErrLength = errors.New("resample: column length does not match the rows")
	// ErrBadValue means a column holds a value that cannot be used, such as
	// NaN in a numeric stratifying column.
	ErrBadValue = errors.New("resample: bad value")
	// ErrTooFewRows means a setting needs more rows than the data has: a
	// block longer than the series, more folds than rows, a rolling window
	// longer than the data.
	ErrTooFewRows = errors.New("resample: too few rows")
)

// InputError reports a data problem found while checking a scheme against
// the data. It unwraps to one of [ErrNoRows], [ErrLength], [ErrBadValue] or
// [ErrTooFewRows], so errors.Is works.
type InputError struct {
	// Option names the setting or column at fault, such as "KFold.K" or
	// "Quantiles.Values".
	Option string
	// Row is the 1-based row at fault, or 0 when no single row is.
	Row int
	// Detail says what was wrong, in a few words.
	Detail string
	// Err is the sentinel.
	Err error
}

// Error returns "resample: <option>[ row <row>]: <detail>".
func (e *InputError) Error() string {
	s := "resample: " + e.Option
	if e.Row > 0 {
		s += " row " + strconv.Itoa(e.Row)
	}
	return s + ": " + e.Detail
}

// Unwrap returns the sentinel.
func (e *InputError) Unwrap() error { return e.Err }
