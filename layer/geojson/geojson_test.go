package geojson

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"runtime"
	"strconv"
	"strings"
	"testing"

	"drygrid/bands"
	"drygrid/grid"
	"drygrid/internal/rastertest"
	"drygrid/internal/reftest"
	"drygrid/polygon"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"
)

// TestPolygonizeAntimeridian: RFC 7946 section 3.1.9 asks that a geometry
// crossing the antimeridian be cut in two with every longitude in
// [-180, 180]. Areas per code stay count x res^2 and every cell centre,
// shifted into [-180, 180], lies in the multipolygon of its own code.
func TestPolygonizeAntimeridian(t *testing.T) {
	for _, c := range rastertest.AntimeridianCases() {
		sp := c.R.Spec
		if !sp.CrossesAntimeridian() {
			t.Fatalf("%s: grid %s should cross 180", c.Name, sp)
		}
		polys := polygon.PolygonizeRFC7946(c.R)
		count := map[uint8]int{}
		for _, v := range c.R.Data {
			if v != 0 {
				count[v]++
			}
		}
		sawEast := false
		for code, mp := range polys {
			area := 0.0
			for _, p := range mp {
				for _, ring := range p {
					for _, q := range ring {
						if q[0] < -180 || q[0] > 180 {
							t.Fatalf("%s: longitude %v outside [-180, 180]", c.Name, q[0])
						}
						sawEast = sawEast || q[0] < 0
					}
				}
				area += planar.Area(p)
			}
			want := float64(count[code]) * sp.Res * sp.Res
			if math.Abs(area-want) > 1e-9*want {
				t.Errorf("%s: code %d area %.12g, want %.12g", c.Name, code, area, want)
			}
		}
		if !sawEast {
			t.Errorf("%s: no part east of 180 (shifted to negative longitudes)", c.Name)
		}
		for row := 0; row < sp.Rows; row++ {
			for col := 0; col < sp.Cols; col++ {
				lon, lat := sp.Center(col, row)
				if math.Abs(lon-180) < sp.Res/2 {
					continue // a cell cut by 180: its centre may lie on the cut
				}
				lon = grid.WrapLon(lon)
				v := c.R.Data[sp.Index(col, row)]
				for code, mp := range polys {
					if in := planar.MultiPolygonContains(mp, orb.Point{lon, lat}); in != (code == v) {
						t.Errorf("%s: centre of (%d,%d) code %d: in code %d = %v", c.Name, col, row, v, code, in)
					}
				}
			}
		}
	}
}

// TestGeoJSONDecimals: a cell edge is West + k*Res, so the decimals of Res,
// West and North suffice (decimal arithmetic, worked by hand). A
// resolution with no short decimal form (1/12) gets drygrid's cap of 9
// decimals: our own rule (1e-9 deg is about 0.1 mm on the ground), not a
// standard's.
func TestGeoJSONDecimals(t *testing.T) {
	for _, tc := range []struct {
		west, north, res float64
		want             int
	}{
		{-180, 90, 0.1, 1}, {-180, 90, 0.25, 2}, {-180, 90, 0.01, 2}, {-180, 90, 1, 0},
		{10.5, 50, 1, 1}, {0, 0, 0.05, 2}, {-180, 90, 1.0 / 12, 9}, {0.3, 0.7, 0.1, 1},
	} {
		if got := polygon.GeoJSONDecimals(grid.Spec{West: tc.west, North: tc.north, Res: tc.res, Cols: 1, Rows: 1}); got != tc.want {
			t.Errorf("res %g west %g: %d decimals, want %d", tc.res, tc.west, got, tc.want)
		}
	}
}

var gjNumber = regexp.MustCompile(`-?\d+(\.\d+)?`)

