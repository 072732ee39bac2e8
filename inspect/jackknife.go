package inspect

import (
	"fmt"
	"math"

	"github.com/kalends/kalends/fit"
)

// WithJackknife fills the Jackknife field of each coefficient statistic in
// stats (as made by [CoefficientStatistics]) from jack, the coefficients
// kept by a run over the leave-one-out replicates of [resample.Jackknife]
// on the same data, feature set and estimator. The BCa interval then takes
// its acceleration from those values.
//
// Statistics are matched to jackknife coefficients by name. A leave-one-out
// fit that failed, or in which the coefficient was not estimable (a holiday
// seen on one row only, with that row left out), gives a NaN value, and the
// BCa interval of that statistic then reports [ErrJackknife] instead of an
// acceleration it cannot know. WithJackknife returns an error if jack holds
// no values or lacks a statistic's name; stats is left unchanged then.
func WithJackknife(stats []Statistic, jack *Kept[[]fit.Coefficient]) error {
	vals, errs := jack.Values(), jack.Errs()
	if vals == nil {
		return fmt.Errorf("inspect: WithJackknife: Kept %q holds no values (never run, or streamed)", jack.Name())
	}
	full, err := jack.Full()
	if err != nil {
		return fmt.Errorf("inspect: WithJackknife: the full-data fit failed: %w", err)
	}
	index := make(map[string]int, len(full))
	for j, c := range full {
		index[c.Name] = j
	}
	cols := make([]int, len(stats))
	for k, s := range stats {
		j, ok := index[s.Name]
		if !ok {
			return fmt.Errorf("inspect: WithJackknife: statistic %q has no jackknife coefficient", s.Name)
		}
		cols[k] = j
	}
	for k := range stats {
		j := cols[k]
		jv := make([]float64, len(vals))
		for i, cs := range vals {
			jv[i] = math.NaN()
			if (errs == nil || errs[i] == nil) && j < len(cs) && cs[j].Estimable {
				jv[i] = cs[j].Estimate
			}
		}
		stats[k].Jackknife = jv
	}
	return nil
}
