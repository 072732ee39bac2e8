package fit

import (
	"encoding/binary"
	"fmt"
	"hash/crc32"
	"math"
	"math/bits"

	"github.com/kalends/kalends/internal/rng"
	"gonum.org/v1/gonum/mat"
)

// Accumulator holds the sufficient statistics of a Poisson bootstrap of a
// linear least-squares fit (OLS, or WLS with precision weights): for the
// whole data and for each of B replicates, Σw, XᵀWX, XᵀWy and yᵀWy, where a
// row's multiplicity in replicate r is rng.Poisson1(rng.Keyed(seed, r,
// key)) for the row's own key. Because a count depends only on (seed,
// replicate, key), accumulators built on any sharding of the rows (other
// goroutines, processes or machines) and merged give the same result as one
// accumulator fed every row.
//
// # Exact summation
//
// Every per-row cross-product, in the standardised units of the
// accumulator's [Standardization], is rounded once to a multiple of 2⁻⁵²
// and summed as a 128-bit two's-complement integer. Integer addition is
// exact, associative and commutative, so merged results are bit-identical
// to the single-pass result whatever the sharding and the merge order; the
// only rounding is that of each row's products to the 2⁻⁵² grid (an
// absolute error of at most 2⁻⁵³ in standardised units, comparable to
// rounding the row's own values to float64). A standardised product larger
// than 2³² in magnitude (a value more than 65,536 scales from its centre)
// is rejected, and an accumulator holds at most 2³⁸ rows, so no sum can
// overflow.
//
// # Binary format
//
// MarshalBinary writes, all little-endian:
//
//	magic    8 bytes  "kalendsA"
//	version  uint32   1
//	p        uint32   design columns
//	B        uint32   replicates
//	frac     uint32   fraction bits of the fixed-point sums (52)
//	seed     uint64
//	rows     uint64   rows added (all shards)
//	icpt     int32    intercept column, −1 if none
//	centre   p × float64, scale p × float64, ycentre, yscale float64
//	sums     (B+1) × q × (lo uint64, hi int64); block 0 is the whole data
//	         (every count 1), block 1+r replicate r; within a block the
//	         layout is w·u_a·u_b for a ≤ b (row-major upper triangle),
//	         w·u_a·v, w·v², and the count of rows with positive weight,
//	         q = p(p+1)/2 + p + 2
//	crc      uint32   CRC-32 (IEEE) of everything before it
//
// The version promise: a reader accepts exactly the versions it knows and
// rejects others with an error (never misreads them); within a version the
// layout, the fixed-point grid and the count derivation (internal/rng's
// Keyed and Poisson1, fixed for a major version of kalends) do not change,
// so accumulators written by any build of one version merge with each
// other. A new layout gets a new version number.
//
// The zero value is not usable; make one with [NewAccumulator]. An
// Accumulator is not safe for concurrent use: give each goroutine its own
// and merge them.
type Accumulator struct {
	std  Standardization
	seed uint64
	b, p int
	rows uint64
	l    xpLayout
	m    stdMap
	sums []int128 // (B+1) × q
}

type int128 struct {
	lo uint64
	hi int64
}

func (v *int128) addMul(t int128, c uint64) {
	h, l := bits.Mul64(t.lo, c)
	var carry uint64
	v.lo, carry = bits.Add64(v.lo, l, 0)
	v.hi += t.hi*int64(c) + int64(h) + int64(carry)
}

func (v *int128) add(t int128) {
	var carry uint64
	v.lo, carry = bits.Add64(v.lo, t.lo, 0)
	v.hi += t.hi + int64(carry)
}

// float returns v·2⁻ᶠʳᵃᶜ rounded to float64 (a deterministic function of
// the integer).
func (v int128) float() float64 {
	neg := v.hi < 0
	if neg {
		var c uint64
		v.lo, c = bits.Add64(^v.lo, 1, 0)
		v.hi = ^v.hi + int64(c)
	}
	f := (float64(v.hi)*0x1p64 + float64(v.lo)) * 0x1p-52
	if neg {
		return -f
	}
	return f
}

const (
	accFrac    = 52
	accMaxTerm = 0x1p32
	accMaxRows = 1 << 38
	accMagic   = "kalendsA"
	accVersion = 1
)

