// Command quiznight is the kalends demo: it invents fifteen years of
// audience figures for a fictional radio quiz, with known calendar and
// holiday effects, and shows how well a block-bootstrapped least-squares
// fit recovers them.
//
// Usage:
//
//	go run ./examples/quiznight [-out ./out/quiznight] [-b 999] [-seed 1]
//
// It prints a one-screen report on standard output (true effects next to
// the estimates and their bootstrap intervals, how many replicates could
// estimate each holiday, the out-of-bag error, and cautions), writes CSV
// and JSON tables and SVG and PNG plots to the output folder, and reports
// progress on standard error when the run takes more than a moment. The
// same flags always give the same report and the same tables.
//
// The station, the programme and every figure are invented; see
// scenario.go for the process that makes the data.
package main

import (
	"context"
	"encoding/csv"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/fit"
	"github.com/kalends/kalends/holiday"
	"github.com/kalends/kalends/inspect"
	"github.com/kalends/kalends/resample"
)

func main() {
	if err := run(os.Args[1:], os.Stdout, os.Stderr); err != nil {
		if !errors.Is(err, flag.ErrHelp) {
			fmt.Fprintln(os.Stderr, "quiznight:", err)
		}
		os.Exit(2)
	}
}

// level is the coverage of the intervals the report prints.
const level = 0.95

// options are the command-line settings.
type options struct {
	out  string
	b    int
	seed uint64
}

func parseFlags(args []string, stderr io.Writer) (options, error) {
	var o options
	fs := flag.NewFlagSet("quiznight", flag.ContinueOnError)
	fs.SetOutput(stderr)
	fs.Usage = func() {
		fmt.Fprintln(stderr, "Usage: go run ./examples/quiznight [flags]")
		fmt.Fprintln(stderr, "\nRuns the kalends demo on invented radio-quiz audiences and writes its tables and plots.")
		fmt.Fprintln(stderr, "\nFlags:")
		fs.PrintDefaults()
	}
	fs.StringVar(&o.out, "out", filepath.Join("out", "quiznight"), "folder for the CSV/JSON tables and SVG/PNG plots (created if missing)")
	fs.IntVar(&o.b, "b", 999, "number of bootstrap replicates")
	fs.Uint64Var(&o.seed, "seed", 1, "seed of the resampling (the data themselves never change)")
	if err := fs.Parse(args); err != nil {
		return o, err
	}
	if fs.NArg() > 0 {
		return o, fmt.Errorf("unexpected argument %q (see -h)", fs.Arg(0))
	}
	if o.b < 2 {
		return o, fmt.Errorf("-b %d: need at least 2 replicates", o.b)
	}
	return o, nil
}

// effect is one line of the report: a coefficient with its true value.
type effect struct {
	Name       string  // design column
	Label      string  // what the reader sees
	True       float64 // the value in the process that made the data
	Broadcasts int     // rows in which the column is not zero
	Holiday    bool    // whether the column is a holiday indicator
	Summary    inspect.Summary
	Interval   inspect.Interval // the percentile interval
}

