package inspect

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
)

// titleStyle is the style of a histogram panel's title.
func titleStyle() text.Style {
	p := plot.New()
	p.Title.TextStyle.Font.Size = vg.Points(11)
	return p.Title.TextStyle
}

// squeeze drops every space and line break.
func squeeze(s string) string {
	return strings.NewReplacer(" ", "", "\n", "").Replace(s)
}

func TestWrapText(t *testing.T) {
	sty := titleStyle()
	tests := []struct {
		name  string
		s     string
		width vg.Length
		lines int  // the fewest lines the result may have; 0: no check
		cut   bool // whether a word must be cut short with an ellipsis
	}{
		{"fits on one line", "slope", 5 * vg.Centimeter, 1, false},
		{"estimable count wraps", "coronation_of_king_charles_iii (estimable in 639 of 999 replicates)", 6 * vg.Centimeter, 2, false},
		{"existing breaks kept", "christmas_day (estimable in 875 of 999 replicates)\nestimate 12.35, 95% percentile [10.88, 13.69]", 5 * vg.Centimeter, 3, false},
		{"underscores break a long name", "state_funeral_of_queen_elizabeth_ii", 3 * vg.Centimeter, 2, false},
		{"indicator level breaks at =", "weekday_of_the_long_name=Saturday", 3 * vg.Centimeter, 2, false},
		{"no break point: ellipsis", "Supercalifragilisticexpialidocious", 2 * vg.Centimeter, 1, true},
		{"narrower than an ellipsis", "abc", vg.Points(1), 1, true},
		{"empty", "", 3 * vg.Centimeter, 1, false},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got := wrapText(sty, tt.s, tt.width)
			lines := strings.Split(got, "\n")
			if len(lines) < tt.lines {
				t.Errorf("got %d lines %q, want at least %d", len(lines), lines, tt.lines)
			}
			for i, l := range lines {
				// A lone ellipsis is the one line allowed to overflow.
				if w := sty.Width(l); w > tt.width && l != ellipsis {
					t.Errorf("line %d %q: got width %.1f pt, want at most %.1f pt", i+1, l, w, tt.width)
				}
			}
			if cut := strings.Contains(got, ellipsis); cut != tt.cut {
				t.Errorf("got %q: ellipsis %t, want %t", got, cut, tt.cut)
			}
			if !tt.cut && squeeze(got) != squeeze(tt.s) {
				t.Errorf("got %q, want the characters of %q in order, only spaces and line breaks changed", got, tt.s)
			}
			// Greedy: a line that ends between words could not have taken
			// the next line's first word.
			for i := 0; i+1 < len(lines); i++ {
				next := strings.Fields(lines[i+1])
				if len(next) == 0 || strings.ContainsAny(lines[i][len(lines[i])-1:], "_-./=") {
					continue
				}
				if sty.Width(lines[i]+" "+next[0]) <= tt.width && !strings.Contains(tt.s, lines[i]+"\n") {
					t.Errorf("line %d %q could have taken %q within %.1f pt", i+1, lines[i], next[0], tt.width)
				}
			}
		})
	}
}

