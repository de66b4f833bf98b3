package interp

import (
	"fmt"
	"math"

	"drygrid/grid"
	"drygrid/interp/internal/lanes"
)

// Rows interpolates rows row0 .. row0+n-1 of spec into dst (n * spec.Cols
// values, row-major; masked cells get grid.NoDataIndex), exactly as Grid
// computes them: the values are the same bits as those rows of
// Grid(spec, nil), whatever the block split and Params.Workers. Rows are
// spread over Params.Workers goroutines (0 = GOMAXPROCS). It lets a caller
// stream a large grid block by block (geotiff.EncodeIndexRows) without
// holding the whole raster.
func (ip *Interpolator) Rows(spec grid.Spec, row0, n int, dst []float32) error {
	if row0 < 0 || n < 0 || row0+n > spec.Rows || spec.Cols < 0 {
		return fmt.Errorf("interp: rows %d..%d outside the grid's %d rows", row0, row0+n-1, spec.Rows)
	}
	if len(dst) != n*spec.Cols {
		return fmt.Errorf("interp: %d values for %d rows of %d cells", len(dst), n, spec.Cols)
	}
	for i := range dst {
		dst[i] = grid.NoDataIndex
	}
	if n == 0 || spec.Cols == 0 {
		return nil
	}
	ip.rows(spec, row0, n, dst, nil)
	return nil
}

// rowsColumns computes the column longitudes of spec and their sines and
// cosines (a few microseconds per block). Past their length, cos and sin
// repeat the last column lanes.Width-1 times, for the lane kernel's lanes
// beyond a row's end.
func rowsColumns(spec grid.Spec) (lon, cos, sin []float64) {
	n, pad := spec.Cols, lanes.Width-1
	lon, cos, sin = make([]float64, n), make([]float64, n, n+pad), make([]float64, n, n+pad)
	for i := range lon {
		l, _ := spec.Center(i, 0)
		lon[i] = normLon(l)
		sin[i], cos[i] = math.Sincos(lon[i] * degToRad)
	}
	if n > 0 {
		for range pad {
			cos, sin = append(cos, cos[n-1]), append(sin, sin[n-1])
		}
	}
	return lon, cos[:n], sin[:n]
}
