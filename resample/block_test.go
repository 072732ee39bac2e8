package resample_test

import (
	"bufio"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"

	"github.com/kalends/kalends/resample"
)

// readCSV reads a testdata CSV, skipping '#' comment lines and the header.
func readCSV(t *testing.T, path string) [][]string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var rows [][]string
	sc := bufio.NewScanner(f)
	header := true
	for sc.Scan() {
		line := sc.Text()
		if strings.HasPrefix(line, "#") || line == "" {
			continue
		}
		if header {
			header = false
			continue
		}
		rows = append(rows, strings.Split(line, ","))
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	return rows
}

func parseFloat(t *testing.T, s string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

// TestBlockLengthReference checks BlockLength against worked values from
// testdata/blocklength.R, an independent base-R implementation of the
// Politis & White (2004) rule with the Patton, Politis & White (2009)
// correction (R 4.2.2, stats::acf autocovariances), on invented series.
// Tolerance: relative 1e-9 (the two sum the same terms in different
// orders).
func TestBlockLengthReference(t *testing.T) {
	series := map[string][]float64{}
	for _, row := range readCSV(t, "testdata/blocklength_series.csv") {
		series[row[0]] = append(series[row[0]], parseFloat(t, row[1]))
	}
	want := readCSV(t, "testdata/blocklength_want.csv")
	if len(want) != 4 {
		t.Fatalf("got %d reference rows, want 4", len(want))
	}
	for _, row := range want {
		t.Run(row[0], func(t *testing.T) {
			x := series[row[0]]
			if n, _ := strconv.Atoi(row[1]); n != len(x) {
				t.Fatalf("series length %d, reference says %d", len(x), n)
			}
			sb, cb, err := resample.BlockLength(x)
			if err != nil {
				t.Fatal(err)
			}
			wsb, wcb := parseFloat(t, row[2]), parseFloat(t, row[3])
			if math.Abs(sb-wsb) > 1e-9*wsb {
				t.Errorf("stationary: got %.12g, want %.12g", sb, wsb)
			}
			if math.Abs(cb-wcb) > 1e-9*wcb {
				t.Errorf("circular: got %.12g, want %.12g", cb, wcb)
			}
		})
	}
}

// TestAutomaticBlockPlans checks that a zero Length/Mean takes the
// automatic length from Series: rounded circular length for the moving and
// circular blocks, the stationary length for the stationary bootstrap.
func TestAutomaticBlockPlans(t *testing.T) {
	var x []float64
	for _, row := range readCSV(t, "testdata/blocklength_series.csv") {
		if row[0] == "ar06" {
			x = append(x, parseFloat(t, row[1]))
		}
	}
	sb, cb, err := resample.BlockLength(x)
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name   string
		scheme resample.Scheme
		want   float64
	}{
		{name: "moving", scheme: resample.MovingBlock{B: 3, Series: x}, want: math.Round(cb)},
		{name: "circular", scheme: resample.CircularBlock{B: 3, Series: x}, want: math.Round(cb)},
		{name: "stationary", scheme: resample.Stationary{B: 3, Series: x}, want: sb},
		{name: "given", scheme: resample.Stationary{B: 3, Mean: 4.5}, want: 4.5},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			p := mustPlan(t, tt.scheme, len(x), 1).(resample.Blocked)
			if got := p.BlockLength(); got != tt.want {
				t.Errorf("BlockLength: got %v, want %v", got, tt.want)
			}
		})
	}
}

// TestBlockCounts checks properties of the block bootstraps that follow
// from their definitions (Künsch 1989; Politis & Romano 1992, 1994):
// counts sum to n, Out is the rows of count zero, and a block as long as
// the series copies every row once (moving: the only block is all rows;
// circular: any rotation covers each row once).
func TestBlockCounts(t *testing.T) {
	const n = 40
	tests := []struct {
		name    string
		scheme  resample.Scheme
		allOnce bool
	}{
		{name: "moving 5", scheme: resample.MovingBlock{B: 50, Length: 5}},
		{name: "circular 7", scheme: resample.CircularBlock{B: 50, Length: 7}},
		{name: "stationary 3.5", scheme: resample.Stationary{B: 50, Mean: 3.5}},
		{name: "moving n", scheme: resample.MovingBlock{B: 5, Length: n}, allOnce: true},
		{name: "circular n", scheme: resample.CircularBlock{B: 5, Length: n}, allOnce: true},
		{name: "moving 1", scheme: resample.MovingBlock{B: 5, Length: 1}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			p := mustPlan(t, tt.scheme, n, 3)
			for _, s := range resample.All(p) {
				var sum int32
				var zero []int
				for i, c := range s.Counts {
					sum += c
					if c == 0 {
						zero = append(zero, i)
					}
					if tt.allOnce && c != 1 {
						t.Fatalf("replicate %d row %d: count %d, want 1", s.Replicate, i, c)
					}
				}
				if sum != n {
					t.Fatalf("replicate %d: counts sum to %d, want %d", s.Replicate, sum, n)
				}
				if d := cmpDiff(zero, s.Out); d != "" {
					t.Fatalf("replicate %d: Out (-want +got):\n%s", s.Replicate, d)
				}
			}
		})
	}
}

// TestMovingBlockRuns checks that moving-block replicates are made of
// runs of consecutive rows (Künsch 1989): with Length 4 every in-bag row
// has an in-bag neighbour.
func TestMovingBlockRuns(t *testing.T) {
	p := mustPlan(t, resample.MovingBlock{B: 100, Length: 4}, 12, 5)
	for _, s := range resample.All(p) {
		for i, c := range s.Counts {
			if c == 0 {
				continue
			}
			left := i > 0 && s.Counts[i-1] > 0
			right := i < 11 && s.Counts[i+1] > 0
			if !left && !right {
				t.Fatalf("replicate %d: row %d is in bag alone: %v", s.Replicate, i, s.Counts)
			}
		}
	}
}