// toFixed converts z to the 2⁻⁵² grid; ok is false if |z| ≥ 2³².
func toFixed(z float64) (int128, bool) {
	if !(math.Abs(z) < accMaxTerm) {
		return int128{}, false
	}
	v := math.RoundToEven(z * 0x1p52)
	if math.Abs(v) < 0x1p62 {
		iv := int64(v)
		return int128{lo: uint64(iv), hi: iv >> 63}, true
	}
	// |v| ≥ 2⁶², so v is a multiple of 2¹⁰ and lo below is exact.
	hi := math.Floor(v * 0x1p-64)
	lo := v - hi*0x1p64
	return int128{lo: uint64(lo), hi: int64(hi)}, true
}

// NewAccumulator returns an empty accumulator for B replicates with the
// given standardization (learned beforehand, the same for every shard) and
// seed. It returns an error wrapping ErrBadValue if std is inconsistent
// (its Centre and Scale lengths give the number of design columns). It
// panics if B < 0.
func NewAccumulator(std Standardization, seed uint64, B int) (*Accumulator, error) {
	if B < 0 {
		panic(fmt.Sprintf("fit: NewAccumulator: negative number of replicates %d", B))
	}
	p := len(std.Centre)
	if err := std.check(p); err != nil {
		return nil, fmt.Errorf("%w: %w", ErrBadValue, err)
	}
	if p == 0 {
		return nil, fmt.Errorf("%w: standardization has no columns", ErrBadValue)
	}
	return newAcc(std, seed, B), nil
}

func newAcc(std Standardization, seed uint64, B int) *Accumulator {
	p := len(std.Centre)
	kept := make([]int, p)
	for j := range kept {
		kept[j] = j
	}
	std.Centre = append([]float64(nil), std.Centre...)
	std.Scale = append([]float64(nil), std.Scale...)
	a := &Accumulator{std: std, seed: seed, b: B, p: p, l: newLayout(p), m: newStdMap(std, kept)}
	a.sums = make([]int128, (B+1)*a.l.q)
	return a
}

// Replicates returns B.
func (a *Accumulator) Replicates() int { return a.b }

// Rows returns the number of rows added, over all merged shards.
func (a *Accumulator) Rows() uint64 { return a.rows }

// Add adds rows to the accumulator: the design x, outcome y, optional
// precision weights (nil means all ones) and each row's key, which must be
// unique across all shards of the data (a row number in the full data, or a
// hash of the row's identity).
//
// Add returns a *[DataError] (rows 1-based within this call) for a NaN or
// infinite value, a negative weight, or a value whose standardised
// cross-products exceed the fixed-point range; nothing is added then. It
// returns an error if the accumulator would exceed 2³⁸ rows. It panics if
// y, weights or keys do not have one entry per row of x or x has the wrong
// number of columns.
func (a *Accumulator) Add(x mat.Matrix, y, weights []float64, keys []uint64) error {
	n, p := x.Dims()
	switch {
	case p != a.p:
		panic(fmt.Sprintf("fit: Accumulator.Add: design has %d columns, accumulator %d", p, a.p))
	case len(y) != n || len(keys) != n || (weights != nil && len(weights) != n):
		panic(fmt.Sprintf("fit: Accumulator.Add: %d rows but %d outcomes, %d keys, %d weights", n, len(y), len(keys), len(weights)))
	}
	if a.rows+uint64(n) > accMaxRows {
		return fmt.Errorf("%w: more than 2^38 rows", errAccumulator)
	}
	src := newRowSource(x)
	if err := validateRows(src, y, weights); err != nil {
		return err
	}
	q := a.l.q
	terms := make([]int128, n*q)
	row := make([]float64, p)
	u := make([]float64, p)
	z := make([]float64, q)
	for i := range n {
		src.row(i, row)
		v := a.m.standardise(u, row, y[i])
		w := 1.0
		if weights != nil {
			w = weights[i]
		}
		a.l.fill(z, u, v, w)
		for t, zt := range z {
			f, ok := toFixed(zt)
			if !ok {
				return &DataError{Row: i + 1, Value: zt, Name: "cross-product", Err: fmt.Errorf("%w: standardised cross-product beyond ±2^32; check the standardization", ErrBadValue)}
			}
			terms[i*q+t] = f
		}
	}
	full := a.sums[:q]
	for i := range n {
		ti := terms[i*q : (i+1)*q]
		for t := range ti {
			full[t].add(ti[t])
		}
		for r := range a.b {
			c := rng.Poisson1(rng.Keyed(a.seed, r, keys[i]))
			if c == 0 {
				continue
			}
			s := a.sums[(r+1)*q : (r+2)*q]
			for t := range ti {
				s[t].addMul(ti[t], uint64(c))
			}
		}
	}
	a.rows += uint64(n)
	return nil
}

