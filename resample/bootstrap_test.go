package resample_test

import (
	"math"
	"slices"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"github.com/kalends/kalends/resample"
)

// alpha is the significance level of every goodness-of-fit test here. The
// seeds are fixed, so each test is deterministic; the level says how
// unusual a correct generator would have to be to fail it.
const alpha = 0.001

// chiSquare returns Pearson's statistic for observed counts against
// expected counts.
func chiSquare(obs []int, exp []float64) float64 {
	var x float64
	for i, o := range obs {
		d := float64(o) - exp[i]
		x += d * d / exp[i]
	}
	return x
}

// critical returns the upper-alpha point of chi-square with df degrees of
// freedom (gonum distuv).
func critical(df int) float64 {
	return distuv.ChiSquared{K: float64(df)}.Quantile(1 - alpha)
}

// TestBootstrapOutOfBagShare checks the mean out-of-bag share against its
// expectation (1 − 1/n)^n, which tends to e⁻¹ ≈ 0.368 (Efron 1983; Efron &
// Tibshirani 1993, An Introduction to the Bootstrap, §7.11 and ch. 17).
// The tolerance is 4 standard errors of the mean share over B replicates,
// from the exact variance of the number X of rows never drawn: with
// indicators I_i, Var X = n q1 + n(n−1) q2 − n² q1², q1 = (1−1/n)^n,
// q2 = (1−2/n)^n (derived here by inclusion–exclusion).
func TestBootstrapOutOfBagShare(t *testing.T) {
	tests := []struct {
		name string
		n, b int
	}{
		{name: "n=10", n: 10, b: 4000},
		{name: "n=57", n: 57, b: 2000},
		{name: "n=1000", n: 1000, b: 400},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			p := mustPlan(t, resample.Bootstrap{B: tt.b}, tt.n, 11)
			var sum float64
			for _, s := range resample.All(p) {
				sum += float64(len(s.Out)) / float64(tt.n)
			}
			got := sum / float64(tt.b)
			n := float64(tt.n)
			q1 := math.Pow(1-1/n, n)
			q2 := math.Pow(1-2/n, n)
			varX := n*q1 + n*(n-1)*q2 - n*n*q1*q1
			tol := 4 * math.Sqrt(varX/float64(tt.b)) / n
			if math.Abs(got-q1) > tol {
				t.Errorf("mean out-of-bag share: got %.5f, want %.5f ± %.5f", got, q1, tol)
			}
		})
	}
}

// TestBootstrapCountsBinomial checks that a row's count is
// Binomial(n, 1/n), the multinomial margin (Efron & Tibshirani 1993, §6),
// by Pearson's chi-square test at level alpha, for the first, a middle
// and the last row (a biased index draw shows at the ends).
func TestBootstrapCountsBinomial(t *testing.T) {
	const n, b = 20, 5000
	p := mustPlan(t, resample.Bootstrap{B: b}, n, 2024)
	bin := distuv.Binomial{N: n, P: 1.0 / n}
	const cells = 5 // 0, 1, 2, 3, ≥4
	exp := make([]float64, cells)
	for k := range cells - 1 {
		exp[k] = b * bin.Prob(float64(k))
	}
	exp[cells-1] = b * (1 - bin.CDF(cells-2))
	for _, row := range []int{0, n / 2, n - 1} {
		obs := make([]int, cells)
		for _, s := range resample.All(p) {
			obs[min(int(s.Counts[row]), cells-1)]++
		}
		if x, c := chiSquare(obs, exp), critical(cells-1); x > c {
			t.Errorf("row %d counts %v: chi-square %.2f > %.2f (df %d, level %g)", row, obs, x, c, cells-1, alpha)
		}
	}
}

