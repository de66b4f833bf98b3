//go:build !purego

package interp

import "golang.org/x/sys/cpu"

// windowSumsAVX2 is windowSumsGo in AVX2 (window_amd64.s), four lanes per
// instruction; windowSumsVec checks the lengths it relies on.
//
//go:noescape
func windowSumsAVX2(c *windowCell)

// hasWindowAVX2 is whether this processor and system run windowSumsAVX2:
// AVX2 with the YMM state saved by the system, and POPCNT.
var hasWindowAVX2 = cpu.X86.HasAVX2 && cpu.X86.HasPOPCNT

// windowSumsVec is the kernel in AVX2, once the slices are known to reach
// the window's end rounded up to a multiple of four.
func windowSumsVec(c *windowCell) {
	if c.m <= 0 {
		c.out = windowOut{lo: c.k.posInf[0], hi: c.k.negInf[0]}
		return
	}
	n := (c.m + windowLanes - 1) &^ (windowLanes - 1)
	e := c.lo + n
	_, _, _, _, _, _ = c.x[c.lo], c.x[e-1], c.y[e-1], c.z[e-1], c.v[e-1], c.d2[n-1]
	windowSumsAVX2(c)
}
