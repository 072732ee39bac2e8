package resample

import (
	"fmt"
	"math"

	"github.com/kalends/kalends/internal/rng"
)

var (
	_ Scheme = MovingBlock{}
	_ Scheme = CircularBlock{}
	_ Scheme = Stationary{}
)

// Blocked is implemented by the [Plan] of every block bootstrap.
// BlockLength returns the block length used (the mean block length for
// [Stationary]), whether given by the caller or chosen automatically.
type Blocked interface {
	Plan
	BlockLength() float64
}

// MovingBlock is the moving-block bootstrap (Künsch 1989) for time-ordered
// rows: each replicate joins blocks of Length consecutive rows, each
// starting at a row drawn uniformly from the n−Length+1 possible starts,
// until n rows are drawn (the last block is cut short).
//
// Each [Split] has Counts (summing to n) and Out (rows with count zero);
// Weights is nil. Rows near either end fall in fewer possible blocks and
// are drawn less often; [CircularBlock] avoids this. The zero value draws
// 1000 replicates with an automatic block length, which needs Series. A
// MovingBlock is a plain value, safe to copy and to share.
type MovingBlock struct {
	// B is the number of replicates; 0 means 1000. Plan panics if B < 0.
	B int
	// Length is the block length; 0 means automatic: the circular-block
	// length of [BlockLength] on Series, rounded to the nearest integer.
	// Plan panics if Length < 0 and returns an error if Length > n.
	Length int
	// Series is the numeric series (usually residuals of a first fit, in
	// row order) whose dependence sets the automatic length; it is read
	// only when Length is 0.
	Series []float64
}

// CircularBlock is the circular-block bootstrap (Politis & Romano 1992):
// as [MovingBlock], but the rows are wrapped on a circle, so every row
// starts a block and every row is equally likely to be drawn.
//
// Each [Split] has Counts (summing to n) and Out (rows with count zero);
// Weights is nil. The zero value draws 1000 replicates with an automatic
// block length, which needs Series. A CircularBlock is a plain value,
// safe to copy and to share.
type CircularBlock struct {
	// B is the number of replicates; 0 means 1000. Plan panics if B < 0.
	B int
	// Length is the block length; 0 means automatic: the circular-block
	// length of [BlockLength] on Series, rounded to the nearest integer.
	// Plan panics if Length < 0 and returns an error if Length > n.
	Length int
	// Series is read only when Length is 0; see [MovingBlock.Series].
	Series []float64
}

// Stationary is the stationary bootstrap (Politis & Romano 1994): blocks
// start at a uniformly drawn row and have independent geometric lengths
// with mean Mean (P(length = k) = p(1−p)^(k−1), p = 1/Mean), wrapped on a
// circle, joined until n rows are drawn (the last block is cut short).
//
// Each [Split] has Counts (summing to n) and Out (rows with count zero);
// Weights is nil. The zero value draws 1000 replicates with an automatic
// mean block length, which needs Series. A Stationary is a plain value,
// safe to copy and to share.
type Stationary struct {
	// B is the number of replicates; 0 means 1000. Plan panics if B < 0.
	B int
	// Mean is the mean block length, 1 ≤ Mean ≤ n; 0 means automatic:
	// the stationary length of [BlockLength] on Series. Plan panics if
	// Mean is negative, NaN or in (0, 1), and returns an error if Mean > n.
	Mean float64
	// Series is read only when Mean is 0; see [MovingBlock.Series].
	Series []float64
}

type blockKind int

const (
	moving blockKind = iota
	circular
	stationary
)

// Plan checks the scheme against n rows. It returns an [*InputError] if n
// is 0, Length > n, or Length is 0 and Series is unusable (see
// [BlockLength]), and panics if B < 0, Length < 0 or n < 0.
func (m MovingBlock) Plan(n int, seed uint64) (Plan, error) {
	return intBlockPlan("MovingBlock", moving, m.B, m.Length, m.Series, n, seed)
}

// Plan checks the scheme against n rows. It returns an [*InputError] if n
// is 0, Length > n, or Length is 0 and Series is unusable (see
// [BlockLength]), and panics if B < 0, Length < 0 or n < 0.
func (c CircularBlock) Plan(n int, seed uint64) (Plan, error) {
	return intBlockPlan("CircularBlock", circular, c.B, c.Length, c.Series, n, seed)
}

