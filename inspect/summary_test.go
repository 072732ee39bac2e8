package inspect_test

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/kalends/kalends/inspect"
)

func panics(f func()) (ok bool) {
	defer func() { ok = recover() != nil }()
	f()
	return false
}

// TestQuantile checks both rules against R 4.2.2: boot:::norm.inter(x, p)
// from boot 1.3.28.1 for DavisonHinkley and quantile(x, p, type = 7) for
// R7, run by hand on the x below (printed with digits = 17).
func TestQuantile(t *testing.T) {
	x := []float64{2.5, 3.1, 4.7, 5.0, 6.2, 7.9, 8.4, 9.9, 11.3, 12.0}
	tests := []struct {
		name   string
		p      float64
		dh, r7 float64
	}{
		{"p=.025", 0.025, 2.5, 2.6350000000000002},
		{"p=.1", 0.1, 2.5754024004716682, 3.04},
		{"p=.25", 0.25, 4.3319277404179761, 4.7750000000000004},
		{"p=.5", 0.5, 7.0500000000000007, 7.0500000000000007},
		{"p=.9", 0.9, 11.912030532783053, 11.370000000000001},
		{"p=.975", 0.975, 12, 11.842500000000001},
	}
	const tol = 1e-13
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := inspect.Quantile(tt.p, inspect.DavisonHinkley, x); relDiff(got, tt.dh) > tol {
				t.Errorf("DavisonHinkley: got %.17g, want %.17g", got, tt.dh)
			}
			if got := inspect.Quantile(tt.p, inspect.R7, x); relDiff(got, tt.r7) > tol {
				t.Errorf("R7: got %.17g, want %.17g", got, tt.r7)
			}
		})
	}
	for _, bad := range []struct {
		name string
		f    func()
	}{
		{"unsorted", func() { inspect.Quantile(0.5, inspect.R7, []float64{2, 1}) }},
		{"empty", func() { inspect.Quantile(0.5, inspect.R7, nil) }},
		{"p>1", func() { inspect.Quantile(1.5, inspect.R7, x) }},
		{"NaN", func() { inspect.Quantile(0.5, inspect.R7, []float64{1, math.NaN()}) }},
		{"rule", func() { inspect.Quantile(0.5, inspect.QuantileRule(9), x) }},
	} {
		if !panics(bad.f) {
			t.Errorf("%s: no panic", bad.name)
		}
	}
}

func seq(n int, f func(i int) float64) []float64 {
	s := make([]float64, n)
	for i := range s {
		s[i] = f(i)
	}
	return s
}

// spread returns b values with a smooth, skewed but deterministic shape.
func spread(b int) []float64 {
	return seq(b, func(i int) float64 { u := (float64(i) + 0.5) / float64(b); return 10 + u*u*4 })
}

