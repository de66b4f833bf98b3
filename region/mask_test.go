package region

import (
	"encoding/json"
	"errors"
	"math"
	"strings"
	"testing"

	"drygrid/grid"
	"drygrid/internal/reftest"

	"github.com/paulmach/orb"
)

// maskFeatures are the test mask: a concave polygon with a hole, a
// sub-cell island and a triangle, three features that do not overlap.
func maskFeatures() []orb.Polygon {
	return []orb.Polygon{
		{
			{{-8.5, -8.2}, {7.7, -8.9}, {8.3, 7.1}, {2.2, 6.4}, {3.1, -3.3}, {-4.6, -2.7}, {-3.3, 8.8}, {-9.1, 6.2}, {-8.5, -8.2}},
			{{-7.2, -6.6}, {-6.1, 3.3}, {-5.2, -6.1}, {-7.2, -6.6}},
		},
		{{{-1.45, 3.2}, {-1.1, 3.3}, {-1.3, 3.7}, {-1.45, 3.2}}},
		{{{4.3, 7.4}, {9.6, 8.1}, {5.2, 9.7}, {4.3, 7.4}}},
	}
}

func maskRegions(t testing.TB, ps []orb.Polygon) []Region {
	var rs []Region
	for i, p := range ps {
		rs = append(rs, Region{Key: string(rune('a' + i)), Index: i, Geom: mustNorm(t, p)})
	}
	return rs
}

// maskShares runs the mask over every row of s.
func maskShares(t testing.TB, s grid.Spec, rs []Region) []float64 {
	t.Helper()
	m, err := NewMask(s, rs)
	if err != nil {
		t.Fatal(err)
	}
	out := make([]float64, s.Len())
	for r := range s.Rows {
		m.Row(r, out[r*s.Cols:(r+1)*s.Cols])
	}
	return out
}

// TestMaskVsShapely: the mask's share of each cell against shapely 1.8's
// exact planar intersection of each feature with the cell box in
// longitude-latitude, measured on the WGS84 ellipsoid by pyproj 3.4's
// geodesic area with edges densified every 0.002 degrees along lon-lat
// lines (testdata/regions_ref.py "shares", as TestCoverageVsShapely), the
// features' shares added (they do not overlap). Cells the reference does
// not name must be outside (share 0, no data).
func TestMaskVsShapely(t *testing.T) {
	py := reftest.Python(t, "shapely", "pyproj")
	s, err := grid.NewSpec(-10, -10, 10, 10, 1)
	if err != nil {
		t.Fatal(err)
	}
	feats := maskFeatures()
	want := make([]float64, s.Len())
	for _, p := range feats {
		ref := refShares(t, py, s, p)
		for _, r := range ref {
			want[int(r[0])] += r[1]
		}
	}
	got := maskShares(t, s, maskRegions(t, feats))
	edge, inside := 0, 0
	for cell := range got {
		w := math.Min(want[cell], 1)
		if math.Abs(got[cell]-w) > 1e-9 {
			t.Errorf("cell %d (col %d row %d) share %.12f, shapely %.12f", cell, cell%s.Cols, cell/s.Cols, got[cell], w)
		}
		if got[cell] > 0 && got[cell] < 1 {
			edge++
		}
		if got[cell] > 0 {
			inside++
		}
	}
	if edge < 50 || inside < 150 {
		t.Errorf("%d edge cells, %d inside: the case checks too little", edge, inside)
	}
}

// TestMaskIsCoverage: each feature's shares are Coverage's, bit for bit
// (the mask and zonal statistics agree on every cell), here across the
// antimeridian too (a grid 170..190 and a feature split at 180).
func TestMaskIsCoverage(t *testing.T) {
	for _, c := range []struct {
		w, s, e, n, res float64
		feats           []orb.Polygon
	}{
		{-10, -10, 10, 10, 0.25, maskFeatures()},
		{170, -20, -170, 0, 0.5, []orb.Polygon{
			{circle(178, -10, 5, 61, false)},
			rect(-180, -15.3, -172.2, -3.1),
		}},
	} {
		s, err := grid.NewSpec(c.w, c.s, c.e, c.n, c.res)
		if err != nil {
			t.Fatal(err)
		}
		rs := maskRegions(t, c.feats)
		want := make([]float64, s.Len())
		for _, r := range rs {
			for _, w := range Coverage(s, r.Geom) {
				want[w.Cell] += w.Frac
			}
		}
		got := maskShares(t, s, rs)
		n := 0
		for cell := range got {
			if w := math.Min(want[cell], 1); got[cell] != w {
				t.Errorf("grid %s cell %d: mask %v, coverage %v", s, cell, got[cell], w)
			}
			if got[cell] > 0 {
				n++
			}
		}
		if n == 0 {
			t.Errorf("grid %s: nothing inside", s)
		}
	}
}

// TestMaskOutside: a mask that reaches no cell of the grid, or holds no
// polygon, is refused.
func TestMaskOutside(t *testing.T) {
	s, _ := grid.NewSpec(-10, -10, 10, 10, 1)
	far := maskRegions(t, []orb.Polygon{rect(40, 10, 50, 20)})
	if _, err := NewMask(s, far); !errors.Is(err, ErrMaskOutside) {
		t.Errorf("mask far away: %v, want ErrMaskOutside", err)
	}
	if _, err := NewMask(s, nil); err == nil || !strings.Contains(err.Error(), "no polygon") {
		t.Errorf("empty mask: %v", err)
	}
}

// TestParseMask: a mask's features need no name and may share one; the
// regions reader's checks apply, with errors saying "mask".
func TestParseMask(t *testing.T) {
	sq := `{"type":"Polygon","coordinates":[[[0,0],[1,0],[1,1],[0,1],[0,0]]]}`
	fc := `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"featurecla":"Land"},"geometry":` + sq +
		`},{"type":"Feature","properties":{"name":"x"},"geometry":` + sq + `},{"type":"Feature","properties":{"name":"x"},"geometry":` + sq + `}]}`
	rs, err := ParseMask("land.geojson", []byte(fc))
	if err != nil || len(rs) != 3 || rs[0].Key != "#0" || rs[1].Key != "x" {
		t.Fatalf("ParseMask: %v %+v", err, rs)
	}
	bad := strings.Replace(fc, "[0,1],[0,0]]]", "[0,1]]]", 1)
	_, err = ParseMask("land.geojson", []byte(bad))
	if err == nil || !strings.HasPrefix(err.Error(), `mask land.geojson feature 0 (key "#0"): ring 0 is not closed`) {
		t.Errorf("unclosed ring: %v", err)
	}
	_, err = ParseMask("land.geojson", []byte(`{"type":"FeatureCollection","features":[]}`))
	if err == nil || err.Error() != "mask land.geojson: the FeatureCollection has no features" {
		t.Errorf("no features: %v", err)
	}
	var se *json.SyntaxError
	if _, err = ParseMask("land.geojson", []byte(`{"type":`)); !errors.As(err, &se) {
		t.Errorf("syntax error not wrapped: %v", err)
	}
}
