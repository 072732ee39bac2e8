package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/log"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/register"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/runners/prism"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/testing/passert"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/testing/ptest"
	"github.com/kalends/kalends/examples/beam/internal/tour"
	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/fit"
	"github.com/kalends/kalends/resample"
)

func init() {
	register.DoFn2x1[context.Context, Solution, error](&checkFn{})
}

// TestMain points TMPDIR at a directory of its own, since each prism run
// leaves an empty beamloopbackworker-* file in the temporary directory,
// and removes it at the end.
func TestMain(m *testing.M) {
	dir, err := os.MkdirTemp("", "kalends-beam-test-")
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	os.Setenv("TMPDIR", dir)
	code := ptest.MainRet(m)
	os.RemoveAll(dir)
	os.Exit(code)
}

const (
	testSeed = 20240102
	testB    = 200
	// tolerance of the pipeline's coefficients against OLS (QR) on each
	// materialised replicate, relative.
	testTol = 1e-9
)

var tourCSV = filepath.Join("testdata", "tour.csv")

func learnTour(t *testing.T) (*Spec, []Row) {
	t.Helper()
	f, err := os.Open(tourCSV)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	extra := []string{"seats", "price"}
	header, rows, err := readRows(f, "show_id", "date", "tickets", extra)
	if err != nil {
		t.Fatal(err)
	}
	spec, err := Learn(header, rows, "show_id", "date", "tickets", extra)
	if err != nil {
		t.Fatal(err)
	}
	// Ship it through JSON as main does.
	data, err := specJSON(spec)
	if err != nil {
		t.Fatal(err)
	}
	if spec, err = ReadSpec(data); err != nil {
		t.Fatal(err)
	}
	return spec, rows
}

// olsReplicates is the single-process reference: for each replicate, the
// Poisson counts of resample.Poisson keyed by RowKey, and fit.OLS (QR) with
// those counts as frequency weights, i.e. OLS on the materialised
// replicate.
func olsReplicates(t *testing.T, spec *Spec, rows []Row, seed uint64, B int) []float64 {
	t.Helper()
	enc, err := spec.encoder()
	if err != nil {
		t.Fatal(err)
	}
	x, y, err := design(enc, rows)
	if err != nil {
		t.Fatal(err)
	}
	keys := make([]uint64, len(rows))
	for i, r := range rows {
		keys[i] = RowKey(r.ID)
	}
	plan, err := resample.Poisson{B: B, Keys: keys}.Plan(len(rows), seed)
	if err != nil {
		t.Fatal(err)
	}
	_, p := x.Dims()
	want := make([]float64, B*p)
	var sp resample.Split
	w := make([]float64, len(rows))
	for r := range B {
		plan.Split(r, &sp)
		for i, c := range sp.Counts {
			w[i] = float64(c)
		}
		m, err := fit.OLS{Weights: fit.Frequency}.FitOLS(x, y, w)
		if err != nil {
			t.Fatalf("replicate %d: %v", r, err)
		}
		for j, c := range m.Coefficients() {
			if !c.Estimable {
				t.Fatalf("replicate %d: %s not estimable", r, c.Name)
			}
			want[r*p+j] = c.Estimate
		}
	}
	return want
}

// accumulated is the single-process Accumulator fed every row at once.
func accumulated(t *testing.T, spec *Spec, rows []Row, seed uint64, B int) []float64 {
	t.Helper()
	enc, err := spec.encoder()
	if err != nil {
		t.Fatal(err)
	}
	x, y, err := design(enc, rows)
	if err != nil {
		t.Fatal(err)
	}
	keys := make([]uint64, len(rows))
	for i, r := range rows {
		keys[i] = RowKey(r.ID)
	}
	a, err := fit.NewAccumulator(spec.Standardization, seed, B)
	if err != nil {
		t.Fatal(err)
	}
	if err := a.Add(x, y, nil, keys); err != nil {
		t.Fatal(err)
	}
	reps, _ := a.Solve(0)
	return reps.Coef
}

