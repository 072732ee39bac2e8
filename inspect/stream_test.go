package inspect_test

import (
	"context"
	"errors"
	"runtime"
	"sync/atomic"
	"testing"

	"github.com/google/go-cmp/cmp"
	"github.com/google/go-cmp/cmp/cmpopts"

	"github.com/kalends/kalends/fit"
	"github.com/kalends/kalends/inspect"
)

// TestStreamInOrder checks that an InOrder sink receives replicates 0, 1,
// ... with the values an accumulating run keeps, and that no more than
// Buffer replicates are ever started and not yet delivered.
func TestStreamInOrder(t *testing.T) {
	d := testData(40)
	fs := calBuilder{cols: allCols[:4]}
	base := inspect.Options{Fitter: ols{}, Scheme: bootstrap{B: 60}, Seed: 4}
	coef := inspect.KeepCoefficients()
	if _, err := inspect.Run(context.Background(), d, fs, base, coef); err != nil {
		t.Fatal(err)
	}
	want := coef.Values()

	var started, delivered atomic.Int64
	var maxAhead int64
	probe := inspect.Keep("probe", func(_ context.Context, r *inspect.Replicate) (int, error) {
		if r.ID >= 0 {
			if ahead := started.Add(1) - delivered.Load(); ahead > atomic.LoadInt64(&maxAhead) {
				atomic.StoreInt64(&maxAhead, ahead)
			}
		}
		return r.ID, nil
	})
	stream := inspect.KeepCoefficients()
	var got [][]fit.Coefficient
	var order []int
	opts := base
	opts.Workers, opts.Buffer = 4, 5
	opts.Sink = inspect.SinkFunc(func(rec *inspect.Record) error {
		delivered.Add(1)
		order = append(order, rec.Replicate)
		cs, err := stream.From(rec)
		if err != nil {
			return err
		}
		got = append(got, append([]fit.Coefficient(nil), cs...))
		if id, _ := probe.From(rec); id != rec.Replicate {
			t.Errorf("record %d carries probe value %d", rec.Replicate, id)
		}
		return nil
	})
	res, err := inspect.Run(context.Background(), d, fs, opts, stream, probe)
	if err != nil {
		t.Fatal(err)
	}
	for i, r := range order {
		if r != i {
			t.Fatalf("delivery %d was replicate %d; want in order", i, r)
		}
	}
	if diff := cmp.Diff(want, got, cmpopts.EquateNaNs()); diff != "" {
		t.Errorf("streamed coefficients (-kept +streamed):\n%s", diff)
	}
	if m := atomic.LoadInt64(&maxAhead); m > 5 {
		t.Errorf("%d replicates started ahead of delivery, want ≤ Buffer = 5", m)
	}
	if res.Errs != nil || stream.Values() != nil {
		t.Error("a streamed run kept per-replicate storage")
	}
	if _, err := stream.Full(); err != nil {
		t.Errorf("full-data value: %v", err)
	}
}

func TestStreamAsDone(t *testing.T) {
	seen := make(map[int]int)
	opts := inspect.Options{Fitter: ols{}, Scheme: bootstrap{B: 50}, Workers: 3, Order: inspect.AsDone,
		Sink: inspect.SinkFunc(func(rec *inspect.Record) error {
			seen[rec.Replicate]++
			return nil
		})}
	res, err := inspect.Run(context.Background(), testData(30), calBuilder{cols: allCols[:3]}, opts)
	if err != nil {
		t.Fatal(err)
	}
	if len(seen) != 50 || res.Finished != 50 {
		t.Fatalf("%d distinct replicates, Finished %d; want 50", len(seen), res.Finished)
	}
	for r, c := range seen {
		if c != 1 || r < 0 || r >= 50 {
			t.Errorf("replicate %d delivered %d times", r, c)
		}
	}
}

// TestStreamSinkError checks that a sink error stops the run, that an
// InOrder stream stopped early has delivered exactly 0..Finished−1, and
// that no goroutine is left behind.
func TestStreamSinkError(t *testing.T) {
	before := runtime.NumGoroutine()
	full := errors.New("disk full")
	var order []int
	opts := inspect.Options{Fitter: ols{}, Scheme: bootstrap{B: 500}, Workers: 4,
		Sink: inspect.SinkFunc(func(rec *inspect.Record) error {
			order = append(order, rec.Replicate)
			if rec.Replicate == 20 {
				return full
			}
			return nil
		})}
	res, err := inspect.Run(context.Background(), testData(30), calBuilder{cols: allCols[:3]}, opts)
	if !errors.Is(err, full) {
		t.Fatalf("got %v, want the sink's error", err)
	}
	if res.Finished != 21 || len(order) != 21 {
		t.Errorf("Finished %d, %d deliveries; want 21", res.Finished, len(order))
	}
	for i, r := range order {
		if r != i {
			t.Fatalf("delivery %d was replicate %d", i, r)
		}
	}
	checkNoLeak(t, before)
}
