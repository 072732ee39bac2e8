package resample

import (
	"fmt"
	"math/bits"

	"github.com/kalends/kalends/internal/rng"
)

var (
	_ Scheme = Bootstrap{}
	_ Scheme = Balanced{}
	_ Scheme = Grouped{}
	_ Scheme = Bayesian{}
	_ Scheme = Poisson{}
)

// Bootstrap is the ordinary (Efron) bootstrap, optionally stratified: each
// replicate draws n rows with replacement, or, with Strata, draws n_h rows
// with replacement within each stratum h, so every stratum keeps its size
// exactly in every replicate.
//
// Each [Split] has Counts (the multiplicity of every row, summing to n) and
// Out (the rows with multiplicity zero, the out-of-bag rows); Weights is
// nil. The zero value is an unstratified bootstrap of 1000 replicates.
// A Bootstrap is a plain value, safe to copy and to share.
type Bootstrap struct {
	// B is the number of replicates; 0 means 1000. Plan panics if B < 0.
	B int
	// Strata, if non-nil, partitions the rows into strata resampled
	// separately (see [ByLabel] and [Quantiles]); the plan then implements
	// [Partitioned]. A stratum of one row is allowed: that row has count 1
	// in every replicate and is never out of bag.
	Strata Partition
}

// Plan checks the scheme against n rows. It returns an [*InputError] if n
// is 0 or Strata reports a problem, and panics if B < 0 or n < 0.
func (b Bootstrap) Plan(n int, seed uint64) (Plan, error) {
	nb := replicates("Bootstrap.B", b.B)
	if err := checkRows("Bootstrap", n); err != nil {
		return nil, err
	}
	p := bootPlan{n: n, b: nb, seed: seed}
	if b.Strata == nil {
		return p, nil
	}
	classes, err := b.Strata.Classes(n)
	if err != nil {
		return nil, err
	}
	return stratPlan{p, classes}, nil
}

type bootPlan struct {
	n, b int
	seed uint64
}

func (p bootPlan) Len() int { return p.b }

func (p bootPlan) Split(r int, dst *Split) *Split {
	checkReplicate(r, p.b)
	dst = countsDst(dst, r, p.n)
	// The loop below is rng.Halves.IntN(n) unrolled over the two halves of
	// each Uint64, with the rejection threshold 2³² mod n hoisted.
	g := rng.Replicate(p.seed, r)
	c := dst.Counts
	n := uint64(p.n)
	thresh := uint32(-uint32(n) % uint32(n))
	for left := p.n; left > 0; {
		u := g.Uint64()
		if m := (u & 0xffffffff) * n; uint32(m) >= thresh {
			c[m>>32]++
			left--
			if left == 0 {
				break
			}
		}
		if m := (u >> 32) * n; uint32(m) >= thresh {
			c[m>>32]++
			left--
		}
	}
	dst.Out = zeros(dst.Out, c)
	return dst
}

type stratPlan struct {
	bootPlan
	classes []Class
}

func (p stratPlan) Classes() []Class { return p.classes }

func (p stratPlan) Split(r int, dst *Split) *Split {
	checkReplicate(r, p.b)
	dst = countsDst(dst, r, p.n)
	g := rng.NewHalves(rng.Replicate(p.seed, r))
	c := dst.Counts
	for _, cl := range p.classes {
		m := len(cl.Rows)
		for range m {
			c[cl.Rows[g.IntN(m)]]++
		}
	}
	dst.Out = zeros(dst.Out, c)
	return dst
}

// Balanced is the balanced bootstrap (Davison, Hinkley & Schechtman 1986):
// over its B replicates every row appears exactly B times in all, while
// each replicate still holds n draws.
//
// The B·n draws are the rows of a pseudo-random permutation π of
// [0, n·B): replicate r holds rows π(j) mod n for j = r·n, …, (r+1)·n−1.
// π is a keyed Feistel network with cycle walking, so a replicate is made
// in O(n) time and memory without ever listing the B·n draws.
//
// Each [Split] has Counts (summing to n) and Out (rows with count zero);
// Weights is nil. The zero value is a balanced bootstrap of 1000
// replicates. A Balanced is a plain value, safe to copy and to share.
type Balanced struct {
	// B is the number of replicates; 0 means 1000. Plan panics if B < 0.
	B int
}