// TestStratifiedSizes checks that every replicate keeps each stratum's
// size exactly (the definition of the stratified bootstrap; Davison &
// Hinkley 1997, Bootstrap Methods and their Application, §3.7) and that
// the out-of-bag list is exactly the rows of count zero.
func TestStratifiedSizes(t *testing.T) {
	labels := []string{"b", "a", "b", "c", "a", "b", "b", "a", "c", "b", "solo", "a"}
	values := []float64{3, 1, 4, 1, 5, 9, 2, 6, 5, 3, 5, 8}
	tests := []struct {
		name   string
		strata resample.Partition
	}{
		{name: "labels", strata: resample.ByLabel(labels)},
		{name: "int labels", strata: resample.ByLabel([]int{2, 1, 2, 3, 1, 2, 2, 1, 3, 2, 9, 1})},
		{name: "quantiles", strata: resample.Quantiles{Values: values, K: 3}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			p := mustPlan(t, resample.Bootstrap{B: 300, Strata: tt.strata}, len(labels), 5)
			classes := p.(resample.Partitioned).Classes()
			for _, s := range resample.All(p) {
				for _, c := range classes {
					var sum int32
					for _, i := range c.Rows {
						sum += s.Counts[i]
					}
					if int(sum) != len(c.Rows) {
						t.Fatalf("replicate %d stratum %q: counts sum to %d, want %d", s.Replicate, c.Label, sum, len(c.Rows))
					}
				}
				var zero []int
				for i, c := range s.Counts {
					if c == 0 {
						zero = append(zero, i)
					}
				}
				if !slices.Equal(zero, s.Out) {
					t.Fatalf("replicate %d: Out %v, want rows of count zero %v", s.Replicate, s.Out, zero)
				}
			}
		})
	}
}

// TestByLabelClasses checks the classes of ByLabel against a hand count:
// sorted label order, rows increasing, the single-row stratum reported.
func TestByLabelClasses(t *testing.T) {
	got, err := resample.ByLabel([]string{"b", "a", "b", "c", "a"}).Classes(5)
	if err != nil {
		t.Fatal(err)
	}
	want := []resample.Class{
		{Label: "a", Rows: []int{1, 4}},
		{Label: "b", Rows: []int{0, 2}},
		{Label: "c", Rows: []int{3}},
	}
	if d := cmpDiff(want, got); d != "" {
		t.Errorf("ByLabel classes (-want +got):\n%s", d)
	}
}

// TestQuantilesMerge checks the quantile cells and the merge rule on
// hand-worked cases. Cut points are R's type-7 quantiles (Hyndman & Fan
// 1996, definition 7), worked by hand: for values 1..8 and K = 4 the cuts
// are 2.75, 4.5, 6.25.
func TestQuantilesMerge(t *testing.T) {
	tests := []struct {
		name string
		q    resample.Quantiles
		want []resample.Class
	}{
		{
			name: "no merge",
			q:    resample.Quantiles{Values: []float64{8, 1, 7, 2, 6, 3, 5, 4}, K: 4},
			want: []resample.Class{
				{Label: "q1", Rows: []int{1, 3}, Cells: []int{1}},
				{Label: "q2", Rows: []int{5, 7}, Cells: []int{2}},
				{Label: "q3", Rows: []int{4, 6}, Cells: []int{3}},
				{Label: "q4", Rows: []int{0, 2}, Cells: []int{4}},
			},
		},
		{
			// Ties: values 1,1,1,1,1,1,2,9 with K = 4 give cuts 1, 1, 1.25, so
			// six rows fall in cell 1, none in 2 or 3, and rows 2 and 9 in
			// cell 4 (both above 1.25); cells 2+3 are empty and join cell 4.
			name: "ties leave empty cells",
			q:    resample.Quantiles{Values: []float64{1, 1, 1, 2, 1, 1, 9, 1}, K: 4},
			want: []resample.Class{
				{Label: "q1", Rows: []int{0, 1, 2, 4, 5, 7}, Cells: []int{1}},
				{Label: "q2+q3+q4", Rows: []int{3, 6}, Cells: []int{2, 3, 4}},
			},
		},
		{
			// Seven rows, K = 7, MinRows 3: each cell holds one row, so
			// cells join in threes; the seventh, left short, joins the
			// second class.
			name: "short tail joins previous",
			q:    resample.Quantiles{Values: []float64{10, 20, 30, 40, 50, 60, 70}, K: 7, MinRows: 3},
			want: []resample.Class{
				{Label: "q1+q2+q3", Rows: []int{0, 1, 2}, Cells: []int{1, 2, 3}},
				{Label: "q4+q5+q6+q7", Rows: []int{3, 4, 5, 6}, Cells: []int{4, 5, 6, 7}},
			},
		},
		{
			name: "fewer rows than MinRows",
			q:    resample.Quantiles{Values: []float64{2, 1}, MinRows: 3},
			want: []resample.Class{
				{Label: "q1+q2+q3+q4", Rows: []int{0, 1}, Cells: []int{1, 2, 3, 4}},
			},
		},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got, err := tt.q.Classes(len(tt.q.Values))
			if err != nil {
				t.Fatal(err)
			}
			if d := cmpDiff(tt.want, got); d != "" {
				t.Errorf("classes (-want +got):\n%s", d)
			}
		})
	}
}

