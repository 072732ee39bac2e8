package inspect_test

import (
	"testing"
	"time"

	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/fit"
	"github.com/kalends/kalends/inspect"
	"github.com/kalends/kalends/resample"
)

// copiedFit fits replicate sp the slow way, as the resample it stands for:
// every row copied count times (keeping its weight, if d has weights), the
// feature set learned on the copied dates, and f fitted to the copies with
// plain weights. Tests compare a run's replicates with it.
func copiedFit(t *testing.T, d inspect.Data, fs features.Builder, f fit.Fitter, sp *resample.Split) (features.Encoder, fit.Predictor) {
	t.Helper()
	var dates []time.Time
	var y, w []float64
	for i, c := range sp.Counts {
		for range c {
			dates = append(dates, d.Dates[i])
			y = append(y, d.Outcome[i])
			if d.Weights != nil {
				w = append(w, d.Weights[i])
			}
		}
	}
	enc, err := fs.Learn(dates)
	if err != nil {
		t.Fatalf("replicate %d, copied rows: %v", sp.Replicate, err)
	}
	x, err := features.Apply(enc, dates)
	if err != nil {
		t.Fatalf("replicate %d, copied rows: %v", sp.Replicate, err)
	}
	m, err := f.Fit(x, y, w)
	if err != nil {
		t.Fatalf("replicate %d, copied rows: %v", sp.Replicate, err)
	}
	return enc, m
}
