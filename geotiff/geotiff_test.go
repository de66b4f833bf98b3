package geotiff

import (
	"bytes"
	"errors"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"drygrid/bands"
	"drygrid/grid"
	"drygrid/internal/reftest"
)

// tiffCOGSpec is larger than 512 px in both directions so that the file
// needs overviews (GDAL's COG validator warns otherwise) and has partial
// edge tiles (1300 = 5*256 + 20, 700 = 2*256 + 188).
var tiffCOGSpec = grid.Spec{West: -30.5, North: 55.25, Res: 0.05, Cols: 1300, Rows: 700}

// Overview sizes GDAL gives a 1300 x 700 image halved until at most 512 px:
// ceil(1300/2) x ceil(700/2), then ceil(1300/4) x ceil(700/4) (GDAL's
// DIV_ROUND_UP, and the sizes gdal_translate -of COG wrote for this size).
var tiffCOGOverviews = [][2]int{{650, 350}, {325, 175}}

func TestIndexTIFFReadByGDAL(t *testing.T) {
	r := tiffTestField(tiffCOGSpec)
	path := filepath.Join(t.TempDir(), "index.tif")
	if err := WriteIndex(path, r, DefaultOptions()); err != nil {
		t.Fatal(err)
	}
	// Reference: GDAL 3.6 (python3-gdal) reading the file, NumPy overviews,
	// GDAL's validate_cloud_optimized_geotiff.
	ref := tiffRunRef(t, path, r, nil)
	tiffCheckCommon(t, ref, r.Spec, "Float32", -9999, 256)
	tiffCheckOverviews(t, ref, tiffCOGOverviews, false)
	if ref.ImageStructure["PREDICTOR"] != "3" {
		t.Errorf("GDAL predictor %q, want 3 (floating point, TIFF Technical Note 3)", ref.ImageStructure["PREDICTOR"])
	}
	if ref.ImageStructure["LAYOUT"] != "COG" {
		t.Errorf("GDAL LAYOUT %q, want COG (GDAL recognises the ghost header)", ref.ImageStructure["LAYOUT"])
	}
	if ref.Metadata["CAUTION"] != Caution {
		t.Errorf("GDAL metadata CAUTION %q, want the caution line", ref.Metadata["CAUTION"])
	}
	if ref.Metadata["AREA_OR_POINT"] != "Area" {
		t.Errorf("GDAL AREA_OR_POINT %q, want Area (GTRasterTypeGeoKey PixelIsArea)", ref.Metadata["AREA_OR_POINT"])
	}
	if len(ref.Overviews) > 0 && ref.Overviews[0].Valid == 0 {
		t.Error("test field has no valid overview pixel; the comparison is empty")
	}
}

func TestBandsTIFFReadByGDAL(t *testing.T) {
	s := bands.Default()
	r := tiffTestBands(tiffTestField(tiffCOGSpec), s)
	path := filepath.Join(t.TempDir(), "bands.tif")
	if err := WriteBands(path, r, s, DefaultOptions()); err != nil {
		t.Fatal(err)
	}
	ref := tiffRunRef(t, path, nil, r)
	tiffCheckCommon(t, ref, r.Spec, "Byte", 0, 256)
	tiffCheckOverviews(t, ref, tiffCOGOverviews, true)
	if ref.ImageStructure["PREDICTOR"] != "2" {
		t.Errorf("GDAL predictor %q, want 2 (horizontal differencing)", ref.ImageStructure["PREDICTOR"])
	}
	// GDAL reads a palette TIFF's ColorMap as a colour table of 256 entries
	// with 16-bit values scaled back to 8 bits (GDAL GTiff driver).
	if ref.ColorInterp != "Palette" || len(ref.ColorTable) != 256 {
		t.Fatalf("GDAL colour interpretation %s with %d entries, want Palette with 256", ref.ColorInterp, len(ref.ColorTable))
	}
	for _, b := range s.Bands {
		c := b.RGBA()
		if got := ref.ColorTable[b.Code]; got != [4]int{int(c.R), int(c.G), int(c.B), 255} {
			t.Errorf("colour of code %d (%s): GDAL %v, scheme %s", b.Code, b.Key, got, b.Color)
		}
	}
	// Category names from the PAM sidecar bands.tif.aux.xml, read by GDAL.
	want := []string{"No data"}
	for _, b := range s.Bands {
		want = append(want, b.Label)
	}
	if strings.Join(ref.Categories, "|") != strings.Join(want, "|") {
		t.Errorf("GDAL category names %q, want %q", ref.Categories, want)
	}
	// gdalinfo (GDAL 3.6 command line) lists them too.
	out, err := exec.Command(reftest.Tool(t, "gdalinfo"), path).CombinedOutput()
	if err != nil {
		t.Fatalf("gdalinfo: %v\n%s", err, out)
	}
	for i, name := range want {
		if !strings.Contains(string(out), "Categories:") || !strings.Contains(string(out), strconv.Itoa(i)+": "+name) {
			t.Errorf("gdalinfo does not list category %d %q:\n%s", i, name, out)
		}
	}
}

