package blockxp

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestMulAdd checks the kernel in use against a plain triple loop, and the
// plain-Go kernel against the same loop, for several depths and row
// strides of Z.
func TestMulAdd(t *testing.T) {
	rnd := rand.New(rand.NewPCG(1, 2))
	for _, tt := range []struct {
		name   string
		k, ldz int
	}{{"empty", 0, Strip}, {"one", 1, Strip}, {"seven", 7, Strip}, {"block", 256, Strip},
		{"seven strided", 7, 29}, {"block strided", 256, 96}} {
		t.Run(tt.name, func(t *testing.T) {
			ldc := 29
			ap := make([]float64, Tile*tt.k)
			zp := make([]float64, tt.ldz*tt.k)
			for i := range ap {
				ap[i] = float64(rnd.IntN(5))
			}
			for i := range zp {
				zp[i] = rnd.NormFloat64()
			}
			if tt.k > 0 {
				zp = zp[:tt.ldz*(tt.k-1)+Strip] // the shortest slice allowed
			}
			c0 := make([]float64, 3*ldc+Strip)
			for i := range c0 {
				c0[i] = rnd.NormFloat64()
			}
			for name, f := range map[string]func(int, []float64, []float64, int, []float64, int){"MulAddStrided": MulAddStrided, "mulAddGo": mulAddGo} {
				c := append([]float64(nil), c0...)
				f(tt.k, ap, zp, tt.ldz, c, ldc)
				for i := range c {
					r, j := i/ldc, i%ldc
					want := c0[i]
					if j < Strip && r < Tile {
						s := 0.0
						for l := 0; l < tt.k; l++ {
							s += ap[Tile*l+r] * zp[tt.ldz*l+j]
						}
						want += s
					}
					if d := math.Abs(c[i] - want); d > 1e-12*(1+math.Abs(want)) {
						t.Fatalf("%s: c[%d][%d] got %v, want %v", name, r, j, c[i], want)
					}
				}
			}
			if tt.ldz == Strip {
				c := append([]float64(nil), c0...)
				MulAdd(tt.k, ap, zp, c, ldc)
				want := append([]float64(nil), c0...)
				MulAddStrided(tt.k, ap, zp, Strip, want, ldc)
				for i := range c {
					if c[i] != want[i] {
						t.Fatalf("MulAdd: c[%d] got %v, want %v (MulAddStrided)", i, c[i], want[i])
					}
				}
			}
		})
	}
}

func TestMulAddPanics(t *testing.T) {
	defer func() {
		if recover() == nil {
			t.Fatal("got no panic for a short slice, want one")
		}
	}()
	MulAdd(2, make([]float64, 7), make([]float64, 24), make([]float64, 48), 12)
}

// TestWiden checks the byte-to-float conversion in use against float64(b)
// for every byte value and lengths around the 16-byte step.
func TestWiden(t *testing.T) {
	for _, tt := range []struct {
		name string
		n    int
	}{{"empty", 0}, {"short", 5}, {"one step", 16}, {"steps and tail", 37}, {"every byte", 256}, {"long", 1031}} {
		t.Run(tt.name, func(t *testing.T) {
			src := make([]uint8, tt.n)
			for i := range src {
				src[i] = uint8(i*7 + i/256)
			}
			dst := make([]float64, tt.n+3)
			for i := range dst {
				dst[i] = -1
			}
			Widen(dst, src)
			for i, c := range src {
				if dst[i] != float64(c) {
					t.Fatalf("dst[%d] got %v, want %v", i, dst[i], float64(c))
				}
			}
			for i := tt.n; i < len(dst); i++ {
				if dst[i] != -1 {
					t.Fatalf("dst[%d] beyond the input got %v, want it untouched (-1)", i, dst[i])
				}
			}
		})
	}
}
