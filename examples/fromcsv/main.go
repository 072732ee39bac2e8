// Command fromcsv runs the whole kalends job on a CSV file of your own: one
// row per dated event, an outcome column, optional extra numeric columns.
// It makes calendar and holiday columns from the dates, fits least squares
// to every bootstrap replicate, prints each coefficient with its interval
// and the out-of-bag error, and writes tables and plots to a folder.
//
// Run it with -h for the flags; the sample file testdata/ferry_tickets.csv
// (invented data) works with the example command line shown there.
package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/fit"
	"github.com/kalends/kalends/holiday"
	"github.com/kalends/kalends/inspect"
	"github.com/kalends/kalends/resample"
	"gonum.org/v1/plot/vg"
)

func main() {
	if err := run(os.Args[1:], os.Stdin, os.Stdout, os.Stderr); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			os.Exit(0)
		}
		fmt.Fprintln(os.Stderr, "fromcsv:", err)
		os.Exit(1)
	}
}

const usageText = `Usage: go run ./examples/fromcsv -file FILE.csv -outcome COLUMN [flags]

fromcsv estimates how much the calendar (trend, season, weekday, public and
custom holidays) moves one number kept per dated row, with bootstrap
intervals and the out-of-bag prediction error. Each row is one event; the
file needs a header line. Lines starting with # are skipped. Rows are used
in file order (block schemes assume that is time order).

Example, on the invented sample shipped with kalends:

  go run ./examples/fromcsv -file testdata/ferry_tickets.csv -outcome tickets \
      -extra rain_mm,sailings -calendar GB \
      -holiday "Skelly Regatta=2nd saturday of august" \
      -parts weekday:indicator,month:cyclic,trend -scheme stationary

Calendar parts (-parts), comma-separated, each part[:encoding[=level]]:
  parts      year quarter month isoweek isoyear day yearday weekday monthweek
             weekend monthstart monthend daysinmonth leapyear, and trend
             (time since the first date, in years; trend:days for days)
  encodings  number (default), indicator (one 0/1 column per level; the
             first level is left out as the reference, or the one after =,
             e.g. weekday:indicator=sunday), cyclic (a sine and a cosine)

Custom holidays (-holiday, repeat the flag), "Name=WHEN", WHEN one of:
  MM-DD                       the same day every year    "Harbour Day=07-14"
  YYYY-MM-DD[,YYYY-MM-DD...]  one-off days               "Pier Closed=2024-01-22"
  easter+N or easter-N        days from Western Easter   "Easter Tuesday=easter+2"
  orthodox+N or orthodox-N    days from Orthodox Easter  "Orthodox Monday=orthodox+1"
  NTH WEEKDAY of MONTH        NTH: 1st…5th or last       "Fair=last monday of july"
Custom holidays stay on their date (no weekend substitution). With -calendar
they are added to that country's holidays. The model always has an intercept.

Flags:
`

// config holds the parsed flags.
type config struct {
	file, dateCol, layout, outcome, extra string
	calendar, holidayCols, parts          string
	holidays                              holidayFlags
	scheme, interval                      string
	b, block                              int
	seed                                  uint64
	level                                 float64
	out                                   string
}