// TestPipelineMatchesSingleProcess runs the pipeline on prism and checks,
// inside the pipeline, that every replicate's coefficients equal OLS on
// the materialised replicate to 1e-9 relative and the single-process
// accumulator bit for bit, for 16 and for 61 shards.
func TestPipelineMatchesSingleProcess(t *testing.T) {
	spec, rows := learnTour(t)
	want := olsReplicates(t, spec, rows, testSeed, testB)
	exact := accumulated(t, spec, rows, testSeed, testB)
	input, err := filepath.Abs(tourCSV)
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name   string
		shards int
	}{
		{name: "16 shards", shards: 16},
		{name: "61 shards", shards: 61},
	} {
		t.Run(tc.name, func(t *testing.T) {
			out := t.TempDir() + "/"
			p, s := beam.NewPipelineWithRoot()
			st, err := Bootstrap(s, Config{Input: input, Output: out, Spec: spec, Seed: testSeed, B: testB, Shards: tc.shards})
			if err != nil {
				t.Fatal(err)
			}
			// Every shard holds rows (589 rows hashed into at most 61
			// shards), so exactly tc.shards accumulators are merged.
			passert.Count(s, st.Partials, "shard accumulators", tc.shards)
			passert.Count(s, st.Solution, "solutions", 1)
			beam.ParDo0(s, &checkFn{Name: "against OLS on each replicate", Want: want, Rows: int64(len(rows)), Tol: testTol}, st.Solution)
			beam.ParDo0(s, &checkFn{Name: "against one accumulator", Want: exact, Rows: int64(len(rows)), Tol: 0}, st.Solution)
			if _, err := prism.Execute(context.Background(), p); err != nil {
				t.Fatalf("pipeline: %v", err)
			}
			checkOutputs(t, out, spec, want)
		})
	}
}

// TestPipelineFails checks that a bad input row and a failed assertion
// both fail the pipeline, with an error that says why.
func TestPipelineFails(t *testing.T) {
	spec, rows := learnTour(t)
	data, err := os.ReadFile(tourCSV)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.SplitN(string(data), "\n", 6)
	bad := filepath.Join(t.TempDir(), "bad.csv")
	// Line 4 is BC-0003; its tickets become "lots".
	lines[3] = strings.Join(append(strings.Split(lines[3], ",")[:4], "lots"), ",")
	if err := os.WriteFile(bad, []byte(strings.Join(lines[:5], "\n")+"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	good, err := filepath.Abs(tourCSV)
	if err != nil {
		t.Fatal(err)
	}
	const B = 10
	want := olsReplicates(t, spec, rows, testSeed, B)
	want[B*len(spec.Columns)-1] *= 1 + 1e-6
	for _, tc := range []struct {
		name, input string
		check       *checkFn
		want        string
	}{
		{name: "bad row", input: bad, want: "row show_id=BC-0003: column tickets"},
		{name: "assertion", input: good, check: &checkFn{Name: "perturbed", Want: want, Rows: int64(len(rows)), Tol: testTol},
			want: "perturbed: replicate 9, price"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			p, s := beam.NewPipelineWithRoot()
			st, err := Bootstrap(s, Config{Input: tc.input, Spec: spec, Seed: testSeed, B: B, Shards: 16})
			if err != nil {
				t.Fatal(err)
			}
			if tc.check != nil {
				beam.ParDo0(s, tc.check, st.Solution)
			}
			_, err = prism.Execute(context.Background(), p)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("got error %v, want one containing %q", err, tc.want)
			}
		})
	}
}

// checkOutputs reads the files the pipeline wrote: the coefficients file
// must hold every replicate (to the tolerance, since it is formatted from
// the same values the check saw), and the summary one row per coefficient
// and interval method.
func checkOutputs(t *testing.T, out string, spec *Spec, want []float64) {
	t.Helper()
	coef := readCSV(t, out+"coefficients.csv")
	wantHeader := append(append([]string{"replicate"}, spec.Columns...), "error")
	if got := strings.Join(coef[0], ","); got != strings.Join(wantHeader, ",") {
		t.Fatalf("coefficients header: got %s, want %s", got, strings.Join(wantHeader, ","))
	}
	if len(coef) != testB+1 {
		t.Fatalf("coefficients: got %d lines, want %d", len(coef), testB+1)
	}
	p := len(spec.Columns)
	for r, rec := range coef[1:] {
		if rec[0] != strconv.Itoa(r) || rec[p+1] != "" {
			t.Fatalf("coefficients line %d: got replicate %q, error %q; want %d and no error", r+2, rec[0], rec[p+1], r)
		}
		for j := range p {
			v, err := strconv.ParseFloat(rec[1+j], 64)
			if w := want[r*p+j]; err != nil || math.Abs(v-w) > testTol*math.Abs(w) {
				t.Fatalf("coefficients line %d, %s: got %q, want %v", r+2, spec.Columns[j], rec[1+j], w)
			}
		}
	}
	sum := readCSV(t, out+"summary.csv")
	if got, want := len(sum), 1+3*p; got != want {
		t.Fatalf("summary: got %d lines, want %d", got, want)
	}
	if sum[0][0] != "statistic" || sum[1][0] != "intercept" || sum[1][1] != "percentile" {
		t.Errorf("summary: got first lines %q, %q", sum[0], sum[1])
	}
}

func readCSV(t *testing.T, path string) [][]string {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(bytes.NewReader(data)).ReadAll()
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return recs
}

