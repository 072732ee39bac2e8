package inspect_test

import (
	"context"
	"runtime"
	"testing"

	"github.com/kalends/kalends/fit"
	"github.com/kalends/kalends/inspect"
	"github.com/kalends/kalends/resample"
)

// BenchmarkRun1000x200 is a run of B = 1000 ordinary-bootstrap replicates
// of n = 200 rows, six design columns (intercept, weekend, month sine and
// cosine, trend, any public holiday) fitted by fit.OLS, keeping the
// coefficients and out-of-bag metrics. Besides ns/op, B/op and allocs/op
// it reports retained-B: the heap still held by the kept results after a
// GC, which grows as B·p (the transient per-replicate designs are
// garbage).
func BenchmarkRun1000x200(b *testing.B) {
	d := realData(b, 200, 3)
	fs := realDesign(b)
	opts := inspect.Options{Fitter: fit.OLS{}, Scheme: resample.Bootstrap{B: 1000}, Seed: 1}
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
