package geojson

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"testing"

	"drygrid/bands"
	"drygrid/grid"
	"drygrid/internal/reftest"
	"drygrid/polygon"

	"github.com/paulmach/orb/planar"
)

// TestPolygonizeProperties runs the Go-side laws (polyCheck) over 800 random
// rasters of every kind the issue names.
func TestPolygonizeProperties(t *testing.T) {
	for _, c := range polyRandomCases(1, 800) {
		polyCheck(t, c.name, c.r, polygon.Polygonize(c.r))
	}
}

func polyRaster(cols int, res float64, cells ...uint8) *grid.Uint8 {
	sp := grid.Spec{West: 0, North: float64(len(cells)/cols) * res, Res: res, Cols: cols, Rows: len(cells) / cols}
	r := grid.NewUint8(sp, 0)
	copy(r.Data, cells)
	return r
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
		{"diagonal pair: two squares touching at a point", polyRaster(2, 1, 1, 0, 0, 1), 1, [][]int{{5}, {5}}},
		{"checkerboard 2x2 of two codes, code 2", polyRaster(2, 1, 1, 2, 2, 1), 2, [][]int{{5}, {5}}},
		// a C whose tips touch diagonally: the pinched cell is a hole touching the shell at a point
		{"hole touching its shell at a corner", polyRaster(3, 1,
			1, 1, 1,
			1, 0, 1,
			1, 1, 0), 1, [][]int{{7, 5}}},
		// two holes touching diagonally inside one shell: two holes, not one self-touching ring
		{"two holes touching at a corner", polyRaster(4, 1,
			1, 1, 1, 1,
			1, 0, 1, 1,
			1, 1, 0, 1,
			1, 1, 1, 1), 1, [][]int{{5, 5, 5}}},
		{"holes in holes: code 1 ring", polyRaster(5, 1,
			1, 1, 1, 1, 1,
			1, 2, 2, 2, 1,
			1, 2, 3, 2, 1,
			1, 2, 2, 2, 1,
			1, 1, 1, 1, 1), 1, [][]int{{5, 5}}},
		{"holes in holes: code 2 ring", polyRaster(5, 1,
			1, 1, 1, 1, 1,
			1, 2, 2, 2, 1,
			1, 2, 3, 2, 1,
			1, 2, 2, 2, 1,
			1, 1, 1, 1, 1), 2, [][]int{{5, 5}}},
		{"L shape drops collinear vertices", polyRaster(3, 1,
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
		polyCheck(t, tc.name, tc.r, polygon.Polygonize(tc.r))
	}
}

// polyFC is a band raster's GeoJSON as written, with what the reference
// script needs to judge it.
type polyFC struct {
	Name       string          `json:"name"`
	Res        float64         `json:"res"`
	Counts     map[string]int  `json:"counts"`
	FC         json.RawMessage `json:"fc"`
	Simplified bool            `json:"simplified"`
	FullArea   float64         `json:"full_area"` // > 0: no no-data cells, bands must tile this area
}

func polyFCOf(t testing.TB, name string, r *grid.Uint8, opt Options) polyFC {
	var b bytes.Buffer
	if err := EncodeBands(&b, r, bands.Default(), opt); err != nil {
		t.Fatalf("%s: %v", name, err)
	}
	counts := map[string]int{}
	for _, c := range r.Data {
		if c != r.NoData {
			counts[fmt.Sprint(c)]++
		}
	}
	full := 0.0
	if n := len(r.Data); n > 0 && sumCounts(counts) == n {
		full = float64(n) * r.Spec.Res * r.Spec.Res
	}
	return polyFC{name, r.Spec.Res, counts, b.Bytes(), opt.SimplifyKm > 0, full}
}

func sumCounts(m map[string]int) int {
	n := 0
	for _, v := range m {
		n += v
	}
	return n
}

// TestPolygonizeShapely checks a few hundred random band layers with shapely
// 1.8 (python3-shapely) in one call of testdata/geojson_ref.py: every
// geometry valid (explain_validity == "Valid Geometry"), exteriors CCW and
// holes CW (LinearRing.is_ccw, RFC 7946 section 3.1.6), per band area =
// count x res^2 (shapely .area), no band overlapping another (pairwise
// intersection area 0) and no polygon overlapping another (union area =
// sum of areas), all longitudes in [-180, 180], no crs member.
func TestPolygonizeShapely(t *testing.T) {
	py := reftest.Python(t, "shapely", "shapely.validation")
	var cases []polyFC
	for _, c := range polyRandomCases(2, 300) {
		if !hasValidCodes(c.r) {
			continue
		}
		cases = append(cases, polyFCOf(t, c.name, c.r, Options{}))
	}
	for _, c := range polyAntimeridianCases() {
		cases = append(cases, polyFCOf(t, c.name, c.r, Options{}))
	}
	polyRunShapely(t, py, cases, len(cases))
}

func hasValidCodes(r *grid.Uint8) bool {
	for _, c := range r.Data {
		if c > 9 {
			return false
		}
	}
	return true
}

func polyRunShapely(t *testing.T, py string, cases []polyFC, want int) {
	t.Helper()
	in, err := json.Marshal(cases)
	if err != nil {
		t.Fatal(err)
	}
	out := reftest.RunPython(t, py, "../../testdata/geojson_ref.py", in, "shapely")
	var rep struct {
		Checked  int      `json:"checked"`
		Problems []string `json:"problems"`
	}
	if err := json.Unmarshal(out, &rep); err != nil {
		t.Fatalf("reference output: %v\n%s", err, out)
	}
	if rep.Checked != want {
		t.Errorf("shapely checked %d layers, want %d", rep.Checked, want)
	}
	for _, p := range rep.Problems {
		t.Error(p)
	}
}

// TestPolygonizeGDAL compares with GDAL 3.6's own polygonizer
// (python3-gdal gdal.Polygonize, default 4-connectedness, nodata masked) on
// the same rasters: per value the number of polygons and their summed area
// (OGR Geometry.GetArea, planar) must agree.
func TestPolygonizeGDAL(t *testing.T) {
	py := reftest.Python(t, "osgeo.gdal", "osgeo.ogr")
	type rasterIn struct {
		Name   string  `json:"name"`
		Cols   int     `json:"cols"`
		Rows   int     `json:"rows"`
		West   float64 `json:"west"`
		North  float64 `json:"north"`
		Res    float64 `json:"res"`
		NoData int     `json:"nodata"`
		Data   []int   `json:"data"`
	}
	cases := polyRandomCases(3, 200)
	var in []rasterIn
	for _, c := range cases {
		d := make([]int, len(c.r.Data))
		for i, v := range c.r.Data {
			d[i] = int(v)
		}
		s := c.r.Spec
		in = append(in, rasterIn{c.name, s.Cols, s.Rows, s.West, s.North, s.Res, int(c.r.NoData), d})
	}
	b, _ := json.Marshal(in)
	out := reftest.RunPython(t, py, "../../testdata/geojson_ref.py", b, "gdal")
	var ref []map[string]struct {
		N    int     `json:"n"`
		Area float64 `json:"area"`
	}
	if err := json.Unmarshal(out, &ref); err != nil || len(ref) != len(cases) {
		t.Fatalf("reference output (%v): %d results for %d rasters", err, len(ref), len(cases))
	}
	for k, c := range cases {
		polys := polygon.Polygonize(c.r)
		if len(polys) != len(ref[k]) {
			t.Errorf("%s: %d codes polygonized, GDAL %d", c.name, len(polys), len(ref[k]))
		}
		for code, mp := range polys {
			g, ok := ref[k][fmt.Sprint(code)]
			if !ok {
				t.Errorf("%s: code %d missing in GDAL's result", c.name, code)
				continue
			}
			var area float64
			for _, p := range mp {
				area += planar.Area(p) // shoelace about the first vertex, as OGR does
			}
			if len(mp) != g.N || math.Abs(area-g.Area) > 1e-9*g.Area {
				t.Errorf("%s: code %d: %d polygons of %.12g deg2, GDAL %d of %.12g", c.name, code, len(mp), area, g.N, g.Area)
			}
		}
	}
}

// FuzzPolygonize polygonizes arbitrary small rasters (the first byte picks
// the width) and checks the laws of polyCheck: area = count x res^2,
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
		polyCheck(t, "fuzz", r, polygon.Polygonize(r))
	})
}
