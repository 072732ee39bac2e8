package inspect

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"gonum.org/v1/gonum/stat/distuv"
)

// Statistic holds one statistic's bootstrap results, the input of
// [Summarize]. Values may come from any numeric result of a replicate, not
// only a coefficient. Summarize reads the slices and never modifies or
// keeps them.
//
// The zero value has no replicates ([Summarize] reports too few).
// Summarize only reads it, so one Statistic may be summarised from several
// goroutines at once.
type Statistic struct {
	// Name names the statistic in tables and plots.
	Name string
	// Estimate is the statistic on the full data, t₀.
	Estimate float64
	// Values holds the statistic on each replicate, t*ᵣ, indexed by
	// replicate. A NaN or infinite value with no error marks the
	// statistic as not estimable in that replicate (a coefficient
	// dropped for collinearity, say); it is counted, never used.
	Values []float64
	// Errs is nil or has the length of Values; a non-nil Errs[r] marks
	// replicate r as failed, and its value is ignored.
	Errs []error
	// StdErr is the full-data standard error of the statistic, for the
	// studentized interval; zero means none.
	StdErr float64
	// StdErrs is nil or has the length of Values: the statistic's
	// standard error within each replicate, for the studentized interval.
	// Replicates whose standard error is not finite and positive are left
	// out of that interval only.
	StdErrs []float64
	// Jackknife holds the leave-one-out estimates θ₍ᵢ₎ from which the BCa
	// acceleration is computed by [Acceleration].
	Jackknife []float64
	// Acceleration, if not nil, is the BCa acceleration to use instead of
	// one computed from Jackknife (from [InfluenceAcceleration], say).
	Acceleration *float64
}

// Config chooses what [Summarize] computes. The zero value asks for 95%
// intervals by the default methods and the [DavisonHinkley] rule.
type Config struct {
	// Level is the coverage of the intervals, in (0, 1); zero means 0.95.
	Level float64
	// Methods lists the intervals to compute, in order. Nil means
	// Percentile, Basic and Normal, then BCa if Jackknife or Acceleration
	// is set, then Studentized if StdErrs is set.
	Methods []Method
	// Rule is how quantiles are read for the percentile, basic, BCa and
	// studentized intervals.
	Rule QuantileRule
}

// Summary describes one statistic's bootstrap distribution. Its zero
// value describes nothing. A Summary is plain data, safe to read
// concurrently.
type Summary struct {
	// Name is the statistic's name, from [Statistic].
	Name string
	// Estimate is the full-data estimate t₀.
	Estimate float64
	// Mean is the mean of the usable replicate values.
	Mean float64
	// Bias is Mean − Estimate.
	Bias float64
	// StdErr is the bootstrap standard error: the standard deviation of
	// the usable replicate values, with divisor Used − 1.
	StdErr float64
	// Replicates is the number of replicates given; Used of them had a
	// finite value and no error, Failed had an error and NotEstimable a
	// NaN or infinite value without one.
	Replicates, Used, Failed, NotEstimable int
	// FailedShare is (Failed + NotEstimable) / Replicates.
	FailedShare float64
	// FirstErrors holds the first few (at most 3) replicate errors, each
	// naming its 0-based replicate.
	FirstErrors []error
	// Warnings concern the distribution as a whole (see [PileUp]).
	Warnings []Warning
	// Intervals holds one interval per method asked for, in that order.
	Intervals []Interval
}

// Interval returns the summary's interval computed by m, and whether there
// is one.
func (s Summary) Interval(m Method) (Interval, bool) {
	for _, iv := range s.Intervals {
		if iv.Method == m {
			return iv, true
		}
	}
	return Interval{}, false
}

