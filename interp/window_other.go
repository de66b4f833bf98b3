//go:build !amd64 || purego

package interp

// hasWindowAVX2 is false off amd64 and with the purego tag: windowSums is
// windowSumsGo.
const hasWindowAVX2 = false

// windowSumsVec is windowSumsGo: there is no vector kernel here.
func windowSumsVec(c *windowCell) { windowSumsGo(c) }
