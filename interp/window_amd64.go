//go:build !purego

package interp

import "golang.org/x/sys/cpu"

// windowChordsAVX2 and windowSumsAVX2 are windowChordsGo and windowSumsGo in
// AVX2 (window_amd64.s), the four cells in the four lanes;
// windowChordsVec and windowSumsVec check the lengths they rely on.
//
//go:noescape
func windowChordsAVX2(grp *windowGroup)

//go:noescape
func windowSumsAVX2(grp *windowGroup)

// hasWindowAVX2 is whether this processor and system run the AVX2 kernel:
// AVX2 and FMA, with the YMM state saved by the system.
var hasWindowAVX2 = cpu.X86.HasAVX2 && cpu.X86.HasFMA

// windowChordsVec is the first pass in AVX2, once the slices are known to
// hold m stations (and d2 four lanes of each) and the cells' columns
// four entries.
func windowChordsVec(g *windowGroup) {
	c := g.c0 + windowLanes - 1
	_, _, _, _ = g.cos[c], g.sin[c], g.lom1[c], g.him1[c]
	if g.m > 0 {
		j := g.j0 + int64(g.m) - 1
		_, _, _, _ = g.x[j], g.y[j], g.z[j], g.d2[windowLanes*g.m-1]
	}
	windowChordsAVX2(g)
}

// windowSumsVec is the second pass in AVX2, as windowChordsVec.
func windowSumsVec(g *windowGroup) {
	if g.m > 0 {
		_, _ = g.v[g.j0+int64(g.m)-1], g.d2[windowLanes*g.m-1]
	}
	windowSumsAVX2(g)
}
