// Package inspect runs an estimator over bootstrap replicates and turns the
// replicates into answers: standard errors, bias and confidence intervals
// (percentile, basic, normal, BCa, studentized), out-of-bag prediction
// error with the .632 and .632+ estimators, long-format tables (CSV, JSON,
// aligned text) and plots (SVG, PNG). An interval describes sampling
// variability under the resampling scheme; it does not make a calendar
// effect causal.
//
// # Summaries
//
//   - A fragile result is an error or a typed [Warning], never a silent
//     NaN: fewer than 2 usable replicates, a level outside (0, 1) or a
//     non-finite estimate is an error; an interval that cannot be computed
//     carries its own Err; an endpoint on the most extreme replicates or a
//     pile-up at a bound is a Warning.
//   - Failed and not-estimable replicates are counted in every summary,
//     never silently dropped.
//   - Summaries, tables and plots are plain functions of their arguments:
//     safe for concurrent use, and they never modify their inputs.
//
// # Runs
//
// [Run] fits a feature set and an estimator to the full data, then to every
// replicate of a resampling scheme, and calls the caller's [Keep]
// callbacks on each fitted replicate. [Compare] does so for two feature
// sets on the same splits; [Predict] resamples residuals for prediction
// intervals. They keep these rules:
//
//   - Determinism: replicate r depends only on the seed and r, never on
//     scheduling, so results are bit-identical for any Workers.
//   - Ordering: kept values are written by replicate index; a [Sink] gets
//     records in replicate order (InOrder) or as they finish (AsDone).
//     Progress and Sink calls are made on the calling goroutine, one at a
//     time.
//   - Failures: a failed learn, fit or callback is recorded against its
//     replicate as a *[ReplicateError] that unwraps to the cause, and the
//     run goes on, unless StopOnError is set; replicates never delivered
//     are marked [ErrNotRun]. Counts say how many replicates each result
//     rests on.
//   - Panics: a panic in a callback, Builder, Encoder, Fitter or Predictor
//     is caught in the worker, the run stops, and it is re-raised on the
//     calling goroutine as a [PanicError] carrying the original stack, or
//     recorded as that replicate's failure with RecordPanics.
//   - Cancellation: the context is checked between replicates; a
//     cancelled run returns after the replicates in progress, with a
//     *[StopError] that says how many finished, and leaves no goroutine
//     behind.
//   - Memory: kept values take B times their size (coefficients: B·p);
//     nothing of size n is kept per replicate unless a callback keeps it
//     ([KeepOutOfBag] keeps about 0.37·n values). A streamed run holds at
//     most Workers + Buffer records (InOrder) or about 2·Workers (AsDone).
//   - Sharing: a [Model] (learned feature set and fitted model) is
//     immutable and safe for concurrent prediction by many goroutines.
//   - Batched path: when the feature set learns nothing from the rows, the
//     estimator is fit.OLS with classical standard errors or fit.Ridge,
//     the data has no
//     case weights, the splits are bootstrap counts and only
//     [KeepCoefficients] and [KeepMetrics] are kept, Run gets every
//     replicate's values from one batched least-squares computation
//     ([fit.Batch]) instead of refitting (see [Run] for the exact rule).
//     The values agree with refitting to about 10⁻¹⁰ relative, with the
//     same not-estimable coefficients and failures; every rule above still
//     holds, and with it the cancellation check comes between blocks of
//     replicates. [Options].Refit turns it off.
package inspect
