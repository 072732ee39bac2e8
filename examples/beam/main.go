// Command beam runs a kalends Poisson bootstrap of an OLS fit on Apache
// Beam: rows are read from CSV, turned into feature rows with a feature set
// learned beforehand, accumulated into mergeable per-replicate sufficient
// statistics (fit.Accumulator) by shard, merged, and solved per replicate.
// It writes every replicate's coefficients and a summary with percentile,
// basic and normal intervals.
//
// Learn the spec (feature set and standardization) on a local file or a
// representative sample, then run the pipeline on any Beam runner:
//
//	go run . -learn -input testdata/tour.csv -spec /tmp/spec.json
//	go run . -input testdata/tour.csv -spec /tmp/spec.json -output /tmp/tour- -replicates 1000
//
// Without -spec the spec is learned from -input, which must then be a
// local file. The runner is chosen by Beam's own flags (-runner, -endpoint,
// ...); see README.md.
package main

import (
	"context"
	"flag"
	"fmt"
	"log"
	"os"
	"strings"

	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/x/beamx"
)

var (
	input    = flag.String("input", "", "input CSV file or pattern (required)")
	output   = flag.String("output", "", "prefix of the output files <prefix>coefficients.csv and <prefix>summary.csv")
	specPath = flag.String("spec", "", "learned spec (JSON): read by a run, written by -learn; empty: learn from -input")
	learn    = flag.Bool("learn", false, "learn the spec from the local file -input, write it to -spec and stop")
	seed     = flag.Uint64("seed", 1, "bootstrap seed")
	reps     = flag.Int("replicates", 1000, "number of bootstrap replicates B")
	shards   = flag.Int("shards", 64, "number of keyed partial accumulators")
	level    = flag.Float64("level", 0.95, "interval coverage")

	keyCol     = flag.String("key", "show_id", "column identifying a row (unique across the input)")
	dateCol    = flag.String("date", "date", "date column, YYYY-MM-DD")
	outcomeCol = flag.String("outcome", "tickets", "outcome column")
	extraCols  = flag.String("extra", "seats,price", "comma-separated extra numeric columns")
)

func main() {
	flag.Parse()
	beam.Init()
	if err := run(context.Background()); err != nil {
		log.Fatal(err)
	}
}

func run(ctx context.Context) error {
	if *input == "" {
		return fmt.Errorf("-input is required")
	}
	var spec *Spec
	switch {
	case *learn || *specPath == "":
		s, err := learnFile(*input)
		if err != nil {
			return err
		}
		if *learn {
			if *specPath == "" {
				return fmt.Errorf("-learn needs -spec to write to")
			}
			return writeSpec(*specPath, s)
		}
		spec = s
	default:
		data, err := os.ReadFile(*specPath)
		if err != nil {
			return err
		}
		if spec, err = ReadSpec(data); err != nil {
			return fmt.Errorf("%s: %w", *specPath, err)
		}
	}
	if *output == "" {
		return fmt.Errorf("-output is required")
	}
	p, s := beam.NewPipelineWithRoot()
	if _, err := Bootstrap(s, Config{Input: *input, Output: *output, Spec: spec, Seed: *seed, B: *reps, Shards: *shards, Level: *level}); err != nil {
		return err
	}
	return beamx.Run(ctx, p)
}

func learnFile(path string) (*Spec, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("learning the spec from -input (give -spec for inputs that are not local files): %w", err)
	}
	defer f.Close()
	var extra []string
	if *extraCols != "" {
		extra = strings.Split(*extraCols, ",")
	}
	header, rows, err := readRows(f, *keyCol, *dateCol, *outcomeCol, extra)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	return Learn(header, rows, *keyCol, *dateCol, *outcomeCol, extra)
}

func writeSpec(path string, s *Spec) error {
	data, err := specJSON(s)
	if err != nil {
		return err
	}
	return os.WriteFile(path, data, 0o644)
}