// TestCOGValidatorCommandLine runs GDAL's validator the way a user would
// (python3 -m osgeo_utils.samples.validate_cloud_optimized_geotiff, GDAL
// 3.6 python3-gdal) on both layers.
func TestCOGValidatorCommandLine(t *testing.T) {
	py := reftest.Python(t, "osgeo_utils.samples.validate_cloud_optimized_geotiff")
	dir := t.TempDir()
	s := bands.Default()
	f := tiffTestField(tiffCOGSpec)
	if err := WriteIndex(filepath.Join(dir, "index.tif"), f, DefaultOptions()); err != nil {
		t.Fatal(err)
	}
	if err := WriteBands(filepath.Join(dir, "bands.tif"), tiffTestBands(f, s), s, DefaultOptions()); err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"index.tif", "bands.tif"} {
		p := filepath.Join(dir, name)
		out, err := exec.Command(py, "-m", "osgeo_utils.samples.validate_cloud_optimized_geotiff", "--full-check=yes", p).CombinedOutput()
		if err != nil || !strings.Contains(string(out), p+" is a valid cloud optimized GeoTIFF") || strings.Contains(string(out), "warning") {
			t.Errorf("validator on %s: %v\n%s", name, err, out)
		}
	}
}

// TestTIFFAntimeridian: a grid crossing 180 is georeferenced with its origin
// west of 180 and a width running past it (GDAL accepts longitudes past 180
// in a geotransform; EPSG:4326 is unbounded in the GeoTIFF model).
func TestTIFFAntimeridian(t *testing.T) {
	s, err := grid.NewSpec(170, -10, -170, 10, 0.5)
	if err != nil {
		t.Fatal(err)
	}
	if s.West != 170 || s.East() != 190 {
		t.Fatalf("spec %v, want west 170 east 190", s)
	}
	r := tiffTestField(s)
	path := filepath.Join(t.TempDir(), "am.tif")
	if err := WriteIndex(path, r, DefaultOptions()); err != nil {
		t.Fatal(err)
	}
	ref := tiffRunRef(t, path, r, nil)
	tiffCheckCommon(t, ref, s, "Float32", -9999, 256)
	// gt[0] + cols*gt[1] is the eastern edge: 170 + 40*0.5 = 190.
	if e := ref.GeoTransform[0] + float64(ref.Size[0])*ref.GeoTransform[1]; e != 190 {
		t.Errorf("GDAL eastern edge %g, want 190", e)
	}
}

