package inspect

import (
	"context"
	"fmt"
	"math"

	"github.com/kalends/kalends/features"
)

// Comparison holds two feature sets fitted on the very same replicates:
// for every replicate, both were learned and fitted on its in-bag rows and
// measured on its out-of-bag rows, so their difference in error is paired
// and free of the replicate-to-replicate noise that both share.
//
// A Comparison is written only by the Compare that returns it; its methods
// only read it and are safe for concurrent use.
type Comparison struct {
	// Total is the number of replicates in the plan, Finished the number
	// delivered and Failed the number in which either fit failed.
	Total, Finished, Failed int
	// Errs holds, per replicate, nil, the *ReplicateError of a replicate
	// in which either feature set failed (its message says which), or
	// ErrNotRun.
	Errs []error
	// A and B hold each feature set's out-of-bag metrics per replicate,
	// zero where Errs is not nil.
	A, B []Metrics
	// FullA and FullB are the full-data fits' apparent metrics.
	FullA, FullB Metrics
	// ModelA and ModelB are the full-data models.
	ModelA, ModelB *Model
}

// Compare fits feature sets a and b, with opts.Fitter, to every replicate
// of opts.Scheme (the same splits for both) and measures each on the
// replicate's out-of-bag rows, as [Run] with [KeepMetrics] would for each
// alone: Compare's A equals the metrics of Run with a, bit for bit, for
// the same seed. Use [Comparison.RMSEDiff] and [Comparison.Summary] for
// the paired difference.
//
// A replicate in which either fit fails is recorded as failed for both,
// so the two are always measured on the same replicates. Options apply as
// in Run, except that Sink must be nil. Compare returns an error if the
// plan cannot be made or either full-data fit fails; if ctx is cancelled
// it returns the partial Comparison and a *[StopError]. It panics as Run
// does, and if opts.Sink is set.
func Compare(ctx context.Context, d Data, a, b features.Builder, opts Options) (*Comparison, error) {
	n := d.rows("Compare")
	if a == nil || b == nil {
		panic("inspect: Compare: nil features.Builder")
	}
	if opts.Fitter == nil {
		panic("inspect: Compare: nil Options.Fitter")
	}
	if opts.Scheme == nil {
		panic("inspect: Compare: nil Options.Scheme")
	}
	if opts.Sink != nil {
		panic("inspect: Compare: Options.Sink is not supported")
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	plan, err := opts.Scheme.Plan(n, opts.Seed)
	if err != nil {
		return nil, err
	}
	total := plan.Len()
	eng := opts.engine(total)
	metrics := KeepMetrics()
	kbs := []*keepBase{metrics.base()}
	ruA, ruB := newRunner(&d, opts, kbs), newRunner(&d, opts, kbs)
	metrics.b.begin(0, true)
	if err := ruA.fitFull(ctx, a); err != nil {
		return nil, fmt.Errorf("inspect: Compare: features A: %w", err)
	}
	fa, errA := metrics.Full()
	if err := ruB.fitFull(ctx, b); err != nil {
		return nil, fmt.Errorf("inspect: Compare: features B: %w", err)
	}
	fb, errB := metrics.Full()
	if errA != nil || errB != nil {
		return nil, fmt.Errorf("inspect: Compare: full-data metrics: %v; %v", errA, errB)
	}
	c := &Comparison{Total: total, Errs: make([]error, total), A: make([]Metrics, total), B: make([]Metrics, total),
		FullA: fa, FullB: fb, ModelA: ruA.full, ModelB: ruB.full}
	for i := range c.Errs {
		c.Errs[i] = ErrNotRun
	}
	type payload struct{ a, b Metrics }
	newRecord := func() *Record {
		rec := ruA.newRecord()
		rec.payload = &payload{}
		return rec
	}
	newWork := func() workFunc {
		sc := &scratch{}
		return func(ctx context.Context, r int, rec *Record) {
			pl := rec.payload.(*payload)
			sp := plan.Split(r, &sc.split)
			for _, side := range []struct {
				ru   *runner
				fs   features.Builder
				name string
				dst  *Metrics
			}{{ruA, a, "A", &pl.a}, {ruB, b, "B", &pl.b}} {
				stage := fmt.Sprintf("features %s: split", side.name)
				fail := func(err error) {
					side.ru.failAll(rec, &ReplicateError{Replicate: r, Err: fmt.Errorf("features %s: %w", side.name, err)})
				}
				ok := func() bool {
					defer side.ru.catch(r, &stage, rec)
					if err := side.ru.fitSplit(side.fs, sp, sc, &stage); err != nil {
						fail(err)
						return false
					}
					side.ru.callbacks(ctx, &sc.rep, rec)
					return rec.panic == nil
				}()
				if !ok || rec.Err != nil {
					return
				}
				v, err := metrics.From(rec)
				if err != nil {
					fail(err)
					return
				}
				*side.dst = v
			}
		}
	}
	deliver := func(rec *Record) error {
		r := rec.Replicate
		c.Errs[r] = rec.Err
		if rec.Err != nil {
			c.Failed++
			return nil
		}
		pl := rec.payload.(*payload)
		c.A[r], c.B[r] = pl.a, pl.b
		return nil
	}
	c.Finished, err = eng.run(ctx, newWork, newRecord, deliver)
	return c, err
}

// RMSEDiff returns the paired difference in out-of-bag RMSE, B minus A,
// as a [Statistic] for [Summarize]: Values[r] is replicate r's difference
// (negative when B predicted the held-out rows better) and Errs its
// failures. Its Estimate is the mean difference over the replicates that
// succeeded (0 if none did; Summarize then reports too few replicates).
func (c *Comparison) RMSEDiff() Statistic {
	s := Statistic{Name: "RMSE(B) - RMSE(A)", Values: make([]float64, len(c.A)), Errs: c.Errs}
	var sum float64
	var used int
	for r := range c.A {
		if c.Errs[r] != nil {
			s.Values[r] = math.NaN()
			continue
		}
		s.Values[r] = c.B[r].RMSE - c.A[r].RMSE
		sum += s.Values[r]
		used++
	}
	if used > 0 {
		s.Estimate = sum / float64(used)
	}
	return s
}

// Summary summarises [Comparison.RMSEDiff] with a percentile interval at
// the given level (0 means 0.95): the range in which the paired difference
// in out-of-bag RMSE fell across resampled data sets, with the number of
// replicates it rests on. An interval wholly below zero says that B
// predicted held-out rows better than A in nearly every resample; it does
// not say why, and a calendar column that predicts is not thereby a cause.
// Summary returns the errors of [Summarize].
func (c *Comparison) Summary(level float64) (Summary, error) {
	return Summarize(c.RMSEDiff(), Config{Level: level, Methods: []Method{Percentile}})
}
