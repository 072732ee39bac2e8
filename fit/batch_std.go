package fit

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Standardization is the affine change of units that the batched
// least-squares path ([Batch]) and the mergeable accumulators
// ([Accumulator]) apply to every row before forming cross-products:
// design column j becomes (x_j − Centre[j]) / Scale[j] and the outcome
// becomes (y − YCentre) / YScale. Without it a calendar design is badly
// conditioned (a year column of about 2000–2030 next to an intercept has a
// cross-product matrix with condition number near 10¹⁰), and cross-products
// formed in the original units lose most of their digits.
//
// The intercept column, if any, is not centred: its Scale is its constant
// value, so that it becomes a column of ones. Without an intercept nothing
// is centred (Centre and YCentre are 0), since centring would change the
// model. Coefficients and standard errors are always reported in the
// original units.
//
// A Standardization is a plain value; the accumulators of one bootstrap must
// all use the same one, learned once beforehand (for example on the whole
// data, or on a sample of it) with [LearnStandardization].
//
// Its zero value has no columns and is rejected by [NewAccumulator].
// Nothing in this package modifies a Standardization it is given
// (NewAccumulator copies its slices), so one value may be shared by many
// goroutines.
type Standardization struct {
	// Intercept is the index of the intercept column, or −1 if there is
	// none.
	Intercept int
	// Centre and Scale hold one value per design column. Every Scale is
	// finite and non-zero.
	Centre, Scale []float64
	// YCentre and YScale standardise the outcome; YScale is finite and
	// non-zero.
	YCentre, YScale float64
}

// check reports whether s is usable for a design with p columns.
func (s Standardization) check(p int) error {
	if len(s.Centre) != p || len(s.Scale) != p {
		return fmt.Errorf("%w: %d centres and %d scales for %d columns", errStandardization, len(s.Centre), len(s.Scale), p)
	}
	if s.Intercept < -1 || s.Intercept >= p {
		return fmt.Errorf("%w: intercept column %d out of range", errStandardization, s.Intercept)
	}
	for j := range p {
		if !finite(s.Centre[j]) || !finite(s.Scale[j]) || s.Scale[j] == 0 {
			return fmt.Errorf("%w: column %d: centre %v, scale %v", errStandardization, j+1, s.Centre[j], s.Scale[j])
		}
	}
	if s.Intercept >= 0 && s.Centre[s.Intercept] != 0 {
		return fmt.Errorf("%w: the intercept column %d is centred", errStandardization, s.Intercept+1)
	}
	if !finite(s.YCentre) || !finite(s.YScale) || s.YScale == 0 {
		return fmt.Errorf("%w: outcome centre %v, scale %v", errStandardization, s.YCentre, s.YScale)
	}
	return nil
}

