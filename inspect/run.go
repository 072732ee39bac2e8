package inspect

import (
	"context"
	"fmt"
	"runtime"
	"runtime/debug"
	"time"

	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/fit"
	"github.com/kalends/kalends/resample"
)

// Data is the input of a run: one row per dated event. Runs never modify
// it.
//
// The zero value is a data set with no rows. A run reads Data from
// several goroutines; do not modify it while a run is using it.
type Data struct {
	// Dates are the rows' dates, from which the feature set makes columns.
	Dates []time.Time
	// Outcome is the number kept per row.
	Outcome []float64
	// Extra, if not nil, holds numeric columns of the caller's own, one
	// value per row, appended to the design after the learned columns.
	Extra *features.Table
	// Weights, if not nil, are case weights, one per row, which the
	// estimator reads as its own kind of weights (precision weights for
	// the built-in ones). Under a scheme that draws counts, a Fitter that
	// implements [fit.CountFitter] (fit.OLS, fit.GLM) gets each
	// replicate's counts and these weights apart, so the replicate is
	// fitted as its copied rows, each keeping its weight: estimates,
	// standard errors and degrees of freedom all count the copies. Any
	// other Fitter, and every Fitter under a weighting scheme (the
	// Bayesian bootstrap), gets the weights multiplied by the
	// replicate's counts or weights (see [Run]):
	// its estimates are still those of the copied rows, but an estimator
	// whose degrees of freedom count rows of positive weight counts
	// distinct rows, so its standard errors, and the studentized
	// interval, come out too large by about √((Σcounts − p)/(distinct rows
	// − p)), some 25% for an ordinary bootstrap (fit.Ridge reports no
	// standard errors). The percentile, basic, normal and BCa intervals use
	// only the estimates and are not affected.
	Weights []float64
}

// rows checks d and returns its number of rows. It panics on caller bugs.
func (d *Data) rows(who string) int {
	n := len(d.Dates)
	if len(d.Outcome) != n {
		panic(fmt.Sprintf("inspect: %s: %d dates but %d outcomes", who, n, len(d.Outcome)))
	}
	if d.Weights != nil && len(d.Weights) != n {
		panic(fmt.Sprintf("inspect: %s: %d dates but %d weights", who, n, len(d.Weights)))
	}
	if d.Extra != nil && d.Extra.Width() > 0 && d.Extra.Rows() != n {
		panic(fmt.Sprintf("inspect: %s: %d dates but %d rows of extra columns", who, n, d.Extra.Rows()))
	}
	return n
}

// Options configure a run. The zero value is not usable: Fitter and Scheme
// are required (Predict takes no Scheme).
type Options struct {
	// Fitter is the estimator fitted to the full data and to every
	// replicate.
	Fitter fit.Fitter
	// Scheme draws the replicates; Seed is passed to its Plan. A stratum
	// or group column goes to the scheme, which holds the rows' labels:
	// resample.Bootstrap{Strata: resample.ByLabel(labels)} keeps every
	// stratum's size in each replicate, and resample.Grouped{Groups:
	// resample.ByLabel(seasons)} draws whole groups.
	Scheme resample.Scheme
	Seed   uint64
	// Workers is the number of goroutines fitting replicates. 0 means
	// runtime.GOMAXPROCS(0); 1 means every replicate runs in order on the
	// calling goroutine. Results do not depend on it.
	Workers int
	// Progress, if not nil, is called after each replicate is delivered
	// (kept, or received by the Sink) with done = 1, 2, ... and the total,
	// on the calling goroutine, never concurrently. It is not called for
	// the full-data fit nor for replicates a stopped run did not deliver.
	Progress func(done, total int)
	// StopOnError stops the run at the first failed replicate or callback
	// error it sees: the rest are cancelled and the run returns a
	// *StopError wrapping that failure. By default a failure is recorded
	// against its replicate and the run goes on.
	StopOnError bool
	// RecordPanics records a panic in a callback, Builder, Encoder, Fitter
	// or Predictor as that replicate's failure (a *ReplicateError wrapping
	// a PanicError). By default the run stops and re-raises the panic on
	// the calling goroutine.
	RecordPanics bool
	// Sink, if not nil, receives every replicate's record as it is
	// delivered, instead of the Keepers accumulating values; see [Sink].
	Sink Sink
	// Order is the order in which Sink receives replicates.
	Order Order
	// Buffer is the size of the reorder buffer for Order InOrder: at most
	// Buffer replicates are in progress or waiting for an earlier one.
	// 0 means 4 × Workers. A Buffer smaller than Workers leaves workers
	// idle.
	Buffer int
	// Refit makes Run refit every replicate (learn, fit, predict, call
	// back) even where its batched least-squares path applies (see
	// [Run]), for comparison and debugging. Compare and Predict always
	// refit.
	Refit bool
}

