package inspect_test

import (
	"context"
	"runtime"
	"testing"

	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/fit"
	"github.com/kalends/kalends/inspect"
	"github.com/kalends/kalends/resample"
)

// BenchmarkRun1000x200 is a run of B = 1000 ordinary-bootstrap replicates
// of n = 200 rows, six design columns (intercept, weekend, month sine and
// cosine, trend, any public holiday) fitted by fit.OLS, keeping the
// coefficients and out-of-bag metrics, refitting every replicate (the
// generic path). Besides ns/op, B/op and allocs/op it reports retained-B:
// the heap still held by the kept results after a GC, which grows as B·p
// (the transient per-replicate designs are garbage).
func BenchmarkRun1000x200(b *testing.B) {
	benchRun(b, realDesign(b), false)
}

// BenchmarkRun1000x200Batched is the same run on the batched
// least-squares path: the same columns from features.Intercept, which
// learns nothing from the rows, so Run uses fit.Batch.
func BenchmarkRun1000x200Batched(b *testing.B) {
	benchRun(b, fastDesign(b), false)
}

// BenchmarkRun1000x200Refit is BenchmarkRun1000x200Batched with
// Options.Refit: the generic path on the same design.
func BenchmarkRun1000x200Refit(b *testing.B) {
	benchRun(b, fastDesign(b), true)
}

func benchRun(b *testing.B, fs features.Builder, refit bool) {
	d := realData(b, 200, 3)
	opts := inspect.Options{Fitter: fit.OLS{}, Scheme: resample.Bootstrap{B: 1000}, Seed: 1, Refit: refit}
	var retained float64
	for b.Loop() {
		coef, met := inspect.KeepCoefficients(), inspect.KeepMetrics()
		var before, after runtime.MemStats
		b.StopTimer()
		runtime.GC()
		runtime.ReadMemStats(&before)
		b.StartTimer()
		if _, err := inspect.Run(context.Background(), d, fs, opts, coef, met); err != nil {
			b.Fatal(err)
		}
		b.StopTimer()
		runtime.GC()
		runtime.ReadMemStats(&after)
		retained = float64(after.HeapAlloc) - float64(before.HeapAlloc)
		runtime.KeepAlive(coef)
		runtime.KeepAlive(met)
		b.StartTimer()
	}
	b.ReportMetric(retained, "retained-B")
}
