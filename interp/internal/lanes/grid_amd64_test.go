//go:build !purego

package lanes_test

import (
	"math"
	"math/rand/v2"
	"testing"

	"drygrid/grid"
	"drygrid/interp"
	"drygrid/interp/internal/lanes"
)

// TestKernelsSameGrid: interp's grid is byte-identical whether the kernel
// runs in AVX2 or in Go (TestAsm checks single groups).
func TestKernelsSameGrid(t *testing.T) {
	if !lanes.HasAVX2() {
		t.Skip("no AVX2 kernel on this processor: the kernel is chordsGo and sumsGo")
	}
	// 20,000 stations uniform on the sphere (longitude uniform, sine of
	// latitude uniform: Archimedes' hat-box theorem), values in [-3, 3].
	r := rand.New(rand.NewPCG(3, 2))
	pts := make([]interp.Point, 20000)
	for i := range pts {
		pts[i] = interp.Point{
			Lon: r.Float64()*360 - 180,
			Lat: math.Asin(2*r.Float64()-1) * 180 / math.Pi,
			Z:   r.Float64()*6 - 3,
		}
	}
	ip, err := interp.New(pts, interp.DefaultParams())
	if err != nil {
		t.Fatal(err)
	}
	spec, _ := grid.NewSpec(-180, -90, 180, 90, 0.5)
	vec := ip.Grid(spec, nil)
	lanes.SetAVX2(false)
	defer lanes.SetAVX2(true)
	gold := ip.Grid(spec, nil)
	for i, a := range vec.Data {
		if math.Float32bits(a) != math.Float32bits(gold.Data[i]) {
			t.Fatalf("cell %d: AVX2 %v, Go %v", i, a, gold.Data[i])
		}
	}
}
