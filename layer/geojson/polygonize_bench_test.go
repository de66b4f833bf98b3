package geojson

import (
	"bufio"
	"encoding/json"
	"io"
	"math"
	"os"
	"path/filepath"
	"testing"

	"drygrid/bands"
	"drygrid/internal/rastertest"
	"drygrid/publish"
)

// BenchmarkPolygonizeGlobal polygonizes the global 0.1 deg band raster and
// writes the band layer to a file, like gdal_polygonize.py -f GeoJSON: the
// target of docs/design.md, "Performance targets", is >= 3x faster than that
// on the same raster.
func BenchmarkPolygonizeGlobal(b *testing.B) {
	r := rastertest.BenchRaster(b)
	s := bands.Default()
	path := filepath.Join(b.TempDir(), "bands.geojson")
	b.ResetTimer()
	for b.Loop() {
		if err := publish.WriteFile(path, func(w *bufio.Writer) error {
			return EncodeBands(w, r, s, Options{})
		}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkWriteBandsGeoJSONDiscard is polygonizing plus encoding, without
// the file system.
func BenchmarkWriteBandsGeoJSONDiscard(b *testing.B) {
	r := rastertest.BenchRaster(b)
	s := bands.Default()
	b.ResetTimer()
	for b.Loop() {
		if err := EncodeBands(io.Discard, r, s, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}

// TestWritePolyBenchRaster writes the benchmark raster as raw bytes (row 0
// north) to bands.u8 and its band layer to bands.geojson, for the
// side-by-side with gdal_polygonize (see testdata/geojson_ref.py raw2tif),
// into $DRYGRID_POLY_BENCH_DIR when set (then also
// bands-simplified-10km.geojson, about 4 s more), else a temporary
// directory. It checks the layer it wrote: valid JSON, one Feature per band
// present, and each band's rings enclosing exactly its cells: the shoelace
// area of the rings in square degrees (exterior rings counter-clockwise,
// holes clockwise, RFC 7946) equals the band's cell count times res^2, to
// 1e-9 relative.
func TestWritePolyBenchRaster(t *testing.T) {
	dir := os.Getenv("DRYGRID_POLY_BENCH_DIR")
	keep := dir != ""
	if !keep {
		dir = t.TempDir()
	}
	r := rastertest.BenchRaster(t)
	if err := os.WriteFile(filepath.Join(dir, "bands.u8"), r.Data, 0o644); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, "bands.geojson")
	if err := publish.WriteFile(path, func(w *bufio.Writer) error {
		return EncodeBands(w, r, bands.Default(), Options{})
	}); err != nil {
		t.Fatal(err)
	}
	if keep {
		if err := publish.WriteFile(filepath.Join(dir, "bands-simplified-10km.geojson"), func(w *bufio.Writer) error {
			return EncodeBands(w, r, bands.Default(), Options{SimplifyKm: 10})
		}); err != nil {
			t.Fatal(err)
		}
	}
	want := map[int]float64{}
	nodata := 0
	for _, c := range r.Data {
		if c == 0 {
			nodata++
			continue
		}
		want[int(c)] += r.Spec.Res * r.Spec.Res
	}
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var fc struct {
		Features []struct {
			Properties struct {
				Code int `json:"code"`
			} `json:"properties"`
			Geometry struct {
				Coordinates [][][][2]float64 `json:"coordinates"`
			} `json:"geometry"`
		} `json:"features"`
	}
	if err := json.Unmarshal(data, &fc); err != nil {
		t.Fatal(err)
	}
	if len(fc.Features) != len(want) {
		t.Fatalf("%d features, %d bands present", len(fc.Features), len(want))
	}
	for _, f := range fc.Features {
		got := 0.0
		for _, poly := range f.Geometry.Coordinates {
			for _, ring := range poly {
				for i := 0; i+1 < len(ring); i++ {
					got += (ring[i][0]*ring[i+1][1] - ring[i+1][0]*ring[i][1]) / 2
				}
			}
		}
		w := want[f.Properties.Code]
		if math.Abs(got-w) > 1e-9*w {
			t.Errorf("band %d: rings enclose %.6f square degrees, its cells %.6f", f.Properties.Code, got, w)
		}
	}
	t.Logf("no data: %.1f%% of %d cells", 100*float64(nodata)/float64(len(r.Data)), len(r.Data))
}

// BenchmarkSimplifyGlobal is the band layer of the global raster with
// --simplify-km 10.
func BenchmarkSimplifyGlobal(b *testing.B) {
	r := rastertest.BenchRaster(b)
	s := bands.Default()
	b.ResetTimer()
	for b.Loop() {
		if err := EncodeBands(io.Discard, r, s, Options{SimplifyKm: 10}); err != nil {
			b.Fatal(err)
		}
	}
}
