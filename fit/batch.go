package fit

import (
	"fmt"
	"math"
	"runtime"
	"runtime/debug"
	"sync"
	"sync/atomic"

	"github.com/kalends/kalends/internal/blockxp"
	"gonum.org/v1/gonum/mat"
)

// CountsFunc writes the multiplicity of every row in replicate r
// (0 ≤ r < B) into dst, which has one entry per row. It must be a pure
// function of r (it may be called more than once for the same replicate)
// and safe to call from several goroutines at once, as resample.Plan.Split
// is. Counts must not be negative.
//
// A nil CountsFunc is a caller bug: [Batch.Fit] panics.
type CountsFunc func(r int, dst []int32)

// Batch fits one least-squares model per bootstrap replicate of a data set
// without refitting each resampled design. A replicate differs from the data
// only in its row multiplicities, so its cross-products XᵀWX, XᵀWy, yᵀWy are
// count-weighted sums of the same per-row cross-products; Batch forms them
// for a block of replicates at once with one dense product
// Counts (replicates × rows) · Z (rows × q) per block of rows, where a row
// of Z holds the row's standardised cross-products (q = p(p+1)/2 + p + 2),
// and then solves each replicate's p × p system.
//
// # When the fast path applies
//
// Replicate r of a Batch fit equals OLS{Weights: Precision, Tol: Tol} fitted
// to the data with row i repeated counts[r][i] times, with classical
// standard errors; with weights == nil that is OLS{Weights: Frequency}
// with the counts as weights. A resampling run can use Batch instead of
// refitting when all of these hold:
//
//   - the estimator is OLS (precision or no weights, CovKind Classical);
//   - every replicate is given by integer row counts (ordinary, stratified,
//     balanced, block, grouped or Poisson bootstrap; not Bayesian-bootstrap
//     weights, not validation splits that hold rows out of both sides);
//   - what the callbacks need is coefficients, their classical standard
//     errors, the residual standard error, the rows used, and out-of-bag
//     RMSE, MAE and R² over the rows with count zero (set OutOfBag);
//     callbacks that need the fitted model itself (its residuals, its
//     Predict on other data, sandwich covariances) need the generic path.
//
// With Ridge set, replicate r is instead Ridge.FitRidge on the replicate
// (see the Ridge field).
//
// # Exactness
//
// Columns are standardised first (see [Standardization]) and each
// replicate's equilibrated cross-product matrix is factorised by Cholesky.
// A replicate whose matrix has a column with no weight, breaks down, or has
// an estimated 1-norm condition number above CondLimit, a replicate with a
// count above 255, and one with fewer rows used than the design has
// columns (distinct rows with a positive count when weights == nil, as
// OLS with frequency weights counts them), is refitted by the QR path (OLS
// on that replicate), so it gets exactly the QR path's coefficients,
// not-estimable status or error (ErrTooFewRows); Fallback reports which. Columns that are not
// estimable on the whole data are not estimable in any replicate and are
// left out of the fast path. Replicates solved by Cholesky agree with the
// QR path to about CondLimit·2⁻⁵² relative.
//
// # Memory and work
//
// Batch never materialises a resampled design and never holds the
// rows × q cross-product table: it keeps the counts of one block of
// replicates (one byte per row and replicate, about half the size of the
// design in all; at least 4 MiB), one block of 256 rows of Z per worker,
// and the block's cross-product sums for each run of 4096 rows
// (⌈n/4096⌉ · block · q values, q/512 times the size of the counts). Each row
// block of Z is built once per block of replicates and shared by all its
// replicates. The work is about 2·B·n·q floating-point operations, done by
// an AVX2/FMA assembly kernel on amd64 (plain Go elsewhere).
//
// # Determinism and concurrency
//
// Results are identical for any number of workers: every sum is formed in
// a fixed order that does not depend on how replicates are shared out. The
// kernel fuses multiply and add on amd64 with AVX2, so results may differ in
// the last bits between machines with and without it. A Batch value is safe
// for concurrent use.
//
// The zero value fits ordinary least-squares replicates with the default
// rank tolerance and condition limit on runtime.GOMAXPROCS(0) workers.
type Batch struct {
	// Tol is the rank tolerance passed to the QR path (see [OLS]); 0 means
	// the default.
	Tol float64
	// CondLimit is the largest estimated condition number (1-norm, of the
	// equilibrated standardised cross-product matrix) that a replicate may
	// have and still be solved by Cholesky; 0 means 1e5, for about 10
	// correct digits or more.
	CondLimit float64
	// OutOfBag asks for out-of-bag RMSE, MAE and R², at the cost of a
	// second pass over the data (about p/q of the first).
	OutOfBag bool
	// Workers is the number of goroutines; 0 means runtime.GOMAXPROCS(0)
	// and 1 runs on the calling goroutine.
	Workers int
	// Ridge, if not nil, makes every replicate a ridge fit: replicate r's
	// coefficients are those of Ridge{Lambda: Ridge.Lambda}.FitRidge on
	// the replicate (its rows repeated, or equivalently the counts times
	// the weights as case weights), with each replicate standardised by
	// its own weighted means and standard deviations as Ridge defines.
	// StdErr and ResidSE are then NaN. The batched solve needs an
	// intercept column; without one every replicate takes the QR path.
	Ridge *Ridge
}

