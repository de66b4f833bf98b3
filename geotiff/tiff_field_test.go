package geotiff

import (
	"encoding/binary"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"testing"

	"drygrid/bands"
	"drygrid/grid"
	"drygrid/internal/reftest"
)

// tiffTestField is a deterministic smooth index field on spec: a sum of a
// few sines in SPI-like units (about -2.5 to 2.5) with the cells where a
// second smooth field is high set to no data (about 30 % of the globe), like
// an interpolated grid masked away from stations.
func tiffTestField(s grid.Spec) *grid.Float32 {
	r := grid.NewFloat32(s, grid.NoDataIndex)
	for row := 0; row < s.Rows; row++ {
		for col := 0; col < s.Cols; col++ {
			lon, lat := s.Center(col, row)
			x, y := lon*math.Pi/180, lat*math.Pi/180
			mask := math.Sin(3*x+0.5)*math.Cos(2*y) + 0.4*math.Sin(7*x-5*y+1)
			if mask > 0.55 {
				continue
			}
			v := 1.1*math.Sin(2*x+0.3)*math.Cos(3*y) + 0.7*math.Sin(5*x-4*y+1) +
				0.4*math.Cos(11*x+7*y) + 0.2*math.Sin(23*x-17*y+2)
			r.Data[s.Index(col, row)] = float32(v)
		}
	}
	return r
}

// tiffTestBands classifies a field with the default scheme.
func tiffTestBands(f *grid.Float32, s *bands.Scheme) *grid.Uint8 {
	b := grid.NewUint8(f.Spec, 0)
	for i, v := range f.Data {
		if v != f.NoData {
			b.Data[i] = s.Classify(float64(v))
		}
	}
	return b
}

// tiffRef is what testdata/tiff_ref.py reports GDAL sees.
type tiffRef struct {
	Driver         string            `json:"driver"`
	Size           [2]int            `json:"size"`
	Bands          int               `json:"bands"`
	Datatype       string            `json:"datatype"`
	Block          [2]int            `json:"block"`
	GeoTransform   [6]float64        `json:"geotransform"`
	NoData         *float64          `json:"nodata"`
	Metadata       map[string]string `json:"metadata"`
	ImageStructure map[string]string `json:"image_structure"`
	Categories     []string          `json:"categories"`
	EPSGAuto       *string           `json:"epsg_auto"`
	Authority      []*string         `json:"authority"`
	IsGeographic   bool              `json:"is_geographic"`
	ColorTable     [][4]int          `json:"colortable"`
	ColorInterp    string            `json:"color_interp"`
	Full           tiffRefCmp        `json:"full"`
	Overviews      []struct {
		tiffRefCmp
		Size         [2]int   `json:"size"`
		Factor       int      `json:"factor"`
		ExpectedSize [2]int   `json:"expected_size"`
		NoData       *float64 `json:"nodata"`
		Valid        int      `json:"valid"`
	} `json:"overviews"`
	COG struct {
		Warnings []string `json:"warnings"`
		Errors   []string `json:"errors"`
	} `json:"cog"`
}

type tiffRefCmp struct {
	Mismatches    int `json:"mismatches"`
	MaxULPs       int `json:"max_ulps"`
	NaNMismatches int `json:"nan_mismatches"`
}

// tiffRunRef writes the expected raster raw next to path and runs
// testdata/tiff_ref.py (GDAL 3.6 via python3-gdal, NumPy) on the file.
func tiffRunRef(t *testing.T, path string, idx *grid.Float32, bands *grid.Uint8) tiffRef {
	t.Helper()
	py := reftest.Python(t, "numpy", "osgeo.gdal", "osgeo_utils.samples.validate_cloud_optimized_geotiff")
	raw := filepath.Join(t.TempDir(), "expected.raw")
	var data []byte
	kind, nodata := "index", 0.0
	if idx != nil {
		data = make([]byte, 4*len(idx.Data))
		for i, v := range idx.Data {
			if v != v {
				v = idx.NoData // the writer stores NaN cells as no data
			}
			binary.LittleEndian.PutUint32(data[4*i:], math.Float32bits(v))
		}
		nodata = float64(idx.NoData)
	} else {
		kind, data, nodata = "bands", bands.Data, float64(bands.NoData)
	}
	if err := os.WriteFile(raw, data, 0o644); err != nil {
		t.Fatal(err)
	}
	out := reftest.RunPython(t, py, "../testdata/tiff_ref.py", nil, path, raw, kind, strconv.FormatFloat(nodata, 'g', -1, 64))
	var r tiffRef
	if err := json.Unmarshal(out, &r); err != nil {
		t.Fatalf("tiff_ref.py output: %v\n%s", err, out)
	}
	return r
}

