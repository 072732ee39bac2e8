//go:build amd64 && !purego

package blockxp

//go:noescape
func mulAdd4x12(k int, ap, zp *float64, ldz int, c *float64, ldc int)

func cpuid(leaf, sub uint32) (a, b, c, d uint32)

func xgetbv0() (lo, hi uint32)

// hasFMA reports whether the processor and operating system support the
// AVX2 and FMA instructions the assembly kernel uses.
var hasFMA = func() bool {
	maxLeaf, _, _, _ := cpuid(0, 0)
	if maxLeaf < 7 {
		return false
	}
	_, _, c1, _ := cpuid(1, 0)
	const fma, osxsave, avx = 1 << 12, 1 << 27, 1 << 28
	if c1&fma == 0 || c1&osxsave == 0 || c1&avx == 0 {
		return false
	}
	if lo, _ := xgetbv0(); lo&6 != 6 { // XMM and YMM state enabled by the OS
		return false
	}
	_, b7, _, _ := cpuid(7, 0)
	return b7&(1<<5) != 0 // AVX2
}()

func mulAdd(k int, ap, zp []float64, ldz int, c []float64, ldc int) {
	if !hasFMA {
		mulAddGo(k, ap, zp, ldz, c, ldc)
		return
	}
	if k == 0 {
		return
	}
	_ = ap[4*k-1]
	_ = zp[ldz*(k-1)+Strip-1]
	_ = c[3*ldc+Strip-1]
	mulAdd4x12(k, &ap[0], &zp[0], ldz, &c[0], ldc)
}

//go:noescape
func widen16(n int, dst *float64, src *uint8)

// widen converts len(src) bytes, a multiple of 16, with AVX2 when it can.
func widen(dst []float64, src []uint8) {
	if !hasFMA {
		widenGo(dst, src)
		return
	}
	_ = dst[len(src)-1]
	widen16(len(src)/16, &dst[0], &src[0])
}