// BatchFit holds the per-replicate results of a [Batch] fit, indexed by
// replicate. Matrices are B × P, row-major: replicate r's coefficients are
// Coef[r*P : (r+1)*P].
//
// A BatchFit is plain data, written only by the Fit or Solve that returns
// it: reading it from several goroutines afterwards is safe. Its zero
// value holds no replicates.
type BatchFit struct {
	// B is the number of replicates and P the number of design columns.
	B, P int
	// Names are the coefficient names, as OLS gives them.
	Names []string
	// Coef, StdErr and Estimable hold the coefficients, their classical
	// standard errors, and whether each was estimable; coefficients that
	// are not estimable have NaN estimates and standard errors.
	Coef, StdErr []float64
	Estimable    []bool
	// ResidSE is the residual standard error, Rows the rows used (the
	// count-weighted number of rows with a positive weight) and Rank the
	// number of estimable coefficients of each replicate.
	ResidSE, Rows []float64
	Rank          []int
	// Fallback reports which replicates were fitted by the QR path.
	Fallback []bool
	// OutOfBagRows is the number of rows with count zero; OutOfBagRMSE and
	// OutOfBagMAE are the root mean squared and mean absolute prediction
	// errors on those rows (unweighted, in outcome units, predictions
	// reading not-estimable coefficients as zero), and OutOfBagR2 is
	// 1 − Σ(y − ŷ)²/Σ(y − ȳ)² over them, ȳ their mean outcome. They are
	// nil unless OutOfBag was set. The errors are NaN for a replicate
	// without out-of-bag rows; R² is NaN also when there are fewer than 2
	// or their outcomes have no spread (Σ(y − ȳ)² ≤ 10⁻²⁴ȳ², the rule of
	// inspect.Measure).
	OutOfBagRows                          []int
	OutOfBagRMSE, OutOfBagMAE, OutOfBagR2 []float64
	// Err holds the error of each replicate that could not be fitted (for
	// example one wrapping ErrTooFewRows), else nil; its row is then NaN.
	Err []error
}

// Replicate returns replicate r's coefficients (a view into Coef).
func (f *BatchFit) Replicate(r int) []float64 { return f.Coef[r*f.P : (r+1)*f.P] }

// batchRows is the number of rows of Z in one block.
const batchRows = 256

