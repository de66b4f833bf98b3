package geotiff

import (
	"bytes"
	"encoding/binary"
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"drygrid/bands"
	"drygrid/grid"
	"drygrid/internal/reftest"
)

type tiffrCase struct {
	Path    string    `json:"path"`
	Type    string    `json:"type"`
	Cols    int       `json:"cols"`
	Rows    int       `json:"rows"`
	Bands   int       `json:"bands,omitempty"`
	GT      []float64 `json:"gt"`
	EPSG    int       `json:"epsg,omitempty"`
	NoData  *float64  `json:"nodata"`
	Options []string  `json:"options"`
	Point   bool      `json:"point,omitempty"`
	Seed    int       `json:"seed"`
}

type tiffrRef struct {
	GT     []float64 `json:"gt"`
	NoData *float64  `json:"nodata"`
}

func tiffrMake(t *testing.T, cases []tiffrCase) map[string]tiffrRef {
	t.Helper()
	py := reftest.Python(t, "numpy", "osgeo.gdal")
	in, _ := json.Marshal(cases)
	var ref map[string]tiffrRef
	if err := json.Unmarshal(reftest.RunPython(t, py, "../testdata/tiffread_ref.py", in), &ref); err != nil {
		t.Fatal(err)
	}
	return ref
}

// TestReadTIFFAgainstGDAL: rasters written by GDAL 3.6's GTiff driver
// (testdata/tiffread_ref.py), stripped and tiled, uncompressed and DEFLATE
// with predictors 2 and 3, both byte orders, PixelIsPoint, a grid past the
// antimeridian; every value must equal GDAL's own readback, the grid GDAL's
// geotransform and the no data GDAL's.
func TestReadTIFFAgainstGDAL(t *testing.T) {
	dir := t.TempDir()
	zero, nd := 0.0, -9999.0
	gtB := []float64{10, 0.25, 0, 50, 0, -0.25}
	gtF := []float64{-20, 0.1, 0, 10, 0, -0.1}
	tile := []string{"TILED=YES", "BLOCKXSIZE=16", "BLOCKYSIZE=16"}
	with := func(a []string, b ...string) []string { return append(append([]string{}, a...), b...) }
	cases := []tiffrCase{
		{Type: "Byte", Cols: 37, Rows: 23, GT: gtB, NoData: &zero, Options: nil},
		{Type: "Byte", Cols: 37, Rows: 23, GT: gtB, NoData: &zero, Options: []string{"COMPRESS=DEFLATE", "PREDICTOR=2", "BLOCKYSIZE=5"}},
		{Type: "Byte", Cols: 37, Rows: 23, GT: gtB, NoData: &zero, Options: with(tile, "COMPRESS=DEFLATE", "PREDICTOR=2")},
		{Type: "Byte", Cols: 37, Rows: 23, GT: gtB, NoData: &zero, Options: with(tile, "ENDIANNESS=BIG")},
		{Type: "Byte", Cols: 37, Rows: 23, GT: gtB, Options: []string{"COMPRESS=DEFLATE"}, Point: true},
		{Type: "Byte", Cols: 40, Rows: 10, GT: []float64{170, 0.5, 0, 5, 0, -0.5}, NoData: &zero, Options: with(tile, "COMPRESS=DEFLATE")},
		{Type: "Float32", Cols: 70, Rows: 45, GT: gtF, NoData: &nd, Options: []string{"TILED=YES", "BLOCKXSIZE=32", "BLOCKYSIZE=32", "COMPRESS=DEFLATE", "PREDICTOR=3"}},
		{Type: "Float32", Cols: 70, Rows: 45, GT: gtF, NoData: &nd, Options: []string{"COMPRESS=DEFLATE", "PREDICTOR=3", "BLOCKYSIZE=7"}},
		{Type: "Float32", Cols: 70, Rows: 45, GT: gtF, NoData: &nd, Options: []string{"ENDIANNESS=BIG"}},
		{Type: "Float32", Cols: 70, Rows: 45, GT: gtF, NoData: &nd, Options: with(tile, "COMPRESS=DEFLATE", "PREDICTOR=2")},
		{Type: "Float32", Cols: 70, Rows: 45, GT: gtF, NoData: &nd, Options: with(tile, "COMPRESS=DEFLATE", "PREDICTOR=3", "ENDIANNESS=BIG")},
		{Type: "Float32", Cols: 3600, Rows: 1800, GT: []float64{-180, 0.1, 0, 90, 0, -0.1}, NoData: &nd, Options: []string{"TILED=YES", "COMPRESS=DEFLATE", "PREDICTOR=3"}},
	}
	for i := range cases {
		cases[i].Path = filepath.Join(dir, "c"+string(rune('a'+i))+".tif")
		cases[i].Seed = i + 1
	}
	ref := tiffrMake(t, cases)
	for _, c := range cases {
		r := ref[c.Path]
		bin, err := os.ReadFile(c.Path + ".bin")
		if err != nil {
			t.Fatal(err)
		}
		name := filepath.Base(c.Path) + " " + c.Type + " " + strings.Join(c.Options, ",")
		var spec grid.Spec
		var wantND float64
		switch c.Type {
		case "Byte":
			b, err := ReadBands(c.Path)
			if err != nil {
				t.Errorf("%s: %v", name, err)
				continue
			}
			if !bytes.Equal(b.Data, bin) {
				t.Errorf("%s: values differ from GDAL's readback", name)
			}
			spec, wantND = b.Spec, float64(b.NoData)
		case "Float32":
			f, err := ReadIndex(c.Path)
			if err != nil {
				t.Errorf("%s: %v", name, err)
				continue
			}
			for i, v := range f.Data {
				if math.Float32bits(v) != binary.LittleEndian.Uint32(bin[4*i:]) {
					t.Errorf("%s: cell %d %v, GDAL %v", name, i, v, math.Float32frombits(binary.LittleEndian.Uint32(bin[4*i:])))
					break
				}
			}
			spec, wantND = f.Spec, float64(f.NoData)
		}
		gt := spec.GeoTransform()
		for k := range gt {
			if math.Abs(gt[k]-r.GT[k]) > 1e-12 {
				t.Errorf("%s: geotransform %v, GDAL %v", name, gt, r.GT)
				break
			}
		}
		if spec.Cols != c.Cols || spec.Rows != c.Rows {
			t.Errorf("%s: %d x %d cells, want %d x %d", name, spec.Cols, spec.Rows, c.Cols, c.Rows)
		}
		if r.NoData != nil && *r.NoData != wantND {
			t.Errorf("%s: no data %v, GDAL %v", name, wantND, *r.NoData)
		}
	}
	// The global 0.1 deg raster gives the very spec grid.Global makes.
	f, err := ReadIndex(cases[len(cases)-1].Path)
	if g, _ := grid.Global(0.1); err != nil || f.Spec != g {
		t.Errorf("global raster spec %+v (%v), want %+v", f.Spec, err, g)
	}
}

