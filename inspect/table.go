package inspect

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"
)

// Table is a long-format table of summaries: one row per statistic per
// interval, or one row with an empty method for a summary without
// intervals. Its columns, in the CSV header and as JSON keys, are:
//
//	statistic      the statistic's name
//	method         the interval method (percentile, basic, normal, BCa, studentized)
//	level          the nominal coverage, e.g. 0.95
//	lower, upper   the interval's endpoints; empty (CSV) or null (JSON) when it could not be computed
//	estimate       the full-data estimate
//	boot_mean      the mean of the usable replicates
//	bias           boot_mean − estimate
//	std_error      the bootstrap standard error
//	replicates     replicates given
//	used           replicates the interval rests on
//	failed         replicates that failed
//	not_estimable  replicates with a NaN or infinite value
//	warnings       the summary's and the interval's warnings, joined by "; " (a list in JSON)
//	error          why the interval could not be computed, or empty
//
// Numbers are written in Go's shortest round-trip form. The column names
// and their order are stable; the text layout of WriteTo is not.
//
// The zero value is an empty table (no rows). Writing a Table
// only reads it, so it may be written from several goroutines at once.
type Table []Summary

var tableHeader = []string{"statistic", "method", "level", "lower", "upper", "estimate", "boot_mean",
	"bias", "std_error", "replicates", "used", "failed", "not_estimable", "warnings", "error"}

type tableRow struct {
	Statistic    string   `json:"statistic"`
	Method       string   `json:"method"`
	Level        *float64 `json:"level"`
	Lower        *float64 `json:"lower"`
	Upper        *float64 `json:"upper"`
	Estimate     *float64 `json:"estimate"`
	BootMean     *float64 `json:"boot_mean"`
	Bias         *float64 `json:"bias"`
	StdError     *float64 `json:"std_error"`
	Replicates   int      `json:"replicates"`
	Used         int      `json:"used"`
	Failed       int      `json:"failed"`
	NotEstimable int      `json:"not_estimable"`
	Warnings     []string `json:"warnings"`
	Error        string   `json:"error"`
}

func num(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}

func (t Table) rows() []tableRow {
	var rows []tableRow
	for _, s := range t {
		base := tableRow{Statistic: s.Name, Estimate: num(s.Estimate), Replicates: s.Replicates,
			Used: s.Used, Failed: s.Failed, NotEstimable: s.NotEstimable, Warnings: []string{}}
		if s.Used >= 2 {
			base.BootMean, base.Bias, base.StdError = num(s.Mean), num(s.Bias), num(s.StdErr)
		}
		for _, w := range s.Warnings {
			base.Warnings = append(base.Warnings, w.String())
		}
		if len(s.Intervals) == 0 {
			rows = append(rows, base)
			continue
		}
		for _, iv := range s.Intervals {
			r := base
			r.Method, r.Level, r.Used = iv.Method.String(), num(iv.Level), iv.Used
			r.Lower, r.Upper = num(iv.Lower), num(iv.Upper)
			r.Warnings = append([]string(nil), base.Warnings...)
			for _, w := range iv.Warnings {
				r.Warnings = append(r.Warnings, w.String())
			}
			if r.Warnings == nil {
				r.Warnings = []string{}
			}
			if iv.Err != nil {
				r.Error = iv.Err.Error()
			}
			rows = append(rows, r)
		}
	}
	return rows
}

func fmtNum(p *float64) string {
	if p == nil {
		return ""
	}
	return strconv.FormatFloat(*p, 'g', -1, 64)
}

// WriteCSV writes the table as CSV with a header line.
func (t Table) WriteCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(tableHeader); err != nil {
		return err
	}
	for _, r := range t.rows() {
		rec := []string{r.Statistic, r.Method, fmtNum(r.Level), fmtNum(r.Lower), fmtNum(r.Upper),
			fmtNum(r.Estimate), fmtNum(r.BootMean), fmtNum(r.Bias), fmtNum(r.StdError),
			strconv.Itoa(r.Replicates), strconv.Itoa(r.Used), strconv.Itoa(r.Failed),
			strconv.Itoa(r.NotEstimable), strings.Join(r.Warnings, "; "), r.Error}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// WriteJSON writes the table as a JSON array of objects, one per row, with
// the column names as keys, followed by a newline.
func (t Table) WriteJSON(w io.Writer) error {
	rows := t.rows()
	if rows == nil {
		rows = []tableRow{}
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(rows)
}

// WriteTo writes the table as aligned plain text for a terminal: one line
// per row with the main columns, a notes column pointing to numbered
// footnotes that spell out warnings and errors. Numbers are shown to 5
// significant digits. The failed and not-estimable replicates are counted
// in columns of their own, as in the CSV and JSON: a replicate whose fit
// failed says something else than one that could not estimate this
// statistic (a holiday it drew no row of, say). It implements
// [io.WriterTo].
//
// The layout is pinned by a golden test but is meant for people: do not
// parse it, use WriteCSV or WriteJSON.
func (t Table) WriteTo(w io.Writer) (int64, error) {
	cells := [][]string{{"statistic", "method", "level", "lower", "upper", "estimate", "bias", "std.error", "used", "failed", "not estimable", "notes"}}
	var notes []string
	for _, r := range t.rows() {
		var refs []string
		for _, s := range r.Warnings {
			refs = append(refs, note(&notes, s))
		}
		if r.Error != "" {
			refs = append(refs, note(&notes, r.Error))
		}
		level := ""
		if r.Level != nil {
			level = strconv.FormatFloat(100**r.Level, 'g', 4, 64) + "%"
		}
		cells = append(cells, []string{r.Statistic, r.Method, level,
			short(r.Lower), short(r.Upper), short(r.Estimate), short(r.Bias), short(r.StdError),
			fmt.Sprintf("%d/%d", r.Used, r.Replicates), strconv.Itoa(r.Failed), strconv.Itoa(r.NotEstimable), strings.Join(refs, ",")})
	}
	width := make([]int, len(cells[0]))
	for _, row := range cells {
		for j, c := range row {
			width[j] = max(width[j], utf8.RuneCountInString(c))
		}
	}
	var b strings.Builder
	for _, row := range cells {
		var line strings.Builder
		for j, c := range row {
			pad := strings.Repeat(" ", width[j]-utf8.RuneCountInString(c))
			if j > 0 {
				line.WriteString("  ")
			}
			if j < 2 || j == len(row)-1 { // names and notes left-aligned, numbers right-aligned
				line.WriteString(c + pad)
			} else {
				line.WriteString(pad + c)
			}
		}
		b.WriteString(strings.TrimRight(line.String(), " "))
		b.WriteByte('\n')
	}
	for i, s := range notes {
		fmt.Fprintf(&b, "[%d] %s\n", i+1, s)
	}
	n, err := io.WriteString(w, b.String())
	return int64(n), err
}

// note returns the footnote number of s, adding it if new.
func note(notes *[]string, s string) string {
	for i, n := range *notes {
		if n == s {
			return strconv.Itoa(i + 1)
		}
	}
	*notes = append(*notes, s)
	return strconv.Itoa(len(*notes))
}

func short(p *float64) string {
	if p == nil {
		return "n/a"
	}
	return strconv.FormatFloat(*p, 'g', 5, 64)
}
