package rng

import (
	"math/rand/v2"
	"testing"
)

// TestHalvesMatchesDefinition checks Halves against a direct reading of its
// documented rule (Lemire 2019, Algorithm 5, on 32-bit words taken low
// half first), including n that force rejections.
func TestHalvesMatchesDefinition(t *testing.T) {
	for _, n := range []int{1, 2, 3, 7, 1000, 1<<31 + 12345, 1<<32 - 1} {
		h := NewHalves(rand.New(rand.NewPCG(1, 2)))
		ref := rand.New(rand.NewPCG(1, 2))
		var words []uint32
		next := func() uint32 {
			if len(words) == 0 {
				u := ref.Uint64()
				words = append(words, uint32(u), uint32(u>>32))
			}
			w := words[0]
			words = words[1:]
			return w
		}
		limit := (uint64(1) << 32) % uint64(n)
		for i := range 2000 {
			var want int
			for {
				m := uint64(next()) * uint64(n)
				if m&0xffffffff >= limit {
					want = int(m >> 32)
					break
				}
			}
			if got := h.IntN(n); got != want {
				t.Fatalf("n=%d draw %d: got %d, want %d", n, i, got, want)
			}
		}
	}
}

// TestHalvesUniform checks that IntN(3) takes each value a third of the
// time, within 5 standard errors.
func TestHalvesUniform(t *testing.T) {
	h := NewHalves(rand.New(rand.NewPCG(3, 4)))
	const draws = 30000
	var c [3]int
	for range draws {
		c[h.IntN(3)]++
	}
	for v, got := range c {
		const want, se = draws / 3.0, 81.6 // sqrt(30000·(1/3)·(2/3))
		if d := float64(got) - want; d > 5*se || d < -5*se {
			t.Errorf("value %d: got %d, want %.0f ± %.0f", v, got, want, 5*se)
		}
	}
}
