package main

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
	"time"
)

// input is what the CSV holds, in file order.
type input struct {
	dates   []time.Time
	outcome []float64
	extra   [][]float64 // one slice per extra column, in flag order
	lines   []int       // the 1-based line of each row
}

// inputError is a problem with the CSV, at a line and column where known.
type inputError struct {
	name   string // the file name, or "stdin"
	line   int    // 1-based; 0 if none
	column string // the column's name; "" if none
	msg    string
}

func (e *inputError) Error() string {
	var b strings.Builder
	b.WriteString(e.name)
	if e.line > 0 {
		fmt.Fprintf(&b, ", line %d", e.line)
	}
	if e.column != "" {
		fmt.Fprintf(&b, ", column %q", e.column)
	}
	b.WriteString(": ")
	b.WriteString(e.msg)
	return b.String()
}

// readInput reads a CSV with a header line. Lines starting with # are
// comments. Dates are parsed with layout in UTC; the outcome and extra
// columns must be finite numbers.
func readInput(r io.Reader, name, dateCol, layout, outcomeCol string, extraCols []string) (*input, error) {
	cr := csv.NewReader(r)
	cr.Comment = '#'
	cr.ReuseRecord = true
	fail := func(line int, col, format string, a ...any) error {
		return &inputError{name: name, line: line, column: col, msg: fmt.Sprintf(format, a...)}
	}
	header, err := cr.Read()
	if err == io.EOF {
		return nil, fail(0, "", "the file is empty: expected a header line naming the columns, such as %s,%s", dateCol, outcomeCol)
	}
	if err != nil {
		return nil, csvError(name, err)
	}
	header = slices.Clone(header)
	headerLine, _ := cr.FieldPos(0)
	index := func(col string) (int, error) {
		for j, h := range header {
			if strings.TrimSpace(h) == col {
				return j, nil
			}
		}
		return 0, fail(headerLine, col, "no such column in the header (it has %s)", strings.Join(quoteAll(header), ", "))
	}
	dj, err := index(dateCol)
	if err != nil {
		return nil, err
	}
	oj, err := index(outcomeCol)
	if err != nil {
		return nil, err
	}
	ej := make([]int, len(extraCols))
	for k, c := range extraCols {
		if ej[k], err = index(c); err != nil {
			return nil, err
		}
	}
	in := &input{extra: make([][]float64, len(extraCols))}
	number := func(rec []string, j int, col string) (float64, error) {
		line, _ := cr.FieldPos(j)
		s := strings.TrimSpace(rec[j])
		if s == "" {
			return 0, fail(line, col, "empty value, want a number")
		}
		v, err := strconv.ParseFloat(s, 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return 0, fail(line, col, "%q is not a finite number", s)
		}
		return v, nil
	}
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if errors.Is(err, csv.ErrFieldCount) {
			line, _ := cr.FieldPos(0)
			return nil, fail(line, "", "%d fields, but the header has %d", len(rec), len(header))
		}
		if err != nil {
			return nil, csvError(name, err)
		}
		line, _ := cr.FieldPos(dj)
		s := strings.TrimSpace(rec[dj])
		t, err := time.ParseInLocation(layout, s, time.UTC)
		if err != nil {
			return nil, fail(line, dateCol, "cannot read %q as a date in the layout %q (see -layout)", s, layout)
		}
		y, err := number(rec, oj, outcomeCol)
		if err != nil {
			return nil, err
		}
		for k, c := range extraCols {
			v, err := number(rec, ej[k], c)
			if err != nil {
				return nil, err
			}
			in.extra[k] = append(in.extra[k], v)
		}
		in.dates, in.outcome, in.lines = append(in.dates, t), append(in.outcome, y), append(in.lines, line)
	}
	if len(in.dates) == 0 {
		return nil, fail(headerLine, "", "the header is there but no data rows follow it")
	}
	return in, nil
}

// csvError turns an encoding/csv error into a one-line inputError.
func csvError(name string, err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		// StartLine is where the record begins: for an unclosed quote, the
		// line the user must fix.
		return &inputError{name: name, line: pe.StartLine, msg: pe.Err.Error()}
	}
	return &inputError{name: name, msg: err.Error()}
}

func quoteAll(s []string) []string {
	out := make([]string, len(s))
	for i, v := range s {
		out[i] = strconv.Quote(v)
	}
	return out
}
