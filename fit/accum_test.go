package fit

import (
	"bytes"
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/kalends/kalends/internal/rng"
	"gonum.org/v1/gonum/mat"
)

// poissonCounts returns the Poisson-bootstrap counts of the accumulators,
// rows keyed by key(i).
func poissonCounts(seed uint64, key func(i int) uint64) CountsFunc {
	return func(r int, dst []int32) {
		for i := range dst {
			dst[i] = int32(rng.Poisson1(rng.Keyed(seed, r, key(i))))
		}
	}
}

func rowsOf(x *mat.Dense, y, w []float64, keys []uint64, idx []int) (*mat.Dense, []float64, []float64, []uint64) {
	_, p := x.Dims()
	xs := mat.NewDense(len(idx), p, nil)
	var ys, ws []float64
	var ks []uint64
	for k, i := range idx {
		xs.SetRow(k, x.RawRowView(i))
		ys = append(ys, y[i])
		if w != nil {
			ws = append(ws, w[i])
		}
		ks = append(ks, keys[i])
	}
	return xs, ys, ws, ks
}

// TestAccumulatorShards checks that 4 shards of very different sizes
// (1, 9, 150 rows and the rest, rows dealt at random), each through a
// MarshalBinary/UnmarshalBinary round trip and merged in two different
// orders, give bytes identical to the single-pass accumulator, and that the
// solved replicates agree with OLS (QR) on the materialised Poisson
// resample to 1e-9 relative to max(|β|, SE).
func TestAccumulatorShards(t *testing.T) {
	x, y := calendarDesign(600, 30, 4, false)
	n, p := x.Dims()
	w := make([]float64, n)
	for i := range w {
		w[i] = 1 + float64(i%3)
	}
	keys := make([]uint64, n)
	for i := range keys {
		keys[i] = uint64(i)*2654435761 + 17 // any unique keys
	}
	const B, seed = 40, 99
	std, err := LearnStandardization(x, y, w)
	if err != nil {
		t.Fatal(err)
	}
	one, _ := NewAccumulator(std, seed, B)
	if err := one.Add(x, y, w, keys); err != nil {
		t.Fatal(err)
	}
	want, _ := one.MarshalBinary()

	perm := rand.New(rand.NewPCG(5, 6)).Perm(n)
	sizes := []int{1, 9, 150, n - 160}
	var blobs [][]byte
	at := 0
	for _, sz := range sizes {
		xs, ys, ws, ks := rowsOf(x, y, w, keys, perm[at:at+sz])
		at += sz
		a, _ := NewAccumulator(std, seed, B)
		// Add in two calls to exercise repeated Add too.
		h := sz / 2
		if err := a.Add(mat.DenseCopyOf(xs.Slice(0, h, 0, p)), ys[:h], ws[:h], ks[:h]); h > 0 && err != nil {
			t.Fatal(err)
		}
		if err := a.Add(mat.DenseCopyOf(xs.Slice(h, sz, 0, p)), ys[h:], ws[h:], ks[h:]); err != nil {
			t.Fatal(err)
		}
		b, err := a.MarshalBinary()
		if err != nil {
			t.Fatal(err)
		}
		blobs = append(blobs, b)
	}
	for _, order := range [][]int{{0, 1, 2, 3}, {3, 1, 0, 2}} {
		var m Accumulator
		if err := m.UnmarshalBinary(blobs[order[0]]); err != nil {
			t.Fatal(err)
		}
		for _, k := range order[1:] {
			var s Accumulator
			if err := s.UnmarshalBinary(blobs[k]); err != nil {
				t.Fatal(err)
			}
			if err := m.Merge(&s); err != nil {
				t.Fatal(err)
			}
		}
		got, _ := m.MarshalBinary()
		if !bytes.Equal(got, want) {
			t.Errorf("merge order %v: merged bytes differ from the single pass", order)
		}
	}

	reps, full := one.Solve(0)
	// Whole data against OLS.
	checkAgainstOLS(t, "whole data", full, 0, x, y, w)
	counts := poissonCounts(seed, func(i int) uint64 { return keys[i] })
	c := make([]int32, n)
	for r := range B {
		counts(r, c)
		xr, yr, wr := materialise(x, y, w, c)
		if reps.Err[r] != nil {
			t.Fatalf("replicate %d: %v", r, reps.Err[r])
		}
		ref := &BatchFit{B: 1, P: p}
		_ = ref
		checkAgainstOLS(t, "replicate", reps, r, xr, yr, wr)
	}
	// The batched path on the same Poisson counts agrees too.
	bf, err := Batch{}.Fit(x, y, w, B, counts)
	if err != nil {
		t.Fatal(err)
	}
	for i := range bf.Coef {
		if d := math.Abs(bf.Coef[i]-reps.Coef[i]) / max(math.Abs(reps.Coef[i]), reps.StdErr[i]); d > 1e-9 {
			t.Fatalf("coefficient %d: Batch %v, Accumulator %v", i, bf.Coef[i], reps.Coef[i])
		}
	}
}

