package resample

import (
	"fmt"
	"iter"
	"slices"
)

// Purposes passed to rng.Stream for draws shared by all replicates. They
// are part of the determinism promise (see the package documentation).
const (
	purposeBalanced = 0x62616c616e636564 // "balanced"
	purposeKFold    = 0x6b666f6c64000000 // "kfold", plus the repeat number
)

// defaultB is the number of replicates when a scheme's B is zero.
const defaultB = 1000

// All returns an iterator over the replicates of p in order, 0 to
// p.Len()−1. It reuses one [Split] for every step, so the yielded Split is
// valid only until the next step; copy its slices to keep them. Only one
// replicate's buffers are live at a time.
func All(p Plan) iter.Seq2[int, *Split] {
	return func(yield func(int, *Split) bool) {
		var s *Split
		for r := range p.Len() {
			s = p.Split(r, s)
			if !yield(r, s) {
				return
			}
		}
	}
}

// replicates returns b, or defaultB when b is zero; it panics, naming the
// field, when b is negative.
func replicates(field string, b int) int {
	if b < 0 {
		panic(fmt.Sprintf("resample: %s = %d is negative", field, b))
	}
	if b == 0 {
		return defaultB
	}
	return b
}

// checkRows panics for negative n and returns an ErrNoRows error for zero.
func checkRows(scheme string, n int) error {
	if n < 0 {
		panic(fmt.Sprintf("resample: %s.Plan: negative number of rows %d", scheme, n))
	}
	if n == 0 {
		return &InputError{Option: scheme, Detail: "no rows", Err: ErrNoRows}
	}
	return nil
}

// checkReplicate panics if r is not a replicate of a plan of length b.
func checkReplicate(r, b int) {
	if r < 0 || r >= b {
		panic(fmt.Sprintf("resample: replicate %d out of range [0, %d)", r, b))
	}
}

// countsDst readies dst (allocating when nil) to receive replicate r as
// zeroed Counts of length n, reusing its buffers where large enough.
func countsDst(dst *Split, r, n int) *Split {
	if dst == nil {
		dst = new(Split)
	}
	dst.Replicate = r
	if cap(dst.Counts) >= n {
		dst.Counts = dst.Counts[:n]
		clear(dst.Counts)
	} else {
		dst.Counts = make([]int32, n)
	}
	dst.Weights = nil
	dst.Out = dst.Out[:0]
	return dst
}

// zeros appends to dst the rows whose count is zero, in increasing order.
func zeros(dst []int, counts []int32) []int {
	// Branch-free: write every row, advance only past zero counts (a count
	// is zero about 37% of the time, which defeats branch prediction).
	k := len(dst)
	dst = slices.Grow(dst, len(counts))[:k+len(counts)]
	for i, c := range counts {
		dst[k] = i
		k += int((uint32(c) - 1) >> 31) // 1 if c == 0, else 0 (c ≥ 0)
	}
	return dst[:k]
}