// tiffCheckCommon asserts what both layers share: GDAL opens a one-band
// GTiff with the grid's size and geotransform (GDAL data model: gt[0] west
// edge, gt[1] res, gt[3] north edge, gt[5] -res), 256 x 256 blocks, CRS
// EPSG:4326 both from the AUTHORITY node and osr's AutoIdentifyEPSG, the
// no-data value, every full-resolution pixel, and GDAL's COG validator with
// no error and no warning.
func tiffCheckCommon(t *testing.T, r tiffRef, s grid.Spec, datatype string, nodata float64, tile int) {
	t.Helper()
	if r.Driver != "GTiff" || r.Bands != 1 || r.Datatype != datatype {
		t.Errorf("GDAL: driver %s, %d bands, type %s; want GTiff, 1, %s", r.Driver, r.Bands, r.Datatype, datatype)
	}
	if r.Size != [2]int{s.Cols, s.Rows} {
		t.Errorf("GDAL size %v, want %d x %d", r.Size, s.Cols, s.Rows)
	}
	if r.Block != [2]int{tile, tile} {
		t.Errorf("GDAL block size %v, want %d x %d tiles", r.Block, tile, tile)
	}
	if r.GeoTransform != s.GeoTransform() {
		t.Errorf("GDAL geotransform %v, want %v exactly", r.GeoTransform, s.GeoTransform())
	}
	if r.EPSGAuto == nil || *r.EPSGAuto != "4326" {
		t.Errorf("osr AutoIdentifyEPSG gives %v, want 4326", r.EPSGAuto)
	}
	if len(r.Authority) != 2 || r.Authority[0] == nil || *r.Authority[0] != "EPSG" || r.Authority[1] == nil || *r.Authority[1] != "4326" {
		t.Errorf("CRS authority %v, want EPSG 4326", r.Authority)
	}
	if !r.IsGeographic {
		t.Error("GDAL: CRS is not geographic")
	}
	if r.NoData == nil || *r.NoData != nodata {
		t.Errorf("GDAL no-data %v, want %g", r.NoData, nodata)
	}
	if r.ImageStructure["COMPRESSION"] != "DEFLATE" {
		t.Errorf("GDAL compression %q, want DEFLATE", r.ImageStructure["COMPRESSION"])
	}
	if r.Full.Mismatches != 0 {
		t.Errorf("GDAL reads %d pixels different from those written", r.Full.Mismatches)
	}
	if len(r.COG.Errors)+len(r.COG.Warnings) != 0 {
		t.Errorf("GDAL COG validator: errors %q, warnings %q", r.COG.Errors, r.COG.Warnings)
	}
}

// tiffCheckOverviews asserts GDAL reads the overview levels expected
// (halving, sizes rounded up like GDAL's, until at most 512 px) and that
// each equals the NumPy overview of tiff_ref.py: exactly for bands, within
// one float32 ulp for index (NumPy sums in a different order in float64).
func tiffCheckOverviews(t *testing.T, r tiffRef, want [][2]int, exact bool) {
	t.Helper()
	if len(r.Overviews) != len(want) {
		t.Fatalf("GDAL reads %d overviews, want %d (%v)", len(r.Overviews), len(want), want)
	}
	for i, o := range r.Overviews {
		if o.Size != want[i] || o.ExpectedSize != want[i] {
			t.Errorf("overview %d: GDAL size %v, NumPy %v, want %v", i, o.Size, o.ExpectedSize, want[i])
		}
		if o.MaxULPs > 1 || o.NaNMismatches != 0 || (exact && o.Mismatches != 0) {
			t.Errorf("overview %d (factor %d): %d pixels differ from NumPy, max %d ulps, %d NaN mismatches",
				i, o.Factor, o.Mismatches, o.MaxULPs, o.NaNMismatches)
		}
	}
}
