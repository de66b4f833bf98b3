//go:build !purego

package lanes

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestAsm checks that the AVX2 passes give the same bits as chordsGo and
// sumsGo (the definition) on random groups of every union length up to 40:
// lane spans empty, partial and whole, stations within 1 m of a cell,
// beyond the radius and tied, values of either zero, and second-pass
// chords of none, the radius and a k-th chord.
func TestAsm(t *testing.T) {
	if !hasAVX2 {
		t.Skip("no AVX2 kernel on this processor: the kernel is chordsGo and sumsGo")
	}
	r := rand.New(rand.NewPCG(7, 8))
	k := NewConsts(0.0022) // 300 km as a chord squared, about
	for trial := range 4000 {
		m := trial % 41
		a := randomGroup(r, m, 0.07, k)
		b := *a
		b.D2 = make([]float64, len(a.D2))
		chordsGo(a)
		chordsVec(&b)
		if a.N != b.N || !sameBits(a.Top[:], b.Top[:]) || !sameFloats(a.D2, b.D2) || !sameFloats(a.Lim[:], b.Lim[:]) {
			t.Fatalf("trial %d (m %d) chords: Go n %v top %v, AVX2 n %v top %v", trial, m, a.N, a.Top, b.N, b.Top)
		}
		for l := range Width {
			switch r.IntN(4) {
			case 0:
				a.Tau[l] = -1
			case 1:
				a.Tau[l] = k.C2max[l]
			default:
				a.Tau[l] = a.Top[r.IntN(Kept)][l]
			}
		}
		b.Tau = a.Tau
		sumsGo(a)
		sumsVec(&b)
		if a.N2 != b.N2 || !sameBits([][Width]float64{a.Sw, a.Swz, a.Lo, a.Hi, a.Val}, [][Width]float64{b.Sw, b.Swz, b.Lo, b.Hi, b.Val}) {
			t.Fatalf("trial %d (m %d) sums: Go %v %v %v %v %v %v, AVX2 %v %v %v %v %v %v", trial, m,
				a.N2, a.Sw, a.Swz, a.Lo, a.Hi, a.Val, b.N2, b.Sw, b.Swz, b.Lo, b.Hi, b.Val)
		}
	}
}

func sameFloats(a, b []float64) bool {
	for i := range a {
		if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
			return false
		}
	}
	return len(a) == len(b)
}

func sameBits(a, b [][Width]float64) bool {
	for i := range a {
		if !sameFloats(a[i][:], b[i][:]) {
			return false
		}
	}
	return len(a) == len(b)
}
