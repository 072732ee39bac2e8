// Package inspect runs an estimator over bootstrap replicates and turns the
// replicates into answers: standard errors, bias and confidence intervals
// (percentile, basic, normal, BCa, studentized), out-of-bag prediction
// error with the .632 and .632+ estimators, long-format tables (CSV, JSON,
// aligned text) and plots (SVG, PNG).
//
// Summaries never hide a fragile result: fewer than 2 usable replicates,
// a level outside (0, 1) or a non-finite estimate is an error; an interval
// that cannot be computed (no spread, a degenerate jackknife, missing
// standard errors) carries its own Err; an endpoint on the most extreme
// replicates, or many replicates tied at a bound, is a typed [Warning].
// Failed and not-estimable replicates are counted in every summary, never
// silently dropped. Summaries and writers are plain functions of their
// arguments, safe for concurrent use, and never modify their inputs.
//
// # Runs
//
// (Section kept for the run engine's guarantees: determinism, ordering,
// failure handling, cancellation.)
package inspect