func (o *Options) workers() int {
	if o.Workers < 0 {
		panic("inspect: negative Options.Workers")
	}
	if o.Workers == 0 {
		return runtime.GOMAXPROCS(0)
	}
	return o.Workers
}

func (o *Options) engine(total int) *engine {
	w := min(o.workers(), max(total, 1))
	if o.Buffer < 0 {
		panic("inspect: negative Options.Buffer")
	}
	if o.Order != InOrder && o.Order != AsDone {
		panic(fmt.Sprintf("inspect: invalid Options.Order %d", int(o.Order)))
	}
	buf := o.Buffer
	if buf == 0 {
		buf = 4 * w
	}
	return &engine{
		total:       total,
		workers:     w,
		buffer:      buf,
		ordered:     o.Sink != nil && o.Order == InOrder,
		progress:    o.Progress,
		stopOnError: o.StopOnError,
	}
}

// Result is what a run leaves besides the Keepers' values.
//
// A Result is written only by the run that returns it and is safe to read
// concurrently afterwards.
type Result struct {
	// Total is the number of replicates in the plan.
	Total int
	// Finished is the number of replicates delivered. It is Total unless
	// the run stopped; a stopped InOrder stream delivered exactly
	// replicates 0 to Finished−1.
	Finished int
	// Failed is the number of delivered replicates whose learn, fit,
	// encoding or prediction failed. Callback failures are counted by
	// each Keeper ([Kept.Count]).
	Failed int
	// Errs holds, per replicate, nil, the *ReplicateError of a failed
	// replicate, or ErrNotRun. It is nil for a streamed run.
	Errs []error
	// Full is the model fitted to all rows.
	Full *Model
}

// Replicate is what a [Callback] sees of one fitted replicate, or of the
// full-data fit. It and its slices are valid only during the call.
//
// A callback may read its Replicate from several goroutines during the
// call but must not modify it.
type Replicate struct {
	// ID is the 0-based replicate number, or −1 for the full-data fit.
	ID int
	// Split is the replicate's resample, or nil for the full-data fit.
	Split *resample.Split
	// Encoder is the feature set learned on the replicate's in-bag dates.
	Encoder features.Encoder
	// Fitted is the model fitted to the replicate's in-bag rows.
	Fitted fit.Predictor
	// Full is the model fitted to all rows, or nil for the full-data fit
	// itself.
	Full *Model
	// Rows are the evaluation rows, 0-based and increasing: the split's
	// out-of-bag rows, or every row for the full-data fit (so an error
	// computed there is the apparent, in-sample error).
	Rows []int
	// Design holds the evaluation rows' columns: the learned ones, then
	// the Extra ones.
	Design *features.Table
	// Outcome and Predicted are the evaluation rows' outcomes and the
	// fitted model's predictions for them.
	Outcome, Predicted []float64
	// Weights are the evaluation rows' case weights, or nil if the data
	// has none.
	Weights []float64
}

// Model is a fitted model together with the feature set it was fitted on,
// ready to predict for new dates. A Model is immutable and safe for
// concurrent use by many goroutines, provided its Encoder and Predictor
// keep the promises of [features.Encoder] and [fit.Predictor].
type Model struct {
	// Encoder is the learned feature set.
	Encoder features.Encoder
	// Predictor is the fitted model.
	Predictor fit.Predictor
	// extra are the names of the caller's extra columns.
	extra []string
	names []string
}

// Names returns the design's column names: the learned ones, then the
// extra ones.
func (m *Model) Names() []string { return append([]string(nil), m.names...) }