// Fit fits the B replicates given by counts to the design x, outcome y and
// optional precision weights (nil means all ones).
//
// Fit returns a *[DataError] for a NaN or infinite value in x or y or a
// NaN, infinite or negative weight, and an error wrapping [ErrBadValue] if
// every weight is zero; a replicate that cannot be fitted gets its error in
// BatchFit.Err and the others are still fitted. Fit panics if len(y)
// differs from the rows of x, weights is not nil and has another length, x
// has no columns, B < 0, counts is nil, or counts writes a negative count.
func (bt Batch) Fit(x mat.Matrix, y, weights []float64, B int, counts CountsFunc) (*BatchFit, error) {
	n, p := x.Dims()
	switch {
	case len(y) != n:
		panic(fmt.Sprintf("fit: Batch: outcome has %d values, design has %d rows", len(y), n))
	case weights != nil && len(weights) != n:
		panic(fmt.Sprintf("fit: Batch: weights have %d values, design has %d rows", len(weights), n))
	case p == 0:
		panic("fit: Batch: design has no columns")
	case B < 0:
		panic(fmt.Sprintf("fit: Batch: negative number of replicates %d", B))
	case counts == nil:
		panic("fit: Batch: nil CountsFunc")
	}
	src := newRowSource(x)
	if err := validateRows(src, y, weights); err != nil {
		return nil, err
	}
	std, err := learnStd(src, y, weights)
	if err != nil {
		return nil, err
	}
	condLimit := bt.CondLimit
	if condLimit == 0 {
		condLimit = 1e5
	}
	workers := bt.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	res := &BatchFit{
		B: B, P: p, Names: columnNames(x, p),
		Coef: make([]float64, B*p), StdErr: make([]float64, B*p), Estimable: make([]bool, B*p),
		ResidSE: make([]float64, B), Rows: make([]float64, B), Rank: make([]int, B),
		Fallback: make([]bool, B), Err: make([]error, B),
	}
	if bt.OutOfBag {
		res.OutOfBagRows = make([]int, B)
		res.OutOfBagRMSE = make([]float64, B)
		res.OutOfBagMAE = make([]float64, B)
		res.OutOfBagR2 = make([]float64, B)
	}
	e := &batchEngine{bt: bt, x: x, src: src, y: y, w: weights, B: B, counts: counts, condLimit: condLimit, workers: workers, res: res}
	checkRidge(bt.Ridge)
	if bt.Ridge != nil {
		e.kept, e.fast = e.ridgeColumns(std)
	} else {
		e.kept, e.fast = e.fullDataColumns(std)
	}
	e.m = newStdMap(std, e.kept)
	e.l = newLayout(len(e.kept))
	if !e.fast {
		e.run(B, func(r int) {
			c := make([]int32, n)
			e.fetch(r, c)
			e.fallbackAny(r, c)
			if bt.OutOfBag {
				e.outOfBagDirect(r, c)
			}
		})
		return res, nil
	}
	e.runBlocks()
	return res, nil
}

type batchEngine struct {
	bt        Batch
	x         mat.Matrix
	src       rowSource
	y, w      []float64
	B         int
	counts    CountsFunc
	condLimit float64
	workers   int
	res       *BatchFit
	scratch   []xpScratch // per worker, reused by every block
	psum      []float64   // per-chunk partial sums of crossProducts
	kept      []int
	fast      bool
	m         stdMap
	l         xpLayout
}

// fullDataColumns decides which columns the fast path keeps and whether it
// can run at all: all columns when the whole data's cross-product matrix
// passes the conditioning check, else the columns OLS finds estimable on
// the whole data, provided the intercept is among them and the reduced
// matrix passes.
func (e *batchEngine) fullDataColumns(std Standardization) ([]int, bool) {
	p := e.src.p
	all := make([]int, p)
	for j := range all {
		all[j] = j
	}
	if e.fullDataSolves(std, all) {
		return all, true
	}
	lm, err := OLS{Tol: e.bt.Tol}.FitOLS(e.x, e.y, e.w)
	if err != nil {
		return all, false
	}
	var kept []int
	for j, c := range lm.Coefficients() {
		if c.Estimable {
			kept = append(kept, j)
		}
	}
	if len(kept) == 0 || (std.Intercept >= 0 && !lm.Coefficients()[std.Intercept].Estimable) {
		return all, false
	}
	return kept, e.fullDataSolves(std, kept)
}

