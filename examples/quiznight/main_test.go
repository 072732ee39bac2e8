package main

import (
	"bytes"
	"encoding/csv"
	"errors"
	"flag"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/holiday"
)

// runDemo runs the demo in-process with a small B into a fresh folder.
func runDemo(t *testing.T, b int) (stdout string, dir string) {
	t.Helper()
	dir = t.TempDir()
	var out, errs bytes.Buffer
	if err := run([]string{"-b", strconv.Itoa(b), "-out", dir}, &out, &errs); err != nil {
		t.Fatalf("run: %v\nstderr: %s", err, errs.String())
	}
	return out.String(), dir
}

// reportLine is one parsed line of the effects table.
type reportLine struct {
	label           string
	true, estimate  float64
	lower, upper    float64
	hasInterval     bool
	estimable, reps int
}

var lineRE = regexp.MustCompile(`^(.+?)\s+(-?\d+\.\d+)\s+(-?\d+\.\d+)\s+(\[\s*(-?\d+\.\d+),\s*(-?\d+\.\d+)\]( \*)?|\(none: see below\))\s+(\d+) of (\d+)`)

func parseReport(t *testing.T, stdout string) []reportLine {
	t.Helper()
	var lines []reportLine
	for _, l := range strings.Split(stdout, "\n") {
		m := lineRE.FindStringSubmatch(l)
		if m == nil {
			continue
		}
		f := func(s string) float64 {
			v, err := strconv.ParseFloat(s, 64)
			if err != nil {
				t.Fatalf("line %q: %v", l, err)
			}
			return v
		}
		r := reportLine{label: m[1], true: f(m[2]), estimate: f(m[3]), hasInterval: m[5] != ""}
		if r.hasInterval {
			r.lower, r.upper = f(m[5]), f(m[6])
		}
		r.estimable, r.reps = int(f(m[8])), int(f(m[9]))
		lines = append(lines, r)
	}
	return lines
}

func TestDemoCoversTrueEffects(t *testing.T) {
	for _, b := range []int{199, 999} {
		if b == 999 && testing.Short() {
			continue
		}
		t.Run(strconv.Itoa(b), func(t *testing.T) {
			stdout, _ := runDemo(t, b)
			lines := parseReport(t, stdout)
			if want := 4 + len(trueUplift); len(lines) != want {
				t.Fatalf("got %d table lines, want %d:\n%s", len(lines), want, stdout)
			}
			for _, r := range lines {
				if r.reps != b {
					t.Errorf("%s: rests on %d replicates, want %d", r.label, r.reps, b)
				}
				mostly := r.estimable >= 9*b/10
				if mostly && !r.hasInterval {
					t.Errorf("%s: estimable in %d of %d replicates but no interval printed", r.label, r.estimable, b)
				}
				if r.hasInterval && (r.true < r.lower || r.true > r.upper) {
					t.Errorf("%s: true value %.2f outside the printed interval [%.2f, %.2f]", r.label, r.true, r.lower, r.upper)
				}
				if name := r.label; trueUplift[name] != 0 {
					if r.true != trueUplift[name] {
						t.Errorf("%s: printed true value %.2f, want %.2f", name, r.true, trueUplift[name])
					}
				}
			}
			for _, want := range []string{"association, not a causal effect", "stationary-bootstrap", "autocorrelated", "Out-of-bag error"} {
				if !strings.Contains(stdout, want) {
					t.Errorf("report does not say %q:\n%s", want, stdout)
				}
			}
		})
	}
}

func TestDemoIsReproducible(t *testing.T) {
	out1, dir1 := runDemo(t, 99)
	out2, dir2 := runDemo(t, 99)
	out1 = strings.ReplaceAll(out1, dir1, "DIR")
	out2 = strings.ReplaceAll(out2, dir2, "DIR")
	if out1 != out2 {
		t.Errorf("two runs printed different reports:\n%s\n---\n%s", out1, out2)
	}
	for _, name := range []string{"broadcasts.csv", "effects.csv", "coefficients.csv", "coefficients.json", "error.csv", "error.json"} {
		a, err := os.ReadFile(filepath.Join(dir1, name))
		if err != nil {
			t.Fatal(err)
		}
		b, err := os.ReadFile(filepath.Join(dir2, name))
		if err != nil {
			t.Fatal(err)
		}
		if len(a) == 0 || !bytes.Equal(a, b) {
			t.Errorf("%s: %d and %d bytes, want the same non-empty content", name, len(a), len(b))
		}
	}
	for _, name := range []string{"coefficients.svg", "coefficients.png", "observed_vs_predicted.svg", "observed_vs_predicted.png"} {
		if fi, err := os.Stat(filepath.Join(dir1, name)); err != nil || fi.Size() == 0 {
			t.Errorf("%s: not written (%v)", name, err)
		}
	}
}