// Design returns the design for new rows: the learned columns of dates and
// the extra columns, taken by name from extra (nil if the model has none).
// It returns an error if a date cannot be encoded or an extra column is
// missing or of the wrong length.
func (m *Model) Design(dates []time.Time, extra *features.Table) (*features.Table, error) {
	t, err := features.Apply(m.Encoder, dates)
	if err != nil {
		return nil, err
	}
	if len(m.extra) == 0 {
		if extra != nil && extra.Width() > 0 {
			return nil, fmt.Errorf("inspect: the model has no extra columns, got %d", extra.Width())
		}
		return t, nil
	}
	if extra == nil {
		return nil, fmt.Errorf("inspect: the model needs extra columns %q, got none", m.extra)
	}
	if extra.Width() != len(m.extra) {
		return nil, fmt.Errorf("inspect: the model needs %d extra columns %q, got %d", len(m.extra), m.extra, extra.Width())
	}
	for _, name := range m.extra {
		col, ok := extra.Lookup(name)
		if !ok {
			return nil, fmt.Errorf("inspect: extra column %q missing", name)
		}
		if len(col) != len(dates) {
			return nil, fmt.Errorf("inspect: extra column %q has %d rows for %d dates", name, len(col), len(dates))
		}
		if err := t.Append(name, col); err != nil {
			return nil, err
		}
	}
	return t, nil
}

// Predict writes the model's prediction for each date into dst and returns
// it; dst is allocated when nil and must otherwise have len(dates)
// elements. It returns an error from [Model.Design].
func (m *Model) Predict(dst []float64, dates []time.Time, extra *features.Table) ([]float64, error) {
	x, err := m.Design(dates, extra)
	if err != nil {
		return nil, err
	}
	if dst != nil && len(dst) != len(dates) {
		panic("inspect: Model.Predict: len(dst) != len(dates)")
	}
	if len(dates) == 0 {
		if dst == nil {
			dst = []float64{}
		}
		return dst, nil
	}
	return m.Predictor.Predict(dst, x), nil
}