// TestHistogramTitlesFit draws long names and estimable counts in a
// 3-column grid and checks every panel's title and x label against the
// width of its tile.
func TestHistogramTitlesFit(t *testing.T) {
	names := []string{"state_funeral_of_queen_elizabeth_ii", "platinum_jubilee_bank_holiday",
		"coronation_of_king_charles_iii", "weekday=Saturday", "summer bank holiday with a long spaced name", "x"}
	g := rand.New(rand.NewPCG(3, 4))
	var stats []Statistic
	var sums []Summary
	for k, n := range names {
		st := Statistic{Name: n, Estimate: float64(k)}
		for r := range 999 {
			v := float64(k) + 1234.5*g.NormFloat64()
			if r < 360 {
				v = math.NaN()
			}
			st.Values = append(st.Values, v)
		}
		s, err := Summarize(st, Config{})
		if err != nil {
			t.Fatal(err)
		}
		stats, sums = append(stats, st), append(sums, s)
	}
	for _, size := range []vg.Length{18 * vg.Centimeter, 24 * vg.Centimeter} {
		f, err := Histograms(stats, sums, PlotColumns(3), PlotSize(size, 16*vg.Centimeter), PlotUnit("tickets per unit of the column"))
		if err != nil {
			t.Fatal(err)
		}
		tile := (size - gridTiles.PadLeft - gridTiles.PadRight - 2*gridTiles.PadX) / 3
		for r, row := range f.panels {
			for c, p := range row {
				if p == nil {
					continue
				}
				for _, l := range strings.Split(p.Title.Text, "\n") {
					if w := p.Title.TextStyle.Width(l); w > tile {
						t.Errorf("%.0f cm wide, panel (%d, %d): title line %q is %.1f pt, want at most the tile's %.1f pt", size/vg.Centimeter, r+1, c+1, l, w, tile)
					}
				}
				if !strings.Contains(p.Title.Text, "(estimable in 639 of 999 replicates)") && !strings.Contains(strings.ReplaceAll(p.Title.Text, "\n", " "), "estimable in 639 of 999 replicates") {
					t.Errorf("panel (%d, %d): title %q lost the estimable count", r+1, c+1, p.Title.Text)
				}
				for _, l := range strings.Split(p.X.Label.Text, "\n") {
					if w := p.X.Label.TextStyle.Width(l); w > tile-15*vg.Millimeter {
						t.Errorf("%.0f cm wide, panel (%d, %d): x label line %q is %.1f pt, want at most %.1f pt", size/vg.Centimeter, r+1, c+1, l, w, tile-15*vg.Millimeter)
					}
				}
			}
		}
	}
}

func TestNiceTicksSpacing(t *testing.T) {
	sty := text.Style{Font: font.From(plot.DefaultFont, vg.Points(10)), Handler: plot.DefaultTextHandler}
	tests := []struct {
		name   string
		lo, hi float64
		room   vg.Length
	}{
		{"wide labels, narrow axis", -16000, 17000, 3 * vg.Centimeter},
		{"wide labels, wide axis", -16000, 17000, 15 * vg.Centimeter},
		{"small values", 0.0123, 0.0456, 3 * vg.Centimeter},
		{"very narrow", -123456, 123456, 1 * vg.Centimeter},
		{"no limit", -3500, 3500, 0},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var major []plot.Tick
			for _, tk := range (niceTicks{room: tt.room, sty: sty}).Ticks(tt.lo, tt.hi) {
				if tk.Label != "" {
					major = append(major, tk)
				}
				if tk.Value < tt.lo-1e-9*(tt.hi-tt.lo) || tk.Value > tt.hi+1e-9*(tt.hi-tt.lo) {
					t.Errorf("tick %v outside [%v, %v]", tk.Value, tt.lo, tt.hi)
				}
			}
			if len(major) < 2 && tt.room > 2*vg.Centimeter {
				t.Errorf("got %d labels, want at least 2", len(major))
			}
			if tt.room == 0 {
				if len(major) < 4 {
					t.Errorf("no limit: got %d labels, want about five", len(major))
				}
				return
			}
			scale := float64(tt.room) / (tt.hi - tt.lo)
			for i := 1; i < len(major); i++ {
				gap := (major[i].Value - major[i-1].Value) * scale
				need := float64(sty.Width(major[i-1].Label)+sty.Width(major[i].Label)) / 2
				if gap < need {
					t.Errorf("labels %q and %q are %.1f pt apart, want at least %.1f pt so they do not overlap",
						major[i-1].Label, major[i].Label, gap, need)
				}
			}
		})
	}
}

