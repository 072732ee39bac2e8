package inspect_test

import (
	"encoding/csv"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"testing"

	"github.com/kalends/kalends/inspect"
)

// readCSV reads a testdata CSV whose comment lines start with '#'; it
// returns the rows after the header (or all rows when header is false).
func readCSV(t *testing.T, name string, header bool) [][]string {
	t.Helper()
	f, err := os.Open(filepath.Join("testdata", name))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	r := csv.NewReader(f)
	r.Comment = '#'
	r.FieldsPerRecord = -1
	rows, err := r.ReadAll()
	if err != nil {
		t.Fatalf("%s: %v", name, err)
	}
	if header {
		rows = rows[1:]
	}
	return rows
}

func parseFloat(t *testing.T, s string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

// relDiff is |got−want| / max(|want|, 1e-300).
func relDiff(got, want float64) float64 {
	return math.Abs(got-want) / math.Max(math.Abs(want), 1e-300)
}

// theatreStats returns, for counts f over the rows of (x, y), the mean of
// y, its variance var(y)/m, the OLS slope of y on x and its variance
// s²/Sxx, with m = Σf: the statistic of boot_reference.R written with
// frequency weights.
func theatreStats(x, y []float64, f []float64) [4]float64 {
	var m, mx, my float64
	for i := range x {
		m += f[i]
		mx += f[i] * x[i]
		my += f[i] * y[i]
	}
	mx /= m
	my /= m
	var sxx, sxy, syy float64
	for i := range x {
		dx, dy := x[i]-mx, y[i]-my
		sxx += f[i] * dx * dx
		sxy += f[i] * dx * dy
		syy += f[i] * dy * dy
	}
	b := sxy / sxx
	a := my - b*mx
	var sse float64
	for i := range x {
		e := y[i] - a - b*x[i]
		sse += f[i] * e * e
	}
	return [4]float64{my, syy / (m - 1) / m, b, sse / (m - 2) / sxx}
}

// TestSummarizeMatchesBoot checks the percentile, basic, normal, BCa and
// studentized intervals against R's boot.ci on the same frequency array
// (testdata/boot_reference.R; R 4.2.2, boot 1.3.28.1). The replicate
// values are recomputed here from boot.array's counts and the BCa
// acceleration from our own jackknife, centred on t₀ as boot's
// empinf(type = "jack") is; all must agree to 1e-8 relative.
func TestSummarizeMatchesBoot(t *testing.T) {
	const tol = 1e-8
	data := readCSV(t, "boot_data.csv", true)
	n := len(data)
	x, y := make([]float64, n), make([]float64, n)
	for i, row := range data {
		x[i], y[i] = parseFloat(t, row[0]), parseFloat(t, row[1])
	}
	ones := make([]float64, n)
	for i := range ones {
		ones[i] = 1
	}
	t0 := theatreStats(x, y, ones)

	rt := readCSV(t, "boot_t.csv", true)
	for j := range 4 {
		if d := relDiff(t0[j], parseFloat(t, rt[0][j])); d > 1e-12 {
			t.Errorf("t0[%d]: got %v, want %v", j, t0[j], rt[0][j])
		}
	}
	freq := readCSV(t, "boot_freq.csv", false)
	b := len(freq)
	if b != len(rt)-1 {
		t.Fatalf("got %d frequency rows, %d replicate rows", b, len(rt)-1)
	}
	var vals [4][]float64
	f := make([]float64, n)
	maxT := 0.0
	for r, row := range freq {
		for i := range f {
			f[i] = parseFloat(t, row[i])
		}
		s := theatreStats(x, y, f)
		for j := range 4 {
			vals[j] = append(vals[j], s[j])
			maxT = math.Max(maxT, relDiff(s[j], parseFloat(t, rt[r+1][j])))
		}
	}
	if maxT > 1e-10 {
		t.Errorf("replicate values from boot.array differ from boot's t by %.2g relative, want ≤ 1e-10", maxT)
	}

	// Jackknife: L_i = (n−1)(t0 − t_(−i)), as boot's usual.jack.
	jack := readCSV(t, "boot_jack.csv", true)
	var infl [2][]float64
	for i := range n {
		f := slicesRepeat(1.0, n)
		f[i] = 0
		s := theatreStats(x, y, f)
		for k, j := range [2]int{0, 2} {
			l := float64(n-1) * (t0[j] - s[j])
			infl[k] = append(infl[k], l)
			if d := math.Abs(l - parseFloat(t, jack[i][k])); d > 1e-8*math.Max(1, math.Abs(l)) {
				t.Errorf("influence %d of statistic %d: got %v, want %v", i+1, j, l, jack[i][k])
			}
		}
	}

	type key struct {
		stat, method string
		level        float64
	}
	want := map[key][2]float64{}
	wantA := map[string]float64{}
	for _, row := range readCSV(t, "boot_ci.csv", true) {
		if row[1] == "acceleration" {
			wantA[row[0]] = parseFloat(t, row[3])
			continue
		}
		want[key{row[0], row[1], parseFloat(t, row[2])}] = [2]float64{parseFloat(t, row[3]), parseFloat(t, row[4])}
	}

	maxDiff := 0.0
	for k, st := range []struct {
		name string
		j    int
	}{{"mean", 0}, {"slope", 2}} {
		a, err := inspect.InfluenceAcceleration(infl[k])
		if err != nil {
			t.Fatal(err)
		}
		if d := relDiff(a, wantA[st.name]); d > tol {
			t.Errorf("%s acceleration: got %v, want %v", st.name, a, wantA[st.name])
		}
		ses := make([]float64, b)
		for r := range ses {
			ses[r] = math.Sqrt(vals[st.j+1][r])
		}
		in := inspect.Statistic{Name: st.name, Estimate: t0[st.j], Values: vals[st.j],
			StdErr: math.Sqrt(t0[st.j+1]), StdErrs: ses, Acceleration: &a}
		for _, level := range []float64{0.90, 0.95} {
			s, err := inspect.Summarize(in, inspect.Config{Level: level})
			if err != nil {
				t.Fatal(err)
			}
			if len(s.Intervals) != 5 {
				t.Fatalf("%s: got %d intervals, want 5", st.name, len(s.Intervals))
			}
			for _, iv := range s.Intervals {
				w, ok := want[key{st.name, iv.Method.String(), level}]
				if !ok {
					t.Fatalf("no reference for %s %v %v", st.name, iv.Method, level)
				}
				if iv.Err != nil {
					t.Errorf("%s %v %v: %v", st.name, iv.Method, level, iv.Err)
					continue
				}
				dl, du := relDiff(iv.Lower, w[0]), relDiff(iv.Upper, w[1])
				maxDiff = math.Max(maxDiff, math.Max(dl, du))
				if dl > tol || du > tol {
					t.Errorf("%s %v %v%%: got [%.12g, %.12g], want [%.12g, %.12g]",
						st.name, iv.Method, 100*level, iv.Lower, iv.Upper, w[0], w[1])
				}
				if len(iv.Warnings) != 0 {
					t.Errorf("%s %v: unexpected warnings %v", st.name, iv.Method, iv.Warnings)
				}
			}
		}
	}
	t.Logf("largest relative difference from boot.ci: %.3g", maxDiff)
}

func slicesRepeat(v float64, n int) []float64 {
	s := make([]float64, n)
	for i := range s {
		s[i] = v
	}
	return s
}
