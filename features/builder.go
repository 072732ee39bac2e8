package features

import (
	"fmt"
	"time"
)

// Builder describes columns to be made from dates. Learn takes whatever
// state the columns need (the levels seen, a scale) from the dates it is
// given and returns an [Encoder] that applies that state unchanged to any
// other dates. A resampling run calls Learn on each replicate's in-bag rows
// and applies the result to its out-of-bag rows, so nothing leaks from the
// rows a replicate holds out.
//
// Learn must not modify dates and must be safe to call from several
// goroutines at once. The calendar parts of this package ([Set]) and the
// holiday columns of package holiday are Builders, and [Join] composes any
// number of them into one design.
type Builder interface {
	Learn(dates []time.Time) (Encoder, error)
}

// Encoder makes learned columns. Names lists the columns it makes, in
// order; Encode appends exactly those columns, one value per date, to dst,
// whose row count must equal len(dates).
//
// An Encoder is immutable once learned and safe for concurrent use by many
// goroutines (a service answering prediction requests may share one).
// Encode must not modify dates. It returns an error naming the row (1-based)
// and the value for a date it cannot encode.
type Encoder interface {
	Names() []string
	Encode(dst *Table, dates []time.Time) error
}

// Apply encodes dates into a new table with e's columns.
func Apply(e Encoder, dates []time.Time) (*Table, error) {
	t := NewTable(len(dates))
	if err := e.Encode(t, dates); err != nil {
		return nil, err
	}
	return t, nil
}

// Join returns a Builder whose columns are those of bs in order. Learn
// fails if two of them make a column with the same name. The joined
// encoder's Encode leaves dst unchanged when any member fails.
func Join(bs ...Builder) Builder { return joined(bs) }

type joined []Builder

func (js joined) Learn(dates []time.Time) (Encoder, error) {
	es := make(joinedEncoder, len(js))
	seen := make(map[string]int)
	for k, b := range js {
		e, err := b.Learn(dates)
		if err != nil {
			return nil, err
		}
		for _, name := range e.Names() {
			if prev, dup := seen[name]; dup {
				return nil, fmt.Errorf("features: join: column %q made by builders %d and %d", name, prev+1, k+1)
			}
			seen[name] = k
		}
		es[k] = e
	}
	return es, nil
}

type joinedEncoder []Encoder

func (es joinedEncoder) Names() []string {
	var names []string
	for _, e := range es {
		names = append(names, e.Names()...)
	}
	return names
}

// Encode appends the members' columns in order. The columns are made in a
// staging table first, so on error dst is left unchanged.
func (es joinedEncoder) Encode(dst *Table, dates []time.Time) error {
	stage := NewTable(len(dates))
	for _, e := range es {
		if err := e.Encode(stage, dates); err != nil {
			return err
		}
	}
	return dst.Join(stage)
}