func parseFlags(args []string, stderr io.Writer) (config, error) {
	var c config
	fs := flag.NewFlagSet("fromcsv", flag.ContinueOnError)
	fs.SetOutput(stderr)
	fs.Usage = func() {
		fmt.Fprint(stderr, usageText)
		fs.PrintDefaults()
	}
	fs.StringVar(&c.file, "file", "", "the CSV file to read, or - for standard input (required)")
	fs.StringVar(&c.dateCol, "date", "date", "the name of the date column")
	fs.StringVar(&c.layout, "layout", time.DateOnly, "the date layout, as Go writes 2 January 2006 (e.g. 02/01/2006)")
	fs.StringVar(&c.outcome, "outcome", "", "the name of the outcome column, the number to explain (required)")
	fs.StringVar(&c.extra, "extra", "", "comma-separated names of extra numeric columns to include in the model")
	fs.StringVar(&c.calendar, "calendar", "", "a country or region holiday calendar code (GB, US, FR, DE-BY, ...); empty for none")
	fs.Var(&c.holidays, "holiday", "a custom holiday, \"Name=WHEN\" (repeatable; forms above)")
	fs.StringVar(&c.holidayCols, "holidays", "each", "holiday columns: each (one indicator per holiday that falls on a row), any (one for all) or none")
	fs.StringVar(&c.parts, "parts", "weekday:indicator,month:cyclic,trend", "calendar parts and encodings (see above)")
	fs.StringVar(&c.scheme, "scheme", "bootstrap", "resampling: bootstrap, balanced, bayesian, poisson, stationary, moving-block, circular-block")
	fs.IntVar(&c.b, "b", 999, "number of replicates")
	fs.IntVar(&c.block, "block", 0, "block length for the block schemes (mean length for stationary); 0 chooses it from the data")
	fs.Uint64Var(&c.seed, "seed", 1, "seed of the resampling: the same seed gives the same results")
	fs.StringVar(&c.interval, "interval", "percentile", "interval method: percentile, basic, normal, bca (adds one leave-one-out fit per row for its acceleration) or studentized")
	fs.Float64Var(&c.level, "level", 0.95, "interval coverage, between 0 and 1")
	fs.StringVar(&c.out, "out", filepath.Join("out", "fromcsv"), "folder for the tables (CSV, JSON) and plots (SVG, PNG); created if missing")
	if err := fs.Parse(args); err != nil {
		return c, err
	}
	switch {
	case fs.NArg() > 0:
		return c, fmt.Errorf("unexpected argument %q: flags come as -name value (see -h)", fs.Arg(0))
	case c.file == "":
		return c, errors.New("no input: give -file FILE.csv, or -file - for standard input (see -h)")
	case c.outcome == "":
		return c, errors.New("no outcome: give -outcome and the name of the column to explain (see -h)")
	case c.b < 2:
		return c, fmt.Errorf("-b %d: need at least 2 replicates", c.b)
	case c.block < 0:
		return c, fmt.Errorf("-block %d: must be 0 (automatic) or positive", c.block)
	case !(c.level > 0 && c.level < 1):
		return c, fmt.Errorf("-level %v: must be between 0 and 1, such as 0.95", c.level)
	}
	return c, nil
}

