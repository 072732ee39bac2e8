package resample

// Split is one replicate of a resampling scheme over n rows, described
// without copying any data.
//
// In-bag rows carry a multiplicity in Counts (how many times the row is in
// the replicate) or, for schemes that weight rather than copy (Bayesian
// bootstrap), a weight in Weights; exactly one of the two is non-nil and it
// has length n. Out lists, in increasing order, the rows held out for
// evaluation: for the bootstrap schemes the rows with zero multiplicity,
// for validation splits the test rows (which need not be every row outside
// the training set: a rolling origin leaves a gap and the future out of
// both).
//
// A Split's slices may be reused by the next call that was given it as dst;
// copy them to keep them. The zero value is an empty Split, ready to be
// passed as dst. A Split is a plain value: it is not safe to fill from one
// goroutine while another reads it.
type Split struct {
	// Replicate is the 0-based replicate number.
	Replicate int
	// Counts holds the multiplicity of every row, or is nil.
	Counts []int32
	// Weights holds the weight of every row, or is nil.
	Weights []float64
	// Out holds the held-out rows in increasing order.
	Out []int
}

// Weight returns the in-bag weight of row i: its count or its weight.
func (s *Split) Weight(i int) float64 {
	if s.Counts != nil {
		return float64(s.Counts[i])
	}
	return s.Weights[i]
}

// WeightsTo writes every row's in-bag weight into dst and returns it; if
// dst is nil a slice is allocated, otherwise its length must be n.
func (s *Split) WeightsTo(dst []float64) []float64 {
	n := len(s.Counts)
	if s.Counts == nil {
		n = len(s.Weights)
	}
	if dst == nil {
		dst = make([]float64, n)
	} else if len(dst) != n {
		panic("resample: WeightsTo: wrong length")
	}
	if s.Counts == nil {
		copy(dst, s.Weights)
		return dst
	}
	for i, c := range s.Counts {
		dst[i] = float64(c)
	}
	return dst
}

// InBag appends to dst the rows with a non-zero weight, in increasing
// order, and returns the extended slice.
func (s *Split) InBag(dst []int) []int {
	if s.Counts != nil {
		for i, c := range s.Counts {
			if c != 0 {
				dst = append(dst, i)
			}
		}
		return dst
	}
	for i, w := range s.Weights {
		if w != 0 {
			dst = append(dst, i)
		}
	}
	return dst
}

// Scheme is a resampling design: given the number of rows and a seed, Plan
// checks the design against the data and returns the replicates to draw.
// Plan returns an error for data problems (too few rows, a stratum column
// of the wrong length).
type Scheme interface {
	Plan(n int, seed uint64) (Plan, error)
}

// Plan is a checked resampling design whose replicates can be drawn lazily,
// in any order and on any goroutine. Split(r, dst) fills dst (allocating
// when dst is nil) with replicate r, 0 ≤ r < Len(), and returns it; the
// result depends only on the seed given to Plan and on r. A Plan is
// immutable and safe for concurrent use; each goroutine passes its own dst.
type Plan interface {
	Len() int
	Split(r int, dst *Split) *Split
}