// fullDataSolves reports whether the whole data's normal equations over the
// kept columns pass the checks of the batched solve.
func (e *batchEngine) fullDataSolves(std Standardization, kept []int) bool {
	out := newRepFit(e.src.p)
	return newStdMap(std, kept).solve(newLayout(len(kept)), e.fullDataSums(std, kept), e.condLimit, newSolveWork(len(kept)), &out)
}

func newRepFit(p int) repFit {
	return repFit{coef: make([]float64, p), se: make([]float64, p), estimable: make([]bool, p)}
}

func (e *batchEngine) weight(i int) float64 {
	if e.w == nil {
		return 1
	}
	return e.w[i]
}

// run calls f(r) for r in [0, n) on the workers, handing out indices in
// order; a panic in f is re-raised on the calling goroutine.
func (e *batchEngine) run(n int, f func(r int)) {
	parallel(e.workers, n, func(_ int, next func() (int, bool)) {
		for r, ok := next(); ok; r, ok = next() {
			f(r)
		}
	})
}

// parallel runs body on up to workers goroutines (the caller's when
// workers is 1), each drawing indices in [0, n) from next. A panic in any
// of them is re-raised on the caller's goroutine with its stack.
func parallel(workers, n int, body func(worker int, next func() (int, bool))) {
	var ctr atomic.Int64
	next := func() (int, bool) {
		i := int(ctr.Add(1) - 1)
		return i, i < n
	}
	workers = min(workers, n)
	if workers <= 1 {
		body(0, next)
		return
	}
	var wg sync.WaitGroup
	var once sync.Once
	var pv any
	var stack []byte
	for w := range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			defer func() {
				if v := recover(); v != nil {
					once.Do(func() { pv, stack = v, debug.Stack() })
					ctr.Store(int64(n))
				}
			}()
			body(w, next)
		}()
	}
	wg.Wait()
	if pv != nil {
		panic(fmt.Sprintf("%v\n\nworker goroutine stack:\n%s", pv, stack))
	}
}

// solve solves one replicate from its sums by Cholesky, reporting false
// when it must take the QR path.
func (e *batchEngine) solve(sums []float64, w *solveWork, out *repFit) bool {
	if e.bt.Ridge != nil {
		return e.m.solveRidge(e.l, sums, e.bt.Ridge.Lambda, e.condLimit, w, out)
	}
	return e.m.solve(e.l, sums, e.condLimit, w, out)
}

// fallbackAny fits replicate r by the QR path of its estimator.
func (e *batchEngine) fallbackAny(r int, cbuf []int32) {
	if e.bt.Ridge != nil {
		e.fallbackRidge(r, cbuf)
		return
	}
	e.fallback(r, cbuf)
}

// fallback fits replicate r by the QR path. cbuf, if not nil, holds its
// counts.
func (e *batchEngine) fallback(r int, cbuf []int32) {
	n, p := e.src.n, e.src.p
	if cbuf == nil {
		cbuf = make([]int32, n)
		e.fetch(r, cbuf)
	}
	res := e.res
	res.Fallback[r] = true
	var lm *OLSFit
	var err error
	if e.w == nil {
		cw := make([]float64, n)
		for i, c := range cbuf {
			cw[i] = float64(c)
		}
		lm, err = OLS{Weights: Frequency, Tol: e.bt.Tol}.FitOLS(e.x, e.y, cw)
	} else {
		lm, err = e.materialised(cbuf)
	}
	coef, se, est := res.Coef[r*p:(r+1)*p], res.StdErr[r*p:(r+1)*p], res.Estimable[r*p:(r+1)*p]
	if err != nil {
		res.Err[r] = err
		for j := range coef {
			coef[j], se[j], est[j] = math.NaN(), math.NaN(), false
		}
		res.ResidSE[r] = math.NaN()
		return
	}
	rank := 0
	for j, c := range lm.Coefficients() {
		coef[j], se[j], est[j] = c.Estimate, c.StdErr, c.Estimable
		if c.Estimable {
			rank++
		}
	}
	st := lm.Statistics()
	res.ResidSE[r], res.Rows[r], res.Rank[r] = st.ResidSE, st.Rows, rank
}