// TestWriteBandsGeoJSONFormat checks the text against RFC 7946: a
// FeatureCollection with bbox (section 5), no crs member (section 4), the
// foreign member (section 6.1), the properties of docs/design.md ("Formats
// written": code, key, label, color, drought, area_km2), and coordinates
// with no more decimals than the grid needs and no float noise
// (0.30000000000000004).
func TestWriteBandsGeoJSONFormat(t *testing.T) {
	sp, err := grid.NewSpec(0.3, 0.1, 0.9, 0.7, 0.1) // edges 0.3..0.9: float noise if computed naively
	if err != nil {
		t.Fatal(err)
	}
	r := grid.NewUint8(sp, 0)
	for i := range r.Data {
		r.Data[i] = uint8(1 + i%3)
	}
	r.Data[0] = 0
	var b bytes.Buffer
	opt := Options{Caution: "test caution", Params: map[string]any{"power": 2, "neighbors": 12}}
	if err := EncodeBands(&b, r, bands.Default(), opt); err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Type    string            `json:"type"`
		BBox    []float64         `json:"bbox"`
		CRS     any               `json:"crs"`
		Drygrid map[string]any    `json:"drygrid"`
		Feats   []json.RawMessage `json:"features"`
	}
	if err := json.Unmarshal(b.Bytes(), &doc); err != nil {
		t.Fatalf("not JSON: %v", err)
	}
	if doc.Type != "FeatureCollection" || doc.CRS != nil || len(doc.Feats) != 3 {
		t.Fatalf("type %q crs %v features %d", doc.Type, doc.CRS, len(doc.Feats))
	}
	if want := []float64{0.3, 0.1, 0.9, 0.7}; !equalFloats(doc.BBox, want) {
		t.Errorf("bbox %v, want %v", doc.BBox, want)
	}
	if doc.Drygrid["caution"] != "test caution" || doc.Drygrid["generated_by"] != "drygrid" {
		t.Errorf("foreign member %v", doc.Drygrid)
	}
	if p, _ := doc.Drygrid["params"].(map[string]any); p["power"] != 2.0 || p["neighbors"] != 12.0 {
		t.Errorf("params %v", doc.Drygrid["params"])
	}
	text := b.String()
	geom := text[strings.Index(text, `"features"`):]
	for _, m := range gjNumber.FindAllString(geom, -1) {
		if i := strings.IndexByte(m, '.'); i >= 0 && len(m)-i-1 > 2 {
			t.Fatalf("number %s has more decimals than needed", m)
		}
	}
	for k, raw := range doc.Feats {
		var f struct {
			Props map[string]any `json:"properties"`
		}
		json.Unmarshal(raw, &f)
		band := bands.Default().Bands[k]
		if f.Props["code"] != float64(band.Code) || f.Props["key"] != band.Key || f.Props["label"] != band.Label ||
			f.Props["color"] != band.Color || f.Props["drought"] != band.Drought {
			t.Errorf("feature %d properties %v, want band %+v", k, f.Props, band)
		}
	}
	// Deterministic: a second write is byte-identical.
	var b2 bytes.Buffer
	EncodeBands(&b2, r, bands.Default(), opt)
	if !bytes.Equal(b.Bytes(), b2.Bytes()) {
		t.Error("two writes differ")
	}
}

func equalFloats(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// TestWriteBandsGeoJSONEarthArea: one band over a global 1-degree grid has
// area_km2 = the WGS84 ellipsoid's surface area, 510,065,621.7 km^2 (the
// published constant docs/design.md, "Checked against", lists: NIMA
// TR8350.2, 3rd ed., 2000, table 3.5, from memory, as in grid's
// area_test.go; to 0.1 km^2).
func TestWriteBandsGeoJSONEarthArea(t *testing.T) {
	sp, _ := grid.Global(1)
	r := grid.NewUint8(sp, 0)
	for i := range r.Data {
		r.Data[i] = 5
	}
	var b bytes.Buffer
	if err := EncodeBands(&b, r, bands.Default(), Options{}); err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Feats []struct {
			Props map[string]any `json:"properties"`
		} `json:"features"`
	}
	json.Unmarshal(b.Bytes(), &doc)
	if len(doc.Feats) != 1 {
		t.Fatalf("%d features", len(doc.Feats))
	}
	if a := doc.Feats[0].Props["area_km2"].(float64); math.Abs(a-510065621.7) > 0.1 {
		t.Errorf("area_km2 %.2f, want 510065621.7", a)
	}
}