// TestTIFFSmallAndEdgeCases: a 1 x 1 grid, grids with partial edge tiles in
// one or both directions and small tiles, an all-no-data raster (with
// overviews, which must all be no data), and NaN cells written as no data.
func TestTIFFSmallAndEdgeCases(t *testing.T) {
	s := bands.Default()
	cases := []struct {
		name string
		spec grid.Spec
		opt  func(*Options)
		fill func(*grid.Float32)
		ovs  [][2]int
	}{
		{name: "1x1", spec: grid.Spec{West: 10, North: 5, Res: 0.25, Cols: 1, Rows: 1}},
		{name: "partial-both", spec: grid.Spec{West: -3, North: 2, Res: 0.01, Cols: 300, Rows: 270}},
		{name: "tiles-16", spec: grid.Spec{West: -3, North: 2, Res: 0.01, Cols: 45, Rows: 33},
			opt: func(o *Options) { o.TileSize = 16 }},
		{name: "all-no-data", spec: grid.Spec{West: 0, North: 60, Res: 0.1, Cols: 700, Rows: 600},
			fill: func(r *grid.Float32) {
				for i := range r.Data {
					r.Data[i] = grid.NoDataIndex
				}
			}, ovs: [][2]int{{350, 300}}},
		{name: "nan-cells", spec: grid.Spec{West: 0, North: 0, Res: 1, Cols: 20, Rows: 10},
			fill: func(r *grid.Float32) {
				for i := 0; i < len(r.Data); i += 3 {
					r.Data[i] = float32(math.NaN())
				}
			}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			opt := DefaultOptions()
			if c.opt != nil {
				c.opt(&opt)
			}
			r := tiffTestField(c.spec)
			if c.fill != nil {
				c.fill(r)
			}
			dir := t.TempDir()
			ip, bp := filepath.Join(dir, "index.tif"), filepath.Join(dir, "bands.tif")
			if err := WriteIndex(ip, r, opt); err != nil {
				t.Fatal(err)
			}
			b := tiffTestBands(r, s)
			if err := WriteBands(bp, b, s, opt); err != nil {
				t.Fatal(err)
			}
			ref := tiffRunRef(t, ip, r, nil)
			tiffCheckCommon(t, ref, c.spec, "Float32", -9999, opt.TileSize)
			tiffCheckOverviews(t, ref, c.ovs, false)
			ref = tiffRunRef(t, bp, nil, b)
			tiffCheckCommon(t, ref, c.spec, "Byte", 0, opt.TileSize)
			tiffCheckOverviews(t, ref, c.ovs, true)
			if c.name == "all-no-data" && ref.Overviews[0].Valid != 0 {
				t.Errorf("all-no-data: %d valid overview pixels expected by NumPy, want 0", ref.Overviews[0].Valid)
			}
		})
	}
}

// TestTIFFBigTIFF forces BigTIFF (the BigTIFF proposal, Aware Systems; magic
// 43, 8-byte offsets) and checks GDAL and its COG validator read it.
func TestTIFFBigTIFF(t *testing.T) {
	s := bands.Default()
	f := tiffTestField(tiffCOGSpec)
	opt := DefaultOptions()
	opt.BigTIFF = 1
	dir := t.TempDir()
	ip, bp := filepath.Join(dir, "index.tif"), filepath.Join(dir, "bands.tif")
	if err := WriteIndex(ip, f, opt); err != nil {
		t.Fatal(err)
	}
	b := tiffTestBands(f, s)
	if err := WriteBands(bp, b, s, opt); err != nil {
		t.Fatal(err)
	}
	for _, p := range []string{ip, bp} {
		head, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.HasPrefix(head, []byte{'I', 'I', 43, 0, 8, 0, 0, 0}) {
			t.Errorf("%s header % x, want BigTIFF II 43 8 0", p, head[:8])
		}
	}
	ref := tiffRunRef(t, ip, f, nil)
	tiffCheckCommon(t, ref, f.Spec, "Float32", -9999, 256)
	tiffCheckOverviews(t, ref, tiffCOGOverviews, false)
	ref = tiffRunRef(t, bp, nil, b)
	tiffCheckCommon(t, ref, f.Spec, "Byte", 0, 256)
	tiffCheckOverviews(t, ref, tiffCOGOverviews, true)
}

// TestTIFFChooseBig: classic TIFF offsets are 32-bit (TIFF 6.0 section 2),
// so a file of up to 2^32-1 bytes stays classic and a larger one becomes
// BigTIFF, unless BigTIFF is forced on or off.
func TestTIFFChooseBig(t *testing.T) {
	cases := []struct {
		size    uint64
		mode    int
		big, ok bool
	}{
		{1 << 20, 0, false, true},
		{1<<32 - 1, 0, false, true},
		{1 << 32, 0, true, true},
		{1 << 20, 1, true, true},
		{1 << 20, -1, false, true},
		{1 << 32, -1, false, false},
	}
	for _, c := range cases {
		big, err := tiffChooseBig(c.size, c.mode)
		if big != c.big || (err == nil) != c.ok {
			t.Errorf("size %d mode %d: big %v err %v, want big %v ok %v", c.size, c.mode, big, err, c.big, c.ok)
		}
	}
}

