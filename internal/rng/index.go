package rng

import "math/rand/v2"

// Halves draws uniform integers in [0, n), 0 < n < 2³², from a generator,
// using each of its Uint64 outputs twice: the low 32 bits first, then the
// high 32 bits. A 32-bit word w is mapped by Lemire's multiply-and-reject
// method (Lemire 2019, "Fast random integer generation in an interval",
// ACM TOMACS 29(1), art. 3): with m = w·n as a 64-bit product, the draw is
// m >> 32, unless the low 32 bits of m are below 2³² mod n, in which case
// w is rejected and the next word is tried. The draws are exactly uniform.
//
// The draws are a pure function of the generator's outputs and of the
// sequence of n's asked for; they are part of kalends' determinism
// promise. The zero value is not usable; a Halves is not safe for
// concurrent use.
type Halves struct {
	g    *rand.Rand
	buf  uint32 // the unused high half of the last Uint64
	have bool
}

// NewHalves returns a Halves drawing from g.
func NewHalves(g *rand.Rand) Halves { return Halves{g: g} }

// word returns the next 32-bit word.
func (h *Halves) word() uint32 {
	if h.have {
		h.have = false
		return h.buf
	}
	u := h.g.Uint64()
	h.buf, h.have = uint32(u>>32), true
	return uint32(u)
}

// IntN returns a uniform integer in [0, n). It panics if n is not in
// (0, 2³²).
func (h *Halves) IntN(n int) int {
	if n <= 0 || uint64(n) >= 1<<32 {
		panic("rng: Halves.IntN: n out of range")
	}
	n32 := uint32(n)
	for {
		m := uint64(h.word()) * uint64(n32)
		if lo := uint32(m); lo < n32 && lo < -n32%n32 {
			continue
		}
		return int(m >> 32)
	}
}
