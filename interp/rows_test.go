package interp

import (
	"math"
	"testing"

	"drygrid/grid"
)

// TestRowsEqualGrid: Rows gives, block by block, the same bits as Grid on
// the whole grid, for any block size and worker count (the streaming
// writers rely on it; a property, not a reference check). The grids cross
// the antimeridian, reach the poles, and the blocks end mid-grid.
func TestRowsEqualGrid(t *testing.T) {
	pts := uniformSphere(3000, 5)
	specs := []grid.Spec{}
	for _, b := range [][5]float64{{-180, -90, 180, 90, 1}, {170, -40, -170, -10, 0.1}, {-30, 60, 40, 90, 0.25}} {
		s, err := grid.NewSpec(b[0], b[1], b[2], b[3], b[4])
		if err != nil {
			t.Fatal(err)
		}
		specs = append(specs, s)
	}
	for _, sectors := range []int{0, 4} {
		for _, workers := range []int{1, 3} {
			p := DefaultParams()
			p.RadiusKm = 500
			p.Workers, p.Sectors = workers, sectors
			ip, err := New(pts, p)
			if err != nil {
				t.Fatal(err)
			}
			for _, spec := range specs {
				want := ip.Grid(spec, nil).Data
				for _, block := range []int{1, 7, 64} {
					got := make([]float32, 0, len(want))
					for row0 := 0; row0 < spec.Rows; row0 += block {
						n := min(block, spec.Rows-row0)
						dst := make([]float32, n*spec.Cols)
						for i := range dst {
							dst[i] = 42 // Rows must overwrite every cell
						}
						if err := ip.Rows(spec, row0, n, dst); err != nil {
							t.Fatal(err)
						}
						got = append(got, dst...)
					}
					for i := range want {
						if math.Float32bits(got[i]) != math.Float32bits(want[i]) {
							t.Fatalf("sectors %d workers %d %v block %d: cell %d is %v, Grid gives %v",
								sectors, workers, spec, block, i, got[i], want[i])
						}
					}
				}
			}
		}
	}
}

// TestRowsErrors: rows outside the grid or a destination of the wrong
// length are refused.
func TestRowsErrors(t *testing.T) {
	ip, err := New(uniformSphere(100, 1), DefaultParams())
	if err != nil {
		t.Fatal(err)
	}
	spec := grid.Spec{West: 0, North: 10, Res: 1, Cols: 10, Rows: 10}
	for _, c := range []struct{ row0, n, len int }{{-1, 1, 10}, {9, 2, 20}, {0, 2, 19}, {0, -1, 0}} {
		if err := ip.Rows(spec, c.row0, c.n, make([]float32, c.len)); err == nil {
			t.Errorf("Rows(%d, %d, %d values): no error", c.row0, c.n, c.len)
		}
	}
	if err := ip.Rows(spec, 10, 0, nil); err != nil {
		t.Errorf("an empty block at the end: %v", err)
	}
}
