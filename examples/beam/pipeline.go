package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"reflect"
	"strconv"
	"strings"

	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/io/textio"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/register"
	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/fit"
	"github.com/kalends/kalends/inspect"
	"gonum.org/v1/gonum/mat"
)

func init() {
	beam.RegisterType(reflect.TypeOf((*FeatureRow)(nil)).Elem())
	beam.RegisterType(reflect.TypeOf((*Solution)(nil)).Elem())
	// Accumulators cross process boundaries in their own versioned binary
	// format (fit.Accumulator.MarshalBinary), not as JSON.
	beam.RegisterCoder(reflect.TypeOf((*fit.Accumulator)(nil)), encodeAccumulator, decodeAccumulator)

	register.DoFn2x1[string, func(int, FeatureRow), error](&featureRowFn{})
	register.Emitter2[int, FeatureRow]()
	register.Combiner3[*fit.Accumulator, FeatureRow, *fit.Accumulator](&shardFn{})
	register.Combiner3[*fit.Accumulator, *fit.Accumulator, *fit.Accumulator](&mergeFn{})
	register.DoFn1x2[*fit.Accumulator, Solution, error](&solveFn{})
	register.Function1x1(coefficientsCSV)
	register.DoFn1x2[Solution, string, error](&summaryFn{})
}

// FeatureRow is one input row turned into its design row: the row's key
// column value and key, its design values (intercept, calendar columns,
// extra columns) and its outcome.
type FeatureRow struct {
	ID  string
	Key uint64
	X   []float64
	Y   float64
}

// Solution is the solved bootstrap: the full-data coefficients and those
// of every replicate (B × P, row-major, replicate r at Coef[r*P:(r+1)*P]),
// each replicate's error ("" if it was solved), and the rows seen.
type Solution struct {
	Names []string
	B, P  int
	Rows  int64
	Full  []float64
	Coef  []float64
	Errs  []string
}

func encodeAccumulator(a *fit.Accumulator) ([]byte, error) { return a.MarshalBinary() }

func decodeAccumulator(b []byte) (*fit.Accumulator, error) {
	a := new(fit.Accumulator)
	if err := a.UnmarshalBinary(b); err != nil {
		return nil, err
	}
	return a, nil
}

// Config is one bootstrap run of the pipeline.
type Config struct {
	// Input is the input file pattern (any file system Beam knows).
	Input string
	// Output, if not empty, is the prefix of the two output files,
	// Output+"coefficients.csv" and Output+"summary.csv".
	Output string
	// Spec is what was learned beforehand.
	Spec *Spec
	// Seed and B give the Poisson bootstrap: B replicates under Seed.
	Seed uint64
	B    int
	// Shards is the number of keyed partial accumulators (at least 1).
	Shards int
	// Level is the coverage of the intervals in the summary; 0 means 0.95.
	Level float64
}

// Stages are the pipeline's main collections, for tests and extensions.
type Stages struct {
	// Rows holds KV<shard, FeatureRow>.
	Rows beam.PCollection
	// Partials holds one accumulator per non-empty shard.
	Partials beam.PCollection
	// Solution holds the one Solution.
	Solution beam.PCollection
}

