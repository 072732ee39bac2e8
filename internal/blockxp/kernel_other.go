//go:build !amd64 || purego

package blockxp

const hasFMA = false

func mulAdd(k int, ap, zp []float64, ldz int, c []float64, ldc int) {
	mulAddGo(k, ap, zp, ldz, c, ldc)
}

func widen(dst []float64, src []uint8) { widenGo(dst, src) }