func intBlockPlan(name string, kind blockKind, b, length int, series []float64, n int, seed uint64) (Plan, error) {
	nb := replicates(name+".B", b)
	if length < 0 {
		panic(fmt.Sprintf("resample: %s.Length = %d is negative", name, length))
	}
	if err := checkRows(name, n); err != nil {
		return nil, err
	}
	if length == 0 {
		_, cb, err := autoLength(name, series, n)
		if err != nil {
			return nil, err
		}
		length = int(math.Round(cb))
	}
	if length > n {
		return nil, &InputError{Option: name + ".Length", Detail: fmt.Sprintf("block length %d exceeds the %d rows", length, n), Err: ErrTooFewRows}
	}
	return blockPlan{bootPlan{n: n, b: nb, seed: seed}, kind, length, 0}, nil
}

// Plan checks the scheme against n rows. It returns an [*InputError] if n
// is 0, Mean > n, or Mean is 0 and Series is unusable (see [BlockLength]),
// and panics if B < 0, n < 0, or Mean is negative, NaN or in (0, 1).
func (s Stationary) Plan(n int, seed uint64) (Plan, error) {
	nb := replicates("Stationary.B", s.B)
	mean := s.Mean
	if !(mean == 0 || mean >= 1) {
		panic(fmt.Sprintf("resample: Stationary.Mean = %v is not 0 or at least 1", mean))
	}
	if err := checkRows("Stationary", n); err != nil {
		return nil, err
	}
	if mean == 0 {
		sb, _, err := autoLength("Stationary", s.Series, n)
		if err != nil {
			return nil, err
		}
		mean = sb
	}
	if mean > float64(n) {
		return nil, &InputError{Option: "Stationary.Mean", Detail: fmt.Sprintf("mean block length %v exceeds the %d rows", mean, n), Err: ErrTooFewRows}
	}
	return blockPlan{bootPlan{n: n, b: nb, seed: seed}, stationary, 0, mean}, nil
}

func autoLength(name string, series []float64, n int) (sb, cb float64, err error) {
	if len(series) != n {
		return 0, 0, &InputError{Option: name + ".Series", Detail: fmt.Sprintf("%d values for %d rows (an automatic block length needs the series)", len(series), n), Err: ErrLength}
	}
	sb, cb, err = BlockLength(series)
	if e, ok := err.(*InputError); ok {
		e.Option = name + ".Series"
	}
	return sb, cb, err
}

type blockPlan struct {
	bootPlan
	kind   blockKind
	length int     // moving, circular
	mean   float64 // stationary
}

func (p blockPlan) BlockLength() float64 {
	if p.kind == stationary {
		return p.mean
	}
	return float64(p.length)
}

func (p blockPlan) Split(r int, dst *Split) *Split {
	checkReplicate(r, p.b)
	dst = countsDst(dst, r, p.n)
	c := dst.Counts
	p.blocks(r, func(start, length int) {
		for j := range length {
			i := start + j
			if i >= p.n {
				i -= p.n
			}
			c[i]++
		}
	})
	dst.Out = zeros(dst.Out, c)
	return dst
}

// blocks calls visit(start, length) for the blocks of replicate r in
// order, lengths already cut so that they sum to n. For each block the
// start is drawn first, then (stationary) the length.
func (p blockPlan) blocks(r int, visit func(start, length int)) {
	p.rawBlocks(r, func(start, length, left int) bool {
		visit(start, min(length, left))
		return length < left
	})
}

// rawBlocks calls visit(start, length, left) with the uncut length and the
// number of rows still to draw, until visit returns false.
func (p blockPlan) rawBlocks(r int, visit func(start, length, left int) bool) {
	g := rng.Replicate(p.seed, r)
	starts := p.n
	if p.kind == moving {
		starts = p.n - p.length + 1
	}
	var logq float64 // log(1 − p) for the geometric lengths
	if p.kind == stationary {
		logq = math.Log1p(-1 / p.mean)
	}
	for left := p.n; left > 0; {
		start := g.IntN(starts)
		length := p.length
		if p.kind == stationary {
			length = 1
			if p.mean > 1 {
				// Inversion: 1 + ⌊log U / log(1−p)⌋ with U = 1 − Float64() in (0, 1].
				k := math.Floor(math.Log(1-g.Float64()) / logq)
				length += int(min(k, float64(p.n)))
			}
		}
		if !visit(start, length, left) {
			return
		}
		left -= length
	}
}
