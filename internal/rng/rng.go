// Package rng derives the random streams kalends uses. Every stream is a
// pure function of a caller's seed and small integer coordinates
// (replicate, row key), so results never depend on scheduling, worker
// count or the order in which replicates are made.
//
// The derivation is a stability promise of kalends: changing it changes
// every published result, so it may change only with a major version.
package rng

import (
	"math"
	"math/rand/v2"
)

// Mix returns what SplitMix64 (Steele, Lea & Flood 2014; S. Vigna's
// splitmix64.c) outputs from state z: z is advanced by the golden-ratio
// increment 0x9e3779b97f4a7c15 and then finalised. It is a bijection of
// uint64 with good avalanche.
func Mix(z uint64) uint64 {
	z += 0x9e3779b97f4a7c15
	z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9
	z = (z ^ (z >> 27)) * 0x94d049bb133111eb
	return z ^ (z >> 31)
}

// Replicate returns the generator for replicate r under seed: a PCG
// (math/rand/v2) seeded with (Mix(seed), Mix(seed ^ Mix(r+1))). Replicate
// r's draws depend only on (seed, r).
func Replicate(seed uint64, r int) *rand.Rand {
	return rand.New(rand.NewPCG(Mix(seed), Mix(seed^Mix(uint64(r)+1))))
}

// Stream returns the generator for a named purpose (an arbitrary constant
// chosen by the caller) under seed, for draws that belong to no replicate,
// such as a permutation shared by all replicates.
func Stream(seed, purpose uint64) *rand.Rand {
	return rand.New(rand.NewPCG(Mix(seed^0x6b616c656e6473), Mix(purpose)))
}

// Keyed returns a uniform number in [0, 1) that is a pure function of
// (seed, replicate, key), for draws that must not depend on a row's
// position in a stream or shard (the Poisson bootstrap).
func Keyed(seed uint64, r int, key uint64) float64 {
	h := Mix(Mix(seed^Mix(uint64(r)+1)) ^ key)
	return float64(h>>11) * 0x1p-53
}

// poisson1CDF[k] is P(X ≤ k) for X ~ Poisson(1).
var poisson1CDF = func() [20]float64 {
	var c [20]float64
	p := math.Exp(-1)
	s := p
	for k := range c {
		if k > 0 {
			p /= float64(k)
			s += p
		}
		c[k] = s
	}
	return c
}()

// Poisson1 returns the Poisson(1) count whose CDF first reaches u, by
// inversion; u is a uniform number in [0, 1).
func Poisson1(u float64) int {
	for k, c := range poisson1CDF {
		if u < c {
			return k
		}
	}
	return len(poisson1CDF)
}
