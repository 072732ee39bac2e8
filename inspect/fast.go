package inspect

import (
	"context"
	"sync"
	"sync/atomic"

	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/fit"
	"github.com/kalends/kalends/resample"
)

// batchRun is a run's batched least-squares path (see [Run]): the
// replicates' coefficients and out-of-bag metrics from [fit.Batch], without
// a fitted model per replicate.
type batchRun struct {
	ru    *runner
	plan  resample.Plan
	bt    fit.Batch
	total int
	pool  sync.Pool // *resample.Split
}

// batchPath returns the batched path of a run, or nil when the run must
// refit every replicate. It applies when all of these hold: Refit is not
// set; the data has no case weights; the feature set learns nothing from
// the rows (features.Adapts is false), so every replicate's design is the
// full-data design's rows; the estimator, after FrequencyWeighted, is
// fit.OLS with frequency weights and classical standard errors, or
// fit.Ridge with frequency weights; every
// Keeper is KeepCoefficients or KeepMetrics; and the plan's first split
// has counts, with Out its rows of count zero (later splits are checked as
// they are drawn).
func (ru *runner) batchPath(fs features.Builder, opts *Options, plan resample.Plan, workers int) *batchRun {
	if opts.Refit || ru.d.Weights != nil || ru.n == 0 || plan.Len() == 0 || features.Adapts(fs) {
		return nil
	}
	for _, kb := range ru.keepers {
		if kb.builtin == userKeeper {
			return nil
		}
	}
	var bt fit.Batch
	switch f := ru.freq.(type) {
	case fit.OLS:
		if !batchOLS(f, ru.full.Predictor) {
			return nil
		}
		bt.Tol = f.Tol
	case *fit.OLS:
		if f == nil || !batchOLS(*f, ru.full.Predictor) {
			return nil
		}
		bt.Tol = f.Tol
	case fit.Ridge:
		if !batchRidge(f, ru.full.Predictor) {
			return nil
		}
		bt.Ridge = &fit.Ridge{Lambda: f.Lambda}
	case *fit.Ridge:
		if f == nil || !batchRidge(*f, ru.full.Predictor) {
			return nil
		}
		bt.Ridge = &fit.Ridge{Lambda: f.Lambda}
	default:
		return nil
	}
	sp := plan.Split(0, nil)
	if !zeroOut(sp, ru.n) {
		return nil
	}
	br := &batchRun{ru: ru, plan: plan, total: plan.Len()}
	bt.Workers = workers
	br.bt = bt
	for _, kb := range ru.keepers {
		if kb.builtin == metricsKeeper {
			br.bt.OutOfBag = true
		}
	}
	return br
}

// batchOLS reports whether Batch reproduces o's replicate fits.
func batchOLS(o fit.OLS, full fit.Predictor) bool {
	_, ok := full.(*fit.OLSFit)
	return ok && o.Weights == fit.Frequency && o.Cov == fit.Classical
}

// batchRidge reports whether Batch reproduces r's replicate fits.
func batchRidge(r fit.Ridge, full fit.Predictor) bool {
	_, ok := full.(*fit.RidgeFit)
	return ok && r.Weights == fit.Frequency
}

// zeroOut reports whether sp has counts for n rows and its Out are exactly
// the rows of count zero, as the batched path's out-of-bag pass assumes.
func zeroOut(sp *resample.Split, n int) bool {
	if sp.Counts == nil || sp.Weights != nil || len(sp.Counts) != n {
		return false
	}
	k := 0
	for i, c := range sp.Counts {
		if c != 0 {
			continue
		}
		if k >= len(sp.Out) || sp.Out[k] != i {
			return false
		}
		k++
	}
	return k == len(sp.Out)
}

