package fit

import (
	"errors"
	"fmt"
)

// Sentinel errors. Errors returned by this package wrap one of them, so
// callers can test with [errors.Is].
var (
	// ErrSingular reports a design whose estimable part is too badly
	// conditioned to solve. A *ConditionError unwraps to it.
	ErrSingular = errors.New("fit: singular design")
	// ErrNoConvergence reports an iterative fit that stopped before
	// converging. A *ConvergenceError unwraps to it.
	ErrNoConvergence = errors.New("fit: no convergence")
	// ErrSeparation reports perfect or quasi-perfect separation in a
	// binomial GLM: some coefficients run off to infinity.
	ErrSeparation = errors.New("fit: perfect separation")
	// ErrBadValue reports a NaN or infinite value, or a value outside the
	// domain of the estimator, in the design, outcome or weights. A
	// *DataError unwraps to it.
	ErrBadValue = errors.New("fit: bad value")
	// ErrTooFewRows reports fewer usable rows than estimable coefficients.
	ErrTooFewRows = errors.New("fit: too few rows")

	// errStandardization reports an inconsistent Standardization
	// (NewAccumulator wraps it together with ErrBadValue).
	errStandardization = errors.New("fit: invalid standardization")
	// errAccumulator reports accumulators that cannot be merged or
	// decoded.
	errAccumulator = errors.New("fit: accumulator")
)

// ConditionError reports a design too badly conditioned to solve, with the
// estimated condition number of its estimable part. It unwraps to
// [ErrSingular].
//
// Errors of this type are not modified after they are returned and are
// safe to read concurrently; the zero value carries no condition number.
type ConditionError struct {
	Cond float64
}

// Error reads "fit: singular design (condition C)".
func (e *ConditionError) Error() string {
	return fmt.Sprintf("fit: singular design (condition %.2g)", e.Cond)
}

// Unwrap returns [ErrSingular].
func (e *ConditionError) Unwrap() error { return ErrSingular }

// ConvergenceError reports an iterative fit that did not converge, with the
// state at the stop. It unwraps to [ErrNoConvergence].
//
// Errors of this type are not modified after they are returned and are
// safe to read concurrently; the zero value carries no state.
type ConvergenceError struct {
	Iter   int     // iterations run
	Change float64 // relative change in deviance at the last iteration
}

// Error gives the iterations run and the last relative change.
func (e *ConvergenceError) Error() string {
	return fmt.Sprintf("fit: no convergence after %d iterations (relative change %.3g)", e.Iter, e.Change)
}

// Unwrap returns [ErrNoConvergence].
func (e *ConvergenceError) Unwrap() error { return ErrNoConvergence }

// DataError reports a bad value in the input of a fit. Row and Column are
// 1-based; Column is 0 for the outcome or the weights, which Name then names.
//
// Errors of this type are not modified after they are returned and are
// safe to read concurrently; the zero value names no row and has a nil
// reason.
type DataError struct {
	Row    int     // 1-based row
	Column int     // 1-based design column, 0 if the value is not in the design
	Name   string  // column name where known, or "outcome" / "weights"
	Value  float64 // the offending value
	Err    error   // the reason; wraps ErrBadValue
}

// Error names the row, the column and the value, then the reason.
func (e *DataError) Error() string {
	where := e.Name
	if where == "" {
		where = fmt.Sprintf("column %d", e.Column)
	}
	return fmt.Sprintf("fit: row %d, %s: value %v: %v", e.Row, where, e.Value, e.Err)
}

// Unwrap returns the reason.
func (e *DataError) Unwrap() error { return e.Err }
