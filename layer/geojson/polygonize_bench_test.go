package geojson

import (
	"bufio"
	"encoding/json"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"

	"drygrid/bands"
	"drygrid/grid"
	"drygrid/polygon"
	"drygrid/publish"
)

// polyBenchRaster is a deterministic, realistic band raster on the global
// 0.1 deg grid (3600 x 1800): a smooth z field (sines plus Gaussian blobs
// plus mild noise) classified with bands.Default(), and about 30% no data
// (where a second smooth field is low, like areas without stations).
func polyBenchRaster(tb testing.TB) *grid.Uint8 {
	sp, err := grid.Global(0.1)
	if err != nil {
		tb.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(2026, 12))
	type blob struct{ x, y, s, a float64 }
	blobs := make([]blob, 40)
	for i := range blobs {
		blobs[i] = blob{rng.Float64() * 360, rng.Float64()*180 - 90, 3 + rng.Float64()*12, rng.NormFloat64() * 1.5}
	}
	s := bands.Default()
	r := grid.NewUint8(sp, 0)
	for row := 0; row < sp.Rows; row++ {
		for col := 0; col < sp.Cols; col++ {
			lon, lat := sp.Center(col, row)
			x, y := (lon+180)*math.Pi/180, lat*math.Pi/180
			mask := math.Sin(2*x+1)*math.Cos(3*y) + 0.6*math.Sin(5*x+3*y)
			if mask < -0.38 {
				continue // no data
			}
			z := 0.8*math.Sin(3*x)*math.Cos(2*y) + 0.5*math.Sin(7*x+5*y+0.5) + 0.3*math.Cos(11*x-9*y)
			for _, b := range blobs {
				dx, dy := lon+180-b.x, lat-b.y
				if d2 := dx*dx + dy*dy; d2 < 9*b.s*b.s {
					z += b.a * math.Exp(-d2/(2*b.s*b.s))
				}
			}
			z += 0.08 * rng.NormFloat64()
			r.Data[sp.Index(col, row)] = s.Classify(z)
		}
	}
	return r
}

// BenchmarkPolygonizeGlobal polygonizes the global 0.1 deg band raster and
// writes the band layer to a file, like gdal_polygonize.py -f GeoJSON: the
// DESIGN.md target is >= 3x faster than that on the same raster.
func BenchmarkPolygonizeGlobal(b *testing.B) {
	r := polyBenchRaster(b)
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
	r := polyBenchRaster(b)
	s := bands.Default()
	b.ResetTimer()
	for b.Loop() {
		if err := EncodeBands(io.Discard, r, s, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkPolygonizeOnly is the tracing alone on the same raster.
func BenchmarkPolygonizeOnly(b *testing.B) {
	r := polyBenchRaster(b)
	b.ResetTimer()
	for b.Loop() {
		polygon.Polygonize(r)
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
	r := polyBenchRaster(t)
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
	r := polyBenchRaster(b)
	s := bands.Default()
	b.ResetTimer()
	for b.Loop() {
		if err := EncodeBands(io.Discard, r, s, Options{SimplifyKm: 10}); err != nil {
			b.Fatal(err)
		}
	}
}