// TestWriteBandsGeoJSONErrors: bad input is an error with context, no panic.
func TestWriteBandsGeoJSONErrors(t *testing.T) {
	sp := grid.Spec{West: 0, North: 1, Res: 1, Cols: 2, Rows: 1}
	r := grid.NewUint8(sp, 0)
	r.Data[0] = 42
	var b bytes.Buffer
	if err := EncodeBands(&b, r, bands.Default(), Options{}); err == nil || !strings.Contains(err.Error(), "code 42") {
		t.Errorf("unknown code: err %v", err)
	}
	r.Data = r.Data[:1]
	if err := EncodeBands(&b, r, bands.Default(), Options{}); err == nil {
		t.Error("short raster: no error")
	}
	r.Data = []uint8{1, 2}
	if err := EncodeBands(&b, r, bands.Default(), Options{SimplifyKm: math.NaN()}); err == nil {
		t.Error("NaN tolerance: no error")
	}
	if err := EncodeBands(&b, r, bands.Default(), Options{Params: map[string]any{"x": math.Inf(1)}}); err == nil {
		t.Error("unencodable parameter: no error")
	}
}

// ogrFeatureCount runs GDAL's ogrinfo on a file and returns the "Feature
// Count" it reports.
func ogrFeatureCount(t *testing.T, path string) (int, string) {
	t.Helper()
	ogrinfo := reftest.Tool(t, "ogrinfo")
	out, err := exec.Command(ogrinfo, "-ro", "-so", "-al", path).CombinedOutput()
	if err != nil {
		t.Fatalf("ogrinfo %s: %v\n%s", path, err, out)
	}
	m := regexp.MustCompile(`Feature Count: (\d+)`).FindSubmatch(out)
	if m == nil {
		t.Fatalf("ogrinfo %s: no feature count\n%s", path, out)
	}
	n, _ := strconv.Atoi(string(m[1]))
	return n, string(out)
}

// TestBandsGeoJSONOgrinfo: GDAL's ogrinfo (gdal-bin 3.6) reads the band
// layer, finds one MultiPolygon feature per band present, and reports the
// bbox as the layer extent.
func TestBandsGeoJSONOgrinfo(t *testing.T) {
	c := rastertest.RandomCases(5, 8)[7] // smooth blobs
	path := filepath.Join(t.TempDir(), "bands.geojson")
	if err := gjWriteTestFile(path, c.R); err != nil {
		t.Fatal(err)
	}
	n, out := ogrFeatureCount(t, path)
	if want := len(polygon.Polygonize(c.R)); n != want {
		t.Errorf("ogrinfo feature count %d, want %d bands present", n, want)
	}
	if !strings.Contains(out, "Geometry: Multi Polygon") {
		t.Errorf("ogrinfo geometry type:\n%s", out)
	}
}

// gjWriteTestFile writes the band layer of r to path.
func gjWriteTestFile(path string, r *grid.Uint8) error {
	var b bytes.Buffer
	if err := EncodeBands(&b, r, bands.Default(), Options{}); err != nil {
		return err
	}
	return os.WriteFile(path, b.Bytes(), 0o644)
}

// TestStationsGeoJSON checks the station layer: a Point per station with the
// properties of docs/design.md (id, value, z, code, key, in_grid), null
// z/code/key where absent (RFC 8259 null),
// longitudes brought into [-180, 180] (RFC 7946 section 3.1.9), and GDAL's
// ogrinfo reading every feature.
func TestStationsGeoJSON(t *testing.T) {
	pts := []Station{
		{ID: "S-001", Lon: 12.5, Lat: 45.25, Value: -1.75, Z: -1.75, HasZ: true, Code: 2, InGrid: true},
		{ID: "S-002", Lon: 190, Lat: -10, Value: 35, InGrid: false},
		{ID: "S-003", Lon: -170, Lat: 0, Value: math.NaN(), Z: 0.1, HasZ: true, Code: 5, InGrid: true},
	}
	var b bytes.Buffer
	if err := EncodeStations(&b, pts, bands.Default(), Options{Params: map[string]any{"kind": "spi"}}); err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Type    string         `json:"type"`
		BBox    []float64      `json:"bbox"`
		Drygrid map[string]any `json:"drygrid"`
		Feats   []struct {
			Geom struct {
				Type   string    `json:"type"`
				Coords []float64 `json:"coordinates"`
			} `json:"geometry"`
			Props map[string]any `json:"properties"`
		} `json:"features"`
	}
	if err := json.Unmarshal(b.Bytes(), &doc); err != nil {
		t.Fatalf("not JSON: %v\n%s", err, b.String())
	}
	if doc.Type != "FeatureCollection" || len(doc.Feats) != 3 || doc.Drygrid["caution"] != Caution {
		t.Fatalf("doc %+v", doc)
	}
	want := []map[string]any{
		{"id": "S-001", "value": -1.75, "z": -1.75, "code": 2.0, "key": "very-dry", "in_grid": true},
		{"id": "S-002", "value": 35.0, "z": nil, "code": nil, "key": nil, "in_grid": false},
		{"id": "S-003", "value": nil, "z": 0.1, "code": 5.0, "key": "normal", "in_grid": true},
	}
	for k, f := range doc.Feats {
		if f.Geom.Type != "Point" {
			t.Errorf("feature %d: %s", k, f.Geom.Type)
		}
		for key, v := range want[k] {
			if got, ok := f.Props[key]; !ok || got != v {
				t.Errorf("feature %d: %s = %v, want %v", k, key, got, v)
			}
		}
	}
	if c := doc.Feats[1].Geom.Coords; c[0] != -170 || c[1] != -10 {
		t.Errorf("190E written as %v, want [-170, -10]", c)
	}
	if !equalFloats(doc.BBox, []float64{-170, -10, 12.5, 45.25}) {
		t.Errorf("bbox %v", doc.BBox)
	}
	path := filepath.Join(t.TempDir(), "stations.geojson")
	os.WriteFile(path, b.Bytes(), 0o644)
	if n, _ := ogrFeatureCount(t, path); n != 3 {
		t.Errorf("ogrinfo feature count %d, want 3", n)
	}
	bad := []Station{{ID: "X", Lon: math.NaN(), Lat: 0}}
	if err := EncodeStations(&b, bad, bands.Default(), Options{}); err == nil || !strings.Contains(err.Error(), `"X"`) {
		t.Errorf("NaN longitude: err %v", err)
	}
}