func TestDemoFlags(t *testing.T) {
	tests := []struct {
		name    string
		args    []string
		wantErr string // substring; "help" means flag.ErrHelp
	}{
		{name: "help", args: []string{"-h"}, wantErr: "help"},
		{name: "too few replicates", args: []string{"-b", "1"}, wantErr: "at least 2"},
		{name: "stray argument", args: []string{"extra"}, wantErr: `unexpected argument "extra"`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var out, errs bytes.Buffer
			err := run(tt.args, &out, &errs)
			switch {
			case err == nil:
				t.Fatalf("got no error, want %q", tt.wantErr)
			case tt.wantErr == "help":
				if !errors.Is(err, flag.ErrHelp) || !strings.Contains(errs.String(), "-out") {
					t.Errorf("got %v and usage %q, want flag.ErrHelp and a usage naming -out", err, errs.String())
				}
			case !strings.Contains(err.Error(), tt.wantErr):
				t.Errorf("got error %q, want it to contain %q", err, tt.wantErr)
			}
			if out.Len() != 0 {
				t.Errorf("printed %q on stdout, want nothing", out.String())
			}
		})
	}
}

// TestScenario checks the invented data against the process documented in
// scenario.go.
func TestScenario(t *testing.T) {
	gb, err := holiday.Country("GB")
	if err != nil {
		t.Fatal(err)
	}
	rows := makeBroadcasts(gb, dataSeed)

	// Every Thursday of 2011–2025 is there, and every other row is a
	// holiday's day off.
	thursdays := 0
	for d := time.Date(firstYear, 1, 6, 0, 0, 0, 0, time.UTC); d.Year() <= lastYear; d = d.AddDate(0, 0, 7) {
		thursdays++
	}
	got := 0
	for i, r := range rows {
		if i > 0 && !rows[i-1].Date.Before(r.Date) {
			t.Fatalf("row %d (%s) is not after row %d", i+1, r.Date.Format(time.DateOnly), i)
		}
		if r.Date.Weekday() == time.Thursday {
			got++
		} else if r.Holiday == "" {
			t.Errorf("row %d (%s, %s) is neither a Thursday nor a holiday", i+1, r.Date.Format(time.DateOnly), r.Date.Weekday())
		}
	}
	if got != thursdays {
		t.Errorf("got %d Thursday broadcasts, want %d", got, thursdays)
	}
	// Each holiday with a true effect occurs: 15 times for the annual
	// ones, once for the one-off days (gov.uk lists 2022-06-03, 2022-09-19
	// and 2023-05-08 as one-off bank holidays).
	count := map[string]int{}
	for _, r := range rows {
		count[r.Holiday]++
	}
	for name := range trueUplift {
		want := 15
		if strings.Contains(name, "Jubilee") || strings.Contains(name, "Funeral") || strings.Contains(name, "Coronation") {
			want = 1
		}
		if count[name] != want {
			t.Errorf("%s: %d broadcasts, want %d", name, count[name], want)
		}
	}

	// The trend variable computed here agrees with the trend column of
	// package features (which the model uses), to 1e-12.
	dates := make([]time.Time, len(rows))
	for i, r := range rows {
		dates[i] = r.Date
	}
	enc, err := features.Set{Trend: &features.Trend{Origin: time.Date(firstYear, 1, 1, 0, 0, 0, 0, time.UTC), Unit: features.Years}}.Learn(dates)
	if err != nil {
		t.Fatal(err)
	}
	tab, err := features.Apply(enc, dates)
	if err != nil {
		t.Fatal(err)
	}
	for i, v := range tab.Column(0) {
		if w := yearsSince2011(dates[i]); math.Abs(v-w) > 1e-12 {
			t.Fatalf("row %d: features trend %.15g, ours %.15g", i+1, v, w)
		}
	}

	// The noise, audience less its true mean, has the AR(1) parameters of
	// the process: with about 900 rows the sample lag-1 autocorrelation
	// has a standard error near sqrt((1-φ²)/n) ≈ 0.03, so ±0.1 is over 3
	// standard errors; the standard deviation is within 10%.
	noise := make([]float64, len(rows))
	for i, r := range rows {
		angle := 2 * math.Pi * float64(r.Date.Month()-1) / 12
		noise[i] = r.Audience - (trueIntercept + trueTrend*yearsSince2011(r.Date) +
			trueSeasonSin*math.Sin(angle) + trueSeasonCos*math.Cos(angle) + trueUplift[r.Holiday])
	}
	if r := lag1(noise); math.Abs(r-noisePhi) > 0.1 {
		t.Errorf("noise lag-1 autocorrelation %.3f, want %.2f ± 0.1", r, noisePhi)
	}
	var ss float64
	for _, e := range noise {
		ss += e * e
	}
	if sd := math.Sqrt(ss / float64(len(noise))); math.Abs(sd/noiseSD()-1) > 0.1 {
		t.Errorf("noise standard deviation %.3f, want %.3f ± 10%%", sd, noiseSD())
	}
}