// Plan checks the scheme against n rows. It returns an [*InputError] if n
// is 0, and panics if B < 0, n < 0, or n·B overflows 2⁶².
func (b Balanced) Plan(n int, seed uint64) (Plan, error) {
	nb := replicates("Balanced.B", b.B)
	if err := checkRows("Balanced", n); err != nil {
		return nil, err
	}
	hi, size := bits.Mul64(uint64(n), uint64(nb))
	if hi != 0 || size > 1<<62 {
		panic(fmt.Sprintf("resample: Balanced: %d rows × %d replicates is too many", n, nb))
	}
	return balancedPlan{n: n, b: nb, perm: newFeistel(size, rng.Stream(seed, purposeBalanced))}, nil
}

type balancedPlan struct {
	n, b int
	perm feistel
}

func (p balancedPlan) Len() int { return p.b }

func (p balancedPlan) Split(r int, dst *Split) *Split {
	checkReplicate(r, p.b)
	dst = countsDst(dst, r, p.n)
	n := uint64(p.n)
	base := uint64(r) * n
	for j := range n {
		dst.Counts[p.perm.at(base+j)%n]++
	}
	dst.Out = zeros(dst.Out, dst.Counts)
	return dst
}

// Grouped is the grouped (cluster) bootstrap: each replicate draws G of the
// G groups with replacement, and every row of a drawn group comes with it.
//
// Each [Split] has Counts (a row's count is the number of times its group
// was drawn, so counts sum to n only on average) and Out (the rows of the
// groups not drawn); Weights is nil. The plan implements [Partitioned],
// its Classes being the groups. The zero value has no Groups and Plan
// panics; set Groups. A Grouped is a plain value, safe to copy and share.
type Grouped struct {
	// B is the number of replicates; 0 means 1000. Plan panics if B < 0.
	B int
	// Groups partitions the rows into groups, usually [ByLabel] of a
	// season or cluster column. Plan panics if Groups is nil.
	Groups Partition
}

// Plan checks the scheme against n rows. It returns an [*InputError] if n
// is 0 or Groups reports a problem, and panics if B < 0, n < 0 or Groups is
// nil.
func (g Grouped) Plan(n int, seed uint64) (Plan, error) {
	nb := replicates("Grouped.B", g.B)
	if g.Groups == nil {
		panic("resample: Grouped.Groups is nil")
	}
	if err := checkRows("Grouped", n); err != nil {
		return nil, err
	}
	classes, err := g.Groups.Classes(n)
	if err != nil {
		return nil, err
	}
	return groupPlan{stratPlan{bootPlan{n: n, b: nb, seed: seed}, classes}}, nil
}

type groupPlan struct{ stratPlan }

func (p groupPlan) Split(r int, dst *Split) *Split {
	checkReplicate(r, p.b)
	dst = countsDst(dst, r, p.n)
	g := rng.NewHalves(rng.Replicate(p.seed, r))
	m := len(p.classes)
	for range m {
		for _, i := range p.classes[g.IntN(m)].Rows {
			dst.Counts[i]++
		}
	}
	dst.Out = zeros(dst.Out, dst.Counts)
	return dst
}

// Bayesian is the Bayesian bootstrap (Rubin 1981): each replicate gives
// the rows Dirichlet(1, …, 1) weights, made as independent standard
// exponential draws divided by their sum, instead of copying rows.
//
// Each [Split] has Weights (positive, summing to 1 up to rounding, mean
// 1/n); Counts is nil and Out is empty, since no row is left out. The
// zero value is a Bayesian bootstrap of 1000 replicates. A Bayesian is a
// plain value, safe to copy and to share.
type Bayesian struct {
	// B is the number of replicates; 0 means 1000. Plan panics if B < 0.
	B int
}

