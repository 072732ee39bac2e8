package main

import (
	"bytes"
	"encoding/csv"
	"errors"
	"math"
	"os"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/kalends/kalends/fit"
	"gonum.org/v1/gonum/mat"
)

// readCSV reads a CSV file under testdata whose first line is a # comment.
func readCSV(t *testing.T, name string) [][]string {
	t.Helper()
	b, err := os.ReadFile("testdata/" + name)
	if err != nil {
		t.Fatal(err)
	}
	r := csv.NewReader(bytes.NewReader(b))
	r.Comment = '#'
	recs, err := r.ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	return recs[1:] // drop the header
}

func atof(t *testing.T, s string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

// rlmData returns the design (intercept, x1, x2) and outcome of
// testdata/rlm_data.csv.
func rlmData(t *testing.T) (*mat.Dense, []float64) {
	recs := readCSV(t, "rlm_data.csv")
	x := mat.NewDense(len(recs), 3, nil)
	y := make([]float64, len(recs))
	for i, rec := range recs {
		y[i] = atof(t, rec[0])
		x.Set(i, 0, 1)
		x.Set(i, 1, atof(t, rec[1]))
		x.Set(i, 2, atof(t, rec[2]))
	}
	return x, y
}

func relClose(got, want, tol float64) bool {
	return math.Abs(got-want) <= tol*math.Max(1, math.Abs(want))
}

// TestHuberAgainstR compares the fit with MASS::rlm (psi.huber, k = 1.345,
// scale.est = "MAD"), whose output testdata/rlm_reference.R wrote to
// testdata/rlm_reference.csv (R 4.2.2, MASS 7.3.58.2).
func TestHuberAgainstR(t *testing.T) {
	x, y := rlmData(t)
	want := map[string]float64{}
	for _, rec := range readCSV(t, "rlm_reference.csv") {
		want[rec[0]] = atof(t, rec[1])
	}
	p, err := Huber{Tol: 1e-14, MaxIter: 500}.Fit(x, y, nil)
	if err != nil {
		t.Fatal(err)
	}
	h := p.(*HuberFit)
	// Both fits iterate to the same fixed point; rlm stops on a change of
	// residuals of 1e-14 and we on a change of coefficients of 1e-14, so
	// 1e-9 relative leaves room for the different stopping rules.
	const tol = 1e-9
	for j, name := range []string{"intercept", "x1", "x2"} {
		if got := h.Coefficients()[j].Estimate; !relClose(got, want[name], tol) {
			t.Errorf("%s: got %.15g, want %.15g (rlm)", name, got, want[name])
		}
	}
	if !relClose(h.Scale, want["scale"], tol) {
		t.Errorf("scale: got %.15g, want %.15g (rlm)", h.Scale, want["scale"])
	}
	if h.DownWeighted != want["downweighted"] {
		t.Errorf("share down-weighted: got %v, want %v (rlm)", h.DownWeighted, want["downweighted"])
	}
}

// TestHuberCountsAreRows checks that whole-number case weights, as a
// bootstrap run passes them, give the fit of the data with each row
// repeated that many times.
func TestHuberCountsAreRows(t *testing.T) {
	x, y := rlmData(t)
	n, _ := x.Dims()
	w := make([]float64, n)
	var rows []int
	for i := range w {
		w[i] = float64((i * 7) % 4) // 0, 3, 2, 1, 0, ...
		for range int(w[i]) {
			rows = append(rows, i)
		}
	}
	xe := mat.NewDense(len(rows), 3, nil)
	ye := make([]float64, len(rows))
	for k, i := range rows {
		xe.SetRow(k, x.RawRowView(i))
		ye[k] = y[i]
	}
	pw, err := Huber{}.Fit(x, y, w)
	if err != nil {
		t.Fatal(err)
	}
	pe, err := Huber{}.Fit(xe, ye, nil)
	if err != nil {
		t.Fatal(err)
	}
	hw, he := pw.(*HuberFit), pe.(*HuberFit)
	for j := range 3 {
		if got, want := hw.Coefficients()[j].Estimate, he.Coefficients()[j].Estimate; !relClose(got, want, 1e-10) {
			t.Errorf("coefficient %d: weighted %.15g, expanded %.15g", j, got, want)
		}
	}
	if !relClose(hw.Scale, he.Scale, 1e-10) || !relClose(hw.DownWeighted, he.DownWeighted, 1e-12) {
		t.Errorf("scale, share: weighted %v, %v; expanded %v, %v", hw.Scale, hw.DownWeighted, he.Scale, he.DownWeighted)
	}
}

func TestHuberLimits(t *testing.T) {
	x, y := rlmData(t)
	ols, err := fit.OLS{}.FitOLS(x, y, nil)
	if err != nil {
		t.Fatal(err)
	}
	// With a huge K no row is down-weighted, so Huber is least squares.
	p, err := Huber{K: 1e9}.Fit(x, y, nil)
	if err != nil {
		t.Fatal(err)
	}
	for j, c := range p.(*HuberFit).Coefficients() {
		if want := ols.Coefficients()[j].Estimate; !relClose(c.Estimate, want, 1e-12) {
			t.Errorf("K = 1e9, coefficient %d: got %.15g, want the OLS %.15g", j, c.Estimate, want)
		}
	}
	if s := p.(*HuberFit).DownWeighted; s != 0 {
		t.Errorf("K = 1e9: %v of rows down-weighted, want 0", s)
	}

	tests := []struct {
		name string
		h    Huber
		y    []float64
		want error // matched with errors.Is, or nil for any error
		msg  string
	}{
		{name: "no convergence", h: Huber{MaxIter: 1}, y: y, want: fit.ErrNoConvergence},
		{name: "zero scale", h: Huber{}, y: exactLine(x, y), msg: "scale is zero"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := tt.h.Fit(x, tt.y, nil)
			if err == nil {
				t.Fatal("got no error")
			}
			if tt.want != nil && !errors.Is(err, tt.want) {
				t.Errorf("got %v, want an error matching %v", err, tt.want)
			}
			if tt.msg != "" && !strings.Contains(err.Error(), tt.msg) {
				t.Errorf("got %q, want it to say %q", err, tt.msg)
			}
		})
	}
}