// materialised fits OLS with precision weights on the replicate with its
// rows repeated.
func (e *batchEngine) materialised(cbuf []int32) (*OLSFit, error) {
	p := e.src.p
	total := 0
	for _, c := range cbuf {
		total += int(c)
	}
	xr := mat.NewDense(max(total, 1), p, nil)
	yr := make([]float64, 0, total)
	wr := make([]float64, 0, total)
	row := make([]float64, p)
	k := 0
	for i, c := range cbuf {
		if c == 0 {
			continue
		}
		e.src.row(i, row)
		for range c {
			xr.SetRow(k, row)
			yr = append(yr, e.y[i])
			wr = append(wr, e.w[i])
			k++
		}
	}
	if total == 0 {
		return nil, fmt.Errorf("%w: the replicate has no rows", ErrTooFewRows)
	}
	return OLS{Weights: Precision, Tol: e.bt.Tol}.FitOLS(xr, yr, wr)
}

func (e *batchEngine) fetch(r int, dst []int32) {
	e.counts(r, dst)
	for i, c := range dst {
		if c < 0 {
			panic(fmt.Sprintf("fit: Batch: replicate %d, row %d: negative count %d", r, i+1, c))
		}
	}
}

// blockSize is the number of replicates whose counts are held at once.
func (e *batchEngine) blockSize() int {
	n, p := e.src.n, e.src.p
	budget := max(4*n*p, 4<<20)
	bb := budget / max(n, 1) / blockxp.Tile * blockxp.Tile
	bb = max(bb, blockxp.Tile)
	return min(bb, (e.B+blockxp.Tile-1)/blockxp.Tile*blockxp.Tile)
}

func (e *batchEngine) runBlocks() {
	n := e.src.n
	bb := e.blockSize()
	if bb == 0 {
		return
	}
	counts8 := make([]uint8, bb*n)
	e.scratch = make([]xpScratch, e.workers)
	sums := make([]float64, bb*e.l.qpad)
	over := make([]bool, bb)
	bufs := make([][]int32, e.workers)
	works := make([]*solveWork, e.workers)
	fits := make([]repFit, e.workers)
	for w := range bufs {
		bufs[w] = make([]int32, n)
		works[w] = newSolveWork(e.l.k)
		fits[w] = newRepFit(e.src.p)
	}
	var bstd []float64
	if e.bt.OutOfBag {
		bstd = make([]float64, bb*e.l.k)
	}
	for r0 := 0; r0 < e.B; r0 += bb {
		nr := min(bb, e.B-r0)
		tiles := (nr + blockxp.Tile - 1) / blockxp.Tile
		// 1. Counts, tile-interleaved: counts8[(t*n+i)*4+lane].
		clear(counts8[:tiles*blockxp.Tile*n])
		parallel(e.workers, nr, func(w int, next func() (int, bool)) {
			buf := bufs[w]
			for rr, ok := next(); ok; rr, ok = next() {
				e.counts(r0+rr, buf)
				t, lane := rr/blockxp.Tile, rr%blockxp.Tile
				over[rr] = e.compress(counts8[t*n*blockxp.Tile+lane:], buf, r0+rr)
			}
		})
		// 2. Cross-products, tiles shared out in contiguous runs.
		clear(sums)
		e.crossProducts(counts8, sums, tiles)
		// 3. Solve, with the QR path where needed.
		parallel(e.workers, nr, func(w int, next func() (int, bool)) {
			for rr, ok := next(); ok; rr, ok = next() {
				r := r0 + rr
				out := &fits[w]
				s := sums[rr*e.l.qpad : rr*e.l.qpad+e.l.q]
				if !over[rr] && e.solve(s, works[w], out) {
					e.store(r, out)
					switch {
					case bstd == nil:
					case e.bt.Ridge != nil:
						e.m.toStd(bstd[rr*e.l.k:(rr+1)*e.l.k], e.res.Coef[r*e.src.p:(r+1)*e.src.p])
					default:
						copy(bstd[rr*e.l.k:], works[w].b)
					}
					continue
				}
				e.fetch(r, bufs[w])
				e.fallbackAny(r, bufs[w])
				if bstd != nil {
					e.m.toStd(bstd[rr*e.l.k:(rr+1)*e.l.k], e.res.Coef[r*e.src.p:(r+1)*e.src.p])
				}
			}
		})
		if bstd != nil {
			e.outOfBag(counts8, bstd, r0, nr, tiles)
		}
	}
}

