//go:build !purego

package interp

import (
	"math"
	"math/rand/v2"
	"testing"

	"drygrid/grid"
)

// TestWindowAsm checks that the AVX2 passes give the same bits as
// windowChordsGo and windowSumsGo (the definition) on random groups of
// every union length up to 40: lane windows empty, partial and whole,
// stations within 1 m of a cell, beyond the radius and tied, values of
// either zero, and second-pass chords of none, the radius and a k-th chord.
func TestWindowAsm(t *testing.T) {
	if !hasWindowAVX2 {
		t.Skip("no AVX2 kernel on this processor: the kernel is windowChordsGo and windowSumsGo")
	}
	r := rand.New(rand.NewPCG(7, 8))
	k := newWindowConsts(0.0022) // 300 km as a chord squared, about
	for trial := range 4000 {
		m := trial % 41
		a := randomGroup(r, m, 0.07, k)
		b := *a
		b.d2 = make([]float64, len(a.d2))
		windowChordsGo(a)
		windowChordsVec(&b)
		if a.n != b.n || !sameBits(a.top[:], b.top[:]) || !sameFloats(a.d2, b.d2) || !sameFloats(a.lim[:], b.lim[:]) {
			t.Fatalf("trial %d (m %d) chords: Go n %v top %v, AVX2 n %v top %v", trial, m, a.n, a.top, b.n, b.top)
		}
		for l := range windowLanes {
			switch r.IntN(4) {
			case 0:
				a.tau[l] = -1
			case 1:
				a.tau[l] = k.c2max[l]
			default:
				a.tau[l] = a.top[r.IntN(windowTop)][l]
			}
		}
		b.tau = a.tau
		windowSumsGo(a)
		windowSumsVec(&b)
		if a.n2 != b.n2 || !sameBits([][windowLanes]float64{a.sw, a.swz, a.lo, a.hi, a.val}, [][windowLanes]float64{b.sw, b.swz, b.lo, b.hi, b.val}) {
			t.Fatalf("trial %d (m %d) sums: Go %v %v %v %v %v %v, AVX2 %v %v %v %v %v %v", trial, m,
				a.n2, a.sw, a.swz, a.lo, a.hi, a.val, b.n2, b.sw, b.swz, b.lo, b.hi, b.val)
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

func sameBits(a, b [][windowLanes]float64) bool {
	for i := range a {
		if !sameFloats(a[i][:], b[i][:]) {
			return false
		}
	}
	return len(a) == len(b)
}

// TestWindowKernelsSameGrid: the grid is byte-identical whether the kernel
// runs in AVX2 or in Go (TestWindowAsm checks single groups).
func TestWindowKernelsSameGrid(t *testing.T) {
	if !hasWindowAVX2 {
		t.Skip("no AVX2 kernel on this processor: the kernel is windowChordsGo and windowSumsGo")
	}
	ip, _ := New(uniformSphere(20000, 3), DefaultParams())
	spec, _ := grid.NewSpec(-180, -90, 180, 90, 0.5)
	vec := ip.Grid(spec, nil)
	hasWindowAVX2 = false
	defer func() { hasWindowAVX2 = true }()
	gold := ip.Grid(spec, nil)
	for i, a := range vec.Data {
		if math.Float32bits(a) != math.Float32bits(gold.Data[i]) {
			t.Fatalf("cell %d: AVX2 %v, Go %v", i, a, gold.Data[i])
		}
	}
}