// TestBalancedTotals checks the defining property of the balanced
// bootstrap (Davison, Hinkley & Schechtman 1986, Biometrika 73, 555–566):
// over B replicates each row appears exactly B times, and each replicate
// has n draws.
func TestBalancedTotals(t *testing.T) {
	tests := []struct {
		name string
		n, b int
	}{
		{name: "1x1", n: 1, b: 1},
		{name: "7x3", n: 7, b: 3},
		{name: "50x200", n: 50, b: 200},
		{name: "1001x17", n: 1001, b: 17},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			p := mustPlan(t, resample.Balanced{B: tt.b}, tt.n, 99)
			total := make([]int, tt.n)
			for _, s := range resample.All(p) {
				var sum int
				for i, c := range s.Counts {
					total[i] += int(c)
					sum += int(c)
				}
				if sum != tt.n {
					t.Fatalf("replicate %d: counts sum to %d, want %d", s.Replicate, sum, tt.n)
				}
			}
			for i, c := range total {
				if c != tt.b {
					t.Fatalf("row %d: total count %d, want %d", i, c, tt.b)
				}
			}
		})
	}
}

// TestBalancedCountsHypergeometric checks that the balancing permutation
// behaves as a random one: a replicate takes n of the n·B draws, B of
// which are row 0, so under a uniform permutation row 0's count is
// hypergeometric (the concatenate-and-permute construction of Davison,
// Hinkley & Schechtman 1986, §2); Pearson's chi-square test at level alpha.
func TestBalancedCountsHypergeometric(t *testing.T) {
	const n, b = 20, 4000
	p := mustPlan(t, resample.Balanced{B: b}, n, 7)
	hyper := func(k int) float64 { // P(count = k): n draws from nB with B successes
		N, K := float64(n*b), float64(b)
		lg := func(x float64) float64 { v, _ := math.Lgamma(x + 1); return v }
		lc := func(a, c float64) float64 { return lg(a) - lg(c) - lg(a-c) }
		return math.Exp(lc(K, float64(k)) + lc(N-K, float64(n-k)) - lc(N, n))
	}
	const cells = 5
	exp := make([]float64, cells)
	rest := 1.0
	for k := range cells - 1 {
		pk := hyper(k)
		exp[k] = b * pk
		rest -= pk
	}
	exp[cells-1] = b * rest
	obs := make([]int, cells)
	for _, s := range resample.All(p) {
		obs[min(int(s.Counts[0]), cells-1)]++
	}
	if x, c := chiSquare(obs, exp), critical(cells-1); x > c {
		t.Errorf("row 0 counts %v: chi-square %.2f > %.2f (df %d, level %g)", obs, x, c, cells-1, alpha)
	}
}

// TestBayesianWeights checks the Dirichlet(1,…,1) weights of the Bayesian
// bootstrap (Rubin 1981, Ann. Statist. 9, 130–134): positive, summing to
// 1, with mean 1/n; the tolerance on the mean of one row's weight over B
// replicates is 4 standard errors, Var w_i = (n−1)/(n²(n+1)) (Dirichlet
// variance, e.g. Kotz, Balakrishnan & Johnson 2000, ch. 49).
func TestBayesianWeights(t *testing.T) {
	const n, b = 30, 4000
	p := mustPlan(t, resample.Bayesian{B: b}, n, 3)
	var mean0, meanLast float64
	for _, s := range resample.All(p) {
		if s.Counts != nil || len(s.Out) != 0 {
			t.Fatalf("replicate %d: Counts %v, Out %v, want nil and empty", s.Replicate, s.Counts, s.Out)
		}
		var sum float64
		for i, w := range s.Weights {
			if !(w > 0) {
				t.Fatalf("replicate %d row %d: weight %v, want > 0", s.Replicate, i, w)
			}
			sum += w
		}
		if math.Abs(sum-1) > 1e-12 {
			t.Fatalf("replicate %d: weights sum to %v, want 1 ± 1e-12", s.Replicate, sum)
		}
		mean0 += s.Weights[0] / b
		meanLast += s.Weights[n-1] / b
	}
	tol := 4 * math.Sqrt(float64(n-1)/(n*n*(n+1))/b)
	for _, got := range []float64{mean0, meanLast} {
		if math.Abs(got-1.0/n) > tol {
			t.Errorf("mean weight: got %.6f, want %.6f ± %.6f", got, 1.0/n, tol)
		}
	}
}