// TestTIFFDeterministic: the bytes do not depend on the number of workers
// (output never depends on the number of cores: docs/design.md, "Command
// line").
func TestTIFFDeterministic(t *testing.T) {
	s := bands.Default()
	f := tiffTestField(tiffCOGSpec)
	b := tiffTestBands(f, s)
	var ref [2][]byte
	for _, workers := range []int{1, 4, 3} {
		opt := DefaultOptions()
		opt.Workers = workers
		var iw, bw bytes.Buffer
		if err := EncodeIndex(&iw, f, opt); err != nil {
			t.Fatal(err)
		}
		if err := EncodeBands(&bw, b, s, opt); err != nil {
			t.Fatal(err)
		}
		if ref[0] == nil {
			ref = [2][]byte{iw.Bytes(), bw.Bytes()}
			continue
		}
		if !bytes.Equal(iw.Bytes(), ref[0]) || !bytes.Equal(bw.Bytes(), ref[1]) {
			t.Errorf("Workers=%d gives other bytes than Workers=1", workers)
		}
	}
}

// TestTIFFAtomicFailure: a failed write leaves the earlier file untouched
// and no temporary file behind.
func TestTIFFAtomicFailure(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "index.tif")
	old := []byte("earlier file")
	if err := os.WriteFile(path, old, 0o644); err != nil {
		t.Fatal(err)
	}
	f := tiffTestField(grid.Spec{West: 0, North: 10, Res: 1, Cols: 10, Rows: 10})
	bad := DefaultOptions()
	bad.TileSize = 250 // not a multiple of 16: the encoder fails inside publish.WriteFile
	if err := WriteIndex(path, f, bad); err == nil {
		t.Fatal("tile size 250 accepted")
	}
	broken := *f
	broken.Data = broken.Data[:5] // raster shorter than its grid
	if err := WriteIndex(path, &broken, DefaultOptions()); err == nil {
		t.Fatal("raster of 5 cells on a 10 x 10 grid accepted")
	}
	if err := WriteIndex(filepath.Join(dir, "missing-dir", "index.tif"), f, DefaultOptions()); err == nil {
		t.Fatal("write into a missing directory succeeded")
	}
	got, err := os.ReadFile(path)
	if err != nil || !bytes.Equal(got, old) {
		t.Errorf("earlier file changed: %q, %v", got, err)
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("directory holds %d entries after failed writes, want only index.tif", len(entries))
	}
}

type tiffFailWriter struct{ n int }

var errTIFFInjected = errors.New("injected write error")

func (w *tiffFailWriter) Write(p []byte) (int, error) {
	if w.n -= len(p); w.n < 0 {
		return 0, errTIFFInjected
	}
	return len(p), nil
}

// TestTIFFWriterError: an error from the writer, at the start or midway
// through the tiles, comes back wrapped with context.
func TestTIFFWriterError(t *testing.T) {
	f := tiffTestField(tiffCOGSpec)
	for _, n := range []int{0, 100, 300000} {
		err := EncodeIndex(&tiffFailWriter{n: n}, f, DefaultOptions())
		if !errors.Is(err, errTIFFInjected) || !strings.Contains(err.Error(), "geotiff: write") {
			t.Errorf("fail after %d bytes: err %v, want wrapped injected error", n, err)
		}
	}
}

func TestTIFFOptionErrors(t *testing.T) {
	f := tiffTestField(grid.Spec{West: 0, North: 10, Res: 1, Cols: 10, Rows: 10})
	for _, c := range []struct {
		name string
		mod  func(*Options)
	}{
		{"tile 8", func(o *Options) { o.TileSize = 8 }},
		{"tile 100", func(o *Options) { o.TileSize = 100 }},
		{"tile 8192", func(o *Options) { o.TileSize = 8192 }},
		{"level 10", func(o *Options) { o.Level = 10 }},
		{"level -3", func(o *Options) { o.Level = -3 }},
		{"bigtiff 2", func(o *Options) { o.BigTIFF = 2 }},
	} {
		opt := DefaultOptions()
		c.mod(&opt)
		if err := EncodeIndex(&bytes.Buffer{}, f, opt); err == nil {
			t.Errorf("%s accepted", c.name)
		}
	}
	if err := EncodeIndex(&bytes.Buffer{}, nil, DefaultOptions()); err == nil {
		t.Error("nil raster accepted")
	}
	if err := EncodeBands(&bytes.Buffer{}, grid.NewUint8(f.Spec, 0), nil, DefaultOptions()); err == nil {
		t.Error("nil scheme accepted")
	}
	zero := grid.Spec{West: 0, North: 10, Res: 0, Cols: 1, Rows: 1}
	if err := EncodeIndex(&bytes.Buffer{}, grid.NewFloat32(zero, -9999), DefaultOptions()); err == nil {
		t.Error("resolution 0 accepted")
	}
}
