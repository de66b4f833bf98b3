package geojson

import (
	"bytes"
	"io"
	"math"
	"testing"

	"drygrid/bands"
	"drygrid/grid"
	"drygrid/internal/rastertest"
	"drygrid/polygon"
)

// encodeStreamed writes the band layer of r fed in blocks of n rows to
// BandAreas and a polygon.Tracer, then EncodeBandPolygons: what a caller
// that never holds the raster does.
func encodeStreamed(t testing.TB, w io.Writer, r *grid.Uint8, opt Options, n int) {
	t.Helper()
	sp := r.Spec
	areas := NewBandAreas(sp, r.NoData)
	tr, err := polygon.NewTracer(sp, r.NoData, opt.SimplifyKm)
	if err != nil {
		t.Fatal(err)
	}
	for row := 0; row < sp.Rows; row += n {
		block := r.Data[row*sp.Cols : min(row+n, sp.Rows)*sp.Cols]
		if err := areas.Rows(row, block); err != nil {
			t.Fatal(err)
		}
		if err := tr.Rows(row, block); err != nil {
			t.Fatal(err)
		}
	}
	polys, err := tr.Finish()
	if err != nil {
		t.Fatal(err)
	}
	if err := EncodeBandPolygons(w, sp, polys, areas, bands.Default(), opt); err != nil {
		t.Fatal(err)
	}
}

// TestEncodeBandsStreamed: the layer written from rows streamed in blocks
// of 1, 3 and 256 rows is byte for byte EncodeBands on the whole raster
// (areas, bbox, polygons), exact and simplified, on random rasters, grids
// crossing 180 and the global benchmark raster.
func TestEncodeBandsStreamed(t *testing.T) {
	type tc struct {
		name string
		r    *grid.Uint8
		km   float64
	}
	var cases []tc
	for _, c := range rastertest.RandomCases(9, 80) {
		if hasValidCodes(c.R) {
			cases = append(cases, tc{c.Name, c.R, 0})
		}
	}
	for _, c := range rastertest.AntimeridianCases() {
		cases = append(cases, tc{c.Name, c.R, 0}, tc{c.Name, c.R, 40})
	}
	for k, sc := range rastertest.SimplifyCases() {
		if k%4 == 0 && hasValidCodes(sc.C.R) {
			cases = append(cases, tc{sc.C.Name, sc.C.R, sc.Km})
		}
	}
	if !testing.Short() {
		cases = append(cases, tc{"global 0.1", rastertest.BenchRaster(t), 0})
	}
	for _, c := range cases {
		var want bytes.Buffer
		if err := EncodeBands(&want, c.r, bands.Default(), Options{SimplifyKm: c.km}); err != nil {
			t.Fatal(err)
		}
		for _, n := range []int{1, 3, 256} {
			var got bytes.Buffer
			encodeStreamed(t, &got, c.r, Options{SimplifyKm: c.km}, n)
			if !bytes.Equal(got.Bytes(), want.Bytes()) {
				t.Fatalf("%s (km %g): blocks of %d rows write other bytes than EncodeBands", c.name, c.km, n)
			}
		}
	}
}

// TestEncodeBandPolygonsErrors: areas that do not cover the grid, of
// another grid, or fed out of order are errors, and nothing is written.
func TestEncodeBandPolygonsErrors(t *testing.T) {
	r := rastertest.Raster(3, 1, 1, 2, 0, 0, 1, 1)
	sp := r.Spec
	polys := polygon.PolygonizeRFC7946(r)
	a := NewBandAreas(sp, 0)
	if err := a.Rows(1, r.Data[3:]); err == nil {
		t.Error("areas: first block at row 1: no error")
	}
	if err := a.Rows(0, r.Data[:2]); err == nil {
		t.Error("areas: a block of 2 codes on 3 columns: no error")
	}
	if err := a.Rows(0, r.Data[:3]); err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := EncodeBandPolygons(&b, sp, polys, a, bands.Default(), Options{}); err == nil || b.Len() > 0 {
		t.Errorf("areas with a row missing: error %v, %d bytes written", err, b.Len())
	}
	if err := a.Rows(1, append(r.Data[3:], r.Data[3:]...)); err == nil {
		t.Error("areas: rows past the grid: no error")
	}
	if err := a.Rows(1, r.Data[3:]); err != nil {
		t.Fatal(err)
	}
	if a.Count(1) != 3 || a.Count(2) != 1 || math.Abs(a.AreaKm2(1)-sp.CellAreaKm2(0)-2*sp.CellAreaKm2(1)) > 1e-9 {
		t.Errorf("areas: counts %d, %d, area %g", a.Count(1), a.Count(2), a.AreaKm2(1))
	}
	other := sp
	other.West++
	if err := EncodeBandPolygons(&b, other, polys, a, bands.Default(), Options{}); err == nil || b.Len() > 0 {
		t.Errorf("areas of another grid: error %v, %d bytes written", err, b.Len())
	}
	if err := EncodeBandPolygons(&b, sp, polys, nil, bands.Default(), Options{}); err == nil {
		t.Error("nil areas: no error")
	}
	if err := EncodeBandPolygons(&b, sp, polys, a, bands.Default(), Options{}); err != nil {
		t.Fatal(err)
	}
	var want bytes.Buffer
	if err := EncodeBands(&want, r, bands.Default(), Options{}); err != nil || !bytes.Equal(b.Bytes(), want.Bytes()) {
		t.Errorf("after the refused calls: error %v, bytes equal %v", err, bytes.Equal(b.Bytes(), want.Bytes()))
	}
}

// BenchmarkWriteBandsStream0025 streams a smooth band field on the global
// 0.025 deg grid (14400 x 7200, 104 M cells) in blocks of 256 rows, made
// as they are fed, to BandAreas and a polygon.Tracer, and writes the layer
// to io.Discard: the raster is never held, and B/op stays far below the
// cell count.
func BenchmarkWriteBandsStream0025(b *testing.B) {
	sp, err := grid.Global(0.025)
	if err != nil {
		b.Fatal(err)
	}
	field := rastertest.NewBenchField(sp)
	block := make([]uint8, 256*sp.Cols)
	s := bands.Default()
	b.ResetTimer()
	for b.Loop() {
		areas := NewBandAreas(sp, 0)
		tr, err := polygon.NewTracer(sp, 0, 0)
		if err != nil {
			b.Fatal(err)
		}
		for row := 0; row < sp.Rows; row += 256 {
			blk := block[:min(256, sp.Rows-row)*sp.Cols]
			field.Rows(row, blk)
			if err := areas.Rows(row, blk); err != nil {
				b.Fatal(err)
			}
			if err := tr.Rows(row, blk); err != nil {
				b.Fatal(err)
			}
		}
		polys, err := tr.Finish()
		if err != nil {
			b.Fatal(err)
		}
		if err := EncodeBandPolygons(io.Discard, sp, polys, areas, s, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}