// TestPoissonCounts checks that Poisson bootstrap counts are Poisson(1)
// (Hanley & MacGibbon 2006; Chamandy et al. 2012) by Pearson's chi-square
// test at level alpha, pooling rows, which are independent.
func TestPoissonCounts(t *testing.T) {
	const n, b = 2000, 5
	p := mustPlan(t, resample.Poisson{B: b}, n, 8)
	pois := distuv.Poisson{Lambda: 1}
	const cells = 5
	exp := make([]float64, cells)
	for k := range cells - 1 {
		exp[k] = n * b * pois.Prob(float64(k))
	}
	exp[cells-1] = n * b * (1 - pois.CDF(cells-2))
	obs := make([]int, cells)
	for _, s := range resample.All(p) {
		for _, c := range s.Counts {
			obs[min(int(c), cells-1)]++
		}
	}
	if x, c := chiSquare(obs, exp), critical(cells-1); x > c {
		t.Errorf("counts %v: chi-square %.2f > %.2f (df %d, level %g)", obs, x, c, cells-1, alpha)
	}
}

// TestPoissonShards checks that a row's Poisson count depends only on
// (seed, replicate, key): planning shards with their own keys gives the
// same counts as one plan over all rows, and default keys are the row
// indices.
func TestPoissonShards(t *testing.T) {
	const n, seed = 100, 42
	keys := make([]uint64, n)
	for i := range keys {
		keys[i] = uint64(i)
	}
	whole := mustPlan(t, resample.Poisson{B: 4}, n, seed)
	keyed := mustPlan(t, resample.Poisson{B: 4, Keys: keys}, n, seed)
	shardA := mustPlan(t, resample.Poisson{B: 4, Keys: keys[:37]}, 37, seed)
	shardB := mustPlan(t, resample.Poisson{B: 4, Keys: keys[37:]}, n-37, seed)
	for r := range 4 {
		want := whole.Split(r, nil).Counts
		got := append(slices.Clone(shardA.Split(r, nil).Counts), shardB.Split(r, nil).Counts...)
		if d := cmpDiff(want, got); d != "" {
			t.Errorf("replicate %d: shards differ from the whole (-want +got):\n%s", r, d)
		}
		if d := cmpDiff(want, keyed.Split(r, nil).Counts); d != "" {
			t.Errorf("replicate %d: index keys differ from default (-want +got):\n%s", r, d)
		}
		for i, c := range want {
			if pc := resample.PoissonCount(seed, r, uint64(i)); pc != c {
				t.Fatalf("replicate %d row %d: PoissonCount %d, plan %d", r, i, pc, c)
			}
		}
	}
}

// TestGroupedWholeGroups checks that the grouped bootstrap draws whole
// groups: all rows of a group share one count, the counts of the groups
// (one per group) sum to the number of groups, and Out is the rows of the
// groups not drawn.
func TestGroupedWholeGroups(t *testing.T) {
	season := []string{"w", "w", "s", "s", "s", "a", "w", "a", "x"}
	p := mustPlan(t, resample.Grouped{B: 200, Groups: resample.ByLabel(season)}, len(season), 1)
	groups := p.(resample.Partitioned).Classes()
	if len(groups) != 4 {
		t.Fatalf("got %d groups, want 4", len(groups))
	}
	for _, s := range resample.All(p) {
		var sum int32
		for _, g := range groups {
			c := s.Counts[g.Rows[0]]
			for _, i := range g.Rows {
				if s.Counts[i] != c {
					t.Fatalf("replicate %d group %q: counts %d and %d differ", s.Replicate, g.Label, c, s.Counts[i])
				}
			}
			sum += c
		}
		if int(sum) != len(groups) {
			t.Fatalf("replicate %d: groups drawn %d times, want %d", s.Replicate, sum, len(groups))
		}
		var zero []int
		for i, c := range s.Counts {
			if c == 0 {
				zero = append(zero, i)
			}
		}
		if !slices.Equal(zero, s.Out) {
			t.Fatalf("replicate %d: Out %v, want %v", s.Replicate, s.Out, zero)
		}
	}
}