// TestExtremeOrderNeed checks the replicate count reported for an endpoint
// on the extreme order statistics. Derivation (DavisonHinkley): the p
// quantile reads order statistic (B+1)p, interior iff (B+1)q > 1 with
// q = min(p, 1−p), i.e. B ≥ ⌊1/q⌋: 40 at 95%, 200 at 99%, 2000 at 99.9%.
// R7 reads position (B−1)q + 1, interior iff (B−1)q ≥ 1, B ≥ ⌈1/q⌉+1: 41 at 95%.
func TestExtremeOrderNeed(t *testing.T) {
	tests := []struct {
		name  string
		level float64
		rule  inspect.QuantileRule
		b     int
		need  int // 0: no warning
	}{
		{"95% B=39", 0.95, inspect.DavisonHinkley, 39, 40},
		{"95% B=40", 0.95, inspect.DavisonHinkley, 40, 0},
		{"99% B=100", 0.99, inspect.DavisonHinkley, 100, 200},
		{"99% B=199", 0.99, inspect.DavisonHinkley, 199, 200},
		{"99% B=200", 0.99, inspect.DavisonHinkley, 200, 0},
		{"99.9% B=999", 0.999, inspect.DavisonHinkley, 999, 2000},
		{"R7 95% B=40", 0.95, inspect.R7, 40, 41},
		{"R7 95% B=41", 0.95, inspect.R7, 41, 0},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			s, err := inspect.Summarize(inspect.Statistic{Name: "x", Estimate: 11, Values: spread(tt.b)},
				inspect.Config{Level: tt.level, Rule: tt.rule, Methods: []inspect.Method{inspect.Percentile, inspect.Basic, inspect.Normal}})
			if err != nil {
				t.Fatal(err)
			}
			for _, iv := range s.Intervals {
				var got []inspect.Warning
				for _, w := range iv.Warnings {
					if w.Kind == inspect.ExtremeOrder {
						got = append(got, w)
					}
				}
				if iv.Method == inspect.Normal || tt.need == 0 {
					if len(got) != 0 {
						t.Errorf("%v: got warnings %v, want none", iv.Method, got)
					}
					continue
				}
				if len(got) != 2 {
					t.Fatalf("%v: got %d extreme-order warnings, want 2 (both ends)", iv.Method, len(got))
				}
				for _, w := range got {
					if w.Need != tt.need || w.Used != tt.b {
						t.Errorf("%v %v: got need %d used %d, want need %d used %d", iv.Method, w.End, w.Need, w.Used, tt.need, tt.b)
					}
				}
				if !strings.Contains(got[0].String(), fmt.Sprint(tt.need)) {
					t.Errorf("String %q does not name %d", got[0], tt.need)
				}
			}
		})
	}
}