// TestReadTIFFRefusals: rasters GDAL writes that the reader must refuse,
// with messages naming the file and the reason.
func TestReadTIFFRefusals(t *testing.T) {
	dir := t.TempDir()
	gt := []float64{10, 0.25, 0, 50, 0, -0.25}
	cases := []tiffrCase{
		{Type: "Byte", Cols: 8, Rows: 8, GT: []float64{1e6, 1000, 0, 6e6, 0, -1000}, EPSG: 3857},
		{Type: "Int16", Cols: 8, Rows: 8, GT: gt},
		{Type: "Byte", Cols: 8, Rows: 8, GT: gt, Bands: 3},
		{Type: "Byte", Cols: 8, Rows: 8, GT: gt, Options: []string{"COMPRESS=LZW"}},
		{Type: "Float32", Cols: 8, Rows: 8, GT: gt},
		{Type: "Byte", Cols: 8, Rows: 8, GT: []float64{10, 0.25, 0, 50, 0, -0.5}},
	}
	want := []string{
		"projected CRS EPSG:3857: want EPSG:4326 longitude-latitude",
		"samples are Int16, want UInt8 (band codes)",
		"3 samples per pixel: want a single-band raster",
		"compression 5 is not supported (only none 1 and DEFLATE 8/32946)",
		"samples are Float32, want UInt8 (band codes)",
		"pixel scale 0.25 x 0.5: want equal positive cell sizes",
	}
	for i := range cases {
		cases[i].Path = filepath.Join(dir, "bad"+string(rune('a'+i))+".tif")
	}
	tiffrMake(t, cases)
	for i, c := range cases {
		_, err := ReadBands(c.Path)
		w := "geotiff " + c.Path + ": " + want[i]
		if err == nil || err.Error() != w {
			t.Errorf("case %d: %v\nwant %s", i, err, w)
		}
	}
	if _, err := ReadIndex(cases[3].Path); err == nil || !strings.HasSuffix(err.Error(), "samples are UInt8, want Float32 (index z)") {
		t.Errorf("index from a band raster: %v", err)
	}
	if _, err := ReadBands(filepath.Join(dir, "none.tif")); err == nil || !strings.Contains(err.Error(), "no such file") {
		t.Errorf("missing file: %v", err)
	}
}