// checkFn fails the pipeline unless the solution matches Want: per
// coefficient |got − want| ≤ Tol·|want| (Tol 0 asks for bit-identical
// values), the same rows and no failed replicate. It runs wherever the
// pipeline runs, so the assertion is portable to any runner.
type checkFn struct {
	Name string
	Want []float64 // B × P, row-major
	Rows int64
	Tol  float64
}

func (f *checkFn) ProcessElement(ctx context.Context, sol Solution) error {
	if len(sol.Coef) != len(f.Want) || sol.P == 0 {
		return fmt.Errorf("%s: got %d coefficients, want %d", f.Name, len(sol.Coef), len(f.Want))
	}
	if sol.Rows != f.Rows {
		return fmt.Errorf("%s: got %d rows, want %d", f.Name, sol.Rows, f.Rows)
	}
	for r, e := range sol.Errs {
		if e != "" {
			return fmt.Errorf("%s: replicate %d failed: %s", f.Name, r, e)
		}
	}
	worst, at := 0.0, 0
	for i, w := range f.Want {
		g := sol.Coef[i]
		if f.Tol == 0 {
			if math.Float64bits(g) != math.Float64bits(w) {
				return fmt.Errorf("%s: replicate %d, %s: got %v, want %v bit for bit", f.Name, i/sol.P, sol.Names[i%sol.P], g, w)
			}
			continue
		}
		d := math.Abs(g - w)
		if w != 0 {
			d /= math.Abs(w)
		}
		if !(d <= f.Tol) {
			return fmt.Errorf("%s: replicate %d, %s: got %v, want %v (relative difference %.3g > %g)", f.Name, i/sol.P, sol.Names[i%sol.P], g, w, d, f.Tol)
		}
		if d > worst {
			worst, at = d, i
		}
	}
	log.Infof(ctx, "%s: largest relative difference %.3g (replicate %d, %s)", f.Name, worst, at/sol.P, sol.Names[at%sol.P])
	return nil
}

// TestCheckFnFails shows that the assertion transform can fail.
func TestCheckFnFails(t *testing.T) {
	sol := Solution{Names: []string{"a", "b"}, B: 2, P: 2, Rows: 10, Coef: []float64{1, 2, 3, 4}, Errs: []string{"", ""}}
	for _, tc := range []struct {
		name string
		f    checkFn
		sol  Solution
		want string
	}{
		{name: "equal", f: checkFn{Want: []float64{1, 2, 3, 4}, Rows: 10, Tol: 1e-9}, sol: sol},
		{name: "within tolerance", f: checkFn{Want: []float64{1, 2, 3, 4 * (1 + 1e-10)}, Rows: 10, Tol: 1e-9}, sol: sol},
		{name: "beyond tolerance", f: checkFn{Want: []float64{1, 2, 3, 4 * (1 + 1e-8)}, Rows: 10, Tol: 1e-9}, sol: sol, want: "replicate 1, b"},
		{name: "last bit, exact", f: checkFn{Want: []float64{1, math.Nextafter(2, 3), 3, 4}, Rows: 10}, sol: sol, want: "bit for bit"},
		{name: "rows", f: checkFn{Want: []float64{1, 2, 3, 4}, Rows: 11, Tol: 1e-9}, sol: sol, want: "got 10 rows, want 11"},
		{name: "failed replicate", f: checkFn{Want: []float64{1, 2, 3, 4}, Rows: 10, Tol: 1e-9},
			sol: Solution{Names: sol.Names, B: 2, P: 2, Rows: 10, Coef: sol.Coef, Errs: []string{"", "singular"}}, want: "replicate 1 failed"},
		{name: "NaN", f: checkFn{Want: []float64{1, 2, 3, 4}, Rows: 10, Tol: 1e-9},
			sol: Solution{Names: sol.Names, B: 2, P: 2, Rows: 10, Coef: []float64{1, math.NaN(), 3, 4}, Errs: sol.Errs}, want: "replicate 0, b"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			err := tc.f.ProcessElement(context.Background(), tc.sol)
			switch {
			case tc.want == "" && err != nil:
				t.Errorf("got error %v, want none", err)
			case tc.want != "" && (err == nil || !strings.Contains(err.Error(), tc.want)):
				t.Errorf("got error %v, want one containing %q", err, tc.want)
			}
		})
	}
}

// TestTourData checks that testdata/tour.csv is what cmd/tourgen writes.
func TestTourData(t *testing.T) {
	var b bytes.Buffer
	if err := tour.Write(&b); err != nil {
		t.Fatal(err)
	}
	stored, err := os.ReadFile(tourCSV)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(b.Bytes(), stored) {
		t.Errorf("%s differs from the generator's output; regenerate it with go run ./cmd/tourgen > %s", tourCSV, tourCSV)
	}
}

