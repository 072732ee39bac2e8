package inspect_test

import (
	"bytes"
	"errors"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/kalends/kalends/inspect"
)

// theatreStatistics reads the replicate values of testdata/boot_t.csv
// (made by boot_reference.R) as three statistics with very different
// scales, plus a bounded one that piles up at zero.
func theatreStatistics(t *testing.T) ([]inspect.Statistic, []inspect.Summary) {
	t.Helper()
	rows := readCSV(t, "boot_t.csv", true)
	names := []string{"mean tickets", "variance of mean", "slope per °C"}
	stats := make([]inspect.Statistic, 4)
	for j := range 3 {
		stats[j] = inspect.Statistic{Name: names[j], Estimate: parseFloat(t, rows[0][j])}
		for _, r := range rows[1:] {
			stats[j].Values = append(stats[j].Values, parseFloat(t, r[j]))
		}
	}
	// A share bounded at 0, and two not-estimable replicates.
	stats[3] = inspect.Statistic{Name: "share above 12", Estimate: 0.02}
	for i, v := range stats[2].Values {
		stats[3].Values = append(stats[3].Values, math.Max(0, (v-10.5)/20))
		if i < 2 {
			stats[3].Values[i] = math.NaN()
		}
	}
	sums := make([]inspect.Summary, len(stats))
	for i, st := range stats {
		s, err := inspect.Summarize(st, inspect.Config{Level: 0.9})
		if err != nil {
			t.Fatal(err)
		}
		sums[i] = s
	}
	return stats, sums
}

func TestHistogramsRender(t *testing.T) {
	stats, sums := theatreStatistics(t)
	fig, err := inspect.Histograms(stats, sums, inspect.PlotColumns(2), inspect.PlotMark(inspect.Basic))
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	if d := os.Getenv("KALENDS_PLOT_DIR"); d != "" {
		dir = d // to look at the images
	}
	for _, name := range []string{"hist.png", "hist.svg"} {
		if err := fig.Save(filepath.Join(dir, name)); err != nil {
			t.Fatal(err)
		}
	}
	f, err := os.Open(filepath.Join(dir, "hist.png"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatal(err)
	}
	// 2 columns × 8 cm by 2 rows × 7 cm + 1 cm at 150 dpi.
	if b := img.Bounds(); b.Dx() != int(math.Round(16/2.54*150)) || b.Dy() != int(math.Round(15/2.54*150)) {
		t.Errorf("got PNG %dx%d, want %dx%d", b.Dx(), b.Dy(), int(math.Round(16/2.54*150)), int(math.Round(15/2.54*150)))
	}
	svg, err := os.ReadFile(filepath.Join(dir, "hist.svg"))
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"<svg", "@font-face", "mean tickets", "90% basic"} {
		if !bytes.Contains(svg, []byte(want)) {
			t.Errorf("SVG lacks %q", want)
		}
	}
	if err := fig.Save(filepath.Join(dir, "hist.gif")); err == nil {
		t.Error("Save .gif: got nil error")
	}
}

func TestObservedPredictedRender(t *testing.T) {
	data := readCSV(t, "boot_data.csv", true)
	var obs, pred []float64
	for _, r := range data {
		x, y := parseFloat(t, r[0]), parseFloat(t, r[1])
		obs = append(obs, y)
		pred = append(pred, 180+9*x)
	}
	fig, err := inspect.ObservedPredicted(obs, pred, inspect.PlotUnit("tickets"))
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	if d := os.Getenv("KALENDS_PLOT_DIR"); d != "" {
		dir = d
	}
	var buf bytes.Buffer
	if err := fig.WritePNG(&buf); err != nil {
		t.Fatal(err)
	}
	if _, err := png.Decode(bytes.NewReader(buf.Bytes())); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "obspred.png"), buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	buf.Reset()
	if err := fig.WriteSVG(&buf); err != nil || !strings.Contains(buf.String(), "out-of-bag predicted (tickets)") {
		t.Errorf("SVG: err %v, or axis label missing", err)
	}
}

func TestPlotBadInput(t *testing.T) {
	nan := math.NaN()
	good := inspect.Statistic{Name: "x", Estimate: 1, Values: []float64{1, 2, 3}}
	s, _ := inspect.Summarize(good, inspect.Config{})
	tests := []struct {
		name string
		f    func() error
	}{
		{"estimate NaN", func() error {
			_, err := inspect.Histograms([]inspect.Statistic{{Name: "x", Estimate: nan, Values: []float64{1, 2}}}, []inspect.Summary{s})
			if !errors.Is(err, inspect.ErrEstimate) || !errors.Is(err, inspect.ErrNotEstimable) {
				return errors.New("want ErrEstimate and ErrNotEstimable")
			}
			return err
		}},
		{"all NaN", func() error {
			_, err := inspect.Histograms([]inspect.Statistic{{Name: "x", Estimate: 1, Values: []float64{nan, nan}}}, []inspect.Summary{s})
			return err
		}},
		{"no statistics", func() error { _, err := inspect.Histograms(nil, nil); return err }},
		{"predicted NaN", func() error {
			_, err := inspect.ObservedPredicted([]float64{1, 2, 3}, []float64{1, nan, 3})
			if err != nil && !strings.Contains(err.Error(), "row 2") {
				return errors.New("error does not name row 2: " + err.Error())
			}
			return err
		}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if err := tt.f(); err == nil {
				t.Error("got nil error")
			} else {
				t.Log(err)
			}
		})
	}
	// NaN and Inf replicates are left out, not plotted (plotter would panic).
	withNaN := inspect.Statistic{Name: "x", Estimate: 2, Values: []float64{1, nan, 3, math.Inf(1), 2}}
	if _, err := inspect.Histograms([]inspect.Statistic{withNaN}, []inspect.Summary{s}); err != nil {
		t.Errorf("NaN replicates: got %v, want them left out", err)
	}
	for _, bad := range []func(){
		func() { inspect.PlotBins(0) },
		func() { inspect.PlotColumns(0) },
		func() { inspect.PlotMark(0) },
		func() { inspect.Histograms([]inspect.Statistic{good}, nil) },
	} {
		if !panics(bad) {
			t.Error("no panic")
		}
	}
}
