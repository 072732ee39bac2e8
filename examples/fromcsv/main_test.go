package main

import (
	"bytes"
	"errors"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/kalends/kalends/holiday"
)

// exampleArgs returns the example command line of the usage message, as
// arguments, with the sample file's path made relative to this folder.
func exampleArgs(t *testing.T) []string {
	t.Helper()
	_, after, ok := strings.Cut(usageText, "Example, on the invented sample shipped with kalends:\n\n")
	if !ok {
		t.Fatal("usage has no example")
	}
	cmd, _, _ := strings.Cut(after, "\n\n")
	cmd = strings.ReplaceAll(cmd, "\\\n", " ")
	var args []string
	for _, m := range regexp.MustCompile(`"[^"]*"|\S+`).FindAllString(cmd, -1) {
		args = append(args, strings.Trim(m, `"`))
	}
	if strings.Join(args[:3], " ") != "go run ./examples/fromcsv" {
		t.Fatalf("example starts %q, want go run ./examples/fromcsv", args[:3])
	}
	args = args[3:]
	for i, a := range args {
		if a == "testdata/ferry_tickets.csv" {
			args[i] = "../../testdata/ferry_tickets.csv"
		}
	}
	return args
}

// TestUsageExample runs the command line printed by -h on the sample CSV
// and checks the estimates against the process documented in
// testdata/ferry_tickets_gen.go.
func TestUsageExample(t *testing.T) {
	dir := t.TempDir()
	args := append(exampleArgs(t), "-b", "199", "-out", dir)
	var out, errs bytes.Buffer
	if err := run(args, strings.NewReader(""), &out, &errs); err != nil {
		t.Fatalf("run %q: %v\n%s", args, err, errs.String())
	}
	// True values of the generator: Saturday and Sunday +45 (Monday is the
	// reference level), regatta +120, rain −3 per mm, +10 per sailing.
	truth := map[string]float64{"weekday=Saturday": 45, "weekday=Sunday": 45, "skelly_regatta": 120, "rain_mm": -3, "sailings": 10}
	re := regexp.MustCompile(`^(\S+)\s+(\S+)\s+\[\s*(\S+),\s*(\S+)\]\s+\S+\s+(\d+) of (\d+)`)
	seen := 0
	for _, line := range strings.Split(out.String(), "\n") {
		m := re.FindStringSubmatch(line)
		if m == nil {
			continue
		}
		want, ok := truth[m[1]]
		if !ok {
			continue
		}
		seen++
		lo, _ := strconv.ParseFloat(m[3], 64)
		hi, _ := strconv.ParseFloat(m[4], 64)
		if want < lo || want > hi {
			t.Errorf("%s: true %v outside the printed interval [%v, %v]", m[1], want, lo, hi)
		}
		if m[6] != "199" {
			t.Errorf("%s: %s replicates, want 199", m[1], m[6])
		}
	}
	if seen != len(truth) {
		t.Errorf("found %d of the %d checked columns in:\n%s", seen, len(truth), out.String())
	}
	for _, want := range []string{"2186 rows", "stationary", "associations in these data, not causal effects", "Out-of-bag error",
		"the change in tickets per unit of its column", "(trend.years: per year;",
		"Reference levels, which have no column (their part's other columns are differences from them):\n  weekday=Monday\n"} {
		if !strings.Contains(out.String(), want) {
			t.Errorf("output does not say %q", want)
		}
	}
	// The out-of-bag figures share their decimals.
	if !regexp.MustCompile(`RMSE \d+\.\d\d \(middle 95% of replicates \d+\.\d\d to \d+\.\d\d\),\nMAE \d+\.\d\d; in-sample RMSE \d+\.\d\d\.`).MatchString(out.String()) {
		t.Errorf("out-of-bag error not printed with two decimals throughout:\n%s", out.String())
	}
	svg, err := os.ReadFile(filepath.Join(dir, "coefficients.svg"))
	if err != nil {
		t.Fatal(err)
	}
	if want := "dashed: 95% percentile interval"; !strings.Contains(string(svg), want) {
		t.Errorf("coefficients.svg does not say %q", want)
	}
}