// Run fits the feature set fs and opts.Fitter to all rows of d, then to
// every replicate of opts.Scheme, and calls each of keep on the full-data
// fit and on every replicate.
//
// For a replicate, fs learns on the in-bag dates, each repeated as often as
// its count (once each under a weighting scheme), and is applied to the
// in-bag and out-of-bag rows. The estimator is fitted to the distinct
// in-bag rows, with their counts (or weights) times Data.Weights as case
// weights; no row is copied. When Data.Weights is nil, the scheme draws
// counts and the Fitter implements [fit.FrequencyWeigher], its
// FrequencyWeighted estimator is used, so that counts mean row copies.
// When Data.Weights is set, the scheme draws counts and the Fitter
// implements [fit.CountFitter], its FitCounts gets the in-bag rows'
// Data.Weights and counts apart, so that counts mean row copies that keep
// their weights.
// The model then predicts the out-of-bag rows ([Split.Out]) and the
// callbacks run.
//
// # The batched path
//
// Run does not refit the replicates when nothing kept would differ: it
// then gets every replicate's coefficients and out-of-bag metrics from one
// batched least-squares computation ([fit.Batch]) over the full-data
// design and the replicates' counts, which is many times faster. It does
// so when all of these hold:
//
//   - opts.Refit is false and Data.Weights is nil;
//   - fs learns nothing from the rows: [features.Adapts](fs) is false
//     ([features.Intercept], a [features.Set] without Indicator parts,
//     holiday.Columns without Seen, and Joins of these), so every
//     replicate's learned design is the full-data design's rows;
//   - opts.Fitter is fit.OLS with Cov Classical, or fit.Ridge (or a
//     pointer to either), read as frequency-weighted, as above;
//   - every Keeper is [KeepCoefficients] or [KeepMetrics];
//   - the splits have Counts and their Out rows are exactly the rows of
//     count zero (the bootstrap schemes, jackknife and k-fold; not the
//     Bayesian bootstrap nor rolling origins). A split found not to
//     qualify while the run is under way sends it back to refitting from
//     that replicate on.
//
// The full-data fit and its callbacks are the same on both paths. Values
// agree with refitting to about 10⁻¹⁰ relative (Cholesky on standardised
// cross-products instead of QR; a replicate where that is not safe, such
// as one missing a holiday, is refitted by QR inside the batch, so it has
// the same not-estimable coefficients), failures are the same, and the
// results are bit-identical for any Workers. Progress, Sink, StopOnError
// and cancellation behave as on the generic path; the context is checked
// between blocks of at most 1024 replicates and between deliveries.
//
// Run returns an error, and no Result, if the plan cannot be made or the
// full-data fit (learn, encode or fit) fails. A failed replicate does not
// stop the run unless opts.StopOnError is set. If ctx is cancelled, Run
// returns promptly, after the replicates in progress, with the partial
// Result and a *[StopError] that wraps ctx.Err(). See the package
// documentation for the guarantees on order, determinism and panics.
//
// Run panics if d's slices differ in length, fs, opts.Fitter or
// opts.Scheme is nil, an option is out of range, a Keeper is given twice or
// two share a name, or a Keeper is in use by another run.
func Run(ctx context.Context, d Data, fs features.Builder, opts Options, keep ...Keeper) (*Result, error) {
	n := d.rows("Run")
	if fs == nil {
		panic("inspect: Run: nil features.Builder")
	}
	if opts.Fitter == nil {
		panic("inspect: Run: nil Options.Fitter")
	}
	if opts.Scheme == nil {
		panic("inspect: Run: nil Options.Scheme")
	}
	kbs := keepers(keep)
	for _, kb := range kbs {
		if !kb.busy.CompareAndSwap(false, true) {
			panic(fmt.Sprintf("inspect: Run: Kept %q is in use by another run", kb.name))
		}
	}
	defer func() {
		for _, kb := range kbs {
			kb.busy.Store(false)
		}
	}()
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	plan, err := opts.Scheme.Plan(n, opts.Seed)
	if err != nil {
		return nil, err
	}
	total := plan.Len()
	eng := opts.engine(total)
	ru := newRunner(&d, opts, kbs)
	stream := opts.Sink != nil
	for _, kb := range kbs {
		kb.begin(total, stream)
	}

	if err := ru.fitFull(ctx, fs); err != nil {
		return nil, err
	}
	res := &Result{Total: total, Full: ru.full}
	if !stream {
		res.Errs = make([]error, total)
		for i := range res.Errs {
			res.Errs[i] = ErrNotRun
		}
	}

	newWork := func() workFunc {
		sc := &scratch{}
		return func(ctx context.Context, r int, rec *Record) {
			stage := "split"
			defer ru.catch(r, &stage, rec)
			sp := plan.Split(r, &sc.split)
			if err := ru.fitSplit(fs, sp, sc, &stage); err != nil {
				ru.failAll(rec, &ReplicateError{Replicate: r, Err: err})
				return
			}
			ru.callbacks(ctx, &sc.rep, rec)
		}
	}
	deliver := func(rec *Record) error {
		if rec.Err != nil {
			res.Failed++
		}
		if stream {
			return opts.Sink.Receive(rec)
		}
		for i, kb := range kbs {
			kb.store(rec.Replicate, rec.slots[i])
		}
		res.Errs[rec.Replicate] = rec.Err
		return nil
	}
	if br := ru.batchPath(fs, &opts, plan, eng.workers); br != nil {
		done, next, err := br.run(ctx, &opts, deliver)
		if err != nil || next == total {
			res.Finished = done
			return res, err
		}
		eng.first = next // a split the batched path cannot take: refit from it
	}
	res.Finished, err = eng.run(ctx, newWork, ru.newRecord, deliver)
	return res, err
}

// keepers checks keep and returns the runs' view of them.
func keepers(keep []Keeper) []*keepBase {
	kbs := make([]*keepBase, len(keep))
	names := make(map[string]bool, len(keep))
	for i, k := range keep {
		if k == nil {
			panic(fmt.Sprintf("inspect: Keeper %d is nil", i+1))
		}
		kb := k.base()
		if names[kb.name] {
			panic(fmt.Sprintf("inspect: two Keepers named %q", kb.name))
		}
		names[kb.name] = true
		kbs[i] = kb
	}
	return kbs
}

// runner holds what every worker of a run reads and nobody writes.
type runner struct {
	d            *Data
	n            int
	fitter, freq fit.Fitter
	counts       fit.CountFitter // the Fitter's, when Data.Weights is set
	keepers      []*keepBase
	recordPanics bool
	full         *Model
	fullX        *features.Table // the full-data design
	extraNames   []string
	all          []int // 0..n-1
}

func newRunner(d *Data, opts Options, kbs []*keepBase) *runner {
	ru := &runner{d: d, n: len(d.Dates), fitter: opts.Fitter, keepers: kbs, recordPanics: opts.RecordPanics}
	if fw, ok := opts.Fitter.(fit.FrequencyWeigher); ok && d.Weights == nil {
		ru.freq = fw.FrequencyWeighted()
	}
	if cf, ok := opts.Fitter.(fit.CountFitter); ok && d.Weights != nil {
		ru.counts = cf
	}
	if d.Extra != nil {
		ru.extraNames = d.Extra.Names()
	}
	ru.all = make([]int, ru.n)
	for i := range ru.all {
		ru.all[i] = i
	}
	return ru
}

