package interp

import (
	"fmt"
	"math"

	"drygrid/grid"
)

// MaxSupportCount is the largest station count Support writes: a cell that
// uses more stations (only with Neighbors above it) is given this.
const MaxSupportCount = math.MaxUint16

// Support fills, for rows row0 .. row0+n-1 of spec (row-major, n *
// spec.Cols values each), how well each cell centre is supported by the
// stations:
//
//   - dist: the great-circle distance in km to the nearest station within
//     RadiusKm (on the sphere of EarthRadiusKm, as the weights use), or
//     grid.NoDataIndex when no station lies within the radius;
//   - count: the number of stations the weighting uses there: those within
//     RadiusKm, at most Neighbors (with Sectors, those the sector rule
//     keeps), capped at MaxSupportCount; 0 when none lies within the
//     radius. It is counted whether or not the coverage rule masks the
//     cell: a count below MinStations (without sectors) is exactly a cell
//     the index leaves as no data.
//
// Either slice may be nil to skip it. The stations are found as Grid finds
// them (the same latitude band, longitude spans and chord test), so the
// count is the n that At reports at the cell centre. Rows are spread over
// Params.Workers goroutines (internal/pool); every cell is computed alone,
// so the values never depend on the worker count or the block split.
func (ip *Interpolator) Support(spec grid.Spec, row0, n int, dist []float32, count []uint16) error {
	if row0 < 0 || n < 0 || row0+n > spec.Rows || spec.Cols < 0 {
		return fmt.Errorf("interp: rows %d..%d outside the grid's %d rows", row0, row0+n-1, spec.Rows)
	}
	if dist != nil && len(dist) != n*spec.Cols {
		return fmt.Errorf("interp: %d distances for %d rows of %d cells", len(dist), n, spec.Cols)
	}
	if count != nil && len(count) != n*spec.Cols {
		return fmt.Errorf("interp: %d counts for %d rows of %d cells", len(count), n, spec.Cols)
	}
	for i := range dist {
		dist[i] = grid.NoDataIndex
	}
	clear(count)
	if n == 0 || spec.Cols == 0 || (dist == nil && count == nil) {
		return nil
	}
	colLon, colCos, colSin := rowsColumns(spec)
	cols := spec.Cols
	ip.eachRow(spec, row0, n, func(w *rowWork, i int, lat float64) {
		var d []float32
		var c []uint16
		if dist != nil {
			d = dist[i*cols : (i+1)*cols]
		}
		if count != nil {
			c = count[i*cols : (i+1)*cols]
		}
		ip.supportRow(w, lat, colLon, colCos, colSin, d, c)
	})
	return nil
}

// supportRow fills one row of Support at latitude lat (dist and count
// already no data and 0; either may be nil).
func (ip *Interpolator) supportRow(w *rowWork, lat float64, colLon, colCos, colSin []float64, dist []float32, count []uint16) {
	span, ok := ip.rowStationsMin(w, lat, 1)
	if !ok {
		return
	}
	sp, cp := math.Sincos(lat * degToRad)
	c := w.c
	c.reset(len(span.lons) + 1)
	for col := range colLon {
		l := colLon[col]
		span.move(l)
		cx, cy, cz := cp*colCos[col], cp*colSin[col], sp
		m := scanSpan(w.st.slice(span.lo, span.hi), c.cs, cx, cy, cz, ip.c2max)
		if m == 0 {
			continue
		}
		cs := c.cs[:m]
		if dist != nil {
			best := 0
			for j := 1; j < m; j++ {
				if cs[j].d2 < cs[best].d2 {
					best = j
				}
			}
			dist[col] = float32(ip.distKm(cs[best].d2, cs[best].rk, cx, cy, cz))
		}
		if count != nil {
			used := min(m, ip.k)
			if ip.p.Sectors > 0 {
				used = ip.sectorPick(cs, l, sp, cp)
			}
			count[col] = uint16(min(used, MaxSupportCount))
		}
	}
}