func TestSummarizeFragile(t *testing.T) {
	errA := errors.New("fit: singular design")
	nan := math.NaN()
	accel := 0.05
	tests := []struct {
		name    string
		in      inspect.Statistic
		cfg     inspect.Config
		wantErr error                    // returned by Summarize
		ivErr   map[inspect.Method]error // per-interval Err
	}{
		{name: "one replicate", in: inspect.Statistic{Estimate: 1, Values: []float64{1}}, wantErr: inspect.ErrTooFewReplicates},
		{name: "no replicates", in: inspect.Statistic{Estimate: 1}, wantErr: inspect.ErrTooFewReplicates},
		{name: "all failed", in: inspect.Statistic{Estimate: 1, Values: []float64{1, 2, 3},
			Errs: []error{errA, errA, errA}}, wantErr: errA},
		{name: "NaN not estimable", in: inspect.Statistic{Estimate: 1, Values: []float64{nan, 2, nan}}, wantErr: inspect.ErrTooFewReplicates},
		{name: "level 1", in: inspect.Statistic{Estimate: 1, Values: spread(50)}, cfg: inspect.Config{Level: 1}, wantErr: inspect.ErrLevel},
		{name: "level negative", in: inspect.Statistic{Estimate: 1, Values: spread(50)}, cfg: inspect.Config{Level: -0.9}, wantErr: inspect.ErrLevel},
		{name: "level 95 not .95", in: inspect.Statistic{Estimate: 1, Values: spread(50)}, cfg: inspect.Config{Level: 95}, wantErr: inspect.ErrLevel},
		{name: "estimate NaN", in: inspect.Statistic{Estimate: nan, Values: spread(50)}, wantErr: inspect.ErrEstimate},
		{name: "estimate NaN not estimable", in: inspect.Statistic{Estimate: nan, Values: spread(50)}, wantErr: inspect.ErrNotEstimable},
		{name: "estimate infinite", in: inspect.Statistic{Estimate: math.Inf(1), Values: spread(50)}, wantErr: inspect.ErrEstimate},
		{name: "all equal", in: inspect.Statistic{Estimate: 3, Values: seq(50, func(int) float64 { return 3 }), Acceleration: &accel},
			ivErr: map[inspect.Method]error{inspect.Percentile: inspect.ErrDegenerate, inspect.Basic: inspect.ErrDegenerate,
				inspect.Normal: inspect.ErrDegenerate, inspect.BCa: inspect.ErrDegenerate}},
		{name: "degenerate jackknife", in: inspect.Statistic{Estimate: 11, Values: spread(100), Jackknife: []float64{2, 2, 2, 2}},
			ivErr: map[inspect.Method]error{inspect.Percentile: nil, inspect.BCa: inspect.ErrJackknife}},
		{name: "BCa without jackknife", in: inspect.Statistic{Estimate: 11, Values: spread(100)},
			cfg:   inspect.Config{Methods: []inspect.Method{inspect.BCa}},
			ivErr: map[inspect.Method]error{inspect.BCa: inspect.ErrNoAcceleration}},
		{name: "BCa estimate below all", in: inspect.Statistic{Estimate: 0, Values: spread(100), Acceleration: &accel},
			ivErr: map[inspect.Method]error{inspect.BCa: inspect.ErrBiasCorrection, inspect.Basic: nil}},
		{name: "studentized without se", in: inspect.Statistic{Estimate: 11, Values: spread(100)},
			cfg:   inspect.Config{Methods: []inspect.Method{inspect.Studentized}},
			ivErr: map[inspect.Method]error{inspect.Studentized: inspect.ErrNoStdErr}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			s, err := inspect.Summarize(tt.in, tt.cfg)
			if tt.wantErr != nil {
				if !errors.Is(err, tt.wantErr) {
					t.Fatalf("got error %v, want %v", err, tt.wantErr)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			for m, want := range tt.ivErr {
				iv, ok := s.Interval(m)
				if !ok {
					t.Fatalf("no %v interval", m)
				}
				if want == nil {
					if iv.Err != nil || math.IsNaN(iv.Lower) || math.IsNaN(iv.Upper) {
						t.Errorf("%v: got [%v, %v] err %v, want an interval", m, iv.Lower, iv.Upper, iv.Err)
					}
					continue
				}
				if !errors.Is(iv.Err, want) {
					t.Errorf("%v: got err %v, want %v", m, iv.Err, want)
				}
				if !math.IsNaN(iv.Lower) || !math.IsNaN(iv.Upper) {
					t.Errorf("%v: got [%v, %v] with an error, want NaN endpoints", m, iv.Lower, iv.Upper)
				}
			}
		})
	}
}

func TestSummarizeCounts(t *testing.T) {
	errA := errors.New("fit: singular design")
	vals := spread(100)
	errs := make([]error, 100)
	errs[3], errs[40], errs[41], errs[99] = errA, errA, errA, errA
	vals[7], vals[8] = math.NaN(), math.Inf(1)
	s, err := inspect.Summarize(inspect.Statistic{Name: "x", Estimate: 11, Values: vals, Errs: errs}, inspect.Config{})
	if err != nil {
		t.Fatal(err)
	}
	if s.Replicates != 100 || s.Used != 94 || s.Failed != 4 || s.NotEstimable != 2 || s.FailedShare != 0.06 {
		t.Errorf("got replicates %d used %d failed %d not estimable %d share %v, want 100 94 4 2 0.06",
			s.Replicates, s.Used, s.Failed, s.NotEstimable, s.FailedShare)
	}
	if len(s.FirstErrors) != 3 || !errors.Is(s.FirstErrors[0], errA) || !strings.HasPrefix(s.FirstErrors[0].Error(), "replicate 3: ") {
		t.Errorf("got first errors %v, want 3 errors starting with replicate 3", s.FirstErrors)
	}
	// Mean and standard error over the 94 used values, by a direct sum.
	var sum, ss float64
	var used []float64
	for i, v := range vals {
		if errs[i] == nil && !math.IsNaN(v) && !math.IsInf(v, 0) {
			used = append(used, v)
			sum += v
		}
	}
	mean := sum / float64(len(used))
	for _, v := range used {
		ss += (v - mean) * (v - mean)
	}
	sd := math.Sqrt(ss / float64(len(used)-1))
	if relDiff(s.Mean, mean) > 1e-14 || relDiff(s.StdErr, sd) > 1e-12 || relDiff(s.Bias, mean-11) > 1e-12 {
		t.Errorf("got mean %v se %v bias %v, want %v %v %v", s.Mean, s.StdErr, s.Bias, mean, sd, mean-11)
	}
	if len(s.Intervals) != 3 {
		t.Errorf("got %d default intervals, want 3 (no jackknife, no standard errors)", len(s.Intervals))
	}

	all := []error{errA, errA, errA, errA, errors.New("other")}
	_, err = inspect.Summarize(inspect.Statistic{Name: "slope", Estimate: 1, Values: make([]float64, 5), Errs: all}, inspect.Config{})
	var tf *inspect.TooFewError
	if !errors.As(err, &tf) || tf.Failed != 5 || len(tf.First) != 3 {
		t.Fatalf("got %v, want a *TooFewError with 5 failed and 3 first errors", err)
	}
	if msg := err.Error(); !strings.Contains(msg, "slope") || !strings.Contains(msg, "replicate 0: fit: singular design") {
		t.Errorf("message %q does not name the statistic and first failure", msg)
	}
}

func TestPileUp(t *testing.T) {
	// A share bounded below by 0: 60 of 400 replicates at exactly 0.
	vals := seq(400, func(i int) float64 { return math.Max(0, float64(i-60)/400) })
	s, err := inspect.Summarize(inspect.Statistic{Name: "share", Estimate: 0.3, Values: vals}, inspect.Config{})
	if err != nil {
		t.Fatal(err)
	}
	if len(s.Warnings) != 1 || s.Warnings[0].Kind != inspect.PileUp || s.Warnings[0].End != inspect.LowerEnd || s.Warnings[0].Count != 61 || s.Warnings[0].Value != 0 {
		t.Errorf("got warnings %+v, want one lower pile-up of 61 at 0", s.Warnings)
	}
	// Two tied values among 400 at the top: below (1 − .95)/2 = 2.5%, no warning.
	vals[398], vals[399] = 5, 5
	vals[0] = -1
	s, _ = inspect.Summarize(inspect.Statistic{Estimate: 0.3, Values: vals}, inspect.Config{})
	if len(s.Warnings) != 0 {
		t.Errorf("got warnings %v, want none", s.Warnings)
	}
}

func TestAcceleration(t *testing.T) {
	// Jackknife of a sample mean: θ₍ᵢ₎ = (nx̄ − xᵢ)/(n−1), so θ̄ − θ₍ᵢ₎ =
	// (xᵢ − x̄)/(n−1) and a = Σ(xᵢ−x̄)³ / (6 (Σ(xᵢ−x̄)²)^1.5) (Efron &
	// Tibshirani 1993, §14.3). For x = 1, 2, 6: x̄ = 3, deviations −2, −1, 3,
	// Σd³ = −8 − 1 + 27 = 18, Σd² = 14, a = 18 / (6·14^1.5) = 3/14^1.5.
	x := []float64{1, 2, 6}
	jack := []float64{(12 - 1) / 2.0, (12 - 2) / 2.0, (12 - 6) / 2.0}
	want := 3 / math.Pow(14, 1.5)
	a, err := inspect.Acceleration(jack)
	if err != nil || relDiff(a, want) > 1e-14 {
		t.Errorf("Acceleration: got %v, %v, want %v", a, err, want)
	}
	a, err = inspect.InfluenceAcceleration([]float64{x[0] - 3, x[1] - 3, x[2] - 3})
	if err != nil || relDiff(a, want) > 1e-14 {
		t.Errorf("InfluenceAcceleration: got %v, %v, want %v", a, err, want)
	}
	for _, bad := range [][]float64{{1}, {2, 2, 2}, {1, math.NaN()}} {
		if _, err := inspect.Acceleration(bad); !errors.Is(err, inspect.ErrJackknife) {
			t.Errorf("Acceleration(%v): got %v, want ErrJackknife", bad, err)
		}
	}
}

func TestSummarizePanics(t *testing.T) {
	tests := []struct {
		name string
		f    func()
	}{
		{"errs length", func() {
			inspect.Summarize(inspect.Statistic{Values: []float64{1, 2}, Errs: []error{nil}}, inspect.Config{})
		}},
		{"stderrs length", func() {
			inspect.Summarize(inspect.Statistic{Values: []float64{1, 2}, StdErrs: []float64{1}}, inspect.Config{})
		}},
		{"method", func() {
			inspect.Summarize(inspect.Statistic{Values: []float64{1, 2}}, inspect.Config{Methods: []inspect.Method{0}})
		}},
		{"rule", func() { inspect.Summarize(inspect.Statistic{Values: []float64{1, 2}}, inspect.Config{Rule: 7}) }},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if !panics(tt.f) {
				t.Error("no panic")
			}
		})
	}
}