// Interval is a confidence interval for one statistic. When Err is not
// nil the interval could not be computed, Lower and Upper are NaN, and Err
// says why.
//
// An Interval is a plain value, safe to copy and share; the zero value is
// not an interval (its Method is invalid).
type Interval struct {
	// Method is the method that made the interval.
	Method Method
	// Level is the nominal coverage.
	Level float64
	// Lower and Upper are the endpoints.
	Lower, Upper float64
	// Used is the number of replicates the interval rests on.
	Used int
	// BiasCorrection and Acceleration are the BCa z₀ and a; zero for the
	// other methods.
	BiasCorrection, Acceleration float64
	// Warnings concern this interval (see [ExtremeOrder]).
	Warnings []Warning
	// Err is why the interval could not be computed, or nil.
	Err error
}

// WarningKind is the kind of a [Warning].
type WarningKind int

const (
	// ExtremeOrder reports an endpoint read from the smallest or largest
	// replicate values, so it rests on one or two replicates and cannot
	// reach the nominal level: more replicates are needed (Warning.Need).
	ExtremeOrder WarningKind = iota + 1
	// PileUp reports many replicates tied at the smallest or largest
	// value, as a bounded statistic (a share, a variance, a coefficient
	// shrunk to zero) gives when it sits at its bound. It is raised when at
	// least 2 replicates, and at least a share (1 − level)/2 of the usable
	// ones, are tied there: then a percentile endpoint on that side is the
	// tied value itself.
	PileUp
)

// String returns "extreme order statistic" or "pile-up at extreme".
func (k WarningKind) String() string {
	switch k {
	case ExtremeOrder:
		return "extreme order statistic"
	case PileUp:
		return "pile-up at extreme"
	}
	return fmt.Sprintf("WarningKind(%d)", int(k))
}

// End says which end of an interval, or of the bootstrap distribution, a
// [Warning] is about.
type End int

const (
	// LowerEnd is the lower endpoint, or the smallest replicate values.
	LowerEnd End = iota + 1
	// UpperEnd is the upper endpoint, or the largest replicate values.
	UpperEnd
)

// String returns "lower" or "upper".
func (e End) String() string {
	switch e {
	case LowerEnd:
		return "lower"
	case UpperEnd:
		return "upper"
	}
	return fmt.Sprintf("End(%d)", int(e))
}

// Warning flags a result that was computed but may mislead.
//
// A Warning is a plain value, safe to copy and share; the zero value is
// not a warning (its Kind is invalid).
type Warning struct {
	// Kind is what is wrong.
	Kind WarningKind
	// End is the end concerned.
	End End
	// Used is the number of usable replicates the warning concerns.
	Used int
	// Need is the fewest replicates that would give an interior endpoint
	// at this level by the same quantile rule (ExtremeOrder); see
	// [Quantile] and the rules' documentation.
	Need int
	// Count is the number of replicates tied at the extreme (PileUp).
	Count int
	// Value is the tied value (PileUp).
	Value float64
}

// String describes the warning in one line.
func (w Warning) String() string {
	switch w.Kind {
	case ExtremeOrder:
		return fmt.Sprintf("%s endpoint on the most extreme replicates: %d used, at least %d needed for this level", w.End, w.Used, w.Need)
	case PileUp:
		which := "smallest"
		if w.End == UpperEnd {
			which = "largest"
		}
		return fmt.Sprintf("%d of %d replicates tied at the %s value %g", w.Count, w.Used, which, w.Value)
	}
	return fmt.Sprintf("%v at %s end", w.Kind, w.End)
}

// TooFewError reports a statistic with fewer than 2 usable replicates,
// including the case where every replicate failed. It unwraps to
// [ErrTooFewReplicates] and to the first few replicate errors, so
// errors.Is(err, fit.ErrSingular) works when fits failed for that reason.
//
// Errors of this type are not modified after they are returned and are
// safe to read concurrently.
type TooFewError struct {
	// Name is the statistic's name.
	Name string
	// Replicates, Used, Failed and NotEstimable count as in [Summary].
	Replicates, Used, Failed, NotEstimable int
	// First holds the first few (at most 3) replicate errors.
	First []error
}

// Error names the statistic, the counts and the first failures.
func (e *TooFewError) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "inspect: %s: %d usable of %d replicates, need at least 2 (%d failed, %d not estimable)",
		nameOr(e.Name), e.Used, e.Replicates, e.Failed, e.NotEstimable)
	for i, err := range e.First {
		if i == 0 {
			b.WriteString("; first failures: ")
		} else {
			b.WriteString("; ")
		}
		b.WriteString(err.Error())
	}
	return b.String()
}

