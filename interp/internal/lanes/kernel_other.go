//go:build !amd64 || purego

package lanes

// hasAVX2 is false off amd64 and with the purego tag: the kernel is chordsGo
// and sumsGo.
const hasAVX2 = false

// chordsVec and sumsVec are the Go passes: there is no vector kernel here.
func chordsVec(g *Group) { chordsGo(g) }
func sumsVec(g *Group)   { sumsGo(g) }