func TestStrings(t *testing.T) {
	tests := []struct{ name, got, want string }{
		{"percentile", inspect.Percentile.String(), "percentile"},
		{"BCa", inspect.BCa.String(), "BCa"},
		{"studentized", inspect.Studentized.String(), "studentized"},
		{"invalid", inspect.Method(0).String(), "Method(0)"},
		{"rule", inspect.R7.String(), "R-7"},
		{"kind", inspect.PileUp.String(), "pile-up at extreme"},
		{"end", inspect.UpperEnd.String(), "upper"},
	}
	for _, tt := range tests {
		if tt.got != tt.want {
			t.Errorf("%s: got %q, want %q", tt.name, tt.got, tt.want)
		}
	}
}

// BenchmarkSummarize summarizes B = 1000 replicates with all five methods.
func BenchmarkSummarize(b *testing.B) {
	vals := spread(1000)
	ses := seq(1000, func(i int) float64 { return 1 + float64(i%7)/10 })
	jack := seq(50, func(i int) float64 { return 11 + float64(i*i%13)/100 })
	in := inspect.Statistic{Estimate: 11, Values: vals, StdErr: 1.2, StdErrs: ses, Jackknife: jack}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := inspect.Summarize(in, inspect.Config{}); err != nil {
			b.Fatal(err)
		}
	}
}