func run(args []string, stdout, stderr io.Writer) error {
	o, err := parseFlags(args, stderr)
	if err != nil {
		return err
	}
	gb, err := holiday.Country("GB")
	if err != nil {
		return err
	}
	rows := makeBroadcasts(gb, dataSeed)
	d := inspect.Data{Dates: make([]time.Time, len(rows)), Outcome: make([]float64, len(rows))}
	for i, r := range rows {
		d.Dates[i], d.Outcome[i] = r.Date, r.Audience
	}
	design := quizDesign(gb)

	// A first fit to all rows, for its residuals: they are autocorrelated
	// (as the noise is), so replicates must keep runs of neighbouring
	// broadcasts together, and the residuals set the mean block length.
	enc, err := design.Learn(d.Dates)
	if err != nil {
		return err
	}
	x, err := features.Apply(enc, d.Dates)
	if err != nil {
		return err
	}
	first, err := fit.OLS{}.FitOLS(x, d.Outcome, nil)
	if err != nil {
		return err
	}
	resid := first.Residuals(nil)
	scheme := resample.Stationary{B: o.b, Series: resid}
	plan, err := scheme.Plan(len(rows), o.seed)
	if err != nil {
		return err
	}
	blockLen := plan.(resample.Blocked).BlockLength()

	coef, metrics, oob := inspect.KeepCoefficients(), inspect.KeepMetrics(), inspect.KeepOutOfBag()
	start := time.Now()
	progress, finish := progressTo(stderr, start)
	res, err := inspect.Run(context.Background(), d, design,
		inspect.Options{Fitter: fit.OLS{}, Scheme: scheme, Seed: o.seed, Progress: progress},
		coef, metrics, oob)
	finish()
	if err != nil {
		return err
	}

	effects, sums, stats, err := summarizeEffects(coef, x)
	if err != nil {
		return err
	}
	errSums, err := summarizeError(metrics)
	if err != nil {
		return err
	}

	// The report.
	p := func(format string, a ...any) { fmt.Fprintf(stdout, format, a...) }
	first1, last := rows[0].Date, rows[len(rows)-1].Date
	onHoliday, specials := 0, 0
	for _, r := range rows {
		if r.Holiday != "" {
			onHoliday++
		}
		if r.Date.Weekday() != time.Thursday {
			specials++
		}
	}
	p("Thursday Quiz Night on Harrowmere Community Radio: what moves the audience?\n")
	p("An invented station's live quiz, every Thursday and every England & Wales bank holiday, %d–%d:\n", first1.Year(), last.Year())
	p("%d broadcasts, %d on a bank holiday (%d specials, %d regular Thursdays), audience in thousands,\n",
		len(rows), onHoliday, specials, onHoliday-specials)
	p("simulated with known true effects.\n\n")

	p("Model: least squares on an intercept, a trend, the season (sine and cosine of the month) and\n")
	p("one indicator per holiday. Intervals: %g%% percentile, from %d stationary-bootstrap replicates\n", 100*level, res.Total)
	p("(mean block %.1f broadcasts, seed %d), in blocks because the noise is autocorrelated: residuals\n", blockLen, o.seed)
	p("of neighbouring broadcasts correlate at %.2f, and resampling single rows would make the\n", lag1(resid))
	p("intervals too narrow. The last column counts each holiday's broadcasts in the data.\n\n")

	p("%-35s %6s %8s  %-17s %-12s  %10s\n", "effect (thousand listeners)", "true", "estimate",
		fmt.Sprintf("%g%% interval", 100*level), "estimable in", "broadcasts")
	var oneOff []string
	for _, e := range effects {
		iv := "(none: see below)"
		switch {
		case e.Broadcasts == 1:
			oneOff = append(oneOff, e.Label)
		case e.Interval.Err != nil:
			iv = "(not computed)"
		default:
			iv = fmt.Sprintf("[%6.2f, %6.2f]", e.Interval.Lower, e.Interval.Upper)
			if !inside(e) {
				iv += " *"
			}
		}
		line := fmt.Sprintf("%-35s %6.2f %8.2f  %-17s %4d of %-4d", e.Label, e.True, e.Summary.Estimate, iv,
			e.Summary.Used, e.Summary.Replicates)
		if e.Holiday {
			line += fmt.Sprintf("   %10d", e.Broadcasts)
		}
		p("%s\n", strings.TrimRight(line, " "))
	}
	p("\nA replicate cannot estimate a holiday when it drew none of that holiday's broadcasts. The\n")
	p("one-off days have a single broadcast each: the estimate is that one evening's departure from\n")
	p("the rest of the model, and a bootstrap interval would leave out its noise. Read them as anecdotes.\n")
	if n := countOutside(effects); n > 0 {
		p("* marks %d true value(s) outside the interval; a 95%% interval misses about 1 time in 20.\n", n)
	}
	p("\n")

	rmse, mae := errSums[0], errSums[1]
	rmseIv, _ := rmse.Interval(inspect.Percentile)
	p("Out-of-bag error, on the broadcasts each replicate left out: RMSE %.2f thousand (middle %g%% of\n",
		rmse.Mean, 100*level)
	p("replicates %.2f–%.2f), MAE %.2f; in-sample RMSE %.2f. The noise alone has standard deviation %.2f.\n\n",
		rmseIv.Lower, rmseIv.Upper, mae.Mean, rmse.Estimate, noiseSD())

	p("Caution: a holiday coefficient is an association, not a causal effect: it mixes the day off with\n")
	p("whatever comes with it (weather, other programmes, who is at home). The data are small, about\n")
	p("15 broadcasts per holiday and one per one-off day: trust the intervals, not the decimals.\n\n")

	if err := writeOutputs(o.out, rows, effects, sums, stats, errSums, oob, d.Outcome); err != nil {
		return err
	}
	p("Written to %s: broadcasts.csv (the invented data), effects.csv (the table above),\n", o.out)
	p("coefficients.csv/.json (every interval method and count, long format), error.csv/.json (the\n")
	p("out-of-bag error; its estimate column is the in-sample value), coefficients.svg/.png (replicate\n")
	p("histograms, one-off days left out), observed_vs_predicted.svg/.png.\n")
	return nil
}

