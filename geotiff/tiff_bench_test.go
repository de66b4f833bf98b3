package geotiff

import (
	"bytes"
	"encoding/binary"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"testing"

	"drygrid/bands"
	"drygrid/grid"
	"drygrid/internal/reftest"
)

// tiffCounter counts bytes written.
type tiffCounter struct{ n int64 }

func (c *tiffCounter) Write(p []byte) (int, error) { c.n += int64(len(p)); return len(p), nil }

func tiffGlobalField(b testing.TB) *grid.Float32 {
	s, err := grid.Global(0.1)
	if err != nil {
		b.Fatal(err)
	}
	return tiffTestField(s)
}

// BenchmarkEncodeIndexTIFFGlobal writes the COG of the global 0.1 deg index
// raster (3600 x 1800 = 6.48 M cells, ~30 % no data) with the default
// options (the target of docs/design.md, "Performance targets": no slower
// than GDAL's COG driver, size within 10 %). The sub-benchmarks give the
// DEFLATE levels, for the choice of DefaultLevel.
func BenchmarkEncodeIndexTIFFGlobal(b *testing.B) {
	r := tiffGlobalField(b)
	for _, level := range []int{0, 1, 2, 3, 4, 6, 9} {
		name := "default"
		if level != 0 {
			name = fmt.Sprintf("level%d", level)
		}
		b.Run(name, func(b *testing.B) {
			opt := DefaultOptions()
			if level != 0 {
				opt.Level = level
			}
			b.SetBytes(int64(4 * len(r.Data)))
			var c tiffCounter
			cpu := tiffCPUSeconds()
			for i := 0; i < b.N; i++ {
				c.n = 0
				if err := EncodeIndex(&c, r, opt); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric((tiffCPUSeconds()-cpu)/float64(b.N), "cpu-s/op")
			b.ReportMetric(float64(c.n), "file-bytes")
		})
	}
}

// BenchmarkEncodeBandsTIFFGlobal writes the band raster of the same field,
// without and with horizontal differencing (predictor 2), for the choice of
// tiffBandsPredictor.
func BenchmarkEncodeBandsTIFFGlobal(b *testing.B) {
	s := bands.Default()
	r := tiffTestBands(tiffGlobalField(b), s)
	opt, _ := tiffNormalize(DefaultOptions())
	for _, pred := range []int{1, 2} {
		b.Run(fmt.Sprintf("predictor%d", pred), func(b *testing.B) {
			var c tiffCounter
			cpu := tiffCPUSeconds()
			for i := 0; i < b.N; i++ {
				c.n = 0
				img := tiffNewImage(r.Spec, opt)
				img.predictor, img.colormap, img.nodata = pred, tiffColorMap(s), "0"
				img.levels = []*tiffLevel{{cols: r.Spec.Cols, rows: r.Spec.Rows, u8: r.Data}}
				for k, sz := range cogLevelSizes(r.Spec.Cols, r.Spec.Rows) {
					img.levels = append(img.levels, &tiffLevel{cols: sz[0], rows: sz[1],
						u8: cogModeOverview(r.Data, r.Spec.Cols, r.Spec.Rows, 2<<k, 0, opt.Workers)})
				}
				if err := tiffCompressTiles(img.levels, img, opt); err != nil {
					b.Fatal(err)
				}
				if err := tiffWrite(&c, img, opt); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric((tiffCPUSeconds()-cpu)/float64(b.N), "cpu-s/op")
			b.ReportMetric(float64(c.n), "file-bytes")
		})
	}
}

// TestTIFFBenchFieldRaw writes the benchmark raster raw (index.f32 with a
// GDAL VRT, index.vrt) for the side-by-side with gdal_translate -of COG in
// BENCHMARKS.md, into $DRYGRID_TIFF_BENCH_DIR when set (else a temporary
// directory), and checks what that side-by-side relies on: the raw file read
// back and encoded (tiffEncodeFromRaw, the work timed against
// gdal_translate) gives the very bytes of the raster encoded in memory, and
// GDAL (python3-gdal) reads the VRT as the same pixels, georeferencing and
// no data as our COG.
func TestTIFFBenchFieldRaw(t *testing.T) {
	dir := os.Getenv("DRYGRID_TIFF_BENCH_DIR")
	if dir == "" {
		dir = t.TempDir()
	}
	r := tiffGlobalField(t)
	raw := make([]byte, 4*len(r.Data))
	for i, v := range r.Data {
		binary.LittleEndian.PutUint32(raw[4*i:], math.Float32bits(v))
	}
	if err := os.WriteFile(filepath.Join(dir, "index.f32"), raw, 0o644); err != nil {
		t.Fatal(err)
	}
	gt := r.Spec.GeoTransform()
	vrt := fmt.Sprintf(`<VRTDataset rasterXSize="%d" rasterYSize="%d">
  <SRS>EPSG:4326</SRS>
  <GeoTransform>%.17g, %.17g, 0, %.17g, 0, %.17g</GeoTransform>
  <VRTRasterBand dataType="Float32" band="1" subClass="VRTRawRasterBand">
    <NoDataValue>-9999</NoDataValue>
    <SourceFilename relativeToVRT="1">index.f32</SourceFilename>
    <ImageOffset>0</ImageOffset><PixelOffset>4</PixelOffset><LineOffset>%d</LineOffset>
    <ByteOrder>LSB</ByteOrder>
  </VRTRasterBand>
</VRTDataset>
`, r.Spec.Cols, r.Spec.Rows, gt[0], gt[1], gt[3], gt[5], 4*r.Spec.Cols)
	if err := os.WriteFile(filepath.Join(dir, "index.vrt"), []byte(vrt), 0o644); err != nil {
		t.Fatal(err)
	}
	ours := filepath.Join(dir, "ours.tif")
	if err := tiffEncodeFromRaw(dir, ours); err != nil {
		t.Fatal(err)
	}
	var want bytes.Buffer
	if err := EncodeIndex(&want, r, DefaultOptions()); err != nil {
		t.Fatal(err)
	}
	if got, err := os.ReadFile(ours); err != nil || !bytes.Equal(got, want.Bytes()) {
		t.Fatalf("the COG encoded from index.f32 differs from the one encoded in memory (%v)", err)
	}
	py := reftest.Python(t, "numpy", "osgeo.gdal")
	out := reftest.RunPython(t, py, "../testdata/vrt_ref.py", nil, filepath.Join(dir, "index.vrt"), ours)
	var ref struct {
		Size              [2]int     `json:"size"`
		GeotransformEqual bool       `json:"geotransform_equal"`
		NoData            [2]float64 `json:"nodata"`
		Differing         int        `json:"differing"`
	}
	if err := json.Unmarshal(out, &ref); err != nil {
		t.Fatalf("vrt_ref.py: %v\n%s", err, out)
	}
	if ref.Size != [2]int{r.Spec.Cols, r.Spec.Rows} || !ref.GeotransformEqual || ref.NoData != [2]float64{-9999, -9999} || ref.Differing != 0 {
		t.Errorf("GDAL reads the VRT and our COG as %+v", ref)
	}
}

// tiffEncodeFromRaw reads dir/index.f32 (the global 0.1 deg raster) and
// writes the COG to path with the default options: the same work
// gdal_translate does from index.vrt. With DRYGRID_TIFF_FROM_RAW=DIR,
// TestTIFFEncodeFromRaw runs it alone, for timing both under
// /usr/bin/time -v.
func tiffEncodeFromRaw(dir, path string) error {
	s, err := grid.Global(0.1)
	if err != nil {
		return err
	}
	raw, err := os.ReadFile(filepath.Join(dir, "index.f32"))
	if err != nil {
		return err
	}
	if len(raw) != 4*s.Len() {
		return fmt.Errorf("index.f32: %d bytes, want %d", len(raw), 4*s.Len())
	}
	r := &grid.Float32{Spec: s, Data: make([]float32, s.Len()), NoData: grid.NoDataIndex}
	for i := range r.Data {
		r.Data[i] = math.Float32frombits(binary.LittleEndian.Uint32(raw[4*i:]))
	}
	return WriteIndex(path, r, DefaultOptions())
}

// TestTIFFEncodeFromRaw is the timed half of the COG side-by-side
// (BENCHMARKS.md): with DRYGRID_TIFF_FROM_RAW=DIR (written by
// TestTIFFBenchFieldRaw) it encodes DIR/index.f32 to DIR/ours.tif and
// nothing else; TestTIFFBenchFieldRaw checks the same function.
func TestTIFFEncodeFromRaw(t *testing.T) {
	dir := os.Getenv("DRYGRID_TIFF_FROM_RAW")
	if dir == "" {
		t.Skip("set DRYGRID_TIFF_FROM_RAW to time the encoding of the raw benchmark raster")
	}
	if err := tiffEncodeFromRaw(dir, filepath.Join(dir, "ours.tif")); err != nil {
		t.Fatal(err)
	}
}

var _ io.Writer = (*tiffCounter)(nil)