func checkAgainstOLS(t *testing.T, what string, got *BatchFit, r int, x *mat.Dense, y, w []float64) {
	t.Helper()
	want, err := OLS{}.FitOLS(x, y, w)
	if err != nil {
		t.Fatal(err)
	}
	p := got.P
	for j, c := range want.Coefficients() {
		g := got.Coef[r*p+j]
		if d := math.Abs(g-c.Estimate) / max(math.Abs(c.Estimate), c.StdErr); d > 1e-9 {
			t.Errorf("%s %d column %d: got %v, want %v (rel %.2g)", what, r, j, g, c.Estimate, d)
		}
		if d := relDiff(got.StdErr[r*p+j], c.StdErr, 0); d > 1e-9 {
			t.Errorf("%s %d column %d: SE got %v, want %v", what, r, j, got.StdErr[r*p+j], c.StdErr)
		}
	}
	if st := want.Statistics(); relDiff(got.ResidSE[r], st.ResidSE, 0) > 1e-9 || got.Rows[r] != st.Rows {
		t.Errorf("%s %d: residual SE, rows got %v, %v, want %v, %v", what, r, got.ResidSE[r], got.Rows[r], st.ResidSE, st.Rows)
	}
}

// TestAccumulatorRefuses checks that mismatched accumulators are not merged
// and that corrupt or foreign bytes are not decoded.
func TestAccumulatorRefuses(t *testing.T) {
	x, y := calendarDesign(100, 5, 1, false)
	std, _ := LearnStandardization(x, y, nil)
	base, _ := NewAccumulator(std, 1, 5)
	other := std
	other.Scale = append([]float64(nil), std.Scale...)
	other.Scale[1] *= 1 + 1e-15
	for _, tt := range []struct {
		name string
		std  Standardization
		seed uint64
		b    int
	}{
		{"standardization", other, 1, 5},
		{"seed", std, 2, 5},
		{"replicates", std, 1, 6},
	} {
		t.Run(tt.name, func(t *testing.T) {
			a, err := NewAccumulator(tt.std, tt.seed, tt.b)
			if err != nil {
				t.Fatal(err)
			}
			if err := base.Merge(a); err == nil {
				t.Errorf("got no error merging a different %s, want one", tt.name)
			}
		})
	}
	good, _ := base.MarshalBinary()
	for _, tt := range []struct {
		name string
		edit func([]byte) []byte
	}{
		{"magic", func(b []byte) []byte { b[0] = 'K'; return b }},
		{"version", func(b []byte) []byte { b[8] = 2; return b }},
		{"checksum", func(b []byte) []byte { b[60] ^= 1; return b }},
		{"truncated", func(b []byte) []byte { return b[:len(b)-20] }},
	} {
		t.Run(tt.name, func(t *testing.T) {
			var a Accumulator
			if err := a.UnmarshalBinary(tt.edit(append([]byte(nil), good...))); err == nil {
				t.Errorf("got no error decoding bytes with a bad %s, want one", tt.name)
			}
		})
	}
	// A value far outside the standardization's range is a data error.
	bad := mat.DenseCopyOf(x)
	bad.Set(3, 1, 1e9)
	err := base.Add(bad, y, nil, make([]uint64, 100))
	var de *DataError
	if !errors.As(err, &de) || de.Row != 4 {
		t.Errorf("got %v, want a *DataError for row 4", err)
	}
}

func TestToFixed(t *testing.T) {
	for _, z := range []float64{0, 1, -1, 0x1p-52, -0x1p-52, 3.75, -123456.789, 0x1p31 + 0.5, -0x1p31 - 0.25, 1e-20} {
		v, ok := toFixed(z)
		if !ok {
			t.Fatalf("toFixed(%v) not ok", z)
		}
		want := math.RoundToEven(z*0x1p52) * 0x1p-52
		if got := v.float(); got != want {
			t.Errorf("toFixed(%v) = %v, want %v", z, got, want)
		}
	}
	if _, ok := toFixed(0x1p32); ok {
		t.Errorf("toFixed(2^32) ok, want out of range")
	}
}
