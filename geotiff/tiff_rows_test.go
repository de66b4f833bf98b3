package geotiff

import (
	"bytes"
	"errors"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"drygrid/bands"
	"drygrid/grid"
)

// tiffRowsFrom serves the rows of r as a RowFunc and checks the call
// contract (row order, block size).
func tiffRowsFrom(t *testing.T, r *grid.Float32, tile int) RowFunc {
	next := 0
	return func(row0, n int, dst []float32) error {
		if row0 != next || n <= 0 || (n != tile && row0+n != r.Spec.Rows) || len(dst) != n*r.Spec.Cols {
			t.Errorf("produce(%d, %d, %d values): want rows from %d in blocks of %d", row0, n, len(dst), next, tile)
		}
		next = row0 + n
		copy(dst, r.Data[row0*r.Spec.Cols:(row0+n)*r.Spec.Cols])
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
			watch := func(row0, n int, dst []float32) error {
				if left, _ := os.ReadDir(spill); len(left) != 0 {
					spilled = true
				}
				return rows(row0, n, dst)
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
		func(row0, n int, dst []float32) error {
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
	ok := func(int, int, []float32) error { return nil }
	bad := []error{
		EncodeIndexBandsRows(nil, nil, spec, -9999, nil, ok, DefaultOptions()),
		EncodeIndexBandsRows(nil, &bytes.Buffer{}, spec, -9999, nil, ok, DefaultOptions()),
		EncodeIndexRows(&bytes.Buffer{}, spec, -9999, nil, DefaultOptions()),
		EncodeIndexRows(&bytes.Buffer{}, grid.Spec{Res: 1}, -9999, ok, DefaultOptions()),
		EncodeIndexRows(&bytes.Buffer{}, spec, -9999, ok, Options{TileSize: 17}),
		WriteIndexBandsRows("", "", spec, -9999, nil, ok, DefaultOptions()),
		EncodeIndexBandsRows(&bytes.Buffer{}, nil, spec, -9999, nil, ok, Options{OnBandRows: func(int, int, []uint8) {}}),
		WriteIndexBandsRows(filepath.Join(t.TempDir(), "i.tif"), "", spec, -9999, nil, ok, Options{OnBandRows: func(int, int, []uint8) {}}),
	}
	for i, err := range bad {
		if err == nil {
			t.Errorf("bad call %d: no error", i)
		}
	}
}

// TestTIFFClassifier: the classifier of the row encoders gives
// bands.Scheme.Classify's code for the cut points, their float64
// neighbours, infinities, NaN and random values, on the default scheme and
// on one with the other inclusivity at each cut.
func TestTIFFClassifier(t *testing.T) {
	inf := math.Inf(1)
	other := &bands.Scheme{Name: "other", Bands: []bands.Band{
		{Code: 3, Key: "a", Min: -inf, Max: -1, MaxInclusive: false, Color: "#000000"},
		{Code: 1, Key: "b", Min: -1, Max: 0.25, MinInclusive: true, MaxInclusive: true, Color: "#000000"},
		{Code: 7, Key: "c", Min: 0.25, Max: inf, Color: "#000000"},
	}}
	r := rand.New(rand.NewPCG(4, 4))
	for _, s := range []*bands.Scheme{bands.Default(), other} {
		zs := []float64{math.NaN(), inf, -inf, 0, math.Copysign(0, -1)}
		for _, b := range s.Bands {
			for _, x := range []float64{b.Min, b.Max} {
				zs = append(zs, x, math.Nextafter(x, inf), math.Nextafter(x, -inf),
					float64(math.Nextafter32(float32(x), float32(inf))), float64(math.Nextafter32(float32(x), -float32(inf))))
			}
		}
		for range 10000 {
			zs = append(zs, r.NormFloat64()*2)
		}
		c := newTiffClassifier(s)
		for _, z := range zs {
			if got, want := c.of(z), s.Classify(z); got != want {
				t.Errorf("%s: z = %v: code %d, Classify gives %d", s.Name, z, got, want)
			}
		}
		// classify, which tries the previous value's band first, on the
		// float32 values in the order given and sorted.
		f := make([]float32, 0, len(zs))
		for _, z := range zs {
			f = append(f, float32(z))
		}
		sorted := slices.Clone(f)
		slices.Sort(sorted)
		for _, src := range [][]float32{f, sorted} {
			got := make([]uint8, len(src))
			c.classify(src, -9999, got)
			for i, v := range src {
				want := s.Classify(float64(v))
				if v == -9999 {
					want = 0
				}
				if got[i] != want {
					t.Errorf("%s: classify %v: code %d, Classify gives %d", s.Name, v, got[i], want)
				}
			}
		}
	}
}

// TestTIFFRowsOnBandRows: the band codes handed to OnBandRows, block by
// block in row order, are the classification of the raster (as
// bands.Scheme.Classify gives it), also when only the index is written.
func TestTIFFRowsOnBandRows(t *testing.T) {
	s := bands.Default()
	spec := grid.Spec{West: 0, North: 50, Res: 0.1, Cols: 333, Rows: 300}
	r := tiffTestField(spec)
	want := tiffTestBands(r, s)
	for _, withBands := range []bool{false, true} {
		var got []uint8
		opt := DefaultOptions()
		opt.TileSize = 64
		opt.OnBandRows = func(row0, n int, codes []uint8) {
			if row0*spec.Cols != len(got) || len(codes) != n*spec.Cols {
				t.Errorf("OnBandRows(%d, %d, %d codes) out of order", row0, n, len(codes))
			}
			got = append(got, codes...)
		}
		var bands io.Writer
		if withBands {
			bands = &bytes.Buffer{}
		}
		if err := EncodeIndexBandsRows(&bytes.Buffer{}, bands, spec, r.NoData, s, tiffRowsFrom(t, r, 64), opt); err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got, want.Data) {
			t.Errorf("bands written %v: codes from OnBandRows differ from the classification", withBands)
		}
	}
}