// TestTitleNumbers checks the fixed-point numbers of a histogram panel's
// title: four significant digits of the largest of estimate and
// endpoints, more decimals when the interval is narrower than that shows,
// rounded to that many significant digits (never spurious trailing
// digits), thousands grouped with commas from 10,000, and exponent notation only
// for magnitudes fixed point cannot show in a title.
func TestTitleNumbers(t *testing.T) {
	tests := []struct {
		name         string
		est, lo, hi  float64
		want0, want1 string
		want2        string
	}{
		{"audience-sized", 10780.4, 10020.2, 11540.9, "10,780", "10,020", "11,540"},
		{"millions", 1234567.8, 1100000, 1400000, "1,235,000", "1,100,000", "1,400,000"},
		{"hundreds", 237.94, 201.5, 270.02, "237.9", "201.5", "270.0"},
		{"narrow interval", 12.3457, 12.30, 12.39, "12.346", "12.300", "12.390"},
		{"share", 0.2345678, 0.1, 0.35, "0.2346", "0.1000", "0.3500"},
		{"negative", -3.2, -5.1, -1.3, "-3.200", "-5.100", "-1.300"},
		{"no negative zero", 0, -0.0001, 2, "0.000", "0.000", "2.000"},
		{"tiny", 2.5e-7, 1e-7, 4e-7, "2.5e-07", "1e-07", "4e-07"},
		{"huge", 3e12, 2e12, 4e12, "3e+12", "2e+12", "4e+12"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got := titleNumbers(tt.est, tt.lo, tt.hi)
			want := [3]string{tt.want0, tt.want1, tt.want2}
			if got != want {
				t.Errorf("titleNumbers(%v, %v, %v): got %q, want %q", tt.est, tt.lo, tt.hi, got, want)
			}
		})
	}
}

// TestHistogramTitleFixedPoint checks that a panel title shows large
// values in fixed point (the audience counts of a broadcast are in the
// tens of thousands), not in exponent notation.
func TestHistogramTitleFixedPoint(t *testing.T) {
	g := rand.New(rand.NewPCG(5, 6))
	st := Statistic{Name: "audience", Estimate: 10780}
	for range 999 {
		st.Values = append(st.Values, 10780+400*g.NormFloat64())
	}
	s, err := Summarize(st, Config{})
	if err != nil {
		t.Fatal(err)
	}
	f, err := Histograms([]Statistic{st}, []Summary{s}, PlotSize(30*vg.Centimeter, 10*vg.Centimeter))
	if err != nil {
		t.Fatal(err)
	}
	title := strings.ReplaceAll(f.panels[0][0].Title.Text, "\n", " ")
	if strings.Contains(title, "e+") || !strings.Contains(title, "estimate 10,780,") {
		t.Errorf("got title %q, want the estimate as \"10,780\" and no exponent", title)
	}
}

// TestPlotUnitOf checks that a per-statistic unit reaches its panel's x
// label and that an empty answer falls back to PlotUnit.
func TestPlotUnitOf(t *testing.T) {
	g := rand.New(rand.NewPCG(5, 6))
	var stats []Statistic
	var sums []Summary
	for _, n := range []string{"trend.years", "weekend"} {
		st := Statistic{Name: n, Estimate: 1}
		for range 200 {
			st.Values = append(st.Values, 1+g.NormFloat64())
		}
		s, err := Summarize(st, Config{})
		if err != nil {
			t.Fatal(err)
		}
		stats, sums = append(stats, st), append(sums, s)
	}
	f, err := Histograms(stats, sums, PlotUnit("listeners"), PlotUnitOf(func(name string) string {
		if name == "trend.years" {
			return "listeners per year"
		}
		return ""
	}))
	if err != nil {
		t.Fatal(err)
	}
	want := []string{"value (listeners per year)", "value (listeners)"}
	for k, w := range want {
		p := f.panels[0][k]
		if got := strings.ReplaceAll(p.X.Label.Text, "\n", " "); got != w {
			t.Errorf("panel %d x label %q, want %q", k+1, got, w)
		}
	}
}