func (ru *runner) newRecord() *Record {
	rec := &Record{keepers: ru.keepers, slots: make([]any, len(ru.keepers))}
	for i, kb := range ru.keepers {
		rec.slots[i] = kb.newSlot()
	}
	return rec
}

// catch turns a panic in replicate r's work into a failure or a panic to
// re-raise. It must be deferred.
func (ru *runner) catch(r int, stage *string, rec *Record) {
	v := recover()
	if v == nil {
		return
	}
	pe := PanicError{Replicate: r, Where: *stage, Value: v, Stack: debug.Stack()}
	if ru.recordPanics {
		ru.failAll(rec, &ReplicateError{Replicate: r, Err: pe})
		return
	}
	rec.panic = &pe
}

// failAll records err as the failure of the replicate and of every
// callback.
func (ru *runner) failAll(rec *Record, err error) {
	rec.Err = err
	rec.failed = true
	for i, kb := range rec.keepers {
		kb.fail(rec.slots[i], err)
	}
}

// callbacks runs every Keeper on rep.
func (ru *runner) callbacks(ctx context.Context, rep *Replicate, rec *Record) {
	for i, kb := range ru.keepers {
		if !ru.callOne(ctx, kb, rep, rec.slots[i], rec) {
			return
		}
	}
}

// callOne runs one callback and reports whether the replicate may go on.
func (ru *runner) callOne(ctx context.Context, kb *keepBase, rep *Replicate, s any, rec *Record) (ok bool) {
	defer func() {
		v := recover()
		if v == nil {
			return
		}
		pe := PanicError{Replicate: rep.ID, Where: fmt.Sprintf("callback %q", kb.name), Value: v, Stack: debug.Stack()}
		if ru.recordPanics {
			kb.fail(s, &ReplicateError{Replicate: rep.ID, Err: pe})
			rec.failed = true
			ok = true
			return
		}
		rec.panic = &pe
		ok = false
	}()
	if err := kb.call(ctx, rep, s); err != nil {
		rec.failed = true
	}
	return true
}

// fitFull fits all rows, runs the callbacks on the full-data fit and sets
// ru.full. A panic in a callback is re-raised here, on the caller's
// goroutine, unless panics are recorded.
func (ru *runner) fitFull(ctx context.Context, fs features.Builder) error {
	d := ru.d
	enc, err := fs.Learn(d.Dates)
	if err != nil {
		return &ReplicateError{Replicate: -1, Err: err}
	}
	m := &Model{Encoder: enc, extra: ru.extraNames}
	x, err := features.Apply(enc, d.Dates)
	if err == nil && d.Extra != nil && d.Extra.Width() > 0 {
		err = x.Join(d.Extra)
	}
	if err != nil {
		return &ReplicateError{Replicate: -1, Err: err}
	}
	m.names = x.Names()
	p, err := ru.fitter.Fit(x, d.Outcome, d.Weights)
	if err != nil {
		return &ReplicateError{Replicate: -1, Err: err}
	}
	m.Predictor = p
	ru.full, ru.fullX = m, x
	rep := &Replicate{
		ID: -1, Encoder: enc, Fitted: p, Rows: ru.all, Design: x,
		Outcome: d.Outcome, Weights: d.Weights,
	}
	if ru.n > 0 {
		rep.Predicted = p.Predict(nil, x)
	}
	rec := ru.newRecord()
	reset(rec, -1)
	ru.callbacks(ctx, rep, rec)
	if rec.panic != nil {
		panic(*rec.panic)
	}
	for i, kb := range ru.keepers {
		kb.storeFull(rec.slots[i])
	}
	return nil
}

// scratch is one worker's reusable memory.
type scratch struct {
	split                      resample.Split
	in                         []int
	learn, inDates, outDates   []time.Time
	yIn, wIn, yOut, wOut, pred []float64
	cIn                        []float64 // in-bag counts, for a CountFitter
	xIn, xOut                  [][]float64
	rep                        Replicate
}

