package inspect_test

import (
	"context"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/kalends/kalends/fit"
	"github.com/kalends/kalends/inspect"
	"github.com/kalends/kalends/resample"
)

// TestRunWeightsCountCopies checks that with Data.Weights and an estimator
// that is a fit.CountFitter (fit.OLS, and a Gamma fit.GLM, whose dispersion
// divides by Σcounts − p) each bootstrap replicate is fitted as its copied
// rows, each keeping its weight: estimates and standard errors equal the
// estimator on the materialised replicate, so the studentized interval
// equals the one built from those fits, and the replicates' standard
// errors are about the full-data one (not √((Σc−p)/(distinct−p)) ≈ 1.3
// times it, as when the counts were folded into the weights).
func TestRunWeightsCountCopies(t *testing.T) {
	const n = 120
	const tol = 1e-9 // relative; the two fits sum the same terms in different orders
	for _, tt := range []struct {
		name              string
		fitter            fit.Fitter
		dataSeed          uint64
		weightSeed        uint64
		B                 int
		seed              uint64
		studentizedChecks bool
	}{
		{name: "OLS", fitter: fit.OLS{}, dataSeed: 1, weightSeed: 11, B: 40, seed: 5, studentizedChecks: true},
		{name: "Gamma GLM", fitter: fit.GLM{Family: fit.Gamma}, dataSeed: 2, weightSeed: 13, B: 20, seed: 7},
	} {
		t.Run(tt.name, func(t *testing.T) {
			d := realData(t, n, tt.dataSeed)
			g := rand.New(rand.NewPCG(tt.weightSeed, tt.weightSeed+1))
			d.Weights = make([]float64, n)
			for i := range d.Weights {
				d.Weights[i] = 0.5 + 2*g.Float64()
			}
			fs := realDesign(t)
			scheme := resample.Bootstrap{B: tt.B}
			coef := inspect.KeepCoefficients()
			if _, err := inspect.Run(context.Background(), d, fs, inspect.Options{Fitter: tt.fitter, Scheme: scheme, Seed: tt.seed, Workers: 2}, coef); err != nil {
				t.Fatal(err)
			}
			stats, err := inspect.CoefficientStatistics(coef)
			if err != nil {
				t.Fatal(err)
			}
			plan, err := scheme.Plan(n, tt.seed)
			if err != nil {
				t.Fatal(err)
			}
			// want[j] is stats[j] with the replicates' standard errors
			// from the materialised fits.
			want := make([]inspect.Statistic, len(stats))
			for j, s := range stats {
				s.StdErrs = slices.Clone(s.StdErrs)
				want[j] = s
			}
			for r := range plan.Len() {
				_, m := copiedFit(t, d, fs, tt.fitter, plan.Split(r, nil))
				if err := coef.Errs()[r]; err != nil {
					t.Errorf("replicate %d: got error %v, want the materialised fit", r, err)
					continue
				}
				for j, c := range m.(fit.Coefficients).Coefficients() {
					got := coef.Values()[r][j]
					if got.Estimable != c.Estimable {
						t.Errorf("replicate %d, %s: estimable %v, want %v", r, c.Name, got.Estimable, c.Estimable)
						continue
					}
					if !c.Estimable {
						continue
					}
					want[j].StdErrs[r] = c.StdErr
					if math.Abs(got.Estimate-c.Estimate) > tol*math.Abs(c.Estimate) ||
						math.Abs(got.StdErr-c.StdErr) > tol*c.StdErr {
						t.Errorf("replicate %d, %s: got %.12g ± %.12g, want %.12g ± %.12g", r, c.Name, got.Estimate, got.StdErr, c.Estimate, c.StdErr)
					}
				}
			}
			if tt.studentizedChecks {
				cfg := inspect.Config{Methods: []inspect.Method{inspect.Studentized}}
				for j := range stats {
					gs, err := inspect.Summarize(stats[j], cfg)
					if err != nil {
						t.Fatalf("%s: %v", stats[j].Name, err)
					}
					ws, err := inspect.Summarize(want[j], cfg)
					if err != nil {
						t.Fatalf("%s: %v", stats[j].Name, err)
					}
					gi, wi := gs.Intervals[0], ws.Intervals[0]
					if gi.Err != nil || wi.Err != nil {
						t.Fatalf("%s: interval errors %v, %v", stats[j].Name, gi.Err, wi.Err)
					}
					if math.Abs(gi.Lower-wi.Lower) > tol*math.Abs(wi.Lower) || math.Abs(gi.Upper-wi.Upper) > tol*math.Abs(wi.Upper) {
						t.Errorf("%s: studentized interval [%.12g, %.12g], want [%.12g, %.12g]", stats[j].Name, gi.Lower, gi.Upper, wi.Lower, wi.Upper)
					}
				}
			}
			// Scale: the median ratio of replicate to full-data standard
			// error of the trend. With distinct rows counted as the
			// residual df it was about √((120−6)/(76−6)) ≈ 1.28.
			const trend = 4
			var ratios []float64
			for r, cs := range coef.Values() {
				if coef.Errs()[r] == nil && cs[trend].Estimable {
					ratios = append(ratios, cs[trend].StdErr/stats[trend].StdErr)
				}
			}
			slices.Sort(ratios)
			if med := ratios[len(ratios)/2]; med < 0.8 || med > 1.15 {
				t.Errorf("%s: median replicate SE / full-data SE = %.3f, want within [0.8, 1.15]", stats[trend].Name, med)
			}
		})
	}
}
