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

// TestRunPrecisionWeightsCountCopies checks that with Data.Weights and
// fit.OLS (a fit.CountFitter) each bootstrap replicate is fitted as its
// copied rows, each keeping its precision weight: estimates and standard
// errors equal fit.OLS on the materialised replicate, so the studentized
// interval equals the one built from those fits, and the replicates'
// standard errors are about the full-data one (not √((Σc−p)/(distinct−p))
// ≈ 1.3 times it, as when the counts were folded into the weights).
func TestRunPrecisionWeightsCountCopies(t *testing.T) {
	const n, B, seed = 120, 40, 5
	const tol = 1e-9 // relative; the two fits sum the same terms in different orders
	d := realData(t, n, 1)
	g := rand.New(rand.NewPCG(11, 12))
	d.Weights = make([]float64, n)
	for i := range d.Weights {
		d.Weights[i] = 0.5 + 2*g.Float64()
	}
	fs := realDesign(t)
	scheme := resample.Bootstrap{B: B}
	coef := inspect.KeepCoefficients()
	if _, err := inspect.Run(context.Background(), d, fs, inspect.Options{Fitter: fit.OLS{}, Scheme: scheme, Seed: seed, Workers: 2}, coef); err != nil {
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
	// want[j] is stats[j] with the replicates' standard errors from the
	// materialised fits.
	want := make([]inspect.Statistic, len(stats))
	for j, s := range stats {
		s.StdErrs = slices.Clone(s.StdErrs)
		want[j] = s
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
		m, err := fit.OLS{}.Fit(x, y, w)
		if err != nil {
			t.Fatal(err)
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
	// Scale: the median ratio of replicate to full-data standard error of
	// the trend. With distinct rows counted as the residual df it was
	// about √((120−6)/(76−6)) ≈ 1.28.
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