// fitSplit learns fs on sp's in-bag rows, fits them, encodes the out rows
// and predicts them, leaving the result in sc.rep. *stage names the step
// in progress, for panics.
func (ru *runner) fitSplit(fs features.Builder, sp *resample.Split, sc *scratch, stage *string) error {
	d := ru.d
	if (sp.Counts == nil) == (sp.Weights == nil) || len(sp.Counts)+len(sp.Weights) != ru.n {
		panic(fmt.Sprintf("inspect: the scheme's split %d has neither counts nor weights of length %d", sp.Replicate, ru.n))
	}
	sc.in = sp.InBag(sc.in[:0])
	in, out := sc.in, sp.Out
	sc.learn, sc.inDates, sc.yIn, sc.wIn = sc.learn[:0], sc.inDates[:0], sc.yIn[:0], sc.wIn[:0]
	// copies: the counts go to the CountFitter apart from the weights.
	copies := sp.Counts != nil && ru.counts != nil
	sc.cIn = sc.cIn[:0]
	for _, i := range in {
		t := d.Dates[i]
		sc.inDates = append(sc.inDates, t)
		sc.yIn = append(sc.yIn, d.Outcome[i])
		w := sp.Weight(i)
		if copies {
			sc.cIn = append(sc.cIn, w)
			w = d.Weights[i]
		} else if d.Weights != nil {
			w *= d.Weights[i]
		}
		sc.wIn = append(sc.wIn, w)
		if sp.Counts != nil {
			for range sp.Counts[i] {
				sc.learn = append(sc.learn, t)
			}
		}
	}
	learn := sc.learn
	if sp.Counts == nil {
		learn = sc.inDates
	}
	*stage = "learn"
	enc, err := fs.Learn(learn)
	if err != nil {
		return fmt.Errorf("inspect: learn: %w", err)
	}
	*stage = "encode"
	xIn, err := ru.design(enc, sc.inDates, in, &sc.xIn)
	if err != nil {
		return err
	}
	fitter := ru.fitter
	if sp.Counts != nil && ru.freq != nil {
		fitter = ru.freq
	}
	*stage = "fit"
	var model fit.Predictor
	if copies {
		model, err = ru.counts.FitCounts(xIn, sc.yIn, sc.wIn, sc.cIn)
	} else {
		model, err = fitter.Fit(xIn, sc.yIn, sc.wIn)
	}
	if err != nil {
		return err
	}
	*stage = "encode"
	sc.outDates, sc.yOut = sc.outDates[:0], sc.yOut[:0]
	for _, i := range out {
		sc.outDates = append(sc.outDates, d.Dates[i])
		sc.yOut = append(sc.yOut, d.Outcome[i])
	}
	var wOut []float64
	if d.Weights != nil {
		sc.wOut = sc.wOut[:0]
		for _, i := range out {
			sc.wOut = append(sc.wOut, d.Weights[i])
		}
		wOut = sc.wOut
	}
	xOut, err := ru.design(enc, sc.outDates, out, &sc.xOut)
	if err != nil {
		return err
	}
	*stage = "predict"
	if cap(sc.pred) < len(out) {
		sc.pred = make([]float64, len(out))
	}
	pred := sc.pred[:len(out)]
	if len(out) > 0 {
		pred = model.Predict(pred, xOut)
	}
	sc.rep = Replicate{
		ID: sp.Replicate, Split: sp, Encoder: enc, Fitted: model, Full: ru.full,
		Rows: out, Design: xOut, Outcome: sc.yOut, Predicted: pred, Weights: wOut,
	}
	return nil
}

// design encodes dates with enc and appends the extra columns of rows,
// gathered into the buffers *bufs.
func (ru *runner) design(enc features.Encoder, dates []time.Time, rows []int, bufs *[][]float64) (*features.Table, error) {
	t := features.NewTable(len(dates))
	if err := enc.Encode(t, dates); err != nil {
		return nil, err
	}
	if len(ru.extraNames) == 0 {
		return t, nil
	}
	if len(*bufs) < len(ru.extraNames) {
		*bufs = make([][]float64, len(ru.extraNames))
	}
	for j, name := range ru.extraNames {
		col := ru.d.Extra.Column(j)
		b := (*bufs)[j][:0]
		for _, i := range rows {
			b = append(b, col[i])
		}
		(*bufs)[j] = b
		if err := t.Append(name, b); err != nil {
			return nil, err
		}
	}
	return t, nil
}