func TestLag1(t *testing.T) {
	// Hand-worked: x = 1, 2, 3, 4 has mean 2.5, deviations −1.5, −0.5,
	// 0.5, 1.5; Σ d_t d_{t−1} = 0.75 − 0.25 + 0.75 = 1.25 and Σ d² = 5.
	if got, want := lag1([]float64{1, 2, 3, 4}), 0.25; math.Abs(got-want) > 1e-15 {
		t.Errorf("lag1 = %v, want %v", got, want)
	}
}

// TestDemoCountsAgree checks that the holiday broadcasts counted in the
// report's header are those of the table's last column, and that the
// specials and regular Thursdays among them add up.
func TestDemoCountsAgree(t *testing.T) {
	stdout, _ := runDemo(t, 19)
	head := regexp.MustCompile(`(\d+) broadcasts, (\d+) on a bank holiday \((\d+) specials, (\d+) regular Thursdays\)`).FindStringSubmatch(stdout)
	if head == nil {
		t.Fatalf("no broadcast counts in the header:\n%s", stdout)
	}
	atoi := func(s string) int {
		v, err := strconv.Atoi(s)
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
	onHoliday, specials, thursdays := atoi(head[2]), atoi(head[3]), atoi(head[4])
	if specials+thursdays != onHoliday {
		t.Errorf("header: %d specials + %d Thursdays, want the %d holiday broadcasts", specials, thursdays, onHoliday)
	}
	last := regexp.MustCompile(` of \d+\s+(\d+)$`)
	sum, lines := 0, 0
	for _, l := range strings.Split(stdout, "\n") {
		if m := last.FindStringSubmatch(l); m != nil {
			sum += atoi(m[1])
			lines++
		}
	}
	if lines != len(trueUplift) || sum != onHoliday {
		t.Errorf("last column: %d holiday lines summing to %d, want %d lines summing to %d (the header's count)",
			lines, sum, len(trueUplift), onHoliday)
	}
}

// TestEffectsFile checks that effects.csv, which the report calls "the
// table above", has the report's intervals: the same endpoints to the
// printed two decimals, and none for the one-off days.
func TestEffectsFile(t *testing.T) {
	stdout, dir := runDemo(t, 49)
	printed := map[string]reportLine{}
	for _, r := range parseReport(t, stdout) {
		printed[r.label] = r
	}
	f, err := os.Open(filepath.Join(dir, "effects.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	col := map[string]int{}
	for j, h := range recs[0] {
		col[h] = j
	}
	if len(recs)-1 != len(printed) {
		t.Fatalf("effects.csv has %d rows, the report %d lines", len(recs)-1, len(printed))
	}
	for _, rec := range recs[1:] {
		label := rec[col["effect"]]
		r, ok := printed[label]
		if !ok {
			t.Errorf("effects.csv row %q is not in the report", label)
			continue
		}
		lower, upper, in := rec[col["lower"]], rec[col["upper"]], rec[col["true_inside"]]
		if !r.hasInterval {
			if lower != "" || upper != "" || in != "" || rec[col["method"]] != "" {
				t.Errorf("%s: effects.csv has interval %q–%q (true_inside %q), want none as in the report", label, lower, upper, in)
			}
			continue
		}
		lo, err1 := strconv.ParseFloat(lower, 64)
		hi, err2 := strconv.ParseFloat(upper, 64)
		if err1 != nil || err2 != nil || math.Abs(lo-r.lower) > 0.005+1e-9 || math.Abs(hi-r.upper) > 0.005+1e-9 {
			t.Errorf("%s: effects.csv interval %q–%q, want the printed [%.2f, %.2f] (±0.005)", label, lower, upper, r.lower, r.upper)
		}
		if want := strconv.FormatBool(r.lower <= r.true && r.true <= r.upper); in != want {
			t.Errorf("%s: true_inside %q, want %q", label, in, want)
		}
	}
}

// TestHistogramUnits checks the units of coefficients.svg: the trend's
// axis is in thousand listeners per year, the others in thousand
// listeners, and the panels carry the report's labels (the one-off days,
// which have no interval, have no panel).
func TestHistogramUnits(t *testing.T) {
	_, dir := runDemo(t, 19)
	svg, err := os.ReadFile(filepath.Join(dir, "coefficients.svg"))
	if err != nil {
		t.Fatal(err)
	}
	text := string(svg)
	for _, want := range []string{trendLabel, "value (thousand listeners per year)",
		"value (thousand listeners)", "Christmas Day", "baseline, 2011 (season averaged)"} {
		if !strings.Contains(text, want) {
			t.Errorf("coefficients.svg does not say %q", want)
		}
	}
	if n := strings.Count(text, "value (thousand listeners per year)"); n != 1 {
		t.Errorf("coefficients.svg has %d axes in thousand listeners per year, want 1 (the trend's)", n)
	}
	for _, unwanted := range []string{"trend.years", "Platinum Jubilee"} {
		if strings.Contains(text, unwanted) {
			t.Errorf("coefficients.svg says %q", unwanted)
		}
	}
}