// TestSummarizeNotEstimable checks the error for a coefficient with no
// full-data estimate (a holiday none of the rows falls on): it says what
// that means and what to do, and wraps the sentinels callers test.
func TestSummarizeNotEstimable(t *testing.T) {
	tests := []struct {
		name          string
		estimate      float64
		notEstimable  bool
		wantInMessage []string
	}{
		{"NaN", math.NaN(), true, []string{"christmas_day is not estimable on the full data",
			"constant or collinear", "no bootstrap distribution", "drop the column"}},
		{"+Inf", math.Inf(1), false, []string{"christmas_day", "+Inf", "not finite"}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := inspect.Summarize(inspect.Statistic{Name: "christmas_day", Estimate: tt.estimate, Values: spread(50)}, inspect.Config{})
			if err == nil {
				t.Fatal("got no error, want one")
			}
			if !errors.Is(err, inspect.ErrEstimate) {
				t.Errorf("got %v, want it to wrap ErrEstimate", err)
			}
			if got := errors.Is(err, inspect.ErrNotEstimable); got != tt.notEstimable {
				t.Errorf("errors.Is(err, ErrNotEstimable): got %t, want %t (err %v)", got, tt.notEstimable, err)
			}
			for _, w := range tt.wantInMessage {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("got message %q, want it to contain %q", err, w)
				}
			}
			if strings.Count(err.Error(), "inspect:") != 1 {
				t.Errorf("got message %q, want one \"inspect:\" prefix", err)
			}
		})
	}
}
