package geojson

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"testing"

	"drygrid/bands"
	"drygrid/grid"
	"drygrid/internal/rastertest"
	"drygrid/internal/reftest"
	"drygrid/polygon"

	"github.com/paulmach/orb/planar"
)

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
	for _, c := range rastertest.RandomCases(2, 300) {
		if !hasValidCodes(c.R) {
			continue
		}
		cases = append(cases, polyFCOf(t, c.Name, c.R, Options{}))
	}
	for _, c := range rastertest.AntimeridianCases() {
		cases = append(cases, polyFCOf(t, c.Name, c.R, Options{}))
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
	cases := rastertest.RandomCases(3, 200)
	var in []rasterIn
	for _, c := range cases {
		d := make([]int, len(c.R.Data))
		for i, v := range c.R.Data {
			d[i] = int(v)
		}
		s := c.R.Spec
		in = append(in, rasterIn{c.Name, s.Cols, s.Rows, s.West, s.North, s.Res, int(c.R.NoData), d})
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
		polys := polygon.Polygonize(c.R)
		if len(polys) != len(ref[k]) {
			t.Errorf("%s: %d codes polygonized, GDAL %d", c.Name, len(polys), len(ref[k]))
		}
		for code, mp := range polys {
			g, ok := ref[k][fmt.Sprint(code)]
			if !ok {
				t.Errorf("%s: code %d missing in GDAL's result", c.Name, code)
				continue
			}
			var area float64
			for _, p := range mp {
				area += planar.Area(p) // shoelace about the first vertex, as OGR does
			}
			if len(mp) != g.N || math.Abs(area-g.Area) > 1e-9*g.Area {
				t.Errorf("%s: code %d: %d polygons of %.12g deg2, GDAL %d of %.12g", c.Name, code, len(mp), area, g.N, g.Area)
			}
		}
	}
}