// Merge adds the statistics of b to a. It returns an error, leaving a
// unchanged, if the two differ in the number of columns or replicates, the
// seed or the standardization (compared bit for bit), or if the merged
// accumulator would exceed 2³⁸ rows.
func (a *Accumulator) Merge(b *Accumulator) error {
	switch {
	case a.p != b.p:
		return fmt.Errorf("%w: cannot merge: %d columns and %d columns", errAccumulator, a.p, b.p)
	case a.b != b.b:
		return fmt.Errorf("%w: cannot merge: %d replicates and %d replicates", errAccumulator, a.b, b.b)
	case a.seed != b.seed:
		return fmt.Errorf("%w: cannot merge: seeds %d and %d differ", errAccumulator, a.seed, b.seed)
	case !a.std.equal(b.std):
		return fmt.Errorf("%w: cannot merge: the standardizations differ (every shard must use the one learned beforehand)", errAccumulator)
	case a.rows+b.rows > accMaxRows:
		return fmt.Errorf("%w: cannot merge: more than 2^38 rows", errAccumulator)
	}
	for i := range a.sums {
		a.sums[i].add(b.sums[i])
	}
	a.rows += b.rows
	return nil
}

// MarshalBinary encodes the accumulator in the format described on
// [Accumulator].
func (a *Accumulator) MarshalBinary() ([]byte, error) {
	buf := make([]byte, 0, 48+16*a.p+16+16*len(a.sums)+4)
	le := binary.LittleEndian
	buf = append(buf, accMagic...)
	buf = le.AppendUint32(buf, accVersion)
	buf = le.AppendUint32(buf, uint32(a.p))
	buf = le.AppendUint32(buf, uint32(a.b))
	buf = le.AppendUint32(buf, accFrac)
	buf = le.AppendUint64(buf, a.seed)
	buf = le.AppendUint64(buf, a.rows)
	buf = le.AppendUint32(buf, uint32(int32(a.std.Intercept)))
	for _, v := range a.std.Centre {
		buf = le.AppendUint64(buf, math.Float64bits(v))
	}
	for _, v := range a.std.Scale {
		buf = le.AppendUint64(buf, math.Float64bits(v))
	}
	buf = le.AppendUint64(buf, math.Float64bits(a.std.YCentre))
	buf = le.AppendUint64(buf, math.Float64bits(a.std.YScale))
	for _, s := range a.sums {
		buf = le.AppendUint64(buf, s.lo)
		buf = le.AppendUint64(buf, uint64(s.hi))
	}
	buf = le.AppendUint32(buf, crc32.ChecksumIEEE(buf))
	return buf, nil
}

// UnmarshalBinary decodes an accumulator written by MarshalBinary,
// replacing a's contents. It returns an error for a wrong magic, an
// unknown version, a bad checksum, or inconsistent sizes.
func (a *Accumulator) UnmarshalBinary(data []byte) error {
	le := binary.LittleEndian
	bad := func(what string) error { return fmt.Errorf("%w: cannot decode: %s", errAccumulator, what) }
	const head = 8 + 4*4 + 8 + 8 + 4
	if len(data) < head+4 || string(data[:8]) != accMagic {
		return bad("not a kalends accumulator")
	}
	if v := le.Uint32(data[8:]); v != accVersion {
		return bad(fmt.Sprintf("format version %d, this build reads version %d", v, accVersion))
	}
	body, sum := data[:len(data)-4], le.Uint32(data[len(data)-4:])
	if crc32.ChecksumIEEE(body) != sum {
		return bad("checksum mismatch (corrupted data)")
	}
	p, B, frac := int(le.Uint32(data[12:])), int(le.Uint32(data[16:])), le.Uint32(data[20:])
	if frac != accFrac {
		return bad(fmt.Sprintf("%d fraction bits, want %d", frac, accFrac))
	}
	q := newLayout(p).q
	if p == 0 || p > 1<<12 || B > 1<<24 || len(body) != head+16*p+16+16*(B+1)*q {
		return bad("sizes do not match the header")
	}
	seed, rows := le.Uint64(data[24:]), le.Uint64(data[32:])
	off := head
	f64 := func() float64 { v := math.Float64frombits(le.Uint64(data[off:])); off += 8; return v }
	std := Standardization{Intercept: int(int32(le.Uint32(data[40:]))), Centre: make([]float64, p), Scale: make([]float64, p)}
	for j := range p {
		std.Centre[j] = f64()
	}
	for j := range p {
		std.Scale[j] = f64()
	}
	std.YCentre, std.YScale = f64(), f64()
	if err := std.check(p); err != nil {
		return bad(err.Error())
	}
	if rows > accMaxRows {
		return bad("too many rows")
	}
	na := newAcc(std, seed, B)
	na.rows = rows
	for i := range na.sums {
		na.sums[i] = int128{lo: le.Uint64(data[off:]), hi: int64(le.Uint64(data[off+8:]))}
		off += 16
	}
	*a = *na
	return nil
}

