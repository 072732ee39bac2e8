// Package blockxp holds the small dense kernel behind kalends' batched
// least-squares path: C (4 × 12 tile) += A (4 × k) · Z (k × 12), with A
// packed so that the kernel reads it sequentially and Z read row by row,
// in place, from a strip of a wider row-major matrix. Widen converts the
// path's one-byte row counts to float64.
//
// On amd64 processors with AVX2 and FMA the kernel is Go assembly; elsewhere
// (or with the purego build tag) it is plain Go. The two agree to rounding
// (the assembly fuses multiply and add) but each is deterministic: the sum
// over k is always taken in increasing k, so a result never depends on how
// callers split work between goroutines, only on the machine's kernel.
package blockxp

// Tile is the number of rows of A (and C) one kernel call handles.
const Tile = 4

// Strip is the number of columns of Z (and C) one kernel call handles.
const Strip = 12

// Accelerated reports whether the assembly kernel is in use.
func Accelerated() bool { return hasFMA }

// MulAdd adds A·Z to a 4 × 12 tile of C. ap holds A packed by column
// (ap[4*l+r] = A[r][l], l < k), zp holds Z packed by row (zp[12*l+j] =
// Z[l][j]), and the tile is c[r*ldc+j] for r < 4, j < 12. The sum over l
// is formed in increasing l in registers and then added to c. MulAdd
// panics if a slice is too short.
func MulAdd(k int, ap, zp, c []float64, ldc int) { MulAddStrided(k, ap, zp, Strip, c, ldc) }

// MulAddStrided is MulAdd with the rows of Z ldz apart: Z[l][j] is
// zp[ldz*l+j], so a strip of a wider row-major matrix can be read in
// place. It panics if a slice is too short or ldz < Strip.
func MulAddStrided(k int, ap, zp []float64, ldz int, c []float64, ldc int) {
	if ldz < Strip || ldc < Strip || len(ap) < Tile*k || (k > 0 && len(zp) < ldz*(k-1)+Strip) || len(c) < 3*ldc+Strip {
		panic("blockxp: MulAdd: slice too short")
	}
	mulAdd(k, ap, zp, ldz, c, ldc)
}

func mulAddGo(k int, ap, zp []float64, ldz int, c []float64, ldc int) {
	var acc [Tile][Strip]float64
	ap = ap[:Tile*k]
	for l := 0; l < k; l++ {
		a := ap[Tile*l : Tile*l+Tile : Tile*l+Tile]
		z := zp[ldz*l : ldz*l+Strip : ldz*l+Strip]
		for r := range Tile {
			ar := a[r]
			row := &acc[r]
			for j := range Strip {
				row[j] += ar * z[j]
			}
		}
	}
	for r := range Tile {
		row := c[r*ldc : r*ldc+Strip : r*ldc+Strip]
		for j := range Strip {
			row[j] += acc[r][j]
		}
	}
}

// Widen writes src, converted to float64, into dst[:len(src)]. It panics
// if dst is shorter than src.
func Widen(dst []float64, src []uint8) {
	if len(dst) < len(src) {
		panic("blockxp: Widen: dst too short")
	}
	n := len(src) &^ 15
	if n > 0 {
		widen(dst[:n], src[:n])
	}
	for i := n; i < len(src); i++ {
		dst[i] = float64(src[i])
	}
}

func widenGo(dst []float64, src []uint8) {
	dst = dst[:len(src)]
	for i, c := range src {
		dst[i] = float64(c)
	}
}
