package inspect

import "errors"

// Sentinel errors. An error this package returns or records (in
// [Interval.Err], [Result.Errs], [Kept.Errs]) for one of these conditions
// wraps its sentinel, so callers can test with [errors.Is]; a replicate's
// failure also keeps the cause its fit returned (fit.ErrSingular, say).
var (
	// ErrNotRun marks a replicate that a stopped run (cancelled, or
	// stopped at the first failure) never delivered: [Result.Errs] and
	// [Kept.Errs] hold it for those replicates, so that no replicate is
	// missing without a reason.
	ErrNotRun = errors.New("inspect: replicate not run")
	// ErrLevel reports an interval level outside (0, 1).
	ErrLevel = errors.New("inspect: interval level outside (0, 1)")
	// ErrTooFewReplicates reports fewer than 2 usable replicates. A
	// *TooFewError unwraps to it.
	ErrTooFewReplicates = errors.New("inspect: fewer than 2 usable replicates")
	// ErrEstimate reports a full-data estimate that is NaN or infinite.
	// When it is NaN, the error also wraps [ErrNotEstimable].
	ErrEstimate = errors.New("inspect: full-data estimate is not finite")
	// ErrNotEstimable reports a statistic that is not estimable on the
	// full data: its estimate is NaN, as a coefficient's is when its
	// column is constant or collinear with others in the rows given (a
	// holiday none of the dates falls on, with holiday.Columns learning
	// every holiday of its calendar). Such a statistic has no bootstrap
	// distribution: drop the column (for holiday columns, holiday.Columns'
	// Seen option keeps only the holidays the dates contain) or leave the
	// statistic out of the summaries. An error that wraps it also wraps
	// [ErrEstimate].
	ErrNotEstimable = errors.New("inspect: not estimable on the full data")
	// ErrDegenerate reports a bootstrap distribution with no spread: all
	// usable replicate values equal, to a relative 1e-12.
	ErrDegenerate = errors.New("inspect: all replicate values are equal")
	// ErrJackknife reports jackknife or influence values from which the
	// BCa acceleration is undefined (all equal, too few, or not finite).
	ErrJackknife = errors.New("inspect: degenerate jackknife, BCa acceleration undefined")
	// ErrNoAcceleration reports a BCa interval asked for without jackknife
	// values or an acceleration.
	ErrNoAcceleration = errors.New("inspect: BCa needs jackknife values or an acceleration")
	// ErrBiasCorrection reports a BCa bias correction z₀ that is infinite
	// (every replicate on one side of the estimate) or an acceleration so
	// large that the adjusted levels are no longer increasing.
	ErrBiasCorrection = errors.New("inspect: BCa adjustment undefined")
	// ErrNoStdErr reports a studentized interval asked for without a
	// finite, positive full-data standard error or per-replicate ones.
	ErrNoStdErr = errors.New("inspect: studentized interval needs standard errors")
	// ErrNoVariance reports observed values with no spread (or fewer
	// than 2), for which R² is undefined.
	ErrNoVariance = errors.New("inspect: observed values have no variance, R² undefined")
	// ErrNoOutOfBag reports that no row was ever out of bag, so no
	// out-of-bag error can be estimated.
	ErrNoOutOfBag = errors.New("inspect: no row is out of bag in any replicate")

	// errNotFinite is the reason wrapped by errors for a NaN or infinite
	// observed, fitted or predicted value.
	errNotFinite = errors.New("not finite")
)
