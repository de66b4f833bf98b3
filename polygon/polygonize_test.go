package polygon_test

import (
	"drygrid/grid"
	"drygrid/internal/rastertest"
	"drygrid/polygon"
	"fmt"
	"reflect"
	"testing"

	"github.com/paulmach/orb"
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

// feedBlocks feeds r to a polygon.Tracer in blocks whose sizes cycle
// through sizes (each 1 + byte % rows). The grids of the fuzz targets do
// not cross 180, so the layer is Polygonize's.
func feedBlocks(t *testing.T, r *grid.Uint8, km float64, sizes []byte) map[uint8]orb.MultiPolygon {
	t.Helper()
	tr, err := polygon.NewTracer(r.Spec, r.NoData, km)
	if err != nil {
		t.Fatal(err)
	}
	cols, rows := r.Spec.Cols, r.Spec.Rows
	for row, k := 0, 0; row < rows; k++ {
		n := rows
		if len(sizes) > 0 {
			n = 1 + int(sizes[k%len(sizes)])%rows
		}
		end := min(row+n, rows)
		if err := tr.Rows(row, r.Data[row*cols:end*cols]); err != nil {
			t.Fatal(err)
		}
		row = end
	}
	out, err := tr.Finish()
	if err != nil {
		t.Fatal(err)
	}
	return out
}

// FuzzPolygonize polygonizes arbitrary small rasters (the first byte picks
// the width, the second the block sizes the rows are fed in) and checks
// the laws of rastertest.Check: area = count x res^2, orientations, simple
// rings, point in polygon, one polygon per component; and that the layer
// fed in blocks equals the whole raster's.
func FuzzPolygonize(f *testing.F) {
	f.Add([]byte{2, 1, 1, 0, 0, 1})
	f.Add([]byte{3, 2, 1, 1, 1, 1, 0, 1, 1, 1, 0})
	f.Add([]byte{4, 7, 1, 1, 1, 1, 1, 0, 1, 1, 1, 1, 0, 1, 1, 1, 1, 1})
	f.Add([]byte{1, 0, 5})
	f.Fuzz(func(t *testing.T, b []byte) {
		if len(b) < 3 || len(b) > 400 {
			return
		}
		cols := 1 + int(b[0])%20
		sizes := []byte{b[1], b[1] / 3, b[1] / 7}
		cells := b[2:]
		rows := len(cells) / cols
		if rows == 0 {
			return
		}
		r := grid.NewUint8(grid.Spec{West: -10, North: 5, Res: 0.25, Cols: cols, Rows: rows}, 0)
		for i := range r.Data {
			r.Data[i] = cells[i] % 5 // few codes, so that regions and saddles form
		}
		whole := polygon.Polygonize(r)
		rastertest.Check(t, "fuzz", r, whole)
		if got := feedBlocks(t, r, 0, sizes); !reflect.DeepEqual(got, whole) {
			t.Fatalf("blocks %v: another layer than the whole raster's", sizes)
		}
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

// BenchmarkTracerStream0025 traces a smooth band field on the global
// 0.025 deg grid (14400 x 7200, 104 M cells) fed in blocks of 256 rows,
// each made as it is fed: the raster is never held. B/op (every byte
// allocated, the polygons included) must stay far below the cell count;
// the field alone takes part of the time.
func BenchmarkTracerStream0025(b *testing.B) {
	s, err := grid.Global(0.025)
	if err != nil {
		b.Fatal(err)
	}
	field := rastertest.NewBenchField(s)
	block := make([]uint8, 256*s.Cols)
	b.ResetTimer()
	for b.Loop() {
		t, err := polygon.NewTracer(s, 0, 0)
		if err != nil {
			b.Fatal(err)
		}
		for row := 0; row < s.Rows; row += 256 {
			n := min(256, s.Rows-row)
			field.Rows(row, block[:n*s.Cols])
			if err := t.Rows(row, block[:n*s.Cols]); err != nil {
				b.Fatal(err)
			}
		}
		polys, err := t.Finish()
		if err != nil {
			b.Fatal(err)
		}
		pts := 0
		for _, mp := range polys {
			for _, p := range mp {
				for _, r := range p {
					pts += len(r)
				}
			}
		}
		b.ReportMetric(float64(pts), "positions")
	}
}
