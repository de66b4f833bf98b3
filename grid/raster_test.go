package grid

import (
	"math"
	"testing"
)

func TestFloat32Raster(t *testing.T) {
	s := specMust(t, 0, 0, 3, 2, 1) // 3 x 2
	r := NewFloat32(s, NoDataIndex)
	if NoDataIndex != -9999 {
		t.Fatalf("NoDataIndex %v, want -9999 (docs/design.md, index.tif)", NoDataIndex)
	}
	if len(r.Data) != 6 || r.NoData != -9999 {
		t.Fatalf("len %d nodata %v", len(r.Data), r.NoData)
	}
	for i, v := range r.Data {
		if v != -9999 {
			t.Fatalf("cell %d = %v, want the no-data fill", i, v)
		}
	}
	if _, ok := r.At(2, 1); ok {
		t.Error("a no-data cell reports data")
	}
	// Row-major, row 0 north: (col 2, row 0) is offset 2, (col 0, row 1) is 3.
	r.Data[2], r.Data[3], r.Data[4] = 1.5, -0.25, float32(math.NaN())
	if v, ok := r.At(2, 0); !ok || v != 1.5 {
		t.Errorf("At(2,0) = %v,%v", v, ok)
	}
	if v, ok := r.At(0, 1); !ok || v != -0.25 {
		t.Errorf("At(0,1) = %v,%v", v, ok)
	}
	if _, ok := r.At(1, 1); ok {
		t.Error("NaN must read as no data")
	}
}

func TestUint8Raster(t *testing.T) {
	s := specMust(t, 0, 0, 3, 2, 1)
	r := NewUint8(s, 0)
	if len(r.Data) != 6 {
		t.Fatalf("len %d", len(r.Data))
	}
	if _, ok := r.At(1, 1); ok {
		t.Error("code 0 is no data (band rasters, bands.tif)")
	}
	r.Data[s.Index(1, 1)] = 7
	if v, ok := r.At(1, 1); !ok || v != 7 || r.Data[4] != 7 {
		t.Errorf("At(1,1) = %v,%v", v, ok)
	}
	f := NewUint8(s, 255)
	for i, v := range f.Data {
		if v != 255 {
			t.Fatalf("cell %d = %d, want the fill 255", i, v)
		}
	}
	if _, ok := f.At(0, 0); ok {
		t.Error("fill value must read as no data")
	}
}
