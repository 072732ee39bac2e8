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
// (Section kept for the run engine's guarantees: determinism, ordering,
// failure handling, cancellation.)
package inspect