func tiffrTestRasters() (*grid.Uint8, *grid.Float32) {
	s, _ := grid.NewSpec(-30, -20, 45.5, 33, 0.25)
	rng := rand.New(rand.NewPCG(5, 5))
	b := grid.NewUint8(s, 0)
	f := grid.NewFloat32(s, grid.NoDataIndex)
	for i := range b.Data {
		if rng.IntN(9) > 0 {
			b.Data[i] = uint8(1 + rng.IntN(9))
			f.Data[i] = float32(rng.NormFloat64())
		}
	}
	return b, f
}

// TestReadTIFFOwnWriter: drygrid's own GeoTIFF writer (EncodeIndex and
// EncodeBands: tiled, DEFLATE, predictors 2 and 3, COG overviews)
// round-trips exactly;
// its conformance is checked against GDAL in geotiff_test.go.
func TestReadTIFFOwnWriter(t *testing.T) {
	b, f := tiffrTestRasters()
	for _, opt := range []Options{DefaultOptions(), {TileSize: 64}} {
		var bb, fb bytes.Buffer
		if err := EncodeBands(&bb, b, bands.Default(), opt); err != nil {
			t.Fatal(err)
		}
		if err := EncodeIndex(&fb, f, opt); err != nil {
			t.Fatal(err)
		}
		b2, err := DecodeBands("bands.tif", bb.Bytes())
		if err != nil {
			t.Fatal(err)
		}
		f2, err := DecodeIndex("index.tif", fb.Bytes())
		if err != nil {
			t.Fatal(err)
		}
		if b2.Spec != b.Spec || !bytes.Equal(b2.Data, b.Data) || b2.NoData != 0 {
			t.Errorf("bands: spec %+v vs %+v, equal data %v", b2.Spec, b.Spec, bytes.Equal(b2.Data, b.Data))
		}
		if f2.Spec != f.Spec || f2.NoData != grid.NoDataIndex {
			t.Errorf("index: spec %+v vs %+v, nodata %v", f2.Spec, f.Spec, f2.NoData)
		}
		for i := range f.Data {
			if f.Data[i] != f2.Data[i] {
				t.Fatalf("index cell %d: %v, wrote %v", i, f2.Data[i], f.Data[i])
			}
		}
	}
}

func FuzzReadTIFF(f *testing.F) {
	b, fl := tiffrTestRasters()
	small := &grid.Uint8{Spec: grid.Spec{West: 0, North: 10, Res: 1, Cols: 5, Rows: 3}, Data: make([]uint8, 15)}
	for i := range small.Data {
		small.Data[i] = uint8(i % 10)
	}
	for _, opt := range []Options{{TileSize: 16}, {TileSize: 16, Overviews: true}} {
		var bb, fb bytes.Buffer
		if EncodeBands(&bb, small, bands.Default(), opt) == nil {
			f.Add(bb.Bytes())
		}
		_ = b
		sf := &grid.Float32{Spec: small.Spec, Data: fl.Data[:15], NoData: grid.NoDataIndex}
		if EncodeIndex(&fb, sf, opt) == nil {
			f.Add(fb.Bytes())
		}
	}
	f.Add([]byte("II*\x00\x08\x00\x00\x00\x00\x00"))
	f.Add([]byte("MM\x00*\x00\x00\x00\x08\x00\x01\x01\x00\x00\x04\x00\x00\x00\x01\xff\xff\xff\xff"))
	f.Fuzz(func(t *testing.T, data []byte) {
		if r, err := DecodeBands("fuzz", data); err == nil && len(r.Data) != r.Spec.Len() {
			t.Fatalf("bands: %d cells for %s", len(r.Data), r.Spec)
		}
		if r, err := DecodeIndex("fuzz", data); err == nil && len(r.Data) != r.Spec.Len() {
			t.Fatalf("index: %d cells for %s", len(r.Data), r.Spec)
		}
	})
}