// Unwrap returns [ErrTooFewReplicates] followed by the first replicate errors.
func (e *TooFewError) Unwrap() []error {
	return append([]error{ErrTooFewReplicates}, e.First...)
}

func nameOr(s string) string {
	if s == "" {
		return "statistic"
	}
	return s
}

// replicateError names the replicate an error came from, unless the
// error's message already does.
type replicateError struct {
	r   int
	err error
}

func (e *replicateError) Error() string {
	msg := e.err.Error()
	if strings.HasPrefix(msg, fmt.Sprintf("replicate %d:", e.r)) {
		return msg
	}
	return fmt.Sprintf("replicate %d: %s", e.r, msg)
}

func (e *replicateError) Unwrap() error { return e.err }

const maxFirstErrors = 3

// estimateError reports a full-data estimate that is not finite, saying
// what a NaN means and what to do about it. It unwraps to ErrEstimate,
// and to ErrNotEstimable when the estimate is NaN.
type estimateError struct {
	op    string // the message's prefix, "inspect: " or "inspect: Histograms: "
	name  string
	value float64
}

func (e *estimateError) Error() string {
	if math.IsNaN(e.value) {
		return fmt.Sprintf("%s%s is not estimable on the full data (its estimate is NaN: for a coefficient, "+
			"its column is constant or collinear with other columns in the rows given), so it has no bootstrap "+
			"distribution; drop the column or leave it out of the summaries", e.op, e.name)
	}
	return fmt.Sprintf("%s%s: full-data estimate is %v, not finite, so it has no bootstrap distribution to summarise",
		e.op, e.name, e.value)
}

func (e *estimateError) Unwrap() []error {
	if math.IsNaN(e.value) {
		return []error{ErrNotEstimable, ErrEstimate}
	}
	return []error{ErrEstimate}
}

// constant reports whether lo and hi are equal to a relative 1e-12.
func constant(lo, hi float64) bool {
	return hi-lo <= 1e-12*math.Max(math.Abs(lo), math.Abs(hi))
}