// Bootstrap adds the Poisson-bootstrap OLS pipeline to s: read lines, make
// feature rows with the learned feature set, accumulate per-replicate
// sufficient statistics by shard, merge the shards, solve each replicate,
// and write the coefficients and the interval summary when cfg.Output is
// set. It returns an error for a configuration that cannot run.
func Bootstrap(s beam.Scope, cfg Config) (Stages, error) {
	switch {
	case cfg.Spec == nil:
		return Stages{}, errors.New("bootstrap: no spec")
	case cfg.B < 1:
		return Stages{}, fmt.Errorf("bootstrap: %d replicates", cfg.B)
	case cfg.Shards < 1:
		return Stages{}, fmt.Errorf("bootstrap: %d shards", cfg.Shards)
	case cfg.Level < 0 || cfg.Level >= 1:
		return Stages{}, fmt.Errorf("bootstrap: level %v outside (0, 1)", cfg.Level)
	}
	specJSON, err := json.Marshal(cfg.Spec)
	if err != nil {
		return Stages{}, err
	}
	if _, err := ReadSpec(specJSON); err != nil {
		return Stages{}, err
	}
	if _, err := fit.NewAccumulator(cfg.Spec.Standardization, cfg.Seed, 0); err != nil {
		return Stages{}, fmt.Errorf("bootstrap: %w", err)
	}
	acc := accConfig{Std: cfg.Spec.Standardization, Seed: cfg.Seed, B: cfg.B}

	lines := textio.Read(s.Scope("Read"), cfg.Input)
	rows := beam.ParDo(s.Scope("FeatureRows"), &featureRowFn{Spec: string(specJSON), Shards: cfg.Shards}, lines)
	partials := beam.DropKey(s, beam.CombinePerKey(s.Scope("ShardAccumulators"), &shardFn{acc}, rows))
	merged := beam.Combine(s.Scope("MergeShards"), &mergeFn{acc}, partials)
	sol := beam.ParDo(s.Scope("Solve"), &solveFn{Names: cfg.Spec.Columns}, merged)
	if cfg.Output != "" {
		textio.Write(s.Scope("WriteCoefficients"), cfg.Output+"coefficients.csv", beam.ParDo(s, coefficientsCSV, sol))
		level := cfg.Level
		if level == 0 {
			level = 0.95
		}
		textio.Write(s.Scope("WriteSummary"), cfg.Output+"summary.csv", beam.ParDo(s, &summaryFn{Level: level}, sol))
	}
	return Stages{Rows: rows, Partials: partials, Solution: sol}, nil
}

// featureRowFn parses input lines and turns them into feature rows with
// the learned feature set, keyed by shard (the row key modulo Shards).
// The spec travels as JSON in the DoFn and is decoded once per worker in
// Setup.
type featureRowFn struct {
	Spec   string
	Shards int

	p   *parser
	enc features.Encoder
}

func (f *featureRowFn) Setup() error {
	s, err := ReadSpec([]byte(f.Spec))
	if err != nil {
		return err
	}
	if f.p, err = s.parser(); err != nil {
		return err
	}
	f.enc, err = s.encoder()
	return err
}

func (f *featureRowFn) ProcessElement(line string, emit func(int, FeatureRow)) error {
	row, err := f.p.parse(line)
	if err == errHeader {
		return nil
	}
	if err != nil {
		return err
	}
	x, y, err := design(f.enc, []Row{row})
	if err != nil {
		return err
	}
	emit(int(row.Key%uint64(f.Shards)), FeatureRow{ID: row.ID, Key: row.Key, X: x.RawRowView(0), Y: y[0]})
	return nil
}

// accConfig is what every accumulator of one bootstrap shares.
type accConfig struct {
	Std  fit.Standardization
	Seed uint64
	B    int
}

func (c accConfig) create() (*fit.Accumulator, error) { return fit.NewAccumulator(c.Std, c.Seed, c.B) }

// shardFn accumulates the feature rows of one shard: each row adds its
// cross-products to every replicate, times its Poisson count, a function
// of (seed, replicate, row key) only.
type shardFn struct{ accConfig }

func (f *shardFn) CreateAccumulator() (*fit.Accumulator, error) { return f.create() }

func (f *shardFn) AddInput(a *fit.Accumulator, r FeatureRow) (*fit.Accumulator, error) {
	if err := a.Add(mat.NewDense(1, len(r.X), r.X), []float64{r.Y}, nil, []uint64{r.Key}); err != nil {
		return nil, fmt.Errorf("row %s: %w", r.ID, err)
	}
	return a, nil
}

func (f *shardFn) MergeAccumulators(a, b *fit.Accumulator) (*fit.Accumulator, error) {
	if err := a.Merge(b); err != nil {
		return nil, err
	}
	return a, nil
}

