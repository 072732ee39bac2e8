package inspect_test

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"flag"
	"math"
	"os"
	"path/filepath"
	"testing"

	"github.com/google/go-cmp/cmp"
	"github.com/kalends/kalends/inspect"
)

// update rewrites golden files: go test ./inspect/ -run Table -update.
// It looks the flag up first so another test file of the package may
// define the same flag.
var update = func() func() bool {
	if f := flag.Lookup("update"); f != nil {
		return func() bool { return f.Value.String() == "true" }
	}
	p := flag.Bool("update", false, "rewrite golden files")
	return func() bool { return *p }
}()

// sampleTable is a fixed table with a computed interval, a warning and an
// interval that failed.
func sampleTable() inspect.Table {
	return inspect.Table{
		{Name: "slope", Estimate: 10.847096046129352, Mean: 10.9, Bias: 0.052903953870648, StdErr: 1.1163,
			Replicates: 999, Used: 997, Failed: 2, FailedShare: 2.0 / 999,
			Intervals: []inspect.Interval{
				{Method: inspect.Percentile, Level: 0.95, Lower: 8.93868378812199, Upper: 13.181974865317388, Used: 997},
				{Method: inspect.BCa, Level: 0.95, Lower: 8.8018316999505473, Upper: 13.007761481331977, Used: 997,
					Warnings: []inspect.Warning{{Kind: inspect.ExtremeOrder, End: inspect.UpperEnd, Used: 997, Need: 1200}}},
			}},
		{Name: "holiday share", Estimate: 0, Mean: 0.02, Bias: 0.02, StdErr: 0.01, Replicates: 999, Used: 999,
			Warnings: []inspect.Warning{{Kind: inspect.PileUp, End: inspect.LowerEnd, Used: 999, Count: 400, Value: 0}},
			Intervals: []inspect.Interval{
				{Method: inspect.Percentile, Level: 0.9, Lower: 0, Upper: 0.05, Used: 999},
				{Method: inspect.BCa, Level: 0.9, Lower: math.NaN(), Upper: math.NaN(), Used: 999,
					Err: errors.New("inspect: BCa adjustment undefined: 0 of 999 replicates below the estimate, bias correction infinite")},
			}},
		{Name: "christmas_day", Estimate: 12.35, Mean: 12.4, Bias: 0.05, StdErr: 0.7, Replicates: 999, Used: 872,
			Failed: 3, NotEstimable: 124, FailedShare: 127.0 / 999,
			Intervals: []inspect.Interval{{Method: inspect.Percentile, Level: 0.95, Lower: 10.88, Upper: 13.69, Used: 872}}},
	}
}

func TestTableText(t *testing.T) {
	var buf bytes.Buffer
	n, err := sampleTable().WriteTo(&buf)
	if err != nil || n != int64(buf.Len()) {
		t.Fatalf("WriteTo: got %d, %v; want %d bytes, nil", n, err, buf.Len())
	}
	golden := filepath.Join("testdata", "table.golden")
	if update() {
		if err := os.WriteFile(golden, buf.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	want, err := os.ReadFile(golden)
	if err != nil {
		t.Fatalf("%v (run with -update to create it)", err)
	}
	if diff := cmp.Diff(string(want), buf.String()); diff != "" {
		t.Errorf("text table mismatch (-want +got):\n%s", diff)
	}
}

func TestTableCSV(t *testing.T) {
	var buf bytes.Buffer
	if err := sampleTable().WriteCSV(&buf); err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	want := [][]string{
		{"statistic", "method", "level", "lower", "upper", "estimate", "boot_mean", "bias", "std_error", "replicates", "used", "failed", "not_estimable", "warnings", "error"},
		{"slope", "percentile", "0.95", "8.93868378812199", "13.181974865317388", "10.847096046129352", "10.9", "0.052903953870648", "1.1163", "999", "997", "2", "0", "", ""},
		{"slope", "BCa", "0.95", "8.801831699950547", "13.007761481331977", "10.847096046129352", "10.9", "0.052903953870648", "1.1163", "999", "997", "2", "0",
			"upper endpoint on the most extreme replicates: 997 used, at least 1200 needed for this level", ""},
		{"holiday share", "percentile", "0.9", "0", "0.05", "0", "0.02", "0.02", "0.01", "999", "999", "0", "0", "400 of 999 replicates tied at the smallest value 0", ""},
		{"holiday share", "BCa", "0.9", "", "", "0", "0.02", "0.02", "0.01", "999", "999", "0", "0", "400 of 999 replicates tied at the smallest value 0",
			"inspect: BCa adjustment undefined: 0 of 999 replicates below the estimate, bias correction infinite"},
		{"christmas_day", "percentile", "0.95", "10.88", "13.69", "12.35", "12.4", "0.05", "0.7", "999", "872", "3", "124", "", ""},
	}
	if diff := cmp.Diff(want, recs); diff != "" {
		t.Errorf("CSV mismatch (-want +got):\n%s", diff)
	}
}

func TestTableJSON(t *testing.T) {
	var buf bytes.Buffer
	if err := sampleTable().WriteJSON(&buf); err != nil {
		t.Fatal(err)
	}
	var rows []map[string]any
	if err := json.Unmarshal(buf.Bytes(), &rows); err != nil {
		t.Fatalf("not valid JSON: %v\n%s", err, buf.String())
	}
	if len(rows) != 5 {
		t.Fatalf("got %d rows, want 5", len(rows))
	}
	if rows[4]["failed"] != 3.0 || rows[4]["not_estimable"] != 124.0 {
		t.Errorf("row 4: got failed %v, not_estimable %v; want 3 and 124, kept apart", rows[4]["failed"], rows[4]["not_estimable"])
	}
	if rows[3]["lower"] != nil || rows[3]["upper"] != nil || rows[3]["error"] == "" {
		t.Errorf("failed interval: got lower %v upper %v error %q, want null, null and a reason", rows[3]["lower"], rows[3]["upper"], rows[3]["error"])
	}
	if rows[0]["lower"] != 8.93868378812199 || rows[0]["method"] != "percentile" || rows[0]["used"] != 997.0 {
		t.Errorf("row 0: got %v", rows[0])
	}
	if w, ok := rows[1]["warnings"].([]any); !ok || len(w) != 1 {
		t.Errorf("row 1 warnings: got %v, want a list of 1", rows[1]["warnings"])
	}
	buf.Reset()
	if err := inspect.Table(nil).WriteJSON(&buf); err != nil || buf.String() != "[]\n" {
		t.Errorf("empty table: got %q, %v; want \"[]\\n\"", buf.String(), err)
	}
}