// Summarize computes the bootstrap summary and intervals of one statistic.
//
// Failed and not-estimable replicates are counted and left out. Summarize
// returns an error if the level is outside (0, 1), if the estimate is not
// finite ([ErrEstimate]; a NaN estimate, a statistic not estimable on the
// full data, also [ErrNotEstimable]), or if fewer than 2 replicates are
// usable (a *[TooFewError]). A
// method that cannot be computed on these replicates (no spread, a
// degenerate jackknife, missing standard errors) sets that interval's Err
// and leaves the other intervals alone. Intervals are never silently NaN.
//
// The bias correction of BCa is z₀ = Φ⁻¹(#{t*ᵣ < t₀}/B), B the usable
// replicates; replicates equal to t₀ count as not below it, as in R's
// boot. The normal interval uses the bootstrap standard error and bias.
//
// Summarize panics if Errs or StdErrs is neither nil nor as long as
// Values, or if c holds an invalid Method or QuantileRule.
func Summarize(r Statistic, c Config) (Summary, error) {
	if r.Errs != nil && len(r.Errs) != len(r.Values) {
		panic("inspect: Summarize: len(Errs) != len(Values)")
	}
	if r.StdErrs != nil && len(r.StdErrs) != len(r.Values) {
		panic("inspect: Summarize: len(StdErrs) != len(Values)")
	}
	for _, m := range c.Methods {
		if !m.valid() {
			panic(fmt.Sprintf("inspect: Summarize: invalid %v", m))
		}
	}
	if c.Rule != DavisonHinkley && c.Rule != R7 {
		panic(fmt.Sprintf("inspect: Summarize: invalid %v", c.Rule))
	}
	level := c.Level
	if level == 0 {
		level = 0.95
	}
	s := Summary{Name: r.Name, Estimate: r.Estimate, Replicates: len(r.Values)}
	if !(level > 0 && level < 1) {
		return s, fmt.Errorf("%w: %v", ErrLevel, c.Level)
	}
	if !finite(r.Estimate) {
		return s, &estimateError{op: "inspect: ", name: nameOr(r.Name), value: r.Estimate}
	}

	used := make([]int, 0, len(r.Values))
	for i, v := range r.Values {
		switch {
		case r.Errs != nil && r.Errs[i] != nil:
			s.Failed++
			if len(s.FirstErrors) < maxFirstErrors {
				s.FirstErrors = append(s.FirstErrors, &replicateError{i, r.Errs[i]})
			}
		case math.IsNaN(v) || math.IsInf(v, 0):
			s.NotEstimable++
		default:
			used = append(used, i)
		}
	}
	s.Used = len(used)
	if s.Replicates > 0 {
		s.FailedShare = float64(s.Failed+s.NotEstimable) / float64(s.Replicates)
	}
	if s.Used < 2 {
		return s, &TooFewError{Name: r.Name, Replicates: s.Replicates, Used: s.Used,
			Failed: s.Failed, NotEstimable: s.NotEstimable, First: s.FirstErrors}
	}

	t := make([]float64, len(used))
	for k, i := range used {
		t[k] = r.Values[i]
	}
	s.Mean, s.StdErr = meanSD(t)
	s.Bias = s.Mean - s.Estimate
	slices.Sort(t)
	degenerate := constant(t[0], t[len(t)-1])
	if !degenerate {
		s.Warnings = pileUps(t, level)
	}

	methods := c.Methods
	if methods == nil {
		methods = []Method{Percentile, Basic, Normal}
		if r.Jackknife != nil || r.Acceleration != nil {
			methods = append(methods, BCa)
		}
		if r.StdErrs != nil {
			methods = append(methods, Studentized)
		}
	}
	lo, hi := (1-level)/2, (1+level)/2
	for _, m := range methods {
		iv := Interval{Method: m, Level: level, Lower: math.NaN(), Upper: math.NaN(), Used: len(t)}
		if degenerate {
			iv.Err = fmt.Errorf("%w: %s is %g in all %d usable replicates", ErrDegenerate, nameOr(r.Name), t[0], len(t))
			s.Intervals = append(s.Intervals, iv)
			continue
		}
		switch m {
		case Percentile:
			iv.Lower, iv.Upper = readAt(&iv, c.Rule, t, lo, hi, LowerEnd, UpperEnd)
		case Basic:
			qhi, qlo := readAt(&iv, c.Rule, t, hi, lo, LowerEnd, UpperEnd)
			iv.Lower, iv.Upper = 2*r.Estimate-qhi, 2*r.Estimate-qlo
		case Normal:
			z := distuv.UnitNormal.Quantile(hi)
			centre := r.Estimate - s.Bias
			iv.Lower, iv.Upper = centre-z*s.StdErr, centre+z*s.StdErr
		case BCa:
			bca(&iv, r, c.Rule, t, lo, hi)
		case Studentized:
			studentized(&iv, r, c.Rule, used, lo, hi)
		}
		s.Intervals = append(s.Intervals, iv)
	}
	return s, nil
}

// readAt reads the p1 and p2 quantiles of sorted t, adding an ExtremeOrder
// warning, labelled e1 or e2, for each that falls on an extreme value.
func readAt(iv *Interval, rule QuantileRule, t []float64, p1, p2 float64, e1, e2 End) (q1, q2 float64) {
	for k, p := range [2]float64{p1, p2} {
		if ok, need := interior(p, len(t), rule); !ok {
			e := e1
			if k == 1 {
				e = e2
			}
			iv.Warnings = append(iv.Warnings, Warning{Kind: ExtremeOrder, End: e, Used: len(t), Need: need})
		}
	}
	return Quantile(p1, rule, t), Quantile(p2, rule, t)
}

