package resample

import (
	"math/bits"
	"math/rand/v2"

	"github.com/kalends/kalends/internal/rng"
)

// feistelRounds is the number of Feistel rounds; part of the determinism
// promise of [Balanced].
const feistelRounds = 4

// feistel is a keyed pseudo-random bijection of [0, size): a balanced
// Feistel network on 2h-bit words (2^(2h) ≥ size, h ≥ 1) whose round
// function is rng.Mix(right ^ key) masked to h bits, restricted to
// [0, size) by cycle walking (apply the network again until the value
// falls inside). Because 2^(2h) < 4·size, a value takes fewer than four
// walks on average.
type feistel struct {
	size uint64
	half uint
	mask uint64
	keys [feistelRounds]uint64
}

// newFeistel draws the round keys, in order, as g.Uint64().
func newFeistel(size uint64, g *rand.Rand) feistel {
	w := uint(bits.Len64(size - 1))
	h := max((w+1)/2, 1)
	f := feistel{size: size, half: h, mask: 1<<h - 1}
	for i := range f.keys {
		f.keys[i] = g.Uint64()
	}
	return f
}

// net applies the Feistel network once.
func (f *feistel) net(x uint64) uint64 {
	l, r := x>>f.half, x&f.mask
	for _, k := range f.keys {
		l, r = r, l^(rng.Mix(r^k)&f.mask)
	}
	return l<<f.half | r
}

// at returns π(x) for x in [0, size).
func (f *feistel) at(x uint64) uint64 {
	x = f.net(x)
	for x >= f.size {
		x = f.net(x)
	}
	return x
}