// progressTo returns a Progress callback that reports to w once the run
// has lasted longer than a moment, and a function to call when it ends.
func progressTo(w io.Writer, start time.Time) (func(done, total int), func()) {
	shown := false
	return func(done, total int) {
			if !shown && time.Since(start) < 300*time.Millisecond {
				return
			}
			if !shown || done == total || done%50 == 0 {
				fmt.Fprintf(w, "\rbootstrap replicates fitted: %d of %d", done, total)
			}
			shown = true
		}, func() {
			if shown {
				fmt.Fprintf(w, " (%.1fs)\n", time.Since(start).Seconds())
			}
		}
}

// lag1 returns the lag-1 autocorrelation of a series.
func lag1(x []float64) float64 {
	var mean float64
	for _, v := range x {
		mean += v
	}
	mean /= float64(len(x))
	var num, den float64
	for i, v := range x {
		den += (v - mean) * (v - mean)
		if i > 0 {
			num += (v - mean) * (x[i-1] - mean)
		}
	}
	return num / den
}

// summarizeEffects summarises every coefficient and pairs it with its true
// value. x is the full-data design, used to count each column's broadcasts.
func summarizeEffects(coef *inspect.Kept[[]fit.Coefficient], x *features.Table) ([]effect, []inspect.Summary, []inspect.Statistic, error) {
	stats, err := inspect.CoefficientStatistics(coef)
	if err != nil {
		return nil, nil, nil, err
	}
	names := map[string]string{} // holiday column → holiday name
	for name := range trueUplift {
		names[holiday.Slug(name)] = name
	}
	var effects []effect
	var sums []inspect.Summary
	for _, st := range stats {
		s, err := inspect.Summarize(st, inspect.Config{Level: level})
		if err != nil {
			return nil, nil, nil, err
		}
		sums = append(sums, s)
		e := effect{Name: st.Name, Summary: s}
		e.Interval, _ = s.Interval(inspect.Percentile)
		col, _ := x.Lookup(st.Name)
		for _, v := range col {
			if v != 0 {
				e.Broadcasts++
			}
		}
		switch st.Name {
		case "intercept":
			e.Label, e.True = "baseline, 2011 (season averaged)", trueIntercept
		case "trend.years":
			e.Label, e.True = trendLabel, trueTrend
		case "month.sin":
			e.Label, e.True = "season, sine of month", trueSeasonSin
		case "month.cos":
			e.Label, e.True = "season, cosine of month", trueSeasonCos
		default:
			name, ok := names[st.Name]
			if !ok {
				return nil, nil, nil, fmt.Errorf("no true value for column %q", st.Name)
			}
			e.Label, e.True, e.Holiday = name, trueUplift[name], true
		}
		effects = append(effects, e)
	}
	return effects, sums, stats, nil
}

// countOutside counts the printed intervals that miss their true value.
func countOutside(effects []effect) int {
	n := 0
	for _, e := range effects {
		if e.Broadcasts > 1 && e.Interval.Err == nil && !inside(e) {
			n++
		}
	}
	return n
}

// inside reports whether the true value lies in the effect's interval.
func inside(e effect) bool {
	return e.Interval.Err == nil && e.Interval.Lower <= e.True && e.True <= e.Interval.Upper
}

// summarizeError summarises the out-of-bag RMSE and MAE across replicates.
func summarizeError(metrics *inspect.Kept[inspect.Metrics]) ([]inspect.Summary, error) {
	var sums []inspect.Summary
	for _, m := range []struct {
		name string
		f    func(inspect.Metrics) float64
	}{
		{"out-of-bag RMSE", func(m inspect.Metrics) float64 { return m.RMSE }},
		{"out-of-bag MAE", func(m inspect.Metrics) float64 { return m.MAE }},
		{"out-of-bag R²", func(m inspect.Metrics) float64 { return m.R2 }},
	} {
		st, err := inspect.StatisticOf(metrics, m.name, m.f)
		if err != nil {
			return nil, err
		}
		s, err := inspect.Summarize(st, inspect.Config{Level: level, Methods: []inspect.Method{inspect.Percentile}})
		if err != nil {
			return nil, err
		}
		sums = append(sums, s)
	}
	return sums, nil
}