func TestBadCSV(t *testing.T) {
	const head = "# a comment line\ndate,tickets,rain\n"
	tests := []struct {
		name, csv string
		args      []string
		want      string // the whole one-line error
	}{
		{name: "empty file", csv: "", want: `stdin: the file is empty: expected a header line naming the columns, such as date,tickets`},
		{name: "only comments", csv: "# nothing\n", want: `stdin: the file is empty: expected a header line naming the columns, such as date,tickets`},
		{name: "header only", csv: head, want: `stdin, line 2: the header is there but no data rows follow it`},
		{name: "missing outcome column", csv: "date,sales\n2024-01-01,3\n",
			want: `stdin, line 1, column "tickets": no such column in the header (it has "date", "sales")`},
		{name: "missing extra column", csv: head + "2024-01-01,3,0\n", args: []string{"-extra", "rain,wind"},
			want: `stdin, line 2, column "wind": no such column in the header (it has "date", "tickets", "rain")`},
		{name: "missing date column", csv: head + "2024-01-01,3,0\n", args: []string{"-date", "day"},
			want: `stdin, line 2, column "day": no such column in the header (it has "date", "tickets", "rain")`},
		{name: "unparsable date", csv: head + "2024-01-01,3,0\n2024-01-02,4,0\n2024-13-01,5,0\n",
			want: `stdin, line 5, column "date": cannot read "2024-13-01" as a date in the layout "2006-01-02" (see -layout)`},
		{name: "date in another layout", csv: head + "01/02/2024,3,0\n",
			want: `stdin, line 3, column "date": cannot read "01/02/2024" as a date in the layout "2006-01-02" (see -layout)`},
		{name: "non-numeric outcome", csv: head + "2024-01-01,3,0\n2024-01-02,many,0\n",
			want: `stdin, line 4, column "tickets": "many" is not a finite number`},
		{name: "empty outcome", csv: head + "2024-01-01,,0\n", want: `stdin, line 3, column "tickets": empty value, want a number`},
		{name: "NaN outcome", csv: head + "2024-01-01,NaN,0\n", want: `stdin, line 3, column "tickets": "NaN" is not a finite number`},
		{name: "non-numeric extra", csv: head + "2024-01-01,3,wet\n", args: []string{"-extra", "rain"},
			want: `stdin, line 3, column "rain": "wet" is not a finite number`},
		{name: "short line", csv: head + "2024-01-01,3,0\n2024-01-02,4\n", want: `stdin, line 4: 2 fields, but the header has 3`},
		{name: "bad quote", csv: head + "2024-01-01,\"3,0\n", want: `stdin, line 3: extraneous or missing " in quoted-field`},
		{name: "bare quote", csv: head + "2024-01-01,3\"x,0\n", want: `stdin, line 3: bare " in non-quoted-field`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			args := append([]string{"-file", "-", "-outcome", "tickets", "-b", "9", "-out", t.TempDir()}, tt.args...)
			var out, errs bytes.Buffer
			err := run(args, strings.NewReader(tt.csv), &out, &errs)
			if err == nil {
				t.Fatalf("got no error, want %q", tt.want)
			}
			if err.Error() != tt.want {
				t.Errorf("got error\n  %s\nwant\n  %s", err, tt.want)
			}
			if strings.Contains(err.Error(), "\n") {
				t.Errorf("error spans several lines: %q", err)
			}
			if out.Len() != 0 {
				t.Errorf("printed %q, want nothing on stdout", out.String())
			}
		})
	}
}