// compress writes the counts c of replicate r into dst[i*Tile] (capped at
// 255) and reports whether the replicate must take the QR path: a count
// above 255, or too few rows used (see fewRows). It panics on a negative
// count.
func (e *batchEngine) compress(dst []uint8, c []int32, r int) bool {
	const T = blockxp.Tile
	if len(c) == 0 {
		return e.src.p > 0
	}
	dst = dst[:(len(c)-1)*T+1]
	var or int32
	nz := 0
	for i, ci := range c {
		or |= ci
		nz += int(uint32(-ci) >> 31) // 1 for a positive count, branch-free
		dst[i*T] = uint8(min(uint32(ci), 255))
	}
	if or < 0 {
		for i, ci := range c {
			if ci < 0 {
				panic(fmt.Sprintf("fit: Batch: replicate %d, row %d: negative count %d", r, i+1, ci))
			}
		}
	}
	if or > 255 {
		return true // some count is above 255
	}
	if e.w == nil {
		return nz < e.src.p
	}
	return e.fewRows(c)
}

// fewRows reports whether the replicate with counts c has fewer rows used
// than the design has columns, so that the QR path must decide whether it
// can be fitted at all: OLS with frequency weights (weights == nil) counts
// the distinct rows with a positive count, OLS on the materialised
// replicate (precision weights) every copy of a row with positive weight.
func (e *batchEngine) fewRows(c []int32) bool {
	p := e.src.p
	nu := 0
	if e.w == nil {
		for _, ci := range c {
			if ci != 0 {
				nu++
			}
		}
		return nu < p
	}
	for i, ci := range c {
		if e.w[i] > 0 {
			nu += int(ci)
		}
	}
	return nu < p
}

func (e *batchEngine) store(r int, f *repFit) {
	p := e.src.p
	res := e.res
	copy(res.Coef[r*p:(r+1)*p], f.coef)
	copy(res.StdErr[r*p:(r+1)*p], f.se)
	copy(res.Estimable[r*p:(r+1)*p], f.estimable)
	res.ResidSE[r], res.Rows[r], res.Rank[r] = f.residSE, f.rows, f.rank
}

// xpScratch is one worker's buffers for crossProducts.
type xpScratch struct {
	zb, ap, row, u []float64
}

func (e *batchEngine) scratchFor(w int) *xpScratch {
	s := &e.scratch[w]
	if s.zb == nil {
		const T = blockxp.Tile
		s.zb = make([]float64, batchRows*e.l.qpad) // row-major; padding stays zero
		s.row = make([]float64, e.src.p)
		s.u = make([]float64, e.l.k)
		s.ap = make([]float64, groupTiles*batchRows*T)
	}
	return s
}

// Work units of crossProducts: a run of chunkRows rows (16 blocks of Z)
// times a group of groupTiles tiles of replicates. The units are fixed by
// the data and the block, never by the number of workers.
const (
	chunkRows  = 16 * batchRows
	groupTiles = 12
)

