package resample

import (
	"fmt"

	"github.com/kalends/kalends/internal/rng"
)

var (
	_ Scheme = KFold{}
	_ Scheme = RollingOrigin{}
)

// KFold is k-fold cross-validation, optionally stratified and optionally
// repeated with fresh fold assignments. Replicate r is fold r mod K of
// repeat r / K, so Len is K·Repeats.
//
// Within a repeat the rows are shuffled (stratum by stratum, in the order
// of the strata, when Strata is set) and the row at position j of the
// shuffled order goes to fold j mod K; the position runs on across
// strata. Fold sizes therefore differ by at most one, and with Strata
// every stratum is spread over the folds as evenly as its size allows (a
// stratum with fewer than K rows is missing from some folds; it is not an
// error, and it shows in [Partitioned]).
//
// Each [Split] has Counts (1 for the training rows, 0 for the fold) and
// Out (the fold's rows); Weights is nil. Every row is out in exactly one
// fold of each repeat. The zero value is unstratified 5-fold
// cross-validation, done once. A KFold is a plain value, safe to copy and
// to share.
type KFold struct {
	// K is the number of folds; 0 means 5. Plan panics if K is 1 or
	// negative and returns an error if K > n.
	K int
	// Repeats is the number of independent fold assignments; 0 means 1.
	// Plan panics if Repeats < 0.
	Repeats int
	// Strata, if non-nil, makes the folds stratified; the plan then
	// implements [Partitioned].
	Strata Partition
}

// Plan checks the scheme against n rows. It returns an [*InputError] if n
// is 0, K > n or Strata reports a problem, and panics if K is 1 or
// negative, Repeats < 0 or n < 0.
func (f KFold) Plan(n int, seed uint64) (Plan, error) {
	k := f.K
	if k < 0 || k == 1 {
		panic(fmt.Sprintf("resample: KFold.K = %d: need at least 2 folds", k))
	}
	if k == 0 {
		k = 5
	}
	if f.Repeats < 0 {
		panic(fmt.Sprintf("resample: KFold.Repeats = %d is negative", f.Repeats))
	}
	reps := max(f.Repeats, 1)
	if err := checkRows("KFold", n); err != nil {
		return nil, err
	}
	if k > n {
		return nil, &InputError{Option: "KFold.K", Detail: fmt.Sprintf("%d folds for %d rows", k, n), Err: ErrTooFewRows}
	}
	p := kfoldPlan{n: n, k: k, reps: reps, seed: seed}
	if f.Strata == nil {
		all := make([]int, n)
		for i := range all {
			all[i] = i
		}
		p.classes = []Class{{Label: "all", Rows: all}}
		return p, nil
	}
	classes, err := f.Strata.Classes(n)
	if err != nil {
		return nil, err
	}
	p.classes = classes
	return stratKFoldPlan{p}, nil
}

type kfoldPlan struct {
	n, k, reps int
	seed       uint64
	classes    []Class
}

type stratKFoldPlan struct{ kfoldPlan }

func (p stratKFoldPlan) Classes() []Class { return p.classes }

func (p kfoldPlan) Len() int { return p.k * p.reps }

func (p kfoldPlan) Split(r int, dst *Split) *Split {
	checkReplicate(r, p.k*p.reps)
	dst = countsDst(dst, r, p.n)
	q, fold := r/p.k, r%p.k
	g := rng.Stream(p.seed, purposeKFold+uint64(q))
	// Use Out as scratch for the shuffled order, then rebuild it.
	order := dst.Out[:0]
	for _, c := range p.classes {
		at := len(order)
		order = append(order, c.Rows...)
		s := order[at:]
		g.Shuffle(len(s), func(i, j int) { s[i], s[j] = s[j], s[i] })
	}
	for j, i := range order {
		if j%p.k != fold {
			dst.Counts[i] = 1
		}
	}
	dst.Out = zeros(order[:0], dst.Counts)
	return dst
}

// RollingOrigin is evaluation on a rolling forecast origin for
// time-ordered rows (rows are taken to be in time order). Split s trains
// on a window that ends at row Window + s·Step (exclusive), skips Gap rows,
// and tests on the next Horizon rows; the window starts at row 0
// (expanding) or at row s·Step (Sliding, always Window rows long). Origins
// roll forward while the test rows fit, so Len is
// ⌊(n − Window − Gap − Horizon)/Step⌋ + 1.
//
// Each [Split] has Counts (1 for the training rows, 0 elsewhere) and Out
// (the test rows); the gap rows and the rows after the test rows are in
// neither. Weights is nil. No randomness is used: the seed is ignored. The
// zero value trains on the first half of the rows (Window 0) and tests one
// step ahead, one origin at a time. A RollingOrigin is a plain value, safe
// to copy and to share.
type RollingOrigin struct {
	// Window is the length of the first training window; 0 means ⌈n/2⌉.
	// Plan panics if Window < 0 and returns an error if
	// Window + Gap + Horizon > n.
	Window int
	// Horizon is the number of test rows after each origin; 0 means 1.
	// Plan panics if Horizon < 0.
	Horizon int
	// Gap is the number of rows skipped between the training window and
	// the test rows, to keep autocorrelated neighbours apart; 0 means none.
	// Plan panics if Gap < 0.
	Gap int
	// Step is how far the origin moves between splits; 0 means 1. Plan
	// panics if Step < 0.
	Step int
	// Sliding keeps the training window at Window rows, dropping the
	// oldest rows as the origin moves; false lets it expand from row 0.
	Sliding bool
}

// Plan checks the scheme against n rows. It returns an [*InputError] if n
// is 0 or Window + Gap + Horizon > n, and panics if Window, Horizon, Gap,
// Step or n is negative.
func (o RollingOrigin) Plan(n int, _ uint64) (Plan, error) {
	for _, f := range []struct {
		name string
		v    int
	}{{"Window", o.Window}, {"Horizon", o.Horizon}, {"Gap", o.Gap}, {"Step", o.Step}} {
		if f.v < 0 {
			panic(fmt.Sprintf("resample: RollingOrigin.%s = %d is negative", f.name, f.v))
		}
	}
	if err := checkRows("RollingOrigin", n); err != nil {
		return nil, err
	}
	p := rollingPlan{n: n, window: o.Window, horizon: max(o.Horizon, 1), gap: o.Gap, step: max(o.Step, 1), sliding: o.Sliding}
	if p.window == 0 {
		p.window = (n + 1) / 2
	}
	if need := p.window + p.gap + p.horizon; need > n {
		return nil, &InputError{Option: "RollingOrigin.Window", Detail: fmt.Sprintf("window %d + gap %d + horizon %d exceeds the %d rows", p.window, p.gap, p.horizon, n), Err: ErrTooFewRows}
	}
	p.len = (n-p.window-p.gap-p.horizon)/p.step + 1
	return p, nil
}

type rollingPlan struct {
	n, window, horizon, gap, step, len int
	sliding                            bool
}

func (p rollingPlan) Len() int { return p.len }

func (p rollingPlan) Split(r int, dst *Split) *Split {
	checkReplicate(r, p.len)
	dst = countsDst(dst, r, p.n)
	end := p.window + r*p.step
	start := 0
	if p.sliding {
		start = r * p.step
	}
	for i := start; i < end; i++ {
		dst.Counts[i] = 1
	}
	for i := end + p.gap; i < end+p.gap+p.horizon; i++ {
		dst.Out = append(dst.Out, i)
	}
	return dst
}
