package interp

import (
	"fmt"
	"math"
	"runtime"
	"sync"
	"sync/atomic"

	"drygrid/grid"
)

// Rows interpolates rows row0 .. row0+n-1 of spec into dst (n * spec.Cols
// values, row-major; masked cells get grid.NoDataIndex), exactly as Grid
// computes them: the values are the same bits as those rows of
// Grid(spec, nil), whatever the block split and Params.Workers. Rows are
// spread over Params.Workers goroutines (0 = GOMAXPROCS). It lets a caller
// stream a large grid block by block (export.EncodeIndexTIFFRows) without
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
	colLon, colCos, colSin := rowsColumns(spec)
	workers := ip.p.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, n)
	var next atomic.Int64
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			w := ip.newRowWork()
			for {
				i := int(next.Add(1) - 1)
				if i >= n {
					return
				}
				_, lat := spec.Center(0, row0+i)
				ip.gridRow(w, lat, spec.Res, colLon, colCos, colSin, dst[i*spec.Cols:(i+1)*spec.Cols])
			}
		}()
	}
	wg.Wait()
	return nil
}

// rowsColumns computes the column longitudes of spec and their sines and
// cosines the way Grid does (a few microseconds per block).
func rowsColumns(spec grid.Spec) (lon, cos, sin []float64) {
	lon, cos, sin = make([]float64, spec.Cols), make([]float64, spec.Cols), make([]float64, spec.Cols)
	for i := range lon {
		l, _ := spec.Center(i, 0)
		lon[i] = normLon(l)
		sin[i], cos[i] = math.Sincos(lon[i] * degToRad)
	}
	return lon, cos, sin
}
