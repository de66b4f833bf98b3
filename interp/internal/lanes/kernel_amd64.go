//go:build !purego

package lanes

import "golang.org/x/sys/cpu"

// chordsAVX2 and sumsAVX2 are chordsGo and sumsGo in AVX2 (kernel_amd64.s),
// the four cells in the four lanes; chordsVec and sumsVec check the
// lengths they rely on.
//
//go:noescape
func chordsAVX2(grp *Group)

//go:noescape
func sumsAVX2(grp *Group)

// hasAVX2 is whether this processor and system run the AVX2 kernel: AVX2
// and FMA, with the YMM state saved by the system.
var hasAVX2 = cpu.X86.HasAVX2 && cpu.X86.HasFMA

// chordsVec is the first pass in AVX2, once the slices are known to hold M
// stations (and D2 four lanes of each) and the cells' columns four
// entries.
func chordsVec(g *Group) {
	c := g.C0 + Width - 1
	_, _, _, _ = g.Cos[c], g.Sin[c], g.Lom1[c], g.Him1[c]
	if g.M > 0 {
		j := g.J0 + int64(g.M) - 1
		_, _, _, _ = g.X[j], g.Y[j], g.Z[j], g.D2[Width*g.M-1]
	}
	chordsAVX2(g)
}

// sumsVec is the second pass in AVX2, as chordsVec.
func sumsVec(g *Group) {
	if g.M > 0 {
		_, _ = g.V[g.J0+int64(g.M)-1], g.D2[Width*g.M-1]
	}
	sumsAVX2(g)
}