func (f *shardFn) ExtractOutput(a *fit.Accumulator) *fit.Accumulator { return a }

// mergeFn merges shard accumulators into one with the library's Merge.
type mergeFn struct{ accConfig }

func (f *mergeFn) CreateAccumulator() (*fit.Accumulator, error) { return f.create() }

func (f *mergeFn) AddInput(a, b *fit.Accumulator) (*fit.Accumulator, error) {
	return f.MergeAccumulators(a, b)
}

func (f *mergeFn) MergeAccumulators(a, b *fit.Accumulator) (*fit.Accumulator, error) {
	if err := a.Merge(b); err != nil {
		return nil, err
	}
	return a, nil
}

func (f *mergeFn) ExtractOutput(a *fit.Accumulator) *fit.Accumulator { return a }

// solveFn solves the full data's and every replicate's normal equations.
type solveFn struct {
	Names []string
}

func (f *solveFn) ProcessElement(a *fit.Accumulator) (Solution, error) {
	reps, full := a.Solve(0)
	if err := full.Err[0]; err != nil {
		return Solution{}, fmt.Errorf("full-data fit: %w", err)
	}
	if reps.P != len(f.Names) {
		return Solution{}, fmt.Errorf("solve: %d columns, %d names", reps.P, len(f.Names))
	}
	sol := Solution{Names: f.Names, B: reps.B, P: reps.P, Rows: int64(a.Rows()),
		Full: full.Replicate(0), Coef: reps.Coef, Errs: make([]string, reps.B)}
	for r, err := range reps.Err {
		if err != nil {
			sol.Errs[r] = err.Error()
		}
	}
	return sol, nil
}

func formatFloat(v float64) string {
	if math.IsNaN(v) {
		return ""
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

// coefficientsCSV formats every replicate's coefficients as CSV: a column
// "replicate" (0-based), one column per coefficient (empty where not
// estimable) and "error".
func coefficientsCSV(sol Solution) string {
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	rec := append(append([]string{"replicate"}, sol.Names...), "error")
	w.Write(rec)
	for r := range sol.B {
		rec = rec[:0]
		rec = append(rec, strconv.Itoa(r))
		for _, v := range sol.Coef[r*sol.P : (r+1)*sol.P] {
			rec = append(rec, formatFloat(v))
		}
		w.Write(append(rec, sol.Errs[r]))
	}
	w.Flush()
	return strings.TrimSuffix(b.String(), "\n")
}

// summaryFn summarises each coefficient's bootstrap distribution with
// inspect.Summarize (percentile, basic and normal intervals) and formats
// the summaries as inspect's long-format CSV table.
type summaryFn struct {
	Level float64
}

func (f *summaryFn) ProcessElement(sol Solution) (string, error) {
	tab, err := summarize(sol, f.Level)
	if err != nil {
		return "", err
	}
	var b bytes.Buffer
	if err := tab.WriteCSV(&b); err != nil {
		return "", err
	}
	return strings.TrimSuffix(b.String(), "\n"), nil
}

func summarize(sol Solution, level float64) (inspect.Table, error) {
	errs := make([]error, sol.B)
	for r, e := range sol.Errs {
		if e != "" {
			errs[r] = fmt.Errorf("replicate %d: %s", r, e)
		}
	}
	cfg := inspect.Config{Level: level, Methods: []inspect.Method{inspect.Percentile, inspect.Basic, inspect.Normal}}
	var tab inspect.Table
	for j, name := range sol.Names {
		vals := make([]float64, sol.B)
		for r := range vals {
			vals[r] = sol.Coef[r*sol.P+j]
		}
		sum, err := inspect.Summarize(inspect.Statistic{Name: name, Estimate: sol.Full[j], Values: vals, Errs: errs}, cfg)
		if err != nil {
			return nil, fmt.Errorf("summary of %s: %w", name, err)
		}
		tab = append(tab, sum)
	}
	return tab, nil
}
