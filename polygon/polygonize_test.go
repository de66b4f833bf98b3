package polygon_test

import (
	"drygrid/grid"
	"drygrid/internal/rastertest"
	"drygrid/polygon"
	"fmt"
	"testing"
)

// TestPolygonizeProperties runs the Go-side laws (rastertest.Check) over 800
// random rasters of every kind rastertest.RandomCases makes (noise,
// checkerboards, single cells, holes in holes, no-data islands, one-row and
// one-column grids, smooth blobs).
func TestPolygonizeProperties(t *testing.T) {
	for _, c := range rastertest.RandomCases(1, 800) {
		rastertest.Check(t, c.Name, c.R, polygon.Polygonize(c.R))
	}
}

// TestPolygonizeCornerRule pins the documented corner (saddle) rule on
// hand-drawn rasters. The expected ring counts follow from the rule itself
// (cells of a code are 4-connected; no ring visits a vertex twice) and are
// counted by hand; OGC Simple Features Access 1.2.1 (06-103r4), the
// Polygon assertions (section number from memory: 6.1.11.1), lets rings of a
// polygon touch only at single points, which is what these shapes exercise (shapely validity is checked in TestPolygonizeShapely).
func TestPolygonizeCornerRule(t *testing.T) {
	tests := []struct {
		name  string
		r     *grid.Uint8
		code  uint8
		rings [][]int // per polygon: number of positions of each ring (closing one included)
	}{
		{"diagonal pair: two squares touching at a point", rastertest.Raster(2, 1, 1, 0, 0, 1), 1, [][]int{{5}, {5}}},
		{"checkerboard 2x2 of two codes, code 2", rastertest.Raster(2, 1, 1, 2, 2, 1), 2, [][]int{{5}, {5}}},
		// a C whose tips touch diagonally: the pinched cell is a hole touching the shell at a point
		{"hole touching its shell at a corner", rastertest.Raster(3, 1,
			1, 1, 1,
			1, 0, 1,
			1, 1, 0), 1, [][]int{{7, 5}}},
		// two holes touching diagonally inside one shell: two holes, not one self-touching ring
		{"two holes touching at a corner", rastertest.Raster(4, 1,
			1, 1, 1, 1,
			1, 0, 1, 1,
			1, 1, 0, 1,
			1, 1, 1, 1), 1, [][]int{{5, 5, 5}}},
		{"holes in holes: code 1 ring", rastertest.Raster(5, 1,
			1, 1, 1, 1, 1,
			1, 2, 2, 2, 1,
			1, 2, 3, 2, 1,
			1, 2, 2, 2, 1,
			1, 1, 1, 1, 1), 1, [][]int{{5, 5}}},
		{"holes in holes: code 2 ring", rastertest.Raster(5, 1,
			1, 1, 1, 1, 1,
			1, 2, 2, 2, 1,
			1, 2, 3, 2, 1,
			1, 2, 2, 2, 1,
			1, 1, 1, 1, 1), 2, [][]int{{5, 5}}},
		{"L shape drops collinear vertices", rastertest.Raster(3, 1,
			1, 0, 0,
			1, 0, 0,
			1, 1, 1), 1, [][]int{{7}}},
	}
	for _, tc := range tests {
		mp := polygon.Polygonize(tc.r)[tc.code]
		var got [][]int
		for _, p := range mp {
			var g []int
			for _, ring := range p {
				g = append(g, len(ring))
			}
			got = append(got, g)
		}
		if fmt.Sprint(got) != fmt.Sprint(tc.rings) {
			t.Errorf("%s: ring sizes %v, want %v; geometry %v", tc.name, got, tc.rings, mp)
		}
		rastertest.Check(t, tc.name, tc.r, polygon.Polygonize(tc.r))
	}
}

// FuzzPolygonize polygonizes arbitrary small rasters (the first byte picks
// the width) and checks the laws of rastertest.Check: area = count x res^2,
// orientations, simple rings, point in polygon, one polygon per component.
func FuzzPolygonize(f *testing.F) {
	f.Add([]byte{2, 1, 0, 0, 1})
	f.Add([]byte{3, 1, 1, 1, 1, 0, 1, 1, 1, 0})
	f.Add([]byte{4, 1, 1, 1, 1, 1, 0, 1, 1, 1, 1, 0, 1, 1, 1, 1, 1})
	f.Add([]byte{1, 5})
	f.Fuzz(func(t *testing.T, b []byte) {
		if len(b) < 2 || len(b) > 400 {
			return
		}
		cols := 1 + int(b[0])%20
		cells := b[1:]
		rows := len(cells) / cols
		if rows == 0 {
			return
		}
		r := grid.NewUint8(grid.Spec{West: -10, North: 5, Res: 0.25, Cols: cols, Rows: rows}, 0)
		for i := range r.Data {
			r.Data[i] = cells[i] % 5 // few codes, so that regions and saddles form
		}
		rastertest.Check(t, "fuzz", r, polygon.Polygonize(r))
	})
}

// BenchmarkPolygonizeOnly is the tracing alone on the same raster.
func BenchmarkPolygonizeOnly(b *testing.B) {
	r := rastertest.BenchRaster(b)
	b.ResetTimer()
	for b.Loop() {
		polygon.Polygonize(r)
	}
}