func TestFlags(t *testing.T) {
	tests := []struct {
		name string
		args []string
		want string
	}{
		{name: "no file", args: []string{"-outcome", "y"}, want: "no input: give -file FILE.csv, or -file - for standard input (see -h)"},
		{name: "no outcome", args: []string{"-file", "x.csv"}, want: "no outcome: give -outcome and the name of the column to explain (see -h)"},
		{name: "bad level", args: []string{"-file", "-", "-outcome", "y", "-level", "95"}, want: "-level 95: must be between 0 and 1, such as 0.95"},
		{name: "unknown interval", args: []string{"-file", "-", "-outcome", "y", "-interval", "median"},
			want: `-interval "median": want percentile, basic, normal, bca or studentized`},
		{name: "stray argument", args: []string{"-file", "-", "data.csv"}, want: `unexpected argument "data.csv": flags come as -name value (see -h)`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var out, errs bytes.Buffer
			err := run(tt.args, strings.NewReader(""), &out, &errs)
			if err == nil || err.Error() != tt.want {
				t.Errorf("got %v, want %q", err, tt.want)
			}
		})
	}
	var out, errs bytes.Buffer
	if err := run([]string{"-h"}, nil, &out, &errs); !errors.Is(err, flag.ErrHelp) {
		t.Errorf("-h: got %v, want flag.ErrHelp", err)
	}
	for _, want := range []string{"Usage:", "Example", "ferry_tickets.csv", "-outcome", "NTH WEEKDAY of MONTH"} {
		if !strings.Contains(errs.String(), want) {
			t.Errorf("-h does not mention %q", want)
		}
	}
}

// TestSchemesAndStdin runs every scheme on a small CSV from standard input.
func TestSchemesAndStdin(t *testing.T) {
	var b strings.Builder
	b.WriteString("day,sales\n")
	for i := range 120 {
		d := time.Date(2024, 1, 1, 0, 0, 0, 0, time.UTC).AddDate(0, 0, i)
		fmt := strconv.Itoa(100 + i%7*3 + (i*37)%11)
		b.WriteString(d.Format("02/01/2006") + "," + fmt + "\n")
	}
	for _, scheme := range []string{"bootstrap", "balanced", "bayesian", "poisson", "stationary", "moving-block", "circular-block"} {
		t.Run(scheme, func(t *testing.T) {
			args := []string{"-file", "-", "-date", "day", "-layout", "02/01/2006", "-outcome", "sales", "-parts", "weekday:indicator=sunday,trend:days",
				"-scheme", scheme, "-b", "30", "-interval", "normal", "-level", "0.9", "-out", t.TempDir()}
			var out, errs bytes.Buffer
			if err := run(args, strings.NewReader(b.String()), &out, &errs); err != nil {
				t.Fatalf("%v\n%s", err, errs.String())
			}
			for _, want := range []string{"120 rows from stdin", "90% normal interval", "weekday=Monday", "trend.days",
				"(trend.days: per day;", "have no column (their part's other columns are differences from them):\n  weekday=Sunday\n"} {
				if !strings.Contains(out.String(), want) {
					t.Errorf("output does not mention %q:\n%s", want, out.String())
				}
			}
			if strings.Contains(out.String(), "weekday=Sunday ") {
				t.Errorf("the reference level Sunday has a column:\n%s", out.String())
			}
		})
	}
}