func run(args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	c, err := parseFlags(args, stderr)
	if err != nil {
		return err
	}
	method, err := parseMethod(c.interval)
	if err != nil {
		return err
	}
	var extraCols []string
	for _, s := range strings.Split(c.extra, ",") {
		if s = strings.TrimSpace(s); s != "" {
			extraCols = append(extraCols, s)
		}
	}

	// Read the data.
	name, r := c.file, stdin
	if c.file == "-" {
		name = "stdin"
	} else {
		f, err := os.Open(c.file)
		if err != nil {
			return err
		}
		defer f.Close()
		r = f
	}
	in, err := readInput(r, name, c.dateCol, c.layout, c.outcome, extraCols)
	if err != nil {
		return err
	}
	for i := 1; i < len(in.dates); i++ {
		if in.dates[i].Before(in.dates[i-1]) {
			fmt.Fprintf(stderr, "fromcsv: warning: %s line %d: date %s is earlier than the row before; rows are used in file order\n",
				name, in.lines[i], in.dates[i].Format(time.DateOnly))
			break
		}
	}
	d := inspect.Data{Dates: in.dates, Outcome: in.outcome}
	if len(extraCols) > 0 {
		d.Extra = features.NewTable(len(in.dates))
		for k, col := range extraCols {
			if err := d.Extra.Append(col, in.extra[k]); err != nil {
				return fmt.Errorf("-extra %q: %v", col, err)
			}
		}
	}

	design, absent, refs, err := buildDesign(c, in.dates)
	if err != nil {
		return err
	}
	full, err := fullDesign(design, d)
	if err != nil {
		return err
	}
	// The residuals of a first least-squares fit, in row order, choose the
	// block length of the block schemes when -block is 0.
	series := func() ([]float64, error) {
		m, err := fit.OLS{}.FitOLS(full, d.Outcome, nil)
		if err != nil {
			return nil, err
		}
		return m.Residuals(nil), nil
	}
	scheme, err := parseScheme(c.scheme, c.b, c.block, series)
	if err != nil {
		return err
	}
	plan, err := scheme.Plan(len(d.Dates), c.seed)
	if err != nil {
		return err
	}

	coef, metrics, oob := inspect.KeepCoefficients(), inspect.KeepMetrics(), inspect.KeepOutOfBag()
	start := time.Now()
	shown := false
	progress := func(done, total int) {
		if !shown && time.Since(start) < 300*time.Millisecond {
			return
		}
		if !shown || done == total || done%50 == 0 {
			fmt.Fprintf(stderr, "\rreplicates fitted: %d of %d", done, total)
		}
		shown = true
	}
	res, err := inspect.Run(context.Background(), d, design,
		inspect.Options{Fitter: fit.OLS{}, Scheme: scheme, Seed: c.seed, Progress: progress}, coef, metrics, oob)
	if shown {
		fmt.Fprintf(stderr, " (%.1fs)\n", time.Since(start).Seconds())
	}
	if err != nil {
		return err
	}
	cfg := inspect.Config{Level: c.level, Methods: []inspect.Method{method}}
	stats, err := inspect.CoefficientStatistics(coef)
	if err != nil {
		return err
	}
	if method == inspect.BCa {
		// BCa's acceleration comes from the leave-one-out (jackknife)
		// estimates: one more run, over resample.Jackknife.
		jack := inspect.KeepCoefficients()
		if _, err := inspect.Run(context.Background(), d, design,
			inspect.Options{Fitter: fit.OLS{}, Scheme: resample.Jackknife{}}, jack); err != nil {
			return fmt.Errorf("jackknife for BCa: %w", err)
		}
		if err := inspect.WithJackknife(stats, jack); err != nil {
			return err
		}
	}
	var sums []inspect.Summary
	var unfit, notes []string
	for _, st := range stats {
		s, err := inspect.Summarize(st, cfg)
		switch {
		case errors.Is(err, inspect.ErrNotEstimable):
			unfit = append(unfit, st.Name)
		case err != nil:
			notes = append(notes, fmt.Sprintf("%s: not summarised: %v", st.Name, err))
		default:
			sums = append(sums, s)
		}
	}

	p := func(format string, a ...any) { fmt.Fprintf(stdout, format, a...) }
	p("%d rows from %s, %s to %s; outcome %q.\n", len(d.Dates), name,
		d.Dates[0].Format(time.DateOnly), d.Dates[len(d.Dates)-1].Format(time.DateOnly), c.outcome)
	schemeText := fmt.Sprintf("%d %s replicates", res.Total, c.scheme)
	if bl, ok := plan.(resample.Blocked); ok {
		schemeText += fmt.Sprintf(" (block length %.1f rows)", bl.BlockLength())
	}
	p("Least squares on %d columns, %s, seed %d.\n\n", len(res.Full.Names()), schemeText, c.seed)
	ivHead := fmt.Sprintf("%g%% %v interval", 100*c.level, method)
	nameW := len("column")
	for _, s := range sums {
		nameW = max(nameW, len(s.Name))
	}
	p("%-*s %10s  %-23s %10s  %-12s %s\n", nameW, "column", "estimate", ivHead, "std.error", "estimable in", "rows")
	few := 0
	for _, s := range sums {
		iv := s.Intervals[0]
		ivText := "(not computed)"
		if iv.Err == nil {
			ivText = fmt.Sprintf("[%9.5g, %9.5g]", iv.Lower, iv.Upper)
		} else {
			notes = append(notes, fmt.Sprintf("%s: no interval: %v", s.Name, iv.Err))
		}
		for _, w := range append(s.Warnings, iv.Warnings...) {
			notes = append(notes, fmt.Sprintf("%s: %v", s.Name, w))
		}
		rows := ""
		if k, ok := indicatorRows(full, s.Name); ok {
			rows = strconv.Itoa(k)
			if k < 5 {
				rows += " !"
				few++
			}
		}
		line := fmt.Sprintf("%-*s %10.5g  %-23s %10.5g  %-12s %s", nameW, s.Name, s.Estimate, ivText, s.StdErr,
			fmt.Sprintf("%d of %d", s.Used, s.Replicates), rows)
		p("%s\n", strings.TrimRight(line, " "))
	}
	if len(absent) > 0 {
		p("\nHolidays of the calendar on none of the rows, so without a column:\n  %s\n", strings.Join(absent, ", "))
	}
	if len(unfit) > 0 {
		p("\nNot estimable even on all rows (the column is constant or repeats others):\n  %s\n",
			strings.Join(unfit, ", "))
	}
	if len(notes) > 0 {
		p("\n")
		for _, n := range notes {
			p("note: %s\n", n)
		}
	}
	units := "a 0/1 column: the difference on its rows"
	for _, n := range res.Full.Names() {
		switch n {
		case "trend.years":
			units = n + ": per year; " + units
		case "trend.days":
			units = n + ": per day; " + units
		}
	}
	p("\nEach coefficient is the change in %s per unit of its column, the other columns held fixed\n", c.outcome)
	p("(%s).\n", units)
	if len(refs) > 0 {
		p("Reference levels, which have no column (their part's other columns are differences from them):\n  %s\n",
			strings.Join(refs, ", "))
	}
	p("rows: for a 0/1 column, the rows where it is 1. A replicate cannot estimate a column that is\n")
	p("all zeros in the rows it drew (a holiday none of whose rows it drew): \"estimable in\" counts\n")
	p("the replicates that could.\n")
	if few > 0 {
		p("! marks %d column(s) set on fewer than 5 rows: their interval cannot show those rows' own\n", few)
		p("noise and is far too narrow. Read such estimates as anecdotes.\n")
	}
	if res.Failed > 0 {
		p("%d of %d replicates failed; the first: %v\n", res.Failed, res.Total, firstErr(res.Errs))
	}
	errSums := make([]inspect.Summary, 0, 2)
	for _, m := range []struct {
		name string
		f    func(inspect.Metrics) float64
	}{
		{"out-of-bag RMSE", func(m inspect.Metrics) float64 { return m.RMSE }},
		{"out-of-bag MAE", func(m inspect.Metrics) float64 { return m.MAE }},
	} {
		st, err := inspect.StatisticOf(metrics, m.name, m.f)
		if err != nil {
			return err
		}
		s, err := inspect.Summarize(st, inspect.Config{Level: c.level, Methods: []inspect.Method{inspect.Percentile}})
		if err != nil {
			p("%s: %v\n", m.name, err)
			continue
		}
		errSums = append(errSums, s)
	}
	if len(errSums) == 2 {
		iv := errSums[0].Intervals[0]
		dec := decimals(errSums[0].Mean, 4)
		p("\nOut-of-bag error (rows each replicate left out): RMSE %.*f (middle %g%% of replicates %.*f to %.*f),\n",
			dec, errSums[0].Mean, 100*c.level, dec, iv.Lower, dec, iv.Upper)
		p("MAE %.*f; in-sample RMSE %.*f.\n", dec, errSums[1].Mean, dec, errSums[0].Estimate)
	}
	p("Calendar and holiday coefficients are associations in these data, not causal effects.\n")

	if err := writeOutputs(c.out, full, sums, stats, errSums, oob, d.Outcome, c.outcome, method, c.level); err != nil {
		return err
	}
	p("Tables and plots written to %s: coefficients.csv/.json, error.csv/.json,\n", c.out)
	p("coefficients.svg/.png (replicate histograms, without the intercept and the ! columns),\n")
	p("observed_vs_predicted.svg/.png.\n")
	return nil
}

