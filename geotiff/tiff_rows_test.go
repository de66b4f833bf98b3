package geotiff

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"drygrid/bands"
	"drygrid/grid"
)

// tiffRowsFrom serves the rows of r, and their codes in the default
// scheme (tiffTestBands, Scheme.Classify cell by cell), as a RowFunc and
// checks the call contract (row order, block size).
func tiffRowsFrom(t *testing.T, r *grid.Float32, tile int) RowFunc {
	next := 0
	codes := tiffTestBands(r, bands.Default())
	return func(row0, n int, dst []float32, u8 []uint8) error {
		if row0 != next || n <= 0 || (n != tile && row0+n != r.Spec.Rows) || len(dst) != n*r.Spec.Cols ||
			(u8 != nil && len(u8) != len(dst)) {
			t.Errorf("produce(%d, %d, %d values, %d codes): want rows from %d in blocks of %d", row0, n, len(dst), len(u8), next, tile)
		}
		next = row0 + n
		lo, hi := row0*r.Spec.Cols, (row0+n)*r.Spec.Cols
		copy(dst, r.Data[lo:hi])
		if u8 != nil {
			copy(u8, codes.Data[lo:hi])
		}
		return nil
	}
}

// TestTIFFRowsSameBytes: the row encoders write byte for byte what
// EncodeIndex and EncodeBands write for the whole raster, so every
// GDAL check of those files (geotiff_test.go: gdalinfo, the COG validator,
// values read back by GDAL) holds for the streamed files too. The sizes
// give partial tiles, a partial last block, tile rows of overviews that end
// mid-block, and (8300 columns at tile 16) an overview factor of 32, larger
// than the tile.
func TestTIFFRowsSameBytes(t *testing.T) {
	s := bands.Default()
	cases := []struct {
		cols, rows, tile, workers int
		overviews                 bool
	}{
		{37, 23, 16, 1, true},
		{600, 530, 16, 3, true},
		{1100, 700, 32, 2, true},
		{8300, 40, 16, 2, true},
		{1030, 515, 256, 1, true},
		{300, 200, 16, 2, false},
	}
	for _, c := range cases {
		spec := grid.Spec{West: -30, North: 60, Res: 0.05, Cols: c.cols, Rows: c.rows}
		r := tiffTestField(spec)
		// Some NaN cells, which the writers store as no data.
		for i := 7; i < len(r.Data); i += 101 {
			r.Data[i] = float32(math.NaN())
		}
		opt := DefaultOptions()
		opt.TileSize, opt.Workers, opt.Overviews = c.tile, c.workers, c.overviews
		var wantI, wantB, gotI, gotB, gotI2 bytes.Buffer
		if err := EncodeIndex(&wantI, r, opt); err != nil {
			t.Fatal(err)
		}
		if err := EncodeBands(&wantB, tiffTestBands(r, s), s, opt); err != nil {
			t.Fatal(err)
		}
		if err := EncodeIndexBandsRows(&gotI, &gotB, spec, r.NoData, s, tiffRowsFrom(t, r, c.tile), opt); err != nil {
			t.Fatal(err)
		}
		if err := EncodeIndexRows(&gotI2, spec, r.NoData, tiffRowsFrom(t, r, c.tile), opt); err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(gotI.Bytes(), wantI.Bytes()) || !bytes.Equal(gotI2.Bytes(), wantI.Bytes()) {
			t.Errorf("%+v: streamed index file differs (%d, %d bytes, want %d)", c, gotI.Len(), gotI2.Len(), wantI.Len())
		}
		if !bytes.Equal(gotB.Bytes(), wantB.Bytes()) {
			t.Errorf("%+v: streamed band file differs (%d bytes, want %d)", c, gotB.Len(), wantB.Len())
		}
		// The same with the compressed tiles spilled to a temporary file,
		// which is gone afterwards: all of them, the second half of them,
		// or none (the default budget holds these small rasters).
		spill := t.TempDir()
		opt.SpillDir = spill
		def := tiffMemoryTiles
		for _, budget := range []int64{0, int64(wantI.Len()+wantB.Len()) / 2, def} {
			tiffMemoryTiles = budget
			gotI.Reset()
			gotB.Reset()
			rows, spilled := tiffRowsFrom(t, r, c.tile), false
			watch := func(row0, n int, dst []float32, u8 []uint8) error {
				if left, _ := os.ReadDir(spill); len(left) != 0 {
					spilled = true
				}
				return rows(row0, n, dst, u8)
			}
			if err := EncodeIndexBandsRows(&gotI, &gotB, spec, r.NoData, s, watch, opt); err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(gotI.Bytes(), wantI.Bytes()) || !bytes.Equal(gotB.Bytes(), wantB.Bytes()) {
				t.Errorf("%+v, %d bytes in memory: spilled files differ", c, budget)
			}
			// The file is made once the tiles pass the budget; with two
			// blocks or more the first block's tiles are compressed while
			// the second is produced.
			if want := budget == 0 && spec.Rows > 2*c.tile; want && !spilled {
				t.Errorf("%+v, %d bytes in memory: no spill file seen", c, budget)
			}
			if budget == def && spilled {
				t.Errorf("%+v: spill file made within the budget", c)
			}
		}
		tiffMemoryTiles = def
		if left, _ := os.ReadDir(spill); len(left) != 0 {
			t.Errorf("%+v: spill file left behind: %v", c, left)
		}
	}
}