func TestParseHoliday(t *testing.T) {
	d := func(s string) time.Time { t, _ := time.Parse(time.DateOnly, s); return t }
	tests := []struct {
		name, in string
		want     holiday.Rule
		wantErr  string
	}{
		{name: "fixed", in: "Harbour Day=07-14", want: holiday.Rule{Name: "Harbour Day", Kind: holiday.Fixed, Month: 7, Day: 14}},
		{name: "one-off", in: "Pier Closed=2024-01-22, 2024-02-03",
			want: holiday.Rule{Name: "Pier Closed", Kind: holiday.OneOff, Dates: []time.Time{d("2024-01-22"), d("2024-02-03")}}},
		{name: "easter", in: "Easter Tuesday=easter+2", want: holiday.Rule{Name: "Easter Tuesday", Kind: holiday.EasterOffset, Offset: 2}},
		{name: "easter sunday", in: "Easter=Easter", want: holiday.Rule{Name: "Easter", Kind: holiday.EasterOffset}},
		{name: "orthodox", in: "Clean Monday=orthodox-48", want: holiday.Rule{Name: "Clean Monday", Kind: holiday.OrthodoxOffset, Offset: -48}},
		{name: "nth weekday", in: "Fair=Last Monday of July", want: holiday.Rule{Name: "Fair", Kind: holiday.NthWeekday, N: -1, Weekday: time.Monday, Month: time.July}},
		{name: "2nd", in: "Regatta=2nd saturday of august", want: holiday.Rule{Name: "Regatta", Kind: holiday.NthWeekday, N: 2, Weekday: time.Saturday, Month: time.August}},
		{name: "no name", in: "=07-14", wantErr: `-holiday "=07-14": want Name=WHEN, such as "Harbour Day=07-14"`},
		{name: "bad day", in: "X=02-30", wantErr: `-holiday "X=02-30": MM-DD is not a date (see -h for the forms of WHEN)`},
		{name: "bad offset", in: "X=easter+one", wantErr: `-holiday "X=easter+one": the offset after easter or orthodox must be like +1 or -2 (see -h for the forms of WHEN)`},
		{name: "bad weekday", in: "X=2nd funday of may", wantErr: `-holiday "X=2nd funday of may": want 1st…5th or last, a weekday name and a month name (see -h for the forms of WHEN)`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got, err := parseHoliday(tt.in)
			if tt.wantErr != "" {
				if err == nil || err.Error() != tt.wantErr {
					t.Errorf("got error %v, want %q", err, tt.wantErr)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if _, err := holiday.New("t", got); err != nil {
				t.Errorf("holiday.New rejects the rule: %v", err)
			}
			if got.Name != tt.want.Name || got.Kind != tt.want.Kind || got.Month != tt.want.Month || got.Day != tt.want.Day ||
				got.N != tt.want.N || got.Weekday != tt.want.Weekday || got.Offset != tt.want.Offset || len(got.Dates) != len(tt.want.Dates) {
				t.Errorf("got %+v, want %+v", got, tt.want)
			}
			for i := range got.Dates {
				if !got.Dates[i].Equal(tt.want.Dates[i]) {
					t.Errorf("date %d: got %v, want %v", i, got.Dates[i], tt.want.Dates[i])
				}
			}
		})
	}
}

func TestParseParts(t *testing.T) {
	tests := []struct {
		name, in, wantErr string
		n                 int
		trend             bool
	}{
		{name: "default", in: "weekday:indicator,month:cyclic,trend", n: 2, trend: true},
		{name: "trend only", in: "trend:days", trend: true},
		{name: "unknown part", in: "fortnight", wantErr: `-parts "fortnight": unknown part "fortnight"`},
		{name: "unknown encoding", in: "month:circle", wantErr: `-parts "month:circle": unknown encoding "circle" (number, indicator or cyclic)`},
		{name: "reference on number", in: "month:number=3", wantErr: `-parts "month:number=3": only indicator parts take a reference level`},
		{name: "empty", in: " , ", wantErr: `-parts " , ": no calendar parts given`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			parts, trend, err := parseParts(tt.in)
			if tt.wantErr != "" {
				if err == nil || !strings.HasPrefix(err.Error(), tt.wantErr) {
					t.Errorf("got error %v, want one starting %q", err, tt.wantErr)
				}
				return
			}
			if err != nil || len(parts) != tt.n || (trend != nil) != tt.trend {
				t.Errorf("got %d parts, trend %v, error %v; want %d parts, trend %v", len(parts), trend != nil, err, tt.n, tt.trend)
			}
		})
	}
}