// chunk is the number of replicates fitted by one Batch call: large enough
// that a call's setup (a few passes over the data) is small beside it,
// small enough that cancellation is seen about every 2²⁸ flops.
func (br *batchRun) chunk() int {
	n, p := br.ru.n, len(br.ru.full.names)
	q := p*(p+1)/2 + p + 2
	return min(max((1<<28)/max(n*q, 1), 128), 1024)
}

// run delivers every replicate from the batched path, in order, and
// returns the number delivered and the first replicate it could not do
// (total when it did them all); the caller refits from there. It stops
// early, as the generic path does, on cancellation, a sink error or, with
// StopOnError, a failure.
func (br *batchRun) run(ctx context.Context, opts *Options, deliver func(*Record) error) (delivered, next int, err error) {
	ru := br.ru
	rec := ru.newRecord()
	step := br.chunk()
	for r0 := 0; r0 < br.total; r0 += step {
		if err := ctx.Err(); err != nil {
			return delivered, r0, &StopError{Finished: delivered, Total: br.total, Err: err}
		}
		nr := min(step, br.total-r0)
		var bad atomic.Bool
		bf, ferr := br.bt.Fit(ru.fullX, ru.d.Outcome, nil, nr, br.counts(r0, &bad))
		if ferr != nil || bad.Load() {
			return delivered, r0, nil
		}
		for rr := range nr {
			r := r0 + rr
			if err := ctx.Err(); err != nil {
				return delivered, r, &StopError{Finished: delivered, Total: br.total, Err: err}
			}
			reset(rec, r)
			br.fill(ctx, bf, rr, rec)
			derr := deliver(rec)
			delivered++
			if opts.Progress != nil {
				opts.Progress(delivered, br.total)
			}
			if derr != nil {
				return delivered, br.total, &StopError{Finished: delivered, Total: br.total, Err: derr}
			}
			if rec.failed && opts.StopOnError {
				return delivered, br.total, &StopError{Finished: delivered, Total: br.total, Err: firstFailure(rec)}
			}
		}
	}
	return delivered, br.total, nil
}

// counts is the CountsFunc of the replicates r0, r0+1, ...; it sets bad
// for a split that the batched path cannot take.
func (br *batchRun) counts(r0 int, bad *atomic.Bool) fit.CountsFunc {
	n := br.ru.n
	return func(r int, dst []int32) {
		sp, _ := br.pool.Get().(*resample.Split)
		sp = br.plan.Split(r0+r, sp)
		if zeroOut(sp, n) {
			copy(dst, sp.Counts)
		} else {
			bad.Store(true)
			clear(dst)
		}
		br.pool.Put(sp)
	}
}

// fill writes replicate rr of bf into rec's slots.
func (br *batchRun) fill(ctx context.Context, bf *fit.BatchFit, rr int, rec *Record) {
	ru := br.ru
	r := rec.Replicate
	if err := bf.Err[rr]; err != nil {
		ru.failAll(rec, &ReplicateError{Replicate: r, Err: err})
		return
	}
	p := bf.P
	for i, kb := range ru.keepers {
		switch kb.builtin {
		case coefficientsKeeper:
			sl := rec.slots[i].(*slot[[]fit.Coefficient])
			cs := make([]fit.Coefficient, p)
			for j := range cs {
				k := rr*p + j
				cs[j] = fit.Coefficient{Name: ru.full.names[j], Estimate: bf.Coef[k], StdErr: bf.StdErr[k], Estimable: bf.Estimable[k]}
			}
			sl.v, sl.err = cs, nil
		case metricsKeeper:
			m := bf.OutOfBagRows[rr]
			if m == 0 {
				// Let the callback itself report the missing rows.
				ru.callOne(ctx, kb, &Replicate{ID: r}, rec.slots[i], rec)
				continue
			}
			sl := rec.slots[i].(*slot[Metrics])
			sl.v = Metrics{N: m, RMSE: bf.OutOfBagRMSE[rr], MAE: bf.OutOfBagMAE[rr], R2: bf.OutOfBagR2[rr]}
			sl.err = nil
		}
	}
}
