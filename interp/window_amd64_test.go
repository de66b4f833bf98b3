//go:build !purego

package interp

import (
	"math"
	"math/rand/v2"
	"testing"

	"drygrid/grid"
)

// TestWindowSumsAsm checks that the AVX2 kernel gives the same bits as
// windowSumsGo (the definition of the lane order) on random windows of
// every length up to 40, including tails, stations within 1 m and stations
// beyond the radius.
func TestWindowSumsAsm(t *testing.T) {
	if !hasWindowAVX2 {
		t.Skip("no AVX2 kernel on this processor: windowSums is windowSumsGo")
	}
	r := rand.New(rand.NewPCG(7, 8))
	c2max := 0.0022 // 300 km as a chord squared, about
	k := newWindowConsts(c2max)
	same := func(a, b float64) bool { return math.Float64bits(a) == math.Float64bits(b) }
	for trial := range 4000 {
		m := trial % 41
		x, y, z, v, cx, cy, cz := randomWindow(r, m, 0.07)
		d2a, d2b := make([]float64, m+windowLanes), make([]float64, m+windowLanes)
		ca := &windowCell{x: x, y: y, z: z, v: v, d2: d2a, m: m, cx: cx, cy: cy, cz: cz, k: k}
		cb := *ca
		cb.d2 = d2b
		windowSumsGo(ca)
		windowSumsVec(&cb)
		a, b := ca.out, cb.out
		if a.n != b.n || !same(a.sw, b.sw) || !same(a.swz, b.swz) || !same(a.lo, b.lo) || !same(a.hi, b.hi) ||
			!same(a.far, b.far) {
			t.Fatalf("trial %d (m %d): Go %+v, AVX2 %+v", trial, m, a, b)
		}
		for j := range m {
			if !same(d2a[j], d2b[j]) {
				t.Fatalf("trial %d: d2[%d] Go %v AVX2 %v", trial, j, d2a[j], d2b[j])
			}
		}
	}
}

// TestWindowKernelsSameGrid: the grid is byte-identical whether the kernel
// runs in AVX2 or in Go (TestWindowSumsAsm checks single windows).
func TestWindowKernelsSameGrid(t *testing.T) {
	if !hasWindowAVX2 {
		t.Skip("no AVX2 kernel on this processor: windowSums is windowSumsGo")
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