// TestAbsentHolidays runs 120 days from 1 January 2024 with the England
// and Wales calendar. The UK government's list (www.gov.uk/bank-holidays,
// recalled from memory, as in package holiday's tests) has three days off
// in them: New Year's Day (1 January), Good Friday (29 March) and Easter
// Monday (1 April). Only those get a column; the others are named as
// absent rather than reported as not estimable.
func TestAbsentHolidays(t *testing.T) {
	var b strings.Builder
	b.WriteString("date,sales\n")
	for i := range 120 {
		d := time.Date(2024, 1, 1, 0, 0, 0, 0, time.UTC).AddDate(0, 0, i)
		b.WriteString(d.Format(time.DateOnly) + "," + strconv.Itoa(100+i%7*3+(i*37)%11) + "\n")
	}
	args := []string{"-file", "-", "-outcome", "sales", "-calendar", "GB", "-parts", "weekday:indicator", "-b", "30", "-out", t.TempDir()}
	var out, errs bytes.Buffer
	if err := run(args, strings.NewReader(b.String()), &out, &errs); err != nil {
		t.Fatalf("%v\n%s", err, errs.String())
	}
	rows := map[string]string{}
	re := regexp.MustCompile(`^(\S+)\s+\S+\s+\[.*\]\s+\S+\s+\d+ of \d+\s*(\d*)`)
	for _, line := range strings.Split(out.String(), "\n") {
		if m := re.FindStringSubmatch(line); m != nil {
			rows[m[1]] = m[2]
		}
	}
	for _, h := range []string{"new_years_day", "good_friday", "easter_monday"} {
		if rows[h] != "1" {
			t.Errorf("%s: got rows %q, want a line with 1 row", h, rows[h])
		}
	}
	absent := "early_may, spring_bank_holiday, summer_bank_holiday, christmas_day, boxing_day, " +
		"platinum_jubilee_bank_holiday, state_funeral_of_queen_elizabeth_ii, coronation_of_king_charles_iii"
	if !strings.Contains(out.String(), "on none of the rows, so without a column:\n  "+absent+"\n") {
		t.Errorf("output does not name the absent holidays %s:\n%s", absent, out.String())
	}
	for _, h := range strings.Split(absent, ", ") {
		if _, ok := rows[h]; ok {
			t.Errorf("absent holiday %s has a line in the table", h)
		}
	}
	if strings.Contains(out.String(), "Not estimable even on all rows") {
		t.Errorf("output reports columns not estimable on all rows, want none:\n%s", out.String())
	}
}

// TestBCa runs the BCa interval, whose acceleration needs the extra
// leave-one-out run, and checks that every coefficient got an interval
// containing its estimate (BCa endpoints are replicate quantiles, and with
// 199 replicates of 120 rows they straddle the full-data estimate).
func TestBCa(t *testing.T) {
	var b strings.Builder
	b.WriteString("day,sales\n")
	for i := range 120 {
		d := time.Date(2024, 1, 1, 0, 0, 0, 0, time.UTC).AddDate(0, 0, i)
		b.WriteString(d.Format(time.DateOnly) + "," + strconv.Itoa(100+i%7*3+(i*37)%11) + "\n")
	}
	out := t.TempDir()
	args := []string{"-file", "-", "-date", "day", "-outcome", "sales", "-parts", "weekend,trend:days",
		"-holidays", "none", "-b", "199", "-interval", "bca", "-out", out}
	var stdout, stderr bytes.Buffer
	if err := run(args, strings.NewReader(b.String()), &stdout, &stderr); err != nil {
		t.Fatalf("%v\n%s", err, stderr.String())
	}
	if !strings.Contains(stdout.String(), "95% BCa interval") {
		t.Fatalf("no BCa interval heading in:\n%s", stdout.String())
	}
	for _, col := range []string{"intercept", "weekend", "trend.days"} {
		line := ""
		for _, l := range strings.Split(stdout.String(), "\n") {
			if strings.HasPrefix(l, col+" ") {
				line = l
			}
		}
		if line == "" {
			t.Errorf("no row for %s in:\n%s", col, stdout.String())
			continue
		}
		var est, lo, hi float64
		if _, err := fmt.Sscanf(strings.TrimSpace(strings.TrimPrefix(line, col)), "%g [%g, %g]", &est, &lo, &hi); err != nil {
			t.Errorf("%s: cannot read %q: %v", col, line, err)
			continue
		}
		if !(lo < est && est < hi) {
			t.Errorf("%s: BCa interval [%g, %g] does not contain the estimate %g", col, lo, hi, est)
		}
	}
}

func TestDecimals(t *testing.T) {
	tests := []struct {
		name string
		v    float64
		want int // decimals for 4 significant digits
	}{
		{name: "tens", v: 13.2954, want: 2},
		{name: "ten exactly", v: 10, want: 2},
		{name: "just under ten", v: 9.99, want: 3},
		{name: "thousands", v: 1234.5, want: 0},
		{name: "millions", v: 2.5e6, want: 0},
		{name: "small", v: 0.012345, want: 5},
		{name: "negative", v: -13.3, want: 2},
		{name: "zero", v: 0, want: 3},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := decimals(tt.v, 4); got != tt.want {
				t.Errorf("decimals(%v, 4) = %d, want %d", tt.v, got, tt.want)
			}
		})
	}
}