func bca(iv *Interval, r Statistic, rule QuantileRule, t []float64, lo, hi float64) {
	var a float64
	switch {
	case r.Acceleration != nil:
		a = *r.Acceleration
		if math.IsNaN(a) || math.IsInf(a, 0) {
			iv.Err = fmt.Errorf("%w: acceleration is %v", ErrJackknife, a)
			return
		}
	case r.Jackknife != nil:
		var err error
		if a, err = Acceleration(r.Jackknife); err != nil {
			iv.Err = err
			return
		}
	default:
		iv.Err = ErrNoAcceleration
		return
	}
	below := 0
	for _, v := range t {
		if v < r.Estimate {
			below++
		}
	}
	if below == 0 || below == len(t) {
		iv.Err = fmt.Errorf("%w: %d of %d replicates below the estimate, bias correction infinite", ErrBiasCorrection, below, len(t))
		return
	}
	z0 := distuv.UnitNormal.Quantile(float64(below) / float64(len(t)))
	iv.BiasCorrection, iv.Acceleration = z0, a
	var adj [2]float64
	for k, p := range [2]float64{lo, hi} {
		w := z0 + distuv.UnitNormal.Quantile(p)
		d := 1 - a*w
		if d <= 0 {
			iv.Err = fmt.Errorf("%w: acceleration %g too large for level %g", ErrBiasCorrection, a, iv.Level)
			return
		}
		adj[k] = distuv.UnitNormal.CDF(z0 + w/d)
	}
	iv.Lower, iv.Upper = readAt(iv, rule, t, adj[0], adj[1], LowerEnd, UpperEnd)
}

func studentized(iv *Interval, r Statistic, rule QuantileRule, used []int, lo, hi float64) {
	if r.StdErrs == nil || !(r.StdErr > 0) || math.IsInf(r.StdErr, 0) {
		iv.Err = fmt.Errorf("%w: full-data standard error %v, per-replicate ones given: %t", ErrNoStdErr, r.StdErr, r.StdErrs != nil)
		return
	}
	z := make([]float64, 0, len(used))
	for _, i := range used {
		se := r.StdErrs[i]
		if se > 0 && !math.IsInf(se, 0) {
			z = append(z, (r.Values[i]-r.Estimate)/se)
		}
	}
	iv.Used = len(z)
	if len(z) < 2 {
		iv.Err = fmt.Errorf("%w: %d replicates with a usable standard error", ErrTooFewReplicates, len(z))
		return
	}
	slices.Sort(z)
	if constant(z[0], z[len(z)-1]) {
		iv.Err = fmt.Errorf("%w: studentized values", ErrDegenerate)
		return
	}
	qhi, qlo := readAt(iv, rule, z, hi, lo, LowerEnd, UpperEnd)
	iv.Lower, iv.Upper = r.Estimate-r.StdErr*qhi, r.Estimate-r.StdErr*qlo
}

// meanSD returns the mean and the standard deviation with divisor n−1.
func meanSD(x []float64) (mean, sd float64) {
	for _, v := range x {
		mean += v
	}
	mean /= float64(len(x))
	var ss, comp float64
	for _, v := range x {
		d := v - mean
		ss += d * d
		comp += d
	}
	n := float64(len(x))
	return mean, math.Sqrt((ss - comp*comp/n) / (n - 1))
}

// pileUps returns PileUp warnings for sorted t.
func pileUps(t []float64, level float64) []Warning {
	var ws []Warning
	min := (1 - level) / 2 * float64(len(t))
	n := len(t)
	lowCount := 1
	for lowCount < n && t[lowCount] == t[0] {
		lowCount++
	}
	highCount := 1
	for highCount < n && t[n-1-highCount] == t[n-1] {
		highCount++
	}
	if lowCount >= 2 && float64(lowCount) >= min {
		ws = append(ws, Warning{Kind: PileUp, End: LowerEnd, Used: n, Count: lowCount, Value: t[0]})
	}
	if highCount >= 2 && float64(highCount) >= min {
		ws = append(ws, Warning{Kind: PileUp, End: UpperEnd, Used: n, Count: highCount, Value: t[n-1]})
	}
	return ws
}
