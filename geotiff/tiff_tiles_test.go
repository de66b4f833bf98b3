package geotiff

import (
	"math"
	"testing"
)

// TestTIFFFloatTilePredictor undoes the floating-point predictor as TIFF
// Technical Note 3 (Adobe 2005) describes the decoder: add each byte of a
// row to the previous one, then read sample j's bytes from planes 0..3 (most
// significant first). It checks the values come back and the cells outside
// the image hold no data (edge padding).
func TestTIFFFloatTilePredictor(t *testing.T) {
	const tile, nd = 16, float32(-9999)
	l := &tiffLevel{cols: 5, rows: 3, f32: []float32{
		1, 2, -0.5, 1e-30, 3.25,
		float32(math.NaN()), 0, -2, 7, 8,
		9, 10, 11, 12, float32(math.Inf(1)),
	}}
	buf := make([]byte, 4*tile*tile)
	tiffFillFloatTile(l, tile, 0, 0, nd, buf)
	for r := 0; r < tile; r++ {
		row := append([]byte(nil), buf[r*4*tile:(r+1)*4*tile]...)
		for i := 1; i < len(row); i++ {
			row[i] += row[i-1]
		}
		for j := 0; j < tile; j++ {
			b := uint32(row[j])<<24 | uint32(row[tile+j])<<16 | uint32(row[2*tile+j])<<8 | uint32(row[3*tile+j])
			got := math.Float32frombits(b)
			want := nd
			if r < l.rows && j < l.cols {
				if v := l.f32[r*l.cols+j]; v == v {
					want = v
				}
			}
			if got != want {
				t.Errorf("row %d col %d: decoded %v, want %v", r, j, got, want)
			}
		}
	}
}

// TestTIFFByteTilePredictor undoes horizontal differencing (TIFF 6.0
// section 14: each byte is the difference from its left neighbour) and
// checks the codes and the no-data padding of an edge tile.
func TestTIFFByteTilePredictor(t *testing.T) {
	const tile = 16
	l := &tiffLevel{cols: 20, rows: 18, u8: make([]uint8, 20*18)}
	for i := range l.u8 {
		l.u8[i] = uint8(i*7%11 + 1)
	}
	buf := make([]byte, tile*tile)
	for _, pred := range []bool{false, true} {
		tiffFillByteTile(l, tile, 1, 1, 0, pred, buf) // covers cols 16..19, rows 16..17
		for r := 0; r < tile; r++ {
			row := append([]byte(nil), buf[r*tile:(r+1)*tile]...)
			if pred {
				for i := 1; i < len(row); i++ {
					row[i] += row[i-1]
				}
			}
			for j, got := range row {
				want := uint8(0)
				if y, x := 16+r, 16+j; y < l.rows && x < l.cols {
					want = l.u8[y*l.cols+x]
				}
				if got != want {
					t.Errorf("predict %v row %d col %d: %d, want %d", pred, r, j, got, want)
				}
			}
		}
	}
}