// decimals returns the number of decimals that shows v to sig significant
// digits (none for large values), so that figures of one scale printed
// together have the same decimals: 13.2954 → 2, as in 13.30.
func decimals(v float64, sig int) int {
	if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		return sig - 1
	}
	return max(0, sig-1-int(math.Floor(math.Log10(math.Abs(v)))))
}

func firstErr(errs []error) error {
	for _, e := range errs {
		if e != nil {
			return e
		}
	}
	return nil
}

// buildDesign makes the feature set from the flags: an intercept, the
// calendar parts (indicator parts without a named reference leave out the
// first level seen in dates) and the holiday columns. With -holidays each,
// only the holidays that fall on one of the dates get a column
// (holiday.Columns.Seen); absent names the others' columns. refs names
// the reference level of each indicator part, as "part=Level".
func buildDesign(c config, dates []time.Time) (design features.Builder, absent, refs []string, err error) {
	parts, trend, err := parseParts(c.parts)
	if err != nil {
		return nil, nil, nil, err
	}
	set := features.Set{ZeroUnseen: true}
	for _, ps := range parts {
		set.Parts = append(set.Parts, ps.spec)
	}
	if trend != nil {
		set.Trend = &features.Trend{Origin: dates[0], Unit: *trend}
	}
	enc, err := set.Learn(dates)
	if err != nil {
		return nil, nil, nil, fmt.Errorf("-parts: %v", err)
	}
	learned := enc.Names()
	for k, ps := range parts {
		if !ps.auto {
			continue
		}
		prefix := ps.spec.Part.String() + "="
		for _, n := range learned {
			if level, ok := strings.CutPrefix(n, prefix); ok {
				set.Parts[k].Reference = level
				break
			}
		}
	}
	for _, sp := range set.Parts {
		if sp.Reference != "" {
			refs = append(refs, sp.Part.String()+"="+sp.Reference)
		}
	}
	builders := []features.Builder{features.Intercept{}, set}

	var cals []holiday.Calendar
	if c.calendar != "" {
		cal, err := holiday.Country(c.calendar)
		if err != nil {
			return nil, nil, nil, fmt.Errorf("-calendar %q: %v", c.calendar, err)
		}
		cals = append(cals, cal)
	}
	if len(c.holidays) > 0 {
		var rules []holiday.Rule
		for _, v := range c.holidays {
			r, err := parseHoliday(v)
			if err != nil {
				return nil, nil, nil, err
			}
			rules = append(rules, r)
		}
		cal, err := holiday.New("custom", rules...)
		if err != nil {
			return nil, nil, nil, fmt.Errorf("-holiday: %v", err)
		}
		cals = append(cals, cal)
	}
	if len(cals) > 0 && c.holidayCols != "none" {
		cal, err := holiday.Combine(cals...)
		if err != nil {
			return nil, nil, nil, err
		}
		hc := holiday.Columns{Calendar: cal}
		switch c.holidayCols {
		case "each":
			hc.Each.Indicator = true
			if absent, err = absentHolidays(hc, dates); err != nil {
				return nil, nil, nil, err
			}
			hc.Seen = true
		case "any":
			hc.Any.Indicator = true
		default:
			return nil, nil, nil, fmt.Errorf("-holidays %q: want each, any or none", c.holidayCols)
		}
		builders = append(builders, hc)
	}
	return features.Join(builders...), absent, refs, nil
}