// Solve solves the whole data's and every replicate's normal equations.
// The result's replicate r is that of the Poisson bootstrap's replicate r;
// full is the whole-data fit as a one-replicate BatchFit. A replicate whose
// cross-product matrix fails the conditioning check of [Batch] (0 for
// condLimit means 1e5) cannot be refitted by QR here, since the rows are
// gone: its coefficients are NaN and its Err is a *[ConditionError] (or an
// error wrapping [ErrTooFewRows] when it has no more rows than columns).
// Names are "x1", "x2", … and OutOfBag fields are nil.
func (a *Accumulator) Solve(condLimit float64) (reps, full *BatchFit) {
	if condLimit == 0 {
		condLimit = 1e5
	}
	return a.solveRange(1, a.b, condLimit), a.solveRange(0, 1, condLimit)
}

func (a *Accumulator) solveRange(first, nrep int, condLimit float64) *BatchFit {
	p, q := a.p, a.l.q
	res := &BatchFit{
		B: nrep, P: p, Names: columnNames(nil, p),
		Coef: make([]float64, nrep*p), StdErr: make([]float64, nrep*p), Estimable: make([]bool, nrep*p),
		ResidSE: make([]float64, nrep), Rows: make([]float64, nrep), Rank: make([]int, nrep),
		Fallback: make([]bool, nrep), Err: make([]error, nrep),
	}
	w := newSolveWork(p)
	out := newRepFit(p)
	sums := make([]float64, q)
	for r := range nrep {
		blk := a.sums[(first+r)*q : (first+r+1)*q]
		for t, v := range blk {
			sums[t] = v.float()
		}
		if a.m.solve(a.l, sums, condLimit, w, &out) {
			copy(res.Coef[r*p:], out.coef)
			copy(res.StdErr[r*p:], out.se)
			copy(res.Estimable[r*p:], out.estimable)
			res.ResidSE[r], res.Rows[r], res.Rank[r] = out.residSE, out.rows, out.rank
			continue
		}
		rows := sums[q-1]
		res.Rows[r] = rows
		if rows <= float64(p) {
			res.Err[r] = fmt.Errorf("%w: %v rows for %d columns", ErrTooFewRows, rows, p)
		} else {
			res.Err[r] = &ConditionError{Cond: w.condEstimate(a.l, sums)}
		}
		for j := range p {
			res.Coef[r*p+j], res.StdErr[r*p+j] = math.NaN(), math.NaN()
		}
		res.ResidSE[r] = math.NaN()
	}
	return res
}

// condEstimate returns the 2-norm condition number of the equilibrated
// cross-product matrix in sums (+Inf when a column has no weight).
func (w *solveWork) condEstimate(l xpLayout, sums []float64) float64 {
	k := l.k
	a := mat.NewSymDense(k, nil)
	t := 0
	for i := range k {
		for j := i; j < k; j++ {
			a.SetSym(i, j, sums[t])
			t++
		}
	}
	for i := range k {
		if !(a.At(i, i) > 0) {
			return math.Inf(1)
		}
	}
	d := make([]float64, k)
	for i := range k {
		d[i] = math.Sqrt(a.At(i, i))
	}
	for i := range k {
		for j := i; j < k; j++ {
			a.SetSym(i, j, a.At(i, j)/(d[i]*d[j]))
		}
	}
	var eig mat.EigenSym
	if !eig.Factorize(a, false) {
		return math.Inf(1)
	}
	v := eig.Values(nil)
	if v[0] <= 0 {
		return math.Inf(1)
	}
	return v[len(v)-1] / v[0]
}
