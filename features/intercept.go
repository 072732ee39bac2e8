package features

import "time"

// Intercept is a [Builder] of one column of ones, named "intercept". The
// estimators of package fit add no intercept of their own, so a design
// that wants one joins Intercept to its other builders:
//
//	features.Join(features.Intercept{}, calendar, holidays)
//
// Intercept learns nothing; its zero value is ready to use and safe for
// concurrent use.
type Intercept struct{}

// InterceptName is the name of the column [Intercept] makes.
const InterceptName = "intercept"

// Learn returns the encoder of the intercept column. It never fails.
func (Intercept) Learn([]time.Time) (Encoder, error) { return Intercept{}, nil }

// Names returns the one column name, [InterceptName].
func (Intercept) Names() []string { return []string{InterceptName} }

// Encode appends a column of ones, one per date, to dst.
func (Intercept) Encode(dst *Table, dates []time.Time) error {
	ones := make([]float64, len(dates))
	for i := range ones {
		ones[i] = 1
	}
	return dst.Append(InterceptName, ones)
}