// crossProducts adds Counts·Z for the block's tiles into sums (tile t,
// lane r at row t*4+r, stride qpad). Rows are cut into chunks of chunkRows
// and tiles into groups of groupTiles; a worker takes one (chunk, group)
// unit at a time, builds that chunk's blocks of Z once for the whole group
// and adds into the chunk's own partial sums, which are then added up in
// chunk order. So every sum is formed in the same order whatever the
// number of workers.
func (e *batchEngine) crossProducts(counts8 []uint8, sums []float64, tiles int) {
	n, l := e.src.n, e.l
	const T, S = blockxp.Tile, blockxp.Strip
	strips := l.qpad / S
	chunks := (n + chunkRows - 1) / chunkRows
	groups := (tiles + groupTiles - 1) / groupTiles
	width := tiles * T * l.qpad
	part := sums
	if chunks > 1 {
		if len(e.psum) < chunks*width {
			e.psum = make([]float64, chunks*width)
		}
		part = e.psum[:chunks*width]
		clear(part)
	}
	parallel(e.workers, chunks*groups, func(w int, next func() (int, bool)) {
		sc := e.scratchFor(w)
		zb, ap, row, u := sc.zb, sc.ap, sc.row, sc.u
		for unit, ok := next(); ok; unit, ok = next() {
			c, g := unit/groups, unit%groups
			t0, t1 := g*groupTiles, min((g+1)*groupTiles, tiles)
			dst := sums
			if chunks > 1 {
				dst = part[c*width : (c+1)*width]
			}
			for i0 := c * chunkRows; i0 < min((c+1)*chunkRows, n); i0 += batchRows {
				nb := min(batchRows, n-i0)
				for k := range nb {
					i := i0 + k
					e.src.row(i, row)
					v := e.m.standardise(u, row, e.y[i])
					l.fill(zb[k*l.qpad:], u, v, e.weight(i))
				}
				for t := t0; t < t1; t++ {
					blockxp.Widen(ap[(t-t0)*batchRows*T:], counts8[(t*n+i0)*T:(t*n+i0+nb)*T])
				}
				for s := range strips {
					zs := zb[s*S : (nb-1)*l.qpad+(s+1)*S]
					for t := t0; t < t1; t++ {
						blockxp.MulAddStrided(nb, ap[(t-t0)*batchRows*T:], zs, l.qpad, dst[t*T*l.qpad+s*S:], l.qpad)
					}
				}
			}
		}
	})
	if chunks > 1 {
		for c := range chunks {
			p := part[c*width : (c+1)*width]
			for i, v := range p {
				sums[i] += v
			}
		}
	}
}

// tileRange returns worker w's contiguous run of tiles.
func tileRange(w, workers, tiles int) (int, int) {
	return w * tiles / workers, (w + 1) * tiles / workers
}

// outOfBag computes the out-of-bag errors of the block's replicates from
// their standardised coefficients bstd (k per replicate): predictions for
// 12 rows and 4 replicates at a time by the same kernel, errors summed over
// the rows with count zero in row order.
func (e *batchEngine) outOfBag(counts8 []uint8, bstd []float64, r0, nr, tiles int) {
	n, k := e.src.n, e.l.k
	const T, S = blockxp.Tile, blockxp.Strip
	workers := min(e.workers, tiles)
	parallel(workers, workers, func(_ int, next func() (int, bool)) {
		for w, ok := next(); ok; w, ok = next() {
			t0, t1 := tileRange(w, workers, tiles)
			if t0 == t1 {
				continue
			}
			nt := t1 - t0
			ap := make([]float64, nt*k*T)
			for t := t0; t < t1; t++ {
				for lane := range T {
					rr := t*T + lane
					if rr >= nr {
						continue
					}
					for a := range k {
						ap[(t-t0)*k*T+a*T+lane] = bstd[rr*k+a]
					}
				}
			}
			sq := make([]float64, nt*T)
			ab := make([]float64, nt*T)
			cnt := make([]int, nt*T)
			v0 := make([]float64, nt*T)  // first out-of-bag outcome
			sd := make([]float64, nt*T)  // Σ(v − v0)
			sdd := make([]float64, nt*T) // Σ(v − v0)²
			zp := make([]float64, k*S)
			vs := make([]float64, S)
			pred := make([]float64, T*S)
			row := make([]float64, e.src.p)
			u := make([]float64, k)
			for i0 := 0; i0 < n; i0 += S {
				nb := min(S, n-i0)
				clear(zp)
				for j := range nb {
					e.src.row(i0+j, row)
					vs[j] = e.m.standardise(u, row, e.y[i0+j])
					for a := range k {
						zp[a*S+j] = u[a]
					}
				}
				for t := t0; t < t1; t++ {
					clear(pred)
					blockxp.MulAdd(k, ap[(t-t0)*k*T:], zp, pred, S)
					c := counts8[(t*n+i0)*T:]
					for j := range nb {
						for lane := range T {
							if c[j*T+lane] != 0 {
								continue
							}
							d := vs[j] - pred[lane*S+j]
							x := (t-t0)*T + lane
							sq[x] += d * d
							ab[x] += math.Abs(d)
							if cnt[x] == 0 {
								v0[x] = vs[j]
							}
							dv := vs[j] - v0[x]
							sd[x] += dv
							sdd[x] += dv * dv
							cnt[x]++
						}
					}
				}
			}
			for t := t0; t < t1; t++ {
				for lane := range T {
					rr := t*T + lane
					if rr >= nr {
						continue
					}
					x, r := (t-t0)*T+lane, r0+rr
					e.storeOutOfBag(r, cnt[x], sq[x], ab[x], v0[x], sd[x], sdd[x])
				}
			}
		}
	})
}

