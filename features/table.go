package features

import (
	"fmt"
	"slices"

	"gonum.org/v1/gonum/mat"
)

var _ mat.Matrix = (*Table)(nil)

// Table is a set of named float64 columns of equal length: the design that
// features and holiday produce, fit consumes and inspect reports on.
//
// A Table owns no data it was not given: Append adopts the caller's slice
// and Join shares the other table's slices, so assembling a design from
// several producers copies nothing. Column order is the order of insertion
// and never changes. Names are unique.
//
// Table implements [mat.Matrix] (rows × columns), so it can be passed to a
// fit directly; [Table.DenseTo] makes a row-major copy when a dense matrix
// is needed. It also implements the Name(j int) string method that fit uses
// to label coefficients.
//
// The zero value is an empty table whose row count is fixed by the first
// Append. A Table is safe for concurrent reads; Append and Join must not run
// concurrently with any other use.
type Table struct {
	rows  int
	fixed bool
	names []string
	cols  [][]float64
	index map[string]int
}

// NewTable returns an empty table of the given number of rows.
// It panics if rows is negative.
func NewTable(rows int) *Table {
	if rows < 0 {
		panic("features: negative row count")
	}
	return &Table{rows: rows, fixed: true}
}

// Rows returns the number of rows.
func (t *Table) Rows() int { return t.rows }

// Width returns the number of columns.
func (t *Table) Width() int { return len(t.cols) }

// Names returns a copy of the column names in column order.
func (t *Table) Names() []string { return slices.Clone(t.names) }

// Name returns the name of column j. It panics if j is out of range.
func (t *Table) Name(j int) string { return t.names[j] }

// Column returns column j. The slice is the table's own storage: callers
// must not modify it. It panics if j is out of range.
func (t *Table) Column(j int) []float64 { return t.cols[j] }

// Index returns the position of the named column, or -1 if there is none.
func (t *Table) Index(name string) int {
	if j, ok := t.index[name]; ok {
		return j
	}
	return -1
}

// Lookup returns the named column and reports whether it exists. The slice
// is the table's own storage: callers must not modify it.
func (t *Table) Lookup(name string) ([]float64, bool) {
	j, ok := t.index[name]
	if !ok {
		return nil, false
	}
	return t.cols[j], true
}

// Append adds a column at the end of the table. The table adopts values
// without copying it; the caller must not modify it afterwards.
// Append returns an error if the name is empty or already present, or if
// len(values) differs from the table's row count.
func (t *Table) Append(name string, values []float64) error {
	if name == "" {
		return fmt.Errorf("features: column %d: empty name", len(t.cols)+1)
	}
	if _, dup := t.index[name]; dup {
		return fmt.Errorf("features: column %q: name already in the table", name)
	}
	if !t.fixed {
		t.rows, t.fixed = len(values), true
	}
	if len(values) != t.rows {
		return fmt.Errorf("features: column %q: %d values, table has %d rows", name, len(values), t.rows)
	}
	if t.index == nil {
		t.index = make(map[string]int)
	}
	t.index[name] = len(t.cols)
	t.names = append(t.names, name)
	t.cols = append(t.cols, values)
	return nil
}

// Join appends every column of u to t, sharing u's storage. It returns an
// error, and leaves t unchanged, if the row counts differ or a name of u is
// already in t.
func (t *Table) Join(u *Table) error {
	if t.fixed && u.Width() > 0 && u.rows != t.rows {
		return fmt.Errorf("features: join: %d rows and %d rows", t.rows, u.rows)
	}
	for _, name := range u.names {
		if _, dup := t.index[name]; dup {
			return fmt.Errorf("features: join: column %q is in both tables", name)
		}
	}
	for j, name := range u.names {
		if err := t.Append(name, u.cols[j]); err != nil {
			return err
		}
	}
	return nil
}

// Dims returns the number of rows and columns. It is part of [mat.Matrix].
func (t *Table) Dims() (r, c int) { return t.rows, len(t.cols) }

// At returns the value in row i of column j. It is part of [mat.Matrix] and
// panics if i or j is out of range.
func (t *Table) At(i, j int) float64 { return t.cols[j][i] }

// T returns the transpose of the table as an implicit [mat.Transpose]. It is
// part of [mat.Matrix].
func (t *Table) T() mat.Matrix { return mat.Transpose{Matrix: t} }

// DenseTo copies the table into dst in row-major order and returns dst.
// If dst is nil or empty a new matrix is allocated; otherwise dst must be
// Rows × Width or DenseTo panics.
func (t *Table) DenseTo(dst *mat.Dense) *mat.Dense {
	r, c := t.Dims()
	switch {
	case dst == nil:
		dst = &mat.Dense{}
		fallthrough
	case dst.IsEmpty():
		if r == 0 || c == 0 {
			return dst
		}
		dst.ReuseAs(r, c)
	default:
		if dr, dc := dst.Dims(); dr != r || dc != c {
			panic(fmt.Sprintf("features: DenseTo: dst is %d×%d, table is %d×%d", dr, dc, r, c))
		}
	}
	raw := dst.RawMatrix()
	for j, col := range t.cols {
		for i, v := range col {
			raw.Data[i*raw.Stride+j] = v
		}
	}
	return dst
}

// FromMatrix returns a table holding a copy of m's columns under the given
// names, one pass over m. It returns an error if len(names) differs from the
// number of columns of m or a name is empty or repeated.
func FromMatrix(m mat.Matrix, names []string) (*Table, error) {
	r, c := m.Dims()
	if len(names) != c {
		return nil, fmt.Errorf("features: FromMatrix: %d names for %d columns", len(names), c)
	}
	t := NewTable(r)
	backing := make([]float64, r*c)
	for j := range c {
		col := backing[j*r : (j+1)*r : (j+1)*r]
		if d, ok := m.(*mat.Dense); ok {
			mat.Col(col, j, d)
		} else {
			for i := range r {
				col[i] = m.At(i, j)
			}
		}
		if err := t.Append(names[j], col); err != nil {
			return nil, err
		}
	}
	return t, nil
}