// writeOutputs writes the tables and plots into dir.
func writeOutputs(dir string, rows []broadcast, effects []effect, sums []inspect.Summary, stats []inspect.Statistic,
	errSums []inspect.Summary, oob *inspect.Kept[inspect.OutOfBag], outcome []float64) error {
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
	steps := []struct {
		name string
		fn   func(w io.Writer) error
	}{
		{"broadcasts.csv", func(w io.Writer) error { return writeBroadcasts(w, rows) }},
		{"effects.csv", func(w io.Writer) error { return writeEffects(w, effects) }},
		{"coefficients.csv", inspect.Table(sums).WriteCSV},
		{"coefficients.json", inspect.Table(sums).WriteJSON},
		{"error.csv", inspect.Table(errSums).WriteCSV},
		{"error.json", inspect.Table(errSums).WriteJSON},
	}
	for _, s := range steps {
		if err := write(s.name, s.fn); err != nil {
			return err
		}
	}

	// Plots: the replicates of every coefficient but the one-off days',
	// and each broadcast's audience against its mean out-of-bag
	// prediction. The panels carry the report's labels. The coefficients
	// do not share one unit (the trend's is thousand listeners per year),
	// so the trend's panel gets its own.
	var hs []inspect.Statistic
	var hsum []inspect.Summary
	for i, st := range stats {
		if effects[i].Broadcasts > 1 {
			sum := sums[i]
			st.Name, sum.Name = effects[i].Label, effects[i].Label
			hs, hsum = append(hs, st), append(hsum, sum)
		}
	}
	hist, err := inspect.Histograms(hs, hsum, inspect.PlotMark(inspect.Percentile), inspect.PlotColumns(4),
		inspect.PlotUnit("thousand listeners"),
		inspect.PlotUnitOf(func(label string) string {
			if label == trendLabel {
				return "thousand listeners per year"
			}
			return ""
		}),
		inspect.PlotTitle(fmt.Sprintf("Bootstrap replicates of each coefficient; solid: full-data estimate; dashed: %g%% percentile interval",
			100*level)))
	if err != nil {
		return err
	}
	mean, count := inspect.MeanOutOfBag(len(outcome), oob.Values())
	var obs, pred []float64
	for i := range outcome {
		if count[i] > 0 {
			obs, pred = append(obs, outcome[i]), append(pred, mean[i])
		}
	}
	scatter, err := inspect.ObservedPredicted(obs, pred, inspect.PlotUnit("thousand listeners"),
		inspect.PlotTitle("Audience against its mean out-of-bag prediction"))
	if err != nil {
		return err
	}
	for _, fig := range []struct {
		name string
		f    *inspect.Figure
	}{{"coefficients", hist}, {"observed_vs_predicted", scatter}} {
		for _, ext := range []string{".svg", ".png"} {
			if err := fig.f.Save(filepath.Join(dir, fig.name+ext)); err != nil {
				return err
			}
		}
	}
	return nil
}

// writeBroadcasts writes the invented data, one row per broadcast.
func writeBroadcasts(w io.Writer, rows []broadcast) error {
	cw := csv.NewWriter(w)
	cw.Write([]string{"date", "weekday", "holiday", "audience_thousands"})
	for _, r := range rows {
		cw.Write([]string{r.Date.Format(time.DateOnly), r.Date.Weekday().String(), r.Holiday,
			strconv.FormatFloat(r.Audience, 'f', 3, 64)})
	}
	cw.Flush()
	return cw.Error()
}

// writeEffects writes the report's table: true values next to estimates,
// with the same intervals (none for the one-off days).
func writeEffects(w io.Writer, effects []effect) error {
	cw := csv.NewWriter(w)
	cw.Write([]string{"column", "effect", "true", "estimate", "method", "level", "lower", "upper",
		"estimable_replicates", "replicates", "broadcasts", "true_inside"})
	f := func(v float64) string {
		if math.IsNaN(v) {
			return ""
		}
		return strconv.FormatFloat(v, 'g', -1, 64)
	}
	for _, e := range effects {
		// As in the report, a one-off day (or an interval that could not
		// be computed) has no interval: the columns are left empty.
		method, lev, lower, upper, in := "", "", "", "", ""
		if e.Broadcasts > 1 && e.Interval.Err == nil {
			method, lev, lower, upper = inspect.Percentile.String(), f(level), f(e.Interval.Lower), f(e.Interval.Upper)
			in = strconv.FormatBool(inside(e))
		}
		cw.Write([]string{e.Name, e.Label, f(e.True), f(e.Summary.Estimate), method, lev, lower, upper,
			strconv.Itoa(e.Summary.Used), strconv.Itoa(e.Summary.Replicates), strconv.Itoa(e.Broadcasts), in})
	}
	cw.Flush()
	return cw.Error()
}

// trendLabel is the trend's label in the report and on its histogram panel.
const trendLabel = "trend, per year"