// outOfBagDirect computes replicate r's out-of-bag errors row by row in
// design units, for runs where no replicate takes the fast path.
func (e *batchEngine) outOfBagDirect(r int, c []int32) {
	p := e.src.p
	beta := e.res.Coef[r*p : (r+1)*p]
	row := make([]float64, p)
	var sq, ab, y0, sd, sdd float64
	m := 0
	for i, ci := range c {
		if ci != 0 {
			continue
		}
		e.src.row(i, row)
		pr := 0.0
		for j, b := range beta {
			if !math.IsNaN(b) {
				pr += b * row[j]
			}
		}
		d := e.y[i] - pr
		sq += d * d
		ab += math.Abs(d)
		if m == 0 {
			y0 = e.y[i]
		}
		dv := e.y[i] - y0
		sd += dv
		sdd += dv * dv
		m++
	}
	e.storeOutOfBagUnits(r, m, sq, ab, y0, sd, sdd, 1, 0)
}

// storeOutOfBag stores replicate r's out-of-bag errors from sums in
// standardised outcome units: m rows, Σd², Σ|d| of the prediction errors
// d, the first out-of-bag outcome v0, and Σ(v − v0), Σ(v − v0)².
func (e *batchEngine) storeOutOfBag(r, m int, sq, ab, v0, sd, sdd float64) {
	st := e.m.std
	e.storeOutOfBagUnits(r, m, sq, ab, v0, sd, sdd, st.YScale, st.YCentre)
}

// storeOutOfBagUnits is storeOutOfBag for sums in units where the outcome
// is (y − centre)/scale.
func (e *batchEngine) storeOutOfBagUnits(r, m int, sq, ab, v0, sd, sdd, scale, centre float64) {
	res := e.res
	res.OutOfBagRows[r] = m
	if m == 0 {
		res.OutOfBagRMSE[r], res.OutOfBagMAE[r], res.OutOfBagR2[r] = math.NaN(), math.NaN(), math.NaN()
		return
	}
	fm := float64(m)
	res.OutOfBagRMSE[r] = scale * math.Sqrt(sq/fm)
	res.OutOfBagMAE[r] = scale * ab / fm
	// Σ(y − ȳ)² and ȳ in outcome units, as inspect.Measure judges them.
	sst := scale * scale * max(sdd-sd*sd/fm, 0)
	mean := centre + scale*(v0+sd/fm)
	if m < 2 || sst <= 1e-24*mean*mean {
		res.OutOfBagR2[r] = math.NaN()
		return
	}
	res.OutOfBagR2[r] = 1 - scale*scale*sq/sst
}
