package resample

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/kalends/kalends/internal/quantile"
)

// Partition assigns each of n rows to exactly one class: a stratum for the
// stratified schemes ([Bootstrap], [KFold]) or a group (cluster) for
// [Grouped]. Classes returns the classes in a fixed, documented order, each
// with its rows in increasing order, or an [*InputError] for a data problem
// (a column of the wrong length, a NaN value). Classes must not modify the
// column it reads.
type Partition interface {
	Classes(n int) ([]Class, error)
}

// Class is one stratum or group of a [Partition].
type Class struct {
	// Label names the class: the label value for [ByLabel], "q1", "q2", …
	// for the quantile cells of [Quantiles], joined by "+" when cells were
	// merged ("q3+q4").
	Label string
	// Rows holds the 0-based rows of the class in increasing order.
	Rows []int
	// Cells holds, for [Quantiles], the 1-based quantile cells merged into
	// this class (one cell when nothing was merged); nil for [ByLabel].
	Cells []int
}

// Partitioned is implemented by the [Plan] of every scheme that samples
// within strata or draws groups. Classes returns the strata or groups
// actually used, after any merge, in the order the draws visit them. A
// stratum or group of a single row is allowed and shows here with
// len(Rows) == 1; a merge of quantile cells shows as len(Cells) > 1. The
// returned slices are shared by the plan and must not be modified.
type Partitioned interface {
	Plan
	Classes() []Class
}

// ByLabel returns the partition of rows by the value of labels[i], one
// class per distinct label, in increasing label order (never map order).
// Classes reports an [ErrLength] error if len(labels) != n and an
// [ErrBadValue] error naming the row for a NaN label. The labels slice is
// kept, not copied, and is never modified.
func ByLabel[K cmp.Ordered](labels []K) Partition { return byLabel[K]{labels} }

type byLabel[K cmp.Ordered] struct{ labels []K }

func (b byLabel[K]) Classes(n int) ([]Class, error) {
	if len(b.labels) != n {
		return nil, &InputError{Option: "ByLabel", Detail: fmt.Sprintf("%d labels for %d rows", len(b.labels), n), Err: ErrLength}
	}
	index := make(map[K]int)
	var keys []K
	for i, k := range b.labels {
		if k != k { // NaN
			return nil, &InputError{Option: "ByLabel", Row: i + 1, Detail: "NaN label", Err: ErrBadValue}
		}
		if _, ok := index[k]; !ok {
			index[k] = 0
			keys = append(keys, k)
		}
	}
	slices.Sort(keys)
	classes := make([]Class, len(keys))
	for c, k := range keys {
		index[k] = c
		classes[c].Label = fmt.Sprint(k)
	}
	for i, k := range b.labels {
		c := &classes[index[k]]
		c.Rows = append(c.Rows, i)
	}
	return classes, nil
}

// Quantiles partitions rows by a numeric column cut at its sample
// quantiles, then merges cells too small to resample.
//
// The K−1 cut points are the type-7 sample quantiles (linear interpolation
// between order statistics, as in R's default) at probabilities j/K,
// j = 1, …, K−1. Row i falls in cell c (1-based) when exactly c−1 cut
// points lie strictly below Values[i], so cells are (q[c−1], q[c]] with the
// first closed below; ties at a cut point can leave a cell small or empty.
//
// Merge rule: cells are taken in increasing order and joined, left to
// right, into one class until the class holds at least MinRows rows; that
// class is then closed and the next begins. If the last class is short it
// is joined to the class before it. So every class has at least MinRows
// rows unless n < MinRows, in which case all rows form one class. Merges
// are reported through [Class.Cells] and [Class.Label].
type Quantiles struct {
	// Values holds one finite value per row; it is never modified.
	Values []float64
	// K is the number of quantile cells; 0 means 4. K < 0 panics.
	K int
	// MinRows is the smallest class kept unmerged; 0 means 2. MinRows < 0
	// panics.
	MinRows int
}

// Classes returns the classes in increasing order of value. It reports an
// [ErrLength] error if len(q.Values) != n and an [ErrBadValue] error naming
// the first NaN or infinite value. It panics if q.K or q.MinRows is
// negative.
func (q Quantiles) Classes(n int) ([]Class, error) {
	k, minRows := q.K, q.MinRows
	if k < 0 {
		panic("resample: Quantiles.K is negative")
	}
	if minRows < 0 {
		panic("resample: Quantiles.MinRows is negative")
	}
	if k == 0 {
		k = 4
	}
	if minRows == 0 {
		minRows = 2
	}
	if len(q.Values) != n {
		return nil, &InputError{Option: "Quantiles.Values", Detail: fmt.Sprintf("%d values for %d rows", len(q.Values), n), Err: ErrLength}
	}
	for i, v := range q.Values {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, &InputError{Option: "Quantiles.Values", Row: i + 1, Detail: fmt.Sprintf("value %v", v), Err: ErrBadValue}
		}
	}
	if n == 0 {
		return nil, &InputError{Option: "Quantiles.Values", Detail: "no rows", Err: ErrNoRows}
	}
	sorted := slices.Clone(q.Values)
	slices.Sort(sorted)
	cuts := make([]float64, k-1)
	for j := range cuts {
		cuts[j] = quantile.R7(sorted, float64(j+1)/float64(k))
	}
	cells := make([][]int, k)
	for i, v := range q.Values {
		c, _ := slices.BinarySearch(cuts, v) // number of cuts < v
		cells[c] = append(cells[c], i)
	}
	var classes []Class
	var cur Class
	for c, rows := range cells {
		cur.Cells = append(cur.Cells, c+1)
		cur.Rows = append(cur.Rows, rows...)
		if len(cur.Rows) >= minRows {
			classes = append(classes, cur)
			cur = Class{}
		}
	}
	if len(cur.Cells) > 0 {
		if len(classes) == 0 {
			classes = append(classes, cur)
		} else {
			last := &classes[len(classes)-1]
			last.Cells = append(last.Cells, cur.Cells...)
			last.Rows = append(last.Rows, cur.Rows...)
		}
	}
	for i := range classes {
		c := &classes[i]
		slices.Sort(c.Rows)
		names := make([]string, len(c.Cells))
		for j, cell := range c.Cells {
			names[j] = "q" + strconv.Itoa(cell)
		}
		c.Label = strings.Join(names, "+")
	}
	return classes, nil
}