// absentHolidays returns the columns hc makes for holidays on none of the
// dates: those it makes without Seen and not with it.
func absentHolidays(hc holiday.Columns, dates []time.Time) ([]string, error) {
	hc.Seen = false
	all, err := hc.Learn(dates)
	if err != nil {
		return nil, err
	}
	hc.Seen = true
	seen, err := hc.Learn(dates)
	if err != nil {
		return nil, err
	}
	var absent []string
	for _, n := range all.Names() {
		if !slices.Contains(seen.Names(), n) {
			absent = append(absent, n)
		}
	}
	return absent, nil
}

// indicatorRows reports, for a 0/1 column of x, how many rows are 1.
func indicatorRows(x *features.Table, name string) (int, bool) {
	col, ok := x.Lookup(name)
	if !ok {
		return 0, false
	}
	k := 0
	for _, v := range col {
		switch v {
		case 0:
		case 1:
			k++
		default:
			return 0, false
		}
	}
	return k, name != features.InterceptName
}

// fullDesign is the design of all rows: learned columns, then the extra ones.
func fullDesign(b features.Builder, d inspect.Data) (*features.Table, error) {
	enc, err := b.Learn(d.Dates)
	if err != nil {
		return nil, err
	}
	x, err := features.Apply(enc, d.Dates)
	if err != nil {
		return nil, err
	}
	if d.Extra != nil {
		if err := x.Join(d.Extra); err != nil {
			return nil, err
		}
	}
	return x, nil
}

