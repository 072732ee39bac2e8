package inspect_test

import (
	"context"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
	"time"

	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/fit"
	"github.com/kalends/kalends/inspect"
	"github.com/kalends/kalends/resample"
)

// TestRunGammaGLMWeightsCountCopies checks that with Data.Weights and a
// Gamma fit.GLM (a fit.CountFitter) each bootstrap replicate is fitted as
// its copied rows, each keeping its prior weight: estimates and standard
// errors (whose dispersion divides by Σcounts − p) equal fit.GLM on the
// materialised replicate, and the replicates' standard errors are about
// the full-data one rather than ≈ 1.3 times it.
func TestRunGammaGLMWeightsCountCopies(t *testing.T) {
	const n, B, seed = 120, 20, 7
	const tol = 1e-9 // relative; the two fits sum the same terms in different orders
	d := realData(t, n, 2)
	g := rand.New(rand.NewPCG(13, 14))
	d.Weights = make([]float64, n)
	for i := range d.Weights {
		d.Weights[i] = 0.5 + 2*g.Float64()
	}
	fs := realDesign(t)
	gamma := fit.GLM{Family: fit.Gamma}
	scheme := resample.Bootstrap{B: B}
	coef := inspect.KeepCoefficients()
	if _, err := inspect.Run(context.Background(), d, fs, inspect.Options{Fitter: gamma, Scheme: scheme, Seed: seed, Workers: 2}, coef); err != nil {
		t.Fatal(err)
	}
	stats, err := inspect.CoefficientStatistics(coef)
	if err != nil {
		t.Fatal(err)
	}
	plan, err := scheme.Plan(n, seed)
	if err != nil {
		t.Fatal(err)
	}
	for r := range plan.Len() {
		sp := plan.Split(r, nil)
		var dates []time.Time
		var y, w []float64
		for i, c := range sp.Counts {
			for range c {
				dates = append(dates, d.Dates[i])
				y = append(y, d.Outcome[i])
				w = append(w, d.Weights[i])
			}
		}
		enc, err := fs.Learn(dates)
		if err != nil {
			t.Fatal(err)
		}
		x, err := features.Apply(enc, dates)
		if err != nil {
			t.Fatal(err)
		}
		m, err := gamma.Fit(x, y, w)
		if err != nil {
			t.Fatalf("replicate %d, materialised: %v", r, err)
		}
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
			if math.Abs(got.Estimate-c.Estimate) > tol*math.Abs(c.Estimate) ||
				math.Abs(got.StdErr-c.StdErr) > tol*c.StdErr {
				t.Errorf("replicate %d, %s: got %.12g ± %.12g, want %.12g ± %.12g", r, c.Name, got.Estimate, got.StdErr, c.Estimate, c.StdErr)
			}
		}
	}
	// Scale: the median ratio of replicate to full-data standard error of
	// the trend; with distinct rows as the residual df it would be about
	// √((120−6)/(76−6)) ≈ 1.28.
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
}
