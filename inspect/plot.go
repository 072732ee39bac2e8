package inspect

import (
	"fmt"
	"image/color"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Figure is a rendered-on-demand figure of one or more plot panels, made
// by [Histograms] or [ObservedPredicted]. Write it with WriteSVG, WritePNG
// or Save. A Figure is not safe for concurrent use. The exact drawing may
// change between versions: do not depend on its bytes.
type Figure struct {
	title  string
	panels [][]*plot.Plot
	width  vg.Length
	height vg.Length
	dpi    int
}

// PlotOption changes how a figure is drawn; options are checked when they
// are made.
type PlotOption func(*plotConfig)

type plotConfig struct {
	bins          int
	cols          int
	width, height vg.Length
	mark          Method
	title         string
	unit          string
	unitOf        func(statistic string) string
	dpi           int
}

// PlotBins sets the number of histogram bins; the default is √B clamped to
// [10, 40]. It panics if n < 1.
func PlotBins(n int) PlotOption {
	if n < 1 {
		panic("inspect: PlotBins: n < 1")
	}
	return func(c *plotConfig) { c.bins = n }
}

// PlotColumns sets the number of panel columns in a histogram grid; the
// default is min(3, panels). It panics if n < 1.
func PlotColumns(n int) PlotOption {
	if n < 1 {
		panic("inspect: PlotColumns: n < 1")
	}
	return func(c *plotConfig) { c.cols = n }
}

// PlotSize sets the whole figure's width and height; the default gives
// each histogram panel 8 cm × 7 cm and a scatter 13 cm × 13 cm. It panics
// unless both are positive.
func PlotSize(width, height vg.Length) PlotOption {
	if !(width > 0 && height > 0) {
		panic("inspect: PlotSize: size not positive")
	}
	return func(c *plotConfig) { c.width, c.height = width, height }
}

// PlotMark chooses which interval of each [Summary] a histogram marks; the
// default is the summary's first interval. It panics if m is invalid.
func PlotMark(m Method) PlotOption {
	if !m.valid() {
		panic(fmt.Sprintf("inspect: PlotMark: invalid %v", m))
	}
	return func(c *plotConfig) { c.mark = m }
}

// PlotTitle sets the figure's title; an empty title removes it.
func PlotTitle(s string) PlotOption { return func(c *plotConfig) { c.title = s } }

// PlotUnit names the unit of the values (the statistics of a histogram
// grid, or the outcome of a scatter), shown in the axis labels.
func PlotUnit(s string) PlotOption { return func(c *plotConfig) { c.unit = s } }

// PlotUnitOf names the unit of each histogram panel's values, for grids
// whose statistics do not share one (a coefficient per year next to
// coefficients in the outcome's unit). f is called with each statistic's
// name; an empty result falls back to the unit of [PlotUnit]. It panics if
// f is nil.
func PlotUnitOf(f func(statistic string) string) PlotOption {
	if f == nil {
		panic("inspect: PlotUnitOf: nil function")
	}
	return func(c *plotConfig) { c.unitOf = f }
}

// PlotDPI sets the resolution of PNG output; the default is 150. It panics
// if dpi < 1.
func PlotDPI(dpi int) PlotOption {
	if dpi < 1 {
		panic("inspect: PlotDPI: dpi < 1")
	}
	return func(c *plotConfig) { c.dpi = dpi }
}

func newConfig(opts []PlotOption) plotConfig {
	c := plotConfig{dpi: 150, title: "\x00"}
	for _, o := range opts {
		o(&c)
	}
	return c
}

func (c plotConfig) label(what string) string {
	if c.unit == "" {
		return what
	}
	return what + " (" + c.unit + ")"
}

var (
	estimateColor = color.RGBA{A: 255}
	intervalColor = color.RGBA{R: 200, G: 30, B: 30, A: 255}
	barColor      = color.RGBA{R: 160, G: 190, B: 220, A: 255}
)

// Histograms draws a grid of histograms of bootstrap replicate values, one
// panel per statistic, each with its own scale, marking the full-data
// estimate (solid line) and the chosen interval of its summary (dashed
// lines). sums[i] must be the [Summary] of stats[i]. Failed and
// not-estimable replicates are left out and counted in the panel's title,
// which also gives the estimate and the interval in fixed point (such as
// "10,780"), to four significant digits or as many as the interval's
// width needs. Titles and axis labels are wrapped to fit their panel, breaking long
// names after "_", "-", ".", "/" or "=" and, where a word has no such
// place, cutting it short with an ellipsis; tick labels are thinned until
// they do not touch.
//
// It returns an error if a statistic's estimate is not finite or it has no
// usable replicate. It panics if len(sums) != len(stats).
func Histograms(stats []Statistic, sums []Summary, opts ...PlotOption) (*Figure, error) {
	if len(sums) != len(stats) {
		panic("inspect: Histograms: len(sums) != len(stats)")
	}
	if len(stats) == 0 {
		return nil, fmt.Errorf("inspect: Histograms: no statistics")
	}
	c := newConfig(opts)
	cols := c.cols
	if cols == 0 {
		cols = min(3, len(stats))
	}
	cols = min(cols, len(stats))
	rows := (len(stats) + cols - 1) / cols
	f := &Figure{dpi: c.dpi, width: c.width, height: c.height, title: c.title}
	if f.width == 0 {
		f.width, f.height = vg.Length(cols)*8*vg.Centimeter, vg.Length(rows)*7*vg.Centimeter+vg.Centimeter
	}
	// Titles and axis labels are wrapped to the panel's width, less a
	// margin for the shift plot.Align may give a panel to line up its axes
	// with the other panels'.
	tileW := (f.width - gridTiles.PadLeft - gridTiles.PadRight - vg.Length(cols-1)*gridTiles.PadX) / vg.Length(cols)
	var marked string
	for i := range stats {
		p, name, err := histogram(stats[i], sums[i], c, tileW-3*vg.Millimeter)
		if err != nil {
			return nil, err
		}
		if marked == "" {
			marked = name
		}
		if i%cols == 0 {
			f.panels = append(f.panels, make([]*plot.Plot, cols))
		}
		f.panels[i/cols][i%cols] = p
	}
	if f.title == "\x00" {
		f.title = "Bootstrap distributions: solid line full-data estimate"
		if marked != "" {
			f.title += ", dashed lines " + marked + " interval"
		}
	}
	return f, nil
}

// histogram returns one panel, its title and x label wrapped to width, and
// the description of its marked interval.
func histogram(st Statistic, s Summary, c plotConfig, width vg.Length) (*plot.Plot, string, error) {
	name := nameOr(st.Name)
	if !finite(st.Estimate) {
		return nil, "", &estimateError{op: "inspect: Histograms: ", name: name, value: st.Estimate}
	}
	var vals plotter.Values
	for r, v := range st.Values {
		if (st.Errs == nil || st.Errs[r] == nil) && finite(v) {
			vals = append(vals, v)
		}
	}
	if _, err := plotter.CopyValues(vals); err != nil {
		return nil, "", fmt.Errorf("inspect: Histograms: %s: no usable replicates of %d: %w", name, len(st.Values), err)
	}
	bins := c.bins
	if bins == 0 {
		bins = min(40, max(10, int(math.Ceil(math.Sqrt(float64(len(vals)))))))
	}
	h, err := plotter.NewHist(vals, bins)
	if err != nil {
		return nil, "", fmt.Errorf("inspect: Histograms: %s: %w", name, err)
	}
	h.FillColor = barColor
	h.LineStyle.Width = vg.Points(0.5)
	top := 0.0
	for _, b := range h.Bins {
		top = math.Max(top, b.Weight)
	}

	p := plot.New()
	// The data area is the panel less about 1.5 cm for the y axis.
	p.X.Tick.Marker = niceTicks{room: width - 15*vg.Millimeter, sty: p.X.Tick.Label}
	p.Y.Tick.Marker = niceTicks{}
	p.Title.TextStyle.Font.Size = vg.Points(11)
	pc := c
	if c.unitOf != nil {
		if u := c.unitOf(st.Name); u != "" {
			pc.unit = u
		}
	}
	p.X.Label.Text = pc.label("value")
	p.Y.Label.Text = "replicates"
	p.X.Label.TextStyle.Font.Size = vg.Points(10)
	p.Y.Label.TextStyle.Font.Size = vg.Points(10)
	p.Add(h)
	vline := func(x float64, col color.Color, dashed bool) error {
		l, err := plotter.NewLine(plotter.XYs{{X: x, Y: 0}, {X: x, Y: top * 1.08}})
		if err != nil {
			return err
		}
		l.Color = col
		l.Width = vg.Points(1.5)
		if dashed {
			l.Dashes = []vg.Length{vg.Points(4), vg.Points(2.5)}
		}
		p.Add(l)
		return nil
	}
	if err := vline(st.Estimate, estimateColor, false); err != nil {
		return nil, "", fmt.Errorf("inspect: Histograms: %s: %w", name, err)
	}

	title := name
	if lost := len(st.Values) - len(vals); lost > 0 {
		// The words of the summaries: the histogram shows the replicates
		// that could estimate the statistic (neither failed nor not
		// estimable).
		title += fmt.Sprintf(" (estimable in %d of %d replicates)", len(vals), len(st.Values))
	}
	desc := ""
	iv, ok := pickInterval(s, c.mark)
	switch {
	case !ok && c.mark != 0:
		title += "\nno " + c.mark.String() + " interval"
	case !ok:
	case iv.Err != nil:
		title += fmt.Sprintf("\n%v interval not computable", iv.Method)
	default:
		desc = fmt.Sprintf("%g%% %v", 100*iv.Level, iv.Method)
		num := titleNumbers(st.Estimate, iv.Lower, iv.Upper)
		title += fmt.Sprintf("\nestimate %s, %s [%s, %s]", num[0], desc, num[1], num[2])
		for _, x := range [2]float64{iv.Lower, iv.Upper} {
			if err := vline(x, intervalColor, true); err != nil {
				return nil, "", fmt.Errorf("inspect: Histograms: %s: %w", name, err)
			}
		}
	}
	p.Title.Text = wrapText(p.Title.TextStyle, title, width)
	// The x label is centred under the data, right of the y axis: allow
	// 1.5 cm for the y label and its tick labels.
	p.X.Label.Text = wrapText(p.X.Label.TextStyle, p.X.Label.Text, width-15*vg.Millimeter)
	p.Y.Min = 0
	return p, desc, nil
}

func pickInterval(s Summary, m Method) (Interval, bool) {
	if m == 0 {
		if len(s.Intervals) == 0 {
			return Interval{}, false
		}
		return s.Intervals[0], true
	}
	return s.Interval(m)
}

// ObservedPredicted draws observed values against predictions (typically
// each row's mean out-of-bag prediction, from [MeanOutOfBag]) as a scatter
// with the 45° line of perfect prediction, both axes on the same scale.
//
// It returns an error naming the first row (1-based) whose observed or
// predicted value is NaN or infinite, with how many such rows there are;
// a row never out of bag must be left out by the caller, deliberately. It
// panics if the lengths differ.
func ObservedPredicted(observed, predicted []float64, opts ...PlotOption) (*Figure, error) {
	if len(observed) != len(predicted) {
		panic("inspect: ObservedPredicted: len(observed) != len(predicted)")
	}
	if len(observed) == 0 {
		return nil, fmt.Errorf("inspect: ObservedPredicted: no rows")
	}
	bad, first := 0, 0
	pts := make(plotter.XYs, len(observed))
	lo, hi := math.Inf(1), math.Inf(-1)
	for i, y := range observed {
		if !finite(y) || !finite(predicted[i]) {
			if bad == 0 {
				first = i + 1
			}
			bad++
			continue
		}
		pts[i] = plotter.XY{X: y, Y: predicted[i]}
		lo = math.Min(lo, math.Min(y, predicted[i]))
		hi = math.Max(hi, math.Max(y, predicted[i]))
	}
	if bad > 0 {
		return nil, fmt.Errorf("inspect: ObservedPredicted: row %d (and %d rows in all) has a NaN or infinite value", first, bad)
	}
	c := newConfig(opts)
	if hi == lo {
		lo, hi = lo-1, hi+1
	}
	pad := (hi - lo) * 0.04
	lo, hi = lo-pad, hi+pad

	width := c.width
	if width == 0 {
		width = 13 * vg.Centimeter
	}
	p := plot.New()
	p.X.Tick.Marker = niceTicks{room: width - gridTiles.PadLeft - gridTiles.PadRight - 15*vg.Millimeter, sty: p.X.Tick.Label}
	p.Y.Tick.Marker = niceTicks{}
	p.X.Label.Text = c.label("observed")
	p.Y.Label.Text = c.label("out-of-bag predicted")
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = lo, hi, lo, hi
	diag, err := plotter.NewLine(plotter.XYs{{X: lo, Y: lo}, {X: hi, Y: hi}})
	if err != nil {
		return nil, fmt.Errorf("inspect: ObservedPredicted: %w", err)
	}
	diag.Color = intervalColor
	diag.Dashes = []vg.Length{vg.Points(4), vg.Points(2.5)}
	sc, err := plotter.NewScatter(pts)
	if err != nil {
		return nil, fmt.Errorf("inspect: ObservedPredicted: %w", err)
	}
	sc.GlyphStyle.Shape = draw.CircleGlyph{}
	sc.GlyphStyle.Radius = vg.Points(2.5)
	sc.GlyphStyle.Color = color.RGBA{R: 30, G: 80, B: 150, A: 255}
	p.Add(diag, sc)
	f := &Figure{panels: [][]*plot.Plot{{p}}, dpi: c.dpi, width: c.width, height: c.height, title: c.title}
	if f.width == 0 {
		f.width, f.height = 13*vg.Centimeter, 13*vg.Centimeter
	}
	if f.title == "\x00" {
		f.title = fmt.Sprintf("Observed vs out-of-bag predicted (%d rows); dashed: 45° line", len(observed))
	}
	return f, nil
}

// niceTicks labels about five round values (1, 2 or 5 times a power of
// ten) and puts unlabelled minor ticks between them. When room is
// positive, the labels, measured with sty, are spread over an axis that
// long, and the step grows (1, 2, 5, 10, ...) until neighbouring labels
// are at least half an em apart; if that would leave fewer than two
// labels, every other label of the last step is left blank, or all but
// the middle one.
type niceTicks struct {
	room vg.Length
	sty  text.Style
}

func (nt niceTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(hi > lo) {
		return plot.DefaultTicks{}.Ticks(lo, hi)
	}
	raw := (hi - lo) / 5
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	m := 1.0
	for _, next := range []float64{2, 5, 10} {
		if raw/mag > next*0.75 {
			m = next
		}
	}
	if m == 10 {
		m, mag = 1, mag*10
	}
	labels := func(step float64) []plot.Tick {
		var ticks []plot.Tick
		for k := math.Ceil(lo / step); k*step <= hi+step*1e-9; k++ {
			v := k * step
			if math.Abs(v) < step*1e-9 {
				v = 0
			}
			ticks = append(ticks, plot.Tick{Value: v, Label: strconv.FormatFloat(v, 'g', 6, 64)})
		}
		return ticks
	}
	step := m * mag
	major := labels(step)
	for range 12 {
		if nt.room <= 0 || nt.spaced(major, step/(hi-lo)*float64(nt.room)) {
			break
		}
		nm, nmag := m, mag
		switch m {
		case 1:
			nm = 2
		case 2:
			nm = 5
		default:
			nm, nmag = 1, mag*10
		}
		next := labels(nm * nmag)
		if len(next) < 2 {
			// A wider step would leave one label or none: keep every
			// other label of this one instead, or only the middle one if
			// even those crowd each other.
			var kept []plot.Tick
			for i := range major {
				if i%2 == 0 {
					kept = append(kept, major[i])
				}
			}
			keep := func(i int) bool { return i%2 == 0 }
			if !nt.spaced(kept, 2*step/(hi-lo)*float64(nt.room)) {
				keep = func(i int) bool { return i == len(major)/2 }
			}
			for i := range major {
				if !keep(i) {
					major[i].Label = ""
				}
			}
			break
		}
		m, mag, step, major = nm, nmag, nm*nmag, next
	}
	var ticks []plot.Tick
	minor := step / 5
	if m == 2 {
		minor = step / 4
	}
	for v := math.Ceil(lo/minor) * minor; v <= hi+minor*1e-9; v += minor {
		ticks = append(ticks, plot.Tick{Value: v})
	}
	return append(ticks, major...)
}

// spaced reports whether labels centred gap apart on the axis leave at
// least half an em between neighbours.
func (nt niceTicks) spaced(major []plot.Tick, gap float64) bool {
	em := float64(nt.sty.Font.Size) / 2
	for i := 1; i < len(major); i++ {
		need := float64(nt.sty.Width(major[i-1].Label)+nt.sty.Width(major[i].Label))/2 + em
		if gap < need {
			return false
		}
	}
	return true
}

// gridTiles holds the padding of a figure's grid of panels.
var gridTiles = draw.Tiles{PadX: 4 * vg.Millimeter, PadY: 4 * vg.Millimeter,
	PadTop: 1 * vg.Millimeter, PadBottom: 2 * vg.Millimeter, PadLeft: 2 * vg.Millimeter, PadRight: 4 * vg.Millimeter}

// draw renders the figure on a canvas.
func (f *Figure) draw(c vg.CanvasSizer) {
	dc := draw.New(c)
	if f.title != "" {
		sty := text.Style{Color: color.Black, Font: font.From(plot.DefaultFont, vg.Points(12)),
			XAlign: draw.XCenter, YAlign: draw.YTop, Handler: plot.DefaultTextHandler}
		title := wrapText(sty, f.title, dc.Max.X-dc.Min.X-6*vg.Millimeter)
		h := sty.Height(title) + 3*vg.Millimeter
		dc.FillText(sty, vg.Point{X: dc.Center().X, Y: dc.Max.Y - 1.5*vg.Millimeter}, title)
		dc = draw.Crop(dc, 0, 0, 0, -h)
	}
	tiles := gridTiles
	tiles.Rows, tiles.Cols = len(f.panels), len(f.panels[0])
	canvases := plot.Align(f.panels, tiles, dc)
	for r := range f.panels {
		for k, p := range f.panels[r] {
			if p != nil {
				p.Draw(canvases[r][k])
			}
		}
	}
}

// WriteSVG writes the figure as SVG with its fonts embedded, so it looks
// the same in any viewer.
func (f *Figure) WriteSVG(w io.Writer) error {
	c := vgsvg.NewWith(vgsvg.UseWH(f.width, f.height), vgsvg.EmbedFonts(true))
	f.draw(c)
	_, err := c.WriteTo(w)
	return err
}

// WritePNG writes the figure as a PNG image on a white background.
func (f *Figure) WritePNG(w io.Writer) error {
	c := vgimg.NewWith(vgimg.UseWH(f.width, f.height), vgimg.UseDPI(f.dpi), vgimg.UseBackgroundColor(color.White))
	f.draw(c)
	_, err := vgimg.PngCanvas{Canvas: c}.WriteTo(w)
	return err
}

// Save writes the figure to a file, as SVG or PNG by the extension of path
// (".svg" or ".png", in any case); any other extension is an error.
func (f *Figure) Save(path string) (err error) {
	var write func(io.Writer) error
	switch strings.ToLower(filepath.Ext(path)) {
	case ".svg":
		write = f.WriteSVG
	case ".png":
		write = f.WritePNG
	default:
		return fmt.Errorf("inspect: Save: %s: extension is not .svg or .png", path)
	}
	out, err := os.Create(path)
	if err != nil {
		return err
	}
	defer func() {
		if cerr := out.Close(); err == nil {
			err = cerr
		}
	}()
	return write(out)
}

// titleNumbers formats a panel title's estimate and interval endpoints in
// fixed point, all to the same decimal place: four significant digits of
// the largest magnitude, or more where the interval is so narrow that two
// significant digits of its width need them (at most ten significant
// digits), rounded to tens, hundreds and so on when that place is left
// of the decimal point. Integer parts of 10,000 and more are grouped in
// thousands with commas. Magnitudes below 10⁻⁴ or from 10¹² on, which
// fixed point would spell out in a dozen zeros, keep exponent notation
// (four significant digits).
func titleNumbers(est, lo, hi float64) [3]string {
	vals := [3]float64{est, lo, hi}
	var out [3]string
	m := 0.0
	for _, v := range vals {
		if finite(v) {
			m = math.Max(m, math.Abs(v))
		}
	}
	if m != 0 && (m < 1e-4 || m >= 1e12) {
		for k, v := range vals {
			out[k] = strconv.FormatFloat(v, 'g', 4, 64)
		}
		return out
	}
	dec := 3
	if m > 0 {
		dec = 3 - int(math.Floor(math.Log10(m)))
		if w := hi - lo; w > 0 && finite(w) {
			dec = min(max(dec, 1-int(math.Floor(math.Log10(w)))), dec+6)
		}
	}
	for k, v := range vals {
		if !finite(v) {
			out[k] = strconv.FormatFloat(v, 'g', -1, 64)
			continue
		}
		var s string
		if dec >= 0 {
			s = strconv.FormatFloat(v, 'f', dec, 64)
		} else {
			unit := math.Pow(10, float64(-dec))
			s = strconv.FormatFloat(math.Round(v/unit)*unit, 'f', 0, 64)
		}
		if strings.Trim(s, "-0.") == "" {
			s = strings.TrimPrefix(s, "-") // no "-0.000"
		}
		out[k] = s
	}
	if m >= 1e4 {
		for k, s := range out {
			out[k] = groupThousands(s)
		}
	}
	return out
}

// groupThousands inserts a comma between every three digits of the
// integer part of a fixed-point number.
func groupThousands(s string) string {
	sign := ""
	if strings.HasPrefix(s, "-") {
		sign, s = "-", s[1:]
	}
	frac := ""
	if i := strings.IndexByte(s, '.'); i >= 0 {
		s, frac = s[:i], s[i:]
	}
	if len(s) <= 3 || strings.Trim(s, "0123456789") != "" {
		return sign + s + frac
	}
	var b strings.Builder
	for i, c := range s {
		if i > 0 && (len(s)-i)%3 == 0 {
			b.WriteByte(',')
		}
		b.WriteRune(c)
	}
	return sign + b.String() + frac
}