// exactLine returns an outcome that the line 1 + x1 fits exactly.
func exactLine(x *mat.Dense, y []float64) []float64 {
	out := make([]float64, len(y))
	for i := range out {
		out[i] = 1 + x.At(i, 1)
	}
	return out
}

func TestWeightedMedianAbs(t *testing.T) {
	tests := []struct {
		name string
		r, w []float64
		want float64
	}{
		{name: "odd", r: []float64{-3, 1, 2}, want: 2},
		{name: "even", r: []float64{-4, 1, 2, 3}, want: 2.5},
		{name: "counts", r: []float64{1, -2, 3}, w: []float64{1, 0, 2}, want: 3},       // 1, 3, 3
		{name: "even counts", r: []float64{1, 2, 3}, w: []float64{2, 1, 1}, want: 1.5}, // 1, 1, 2, 3
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := weightedMedianAbs(tt.r, tt.w); got != tt.want {
				t.Errorf("got %v, want %v", got, tt.want)
			}
		})
	}
}

var rowRE = regexp.MustCompile(`^(\S+)\s+(-?[\d.]+)\s+(-?[\d.]+) \[\s*(-?[\d.]+),\s*(-?[\d.]+)\]\s+(-?[\d.]+) \[\s*(-?[\d.]+),\s*(-?[\d.]+)\]`)

func TestRun(t *testing.T) {
	var out, errs bytes.Buffer
	if err := run([]string{"-b", "99"}, &out, &errs); err != nil {
		t.Fatalf("run: %v\n%s", err, errs.String())
	}
	seen := 0
	for _, line := range strings.Split(out.String(), "\n") {
		m := rowRE.FindStringSubmatch(line)
		if m == nil {
			continue
		}
		seen++
		name, tru := m[1], atof(t, m[2])
		if want := truth[name]; tru != want {
			t.Errorf("%s: printed true value %v, want %v", name, tru, want)
		}
		// The faults are all low, so they pull even Huber's level down a
		// little; the other coefficients are not pulled, and their
		// intervals cover the truth.
		hub, lo, hi := atof(t, m[6]), atof(t, m[7]), atof(t, m[8])
		if name != "intercept" && (tru < lo || tru > hi) {
			t.Errorf("%s: true %v outside the Huber interval [%v, %v]", name, tru, lo, hi)
		}
		// Least squares is pulled much further.
		if ols := atof(t, m[3]); name == "intercept" && math.Abs(hub-tru) >= math.Abs(ols-tru) {
			t.Errorf("intercept: Huber %v is no closer to %v than least squares %v", hub, tru, ols)
		}
	}
	if seen != len(truth) {
		t.Errorf("got %d coefficient lines, want %d:\n%s", seen, len(truth), out.String())
	}
	for _, want := range []string{"robust scale (calls)", "% of evenings down-weighted", "IRLS steps",
		"Effects in calls per evening (trend.years: per year)", "relative to Monday, the\nreference level"} {
		if !strings.Contains(out.String(), want) {
			t.Errorf("output does not mention %q:\n%s", want, out.String())
		}
	}
	// Same seed, same output.
	var again bytes.Buffer
	if err := run([]string{"-b", "99"}, &again, &errs); err != nil {
		t.Fatal(err)
	}
	if again.String() != out.String() {
		t.Errorf("two runs differ:\n%s\n---\n%s", out.String(), again.String())
	}
}