func TestParseErrors(t *testing.T) {
	p, err := newParser(strings.Split(tour.Header, ","), "show_id", "date", "tickets", []string{"seats", "price"})
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name, line, want string
	}{
		{name: "bad date", line: "BC-0007,2024-02-30,140,9.50,40", want: "row show_id=BC-0007: column date"},
		{name: "bad outcome", line: "BC-0008,2024-02-03,140,9.50,many", want: "row show_id=BC-0008: column tickets"},
		{name: "bad extra", line: "BC-0009,2024-02-03,140,,40", want: "row show_id=BC-0009: column price"},
		{name: "too few fields", line: "BC-0010,2024-02-03,140", want: `line "BC-0010,2024-02-03,140"`},
		{name: "empty key", line: ",2024-02-03,140,9.50,40", want: "empty show_id"},
		{name: "empty line", line: "", want: "empty line"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := p.parse(tc.line)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("got error %v, want one containing %q", err, tc.want)
			}
		})
	}
	row, err := p.parse("BC-0011,2024-02-03,140,9.50,40\r")
	if err != nil {
		t.Fatal(err)
	}
	if row.ID != "BC-0011" || row.Key != RowKey("BC-0011") || row.Day.Format("2006-01-02") != "2024-02-03" || row.Outcome != 40 || row.Extra[0] != 140 || row.Extra[1] != 9.5 {
		t.Errorf("got %+v", row)
	}
	if _, err := p.parse(tour.Header); err != errHeader {
		t.Errorf("header line: got %v, want errHeader", err)
	}
}

// TestRowKey pins the key derivation, FNV-1a 64 (offset basis
// 0xcbf29ce484222325; the hash of "a" is 0xaf63dc4c8601ec8c, from the FNV
// reference test vectors by Fowler, Noll and Vo).
func TestRowKey(t *testing.T) {
	for _, tc := range []struct {
		name string
		id   string
		want uint64
	}{
		{name: "empty", id: "", want: 0xcbf29ce484222325},
		{name: "a", id: "a", want: 0xaf63dc4c8601ec8c},
	} {
		if got := RowKey(tc.id); got != tc.want {
			t.Errorf("%s: got %#x, want %#x", tc.name, got, tc.want)
		}
	}
}

// TestUnseenWeekday shows that a date whose weekday the feature set never
// saw (a Monday, here) is an error naming the row, not a silent zero.
func TestUnseenWeekday(t *testing.T) {
	spec, _ := learnTour(t)
	enc, err := spec.encoder()
	if err != nil {
		t.Fatal(err)
	}
	p, err := spec.parser()
	if err != nil {
		t.Fatal(err)
	}
	row, err := p.parse("BC-9999,2024-01-08,140,9.50,40")
	if err != nil {
		t.Fatal(err)
	}
	_, _, err = design(enc, []Row{row})
	if err == nil || !strings.Contains(err.Error(), "row BC-9999") || !strings.Contains(err.Error(), "weekday=Monday") {
		t.Errorf("got error %v, want one naming row BC-9999 and weekday=Monday", err)
	}
	if !errors.Is(err, features.ErrUnseenLevel) {
		t.Errorf("got error %v, want one wrapping features.ErrUnseenLevel", err)
	}
}

// TestShuffleCost checks the README's cost model against the accumulator's
// encoding: a shard's accumulator for p columns and B replicates takes
// 16·(B+1)·q + 16·p + 64 bytes, q = p(p+1)/2 + p + 2, i.e. 16·q bytes per
// replicate.
func TestShuffleCost(t *testing.T) {
	spec, _ := learnTour(t)
	p := len(spec.Columns)
	q := p*(p+1)/2 + p + 2
	for _, tc := range []struct {
		name string
		B    int
	}{
		{name: "B=1", B: 1},
		{name: "B=200", B: 200},
		{name: "B=1000", B: 1000},
	} {
		t.Run(tc.name, func(t *testing.T) {
			a, err := fit.NewAccumulator(spec.Standardization, testSeed, tc.B)
			if err != nil {
				t.Fatal(err)
			}
			b, err := encodeAccumulator(a)
			if err != nil {
				t.Fatal(err)
			}
			if got, want := len(b), 16*(tc.B+1)*q+16*p+64; got != want {
				t.Errorf("p=%d: got %d bytes, want %d", p, got, want)
			}
			back, err := decodeAccumulator(b)
			if err != nil || back.Replicates() != tc.B {
				t.Errorf("decode: got %v replicates, error %v; want %d", back, err, tc.B)
			}
		})
	}
}
