// Package resample draws reproducible resamples of n rows: ordinary,
// stratified, balanced, block, grouped, Bayesian and Poisson bootstraps,
// validation splits (k-fold, rolling origin) and the delete-one
// [Jackknife]. A [Scheme] is a value struct whose zero value works; its
// Plan method checks it against the data and returns a [Plan], from which
// replicate r is made on demand as a [Split] of row multiplicities or
// weights plus the out-of-bag rows. No data are copied, and at no time are
// all replicates held in memory.
//
// # Determinism
//
// A plan's replicates are a pure function of the seed given to Plan, the
// replicate number r and the scheme's settings and columns. This
// derivation is a stability promise: it changes only with a major version.
//
//   - Replicate r draws only from rng.Replicate(seed, r), a math/rand/v2
//     PCG seeded with (Mix(seed), Mix(seed ^ Mix(r+1))), Mix(z) being
//     SplitMix64's output from state z. [Bootstrap] makes n index draws in [0, n)
//     (stratified: for each stratum in [Partition] order, n_h draws in
//     [0, n_h) picking among its rows) and [Grouped] makes G draws in
//     [0, G), each Uint64 of the generator giving two 32-bit words, low
//     half first, mapped to an index by Lemire's multiply-and-reject
//     method (exactly uniform); [Bayesian] makes n draws ExpFloat64; the
//     block bootstraps draw, per block, IntN(starts) and then, for
//     [Stationary], the length 1 + ⌊log(1−Float64())/log(1−1/Mean)⌋.
//   - Draws shared by all replicates come from rng.Stream(seed, purpose):
//     the four Feistel round keys of [Balanced] (four Uint64 calls), and the
//     shuffle of repeat q of [KFold] (Shuffle on each stratum in turn, with
//     purpose 0x6b666f6c64000000 + q).
//   - [Poisson] counts are rng.Poisson1(rng.Keyed(seed, r, key)), key being
//     the row index or the caller's row key, so a row's count depends on
//     nothing else (see [PoissonCount]).
//   - [RollingOrigin] and [Jackknife] use no randomness.
//
// Hence replicate r is the same whether it is made first, last, alone or
// on another goroutine, and a single replicate can be regenerated to debug
// it. The draws use math/rand/v2's PCG and its Rand methods, whose outputs
// Go pins with its own regression tests.
//
// # Concurrency
//
// Schemes are plain values and plans are immutable: a Plan is safe for
// concurrent use, each goroutine passing its own dst to Split. Results are
// identical for any number of goroutines and any order of replicates.
//
// # Errors
//
// Plan returns an [*InputError] for problems of the data, naming the option
// or column and, where one row is at fault, its 1-based row: no rows, a
// stratum, group, key or series column whose length is not n, NaN in a
// numeric column, a block length, fold count or window the rows cannot
// hold. The error unwraps to [ErrNoRows], [ErrLength], [ErrBadValue] or
// [ErrTooFewRows]. Settings that are wrong whatever the data (B < 0, a
// negative block length, K = 1 folds, a negative horizon) are caller bugs:
// Plan panics with a message starting "resample: ", as does Split for a
// replicate out of range. A stratum or group of a single row is not an
// error; it is reported through [Partitioned], as are merged quantile
// strata.
//
// # Reuse
//
// Split(r, dst) fills dst, reusing its slices when they are large enough,
// and allocates when dst is nil; [All] reuses one Split for a whole loop.
// A Split returned this way is overwritten by the next call given it, so
// copy what must be kept. Input slices (labels, values, keys, series) are
// kept by reference and never modified; do not change them while a plan
// is in use.
package resample
