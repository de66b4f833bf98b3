//go:build !amd64 || purego

package interp

// hasWindowAVX2 is false off amd64 and with the purego tag: the kernel is
// windowChordsGo and windowSumsGo.
const hasWindowAVX2 = false

// windowChordsVec and windowSumsVec are the Go passes: there is no vector
// kernel here.
func windowChordsVec(g *windowGroup) { windowChordsGo(g) }
func windowSumsVec(g *windowGroup)   { windowSumsGo(g) }