// writeOutputs writes the tables and plots into dir.
func writeOutputs(dir string, full *features.Table, sums []inspect.Summary, stats []inspect.Statistic, errSums []inspect.Summary,
	oob *inspect.Kept[inspect.OutOfBag], outcome []float64, outcomeName string, method inspect.Method, level float64) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	write := func(name string, fn func(w io.Writer) error) error {
		f, err := os.Create(filepath.Join(dir, name))
		if err != nil {
			return err
		}
		if err := fn(f); err != nil {
			f.Close()
			return fmt.Errorf("writing %s: %w", name, err)
		}
		return f.Close()
	}
	for _, s := range []struct {
		name string
		fn   func(w io.Writer) error
	}{
		{"coefficients.csv", inspect.Table(sums).WriteCSV},
		{"coefficients.json", inspect.Table(sums).WriteJSON},
		{"error.csv", inspect.Table(errSums).WriteCSV},
		{"error.json", inspect.Table(errSums).WriteJSON},
	} {
		if err := write(s.name, s.fn); err != nil {
			return err
		}
	}
	// Histograms of the coefficients that could be summarised, except the
	// intercept, whose scale dwarfs the others, and the columns set on
	// fewer than 5 rows.
	byName := map[string]inspect.Statistic{}
	for _, st := range stats {
		byName[st.Name] = st
	}
	var hs []inspect.Statistic
	var hsum []inspect.Summary
	for _, s := range sums {
		if k, ok := indicatorRows(full, s.Name); s.Name != features.InterceptName && (!ok || k >= 5) {
			hs, hsum = append(hs, byName[s.Name]), append(hsum, s)
		}
	}
	var figs []struct {
		name string
		f    *inspect.Figure
	}
	if len(hs) > 0 {
		rows := (len(hs) + 2) / 3
		hist, err := inspect.Histograms(hs, hsum, inspect.PlotMark(method), inspect.PlotColumns(3),
			inspect.PlotSize(30*vg.Centimeter, vg.Length(rows)*7*vg.Centimeter),
			inspect.PlotUnit(outcomeName+" per unit of the column"),
			inspect.PlotTitle(fmt.Sprintf("Bootstrap replicates of each coefficient (solid: full-data estimate; dashed: %g%% %v interval)",
				100*level, method)))
		if err != nil {
			return err
		}
		figs = append(figs, struct {
			name string
			f    *inspect.Figure
		}{"coefficients", hist})
	}
	mean, count := inspect.MeanOutOfBag(len(outcome), oob.Values())
	var obs, pred []float64
	for i := range outcome {
		if count[i] > 0 {
			obs, pred = append(obs, outcome[i]), append(pred, mean[i])
		}
	}
	if len(obs) > 0 {
		scatter, err := inspect.ObservedPredicted(obs, pred, inspect.PlotUnit(outcomeName),
			inspect.PlotTitle("Observed against mean out-of-bag prediction"))
		if err != nil {
			return err
		}
		figs = append(figs, struct {
			name string
			f    *inspect.Figure
		}{"observed_vs_predicted", scatter})
	}
	for _, fig := range figs {
		for _, ext := range []string{".svg", ".png"} {
			if err := fig.f.Save(filepath.Join(dir, fig.name+ext)); err != nil {
				return err
			}
		}
	}
	return nil
}