// TestTIFFRowsWriteFiles: WriteIndexBandsRows writes the files, the
// band sidecar included, that WriteIndex and WriteBands write, and
// leaves no spill file beside them.
func TestTIFFRowsWriteFiles(t *testing.T) {
	s := bands.Default()
	spec := grid.Spec{West: 100, North: -10, Res: 0.1, Cols: 700, Rows: 600}
	r := tiffTestField(spec)
	opt := DefaultOptions()
	want, got := t.TempDir(), t.TempDir()
	if err := WriteIndex(filepath.Join(want, "index.tif"), r, opt); err != nil {
		t.Fatal(err)
	}
	if err := WriteBands(filepath.Join(want, "bands.tif"), tiffTestBands(r, s), s, opt); err != nil {
		t.Fatal(err)
	}
	if err := WriteIndexBandsRows(filepath.Join(got, "index.tif"), filepath.Join(got, "bands.tif"), spec, r.NoData, s,
		tiffRowsFrom(t, r, opt.TileSize), opt); err != nil {
		t.Fatal(err)
	}
	if err := WriteIndexRows(filepath.Join(got, "index2.tif"), spec, r.NoData, tiffRowsFrom(t, r, opt.TileSize), opt); err != nil {
		t.Fatal(err)
	}
	files := map[string]string{"index.tif": "index.tif", "index2.tif": "index.tif", "bands.tif": "bands.tif",
		"bands.tif.aux.xml": "bands.tif.aux.xml"}
	for g, w := range files {
		a, err1 := os.ReadFile(filepath.Join(got, g))
		b, err2 := os.ReadFile(filepath.Join(want, w))
		if err1 != nil || err2 != nil || !bytes.Equal(a, b) {
			t.Errorf("%s: differs from %s (%v, %v)", g, w, err1, err2)
		}
	}
	if left, _ := os.ReadDir(got); len(left) != len(files) {
		t.Errorf("files left: %v", left)
	}
}

// TestTIFFRowsErrors: a producer error comes back with its rows named and
// stops the run; bad arguments are refused.
func TestTIFFRowsErrors(t *testing.T) {
	spec := grid.Spec{West: 0, North: 10, Res: 0.01, Cols: 700, Rows: 900}
	boom := errors.New("boom")
	calls := 0
	err := EncodeIndexBandsRows(&bytes.Buffer{}, &bytes.Buffer{}, spec, -9999, bands.Default(),
		func(row0, n int, dst []float32, _ []uint8) error {
			calls++
			if row0 >= 512 {
				return boom
			}
			return nil
		}, DefaultOptions())
	if !errors.Is(err, boom) || !strings.Contains(err.Error(), "rows 512-767") {
		t.Errorf("producer error: got %v", err)
	}
	if calls != 3 {
		t.Errorf("producer called %d times after its error at the third block, want 3", calls)
	}
	ok := func(int, int, []float32, []uint8) error { return nil }
	bad := []error{
		EncodeIndexBandsRows(nil, nil, spec, -9999, nil, ok, DefaultOptions()),
		EncodeIndexBandsRows(nil, &bytes.Buffer{}, spec, -9999, nil, ok, DefaultOptions()),
		EncodeIndexRows(&bytes.Buffer{}, spec, -9999, nil, DefaultOptions()),
		EncodeIndexRows(&bytes.Buffer{}, grid.Spec{Res: 1}, -9999, ok, DefaultOptions()),
		EncodeIndexRows(&bytes.Buffer{}, spec, -9999, ok, Options{TileSize: 17}),
		WriteIndexBandsRows("", "", spec, -9999, nil, ok, DefaultOptions()),
		WriteIndexRows(filepath.Join(t.TempDir(), "index.tif"), spec, -9999, nil, DefaultOptions()),
	}
	for i, err := range bad {
		if err == nil {
			t.Errorf("bad call %d: no error", i)
		}
	}
}