// Plan checks the scheme against n rows. It returns an [*InputError] if n
// is 0, and panics if B < 0 or n < 0.
func (b Bayesian) Plan(n int, seed uint64) (Plan, error) {
	nb := replicates("Bayesian.B", b.B)
	if err := checkRows("Bayesian", n); err != nil {
		return nil, err
	}
	return bayesPlan{bootPlan{n: n, b: nb, seed: seed}}, nil
}

type bayesPlan struct{ bootPlan }

func (p bayesPlan) Split(r int, dst *Split) *Split {
	checkReplicate(r, p.b)
	if dst == nil {
		dst = new(Split)
	}
	dst.Replicate = r
	dst.Counts = nil
	dst.Out = dst.Out[:0]
	if cap(dst.Weights) >= p.n {
		dst.Weights = dst.Weights[:p.n]
	} else {
		dst.Weights = make([]float64, p.n)
	}
	g := rng.Replicate(p.seed, r)
	w := dst.Weights
	var sum float64
	for i := range w {
		w[i] = g.ExpFloat64()
		sum += w[i]
	}
	for i := range w {
		w[i] /= sum
	}
	return dst
}

// Poisson is the Poisson bootstrap: every row gets an independent
// Poisson(1) count, so a replicate needs no n in advance and the count of
// a row depends only on (seed, replicate, the row's key), never on its
// position, its shard or the other rows (see [PoissonCount]). Shards of a
// data set, or a stream, can therefore be resampled separately and their
// per-replicate results added up, and agree exactly with one pass over
// all rows.
//
// Each [Split] has Counts (summing to n only on average) and Out (rows
// with count zero); Weights is nil. The zero value is a Poisson bootstrap
// of 1000 replicates keyed by row index. A Poisson is a plain value, safe
// to copy and to share.
type Poisson struct {
	// B is the number of replicates; 0 means 1000. Plan panics if B < 0.
	B int
	// Keys, if non-nil, holds one key per row (for example a stable event
	// id), used in place of the row index; it is kept, not copied, and
	// never modified. Keys need not be distinct, but rows sharing a key
	// share their counts.
	Keys []uint64
}

// Plan checks the scheme against n rows. It returns an [*InputError] if n
// is 0 or Keys is non-nil with a length other than n, and panics if B < 0
// or n < 0.
func (p Poisson) Plan(n int, seed uint64) (Plan, error) {
	nb := replicates("Poisson.B", p.B)
	if err := checkRows("Poisson", n); err != nil {
		return nil, err
	}
	if p.Keys != nil && len(p.Keys) != n {
		return nil, &InputError{Option: "Poisson.Keys", Detail: fmt.Sprintf("%d keys for %d rows", len(p.Keys), n), Err: ErrLength}
	}
	return poissonPlan{bootPlan{n: n, b: nb, seed: seed}, p.Keys}, nil
}

// PoissonCount returns the Poisson bootstrap count of the row with the
// given key in replicate r under seed: rng.Poisson1(rng.Keyed(seed, r,
// key)), a pure function of its three arguments. It is what [Poisson]
// plans use, exported so that sharded or streaming code can compute counts
// without a plan; by default a row's key is its 0-based index.
func PoissonCount(seed uint64, r int, key uint64) int32 {
	return int32(rng.Poisson1(rng.Keyed(seed, r, key)))
}

type poissonPlan struct {
	bootPlan
	keys []uint64
}

func (p poissonPlan) Split(r int, dst *Split) *Split {
	checkReplicate(r, p.b)
	dst = countsDst(dst, r, p.n)
	c := dst.Counts
	if p.keys == nil {
		for i := range c {
			c[i] = PoissonCount(p.seed, r, uint64(i))
		}
	} else {
		for i, k := range p.keys {
			c[i] = PoissonCount(p.seed, r, k)
		}
	}
	dst.Out = zeros(dst.Out, c)
	return dst
}