// TestBandsGeoJSONAntimeridianBBox: RFC 7946 section 5.2 writes the bbox of
// a geometry crossing the antimeridian with west > east; data in every
// longitude gets -180..180.
func TestBandsGeoJSONAntimeridianBBox(t *testing.T) {
	for _, tc := range []struct {
		sp   grid.Spec
		want []float64
	}{
		{grid.Spec{West: 170, North: 10, Res: 1, Cols: 20, Rows: 8}, []float64{170, 2, -170, 10}},
		{grid.Spec{West: 185 - 360, North: 10, Res: 0.5, Cols: 20, Rows: 8}, []float64{-175, 6, -165, 10}},
		{grid.Spec{West: -170, North: 10, Res: 1, Cols: 360, Rows: 2}, []float64{-180, 8, 180, 10}},
	} {
		r := grid.NewUint8(tc.sp, 0)
		for i := range r.Data {
			r.Data[i] = 5
		}
		var b bytes.Buffer
		if err := EncodeBands(&b, r, bands.Default(), Options{}); err != nil {
			t.Fatal(err)
		}
		var doc struct {
			BBox []float64 `json:"bbox"`
		}
		json.Unmarshal(b.Bytes(), &doc)
		if !equalFloats(doc.BBox, tc.want) {
			t.Errorf("grid %s: bbox %v, want %v", tc.sp, doc.BBox, tc.want)
		}
	}
}

// TestBandsGeoJSONDeterministic: output never depends on the number of cores
// (docs/design.md, "Command line"), so the bytes must be the same for any
// core count; map iteration order is the risk, so write each layer
// (exact and simplified, crossing 180 or not) under GOMAXPROCS 1 and 2.
func TestBandsGeoJSONDeterministic(t *testing.T) {
	cases := append(rastertest.AntimeridianCases(), rastertest.Case{Name: "smooth", R: rastertest.Smooth(4, 50, 40, 0.1, true)})
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(0))
	for _, c := range cases {
		for _, km := range []float64{0, 25} {
			var out [2][]byte
			for k := range out {
				runtime.GOMAXPROCS(k + 1)
				var b bytes.Buffer
				if err := EncodeBands(&b, c.R, bands.Default(), Options{SimplifyKm: km, Params: map[string]any{"b": 1, "a": 2}}); err != nil {
					t.Fatal(err)
				}
				out[k] = b.Bytes()
			}
			if !bytes.Equal(out[0], out[1]) {
				t.Errorf("%s km %g: output differs between GOMAXPROCS 1 and 2", c.Name, km)
			}
		}
	}
	if len(polygon.Polygonize(nil)) != 0 || len(polygon.PolygonizeRFC7946(&grid.Uint8{Spec: grid.Spec{Cols: 3, Rows: 3, Res: 1}})) != 0 {
		t.Error("unusable rasters should give no polygons")
	}
}