// equal reports whether s and t are the same, bit for bit.
func (s Standardization) equal(t Standardization) bool {
	if s.Intercept != t.Intercept || len(s.Centre) != len(t.Centre) || len(s.Scale) != len(t.Scale) {
		return false
	}
	same := func(a, b float64) bool { return math.Float64bits(a) == math.Float64bits(b) }
	for j := range s.Centre {
		if !same(s.Centre[j], t.Centre[j]) || !same(s.Scale[j], t.Scale[j]) {
			return false
		}
	}
	return same(s.YCentre, t.YCentre) && same(s.YScale, t.YScale)
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// LearnStandardization learns a [Standardization] from a design, an outcome
// and optional precision weights (nil means all ones): the intercept is the
// first column that is constant and non-zero over the rows with a positive
// weight (the rule [OLS] uses), the centres are the weighted means of the
// other columns and of y when there is an intercept (0 otherwise), and the
// scales are the weighted standard deviations about the centre (the root
// mean square when nothing is centred). A constant column other than the
// intercept gets its constant value as centre and scale 1, so that it
// standardises to exactly zero.
//
// LearnStandardization returns a *[DataError] for a NaN or infinite value
// or a negative weight, and an error wrapping [ErrBadValue] if every weight
// is zero. It panics if len(y) differs from the rows of x or weights is not
// nil and has another length.
func LearnStandardization(x mat.Matrix, y, weights []float64) (Standardization, error) {
	n, _ := x.Dims()
	if len(y) != n {
		panic(fmt.Sprintf("fit: outcome has %d values, design has %d rows", len(y), n))
	}
	if weights != nil && len(weights) != n {
		panic(fmt.Sprintf("fit: weights have %d values, design has %d rows", len(weights), n))
	}
	src := newRowSource(x)
	if err := validateRows(src, y, weights); err != nil {
		return Standardization{}, err
	}
	return learnStd(src, y, weights)
}

func learnStd(src rowSource, y, w []float64) (Standardization, error) {
	n, p := src.n, src.p
	s := Standardization{Intercept: -1, Centre: make([]float64, p), Scale: make([]float64, p)}
	wt := func(i int) float64 {
		if w == nil {
			return 1
		}
		return w[i]
	}
	first := -1
	for i := range n {
		if wt(i) > 0 {
			first = i
			break
		}
	}
	if first < 0 {
		return Standardization{}, fmt.Errorf("%w: every weight is zero", ErrBadValue)
	}
	row := make([]float64, p)
	ref := make([]float64, p)
	src.row(first, ref)
	constant := make([]bool, p)
	for j := range constant {
		constant[j] = true
	}
	var sw float64
	mean := make([]float64, p)
	var my float64
	for i := range n {
		wi := wt(i)
		if wi <= 0 {
			continue
		}
		src.row(i, row)
		sw += wi
		for j, v := range row {
			if v != ref[j] {
				constant[j] = false
			}
			mean[j] += wi * v
		}
		my += wi * y[i]
	}
	for j := range p {
		if constant[j] && ref[j] != 0 && s.Intercept < 0 {
			s.Intercept = j
		}
	}
	centre := s.Intercept >= 0
	for j := range p {
		switch {
		case j == s.Intercept:
			s.Centre[j], s.Scale[j] = 0, ref[j]
		case constant[j]:
			s.Centre[j], s.Scale[j] = ref[j], 1
		case centre:
			s.Centre[j] = mean[j] / sw
		}
	}
	if centre {
		s.YCentre = my / sw
	}
	ss := make([]float64, p)
	var ssy float64
	for i := range n {
		wi := wt(i)
		if wi <= 0 {
			continue
		}
		src.row(i, row)
		for j, v := range row {
			d := v - s.Centre[j]
			ss[j] += wi * d * d
		}
		d := y[i] - s.YCentre
		ssy += wi * d * d
	}
	for j := range p {
		if j != s.Intercept && !constant[j] {
			s.Scale[j] = math.Sqrt(ss[j] / sw)
			if s.Scale[j] == 0 || !finite(s.Scale[j]) {
				s.Scale[j] = 1
			}
		}
	}
	s.YScale = math.Sqrt(ssy / sw)
	if s.YScale == 0 || !finite(s.YScale) {
		s.YScale = 1
	}
	return s, nil
}

// rowSource reads rows of a design without copying it when it is a dense
// row-major matrix or a column table.
type rowSource struct {
	n, p   int
	data   []float64   // row-major with stride, or nil
	stride int         //
	cols   [][]float64 // column slices, or nil
	m      mat.Matrix  // fallback
}

func newRowSource(x mat.Matrix) rowSource {
	n, p := x.Dims()
	s := rowSource{n: n, p: p, m: x}
	if rm, ok := x.(mat.RawMatrixer); ok {
		raw := rm.RawMatrix()
		s.data, s.stride = raw.Data, raw.Stride
		return s
	}
	if cv, ok := x.(interface{ Column(int) []float64 }); ok {
		s.cols = make([][]float64, p)
		for j := range p {
			s.cols[j] = cv.Column(j)[:n]
		}
	}
	return s
}

// row writes row i into dst (length p).
func (s rowSource) row(i int, dst []float64) {
	switch {
	case s.data != nil:
		copy(dst, s.data[i*s.stride:i*s.stride+s.p])
	case s.cols != nil:
		for j, c := range s.cols {
			dst[j] = c[i]
		}
	default:
		for j := range dst {
			dst[j] = s.m.At(i, j)
		}
	}
}

// validateRows returns a *DataError for the first NaN or infinite value in
// the design or outcome, or NaN, infinite or negative weight, worded and
// named as OLS words and names it (design columns by their [Namer] name).
func validateRows(src rowSource, y, w []float64) error {
	row := make([]float64, src.p)
	for i := range src.n {
		src.row(i, row)
		for j, v := range row {
			if !finite(v) {
				return &DataError{Row: i + 1, Column: j + 1, Name: columnNames(src.m, src.p)[j], Value: v, Err: badValue(v)}
			}
		}
		if !finite(y[i]) {
			return &DataError{Row: i + 1, Name: "outcome", Value: y[i], Err: badValue(y[i])}
		}
		if w != nil {
			switch v := w[i]; {
			case !finite(v):
				return &DataError{Row: i + 1, Name: "weights", Value: v, Err: badValue(v)}
			case v < 0:
				return &DataError{Row: i + 1, Name: "weights", Value: v, Err: fmt.Errorf("negative weight: %w", ErrBadValue)}
			}
		}
	}
	return nil
}
