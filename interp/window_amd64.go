//go:build !purego

package interp

import "golang.org/x/sys/cpu"

// windowSumsAVX2 is windowSumsGo in AVX2 (window_amd64.s), four lanes per
// instruction. x, y, z, v and d2 point at the window's first station and
// must be readable (d2 writable) to m rounded up to a multiple of four.
//
//go:noescape
func windowSumsAVX2(x, y, z, v, d2 *float64, m int, cx, cy, cz float64, k *windowConsts, out *windowOut)

// hasWindowAVX2 is whether this processor and system run windowSumsAVX2:
// AVX2 with the YMM state saved by the system, and POPCNT.
var hasWindowAVX2 = cpu.X86.HasAVX2 && cpu.X86.HasPOPCNT

func init() {
	if hasWindowAVX2 {
		windowSums = windowSumsVec
	}
}

// windowSumsVec is windowSums through the AVX2 kernel.
func windowSumsVec(x, y, z, v, d2 []float64, m int, cx, cy, cz float64, k *windowConsts, out *windowOut) {
	if m <= 0 {
		*out = windowOut{lo: k.posInf[0], hi: k.negInf[0]}
		return
	}
	n := (m + windowLanes - 1) &^ (windowLanes - 1)
	_, _, _, _, _ = x[n-1], y[n-1], z[n-1], v[n-1], d2[n-1] // the bounds the assembly relies on
	windowSumsAVX2(&x[0], &y[0], &z[0], &v[0], &d2[0], m, cx, cy, cz, k, out)
}
