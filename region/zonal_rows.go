package region

import (
	"fmt"
	"math"
	"slices"

	"drygrid/grid"
	"drygrid/internal/pool"
)

// ZonalRows accumulates the zonal statistics of regions over a grid's rows
// as they come: blocks of whole rows, in order from row 0 (the
// northernmost), each passed once to Rows; Stats gives the result after the
// last row. The result is Zonal's bit for bit, whatever the block sizes and
// the core count: each region is summed in row-major cell order, its shares
// being Coverage's.
//
// Memory: the regions' polygons in grid units (each released once the
// region's last row has passed), the statistics, and per worker a few rows
// of Cols floats; never a whole raster, nor a region's cells. Within a
// block the regions that reach its rows are spread over the cores
// (internal/pool). A ZonalRows is not safe for use by several goroutines at
// once.
type ZonalRows struct {
	spec    grid.Spec
	rowArea []float64    // km^2 of a whole cell, by row
	covers  []rowCover   // by region; emptied once the region is done
	stats   []ZonalStats // by region: the sums so far
	sumZ    []zonalZ     // by region
	order   []int        // regions that reach the grid, by first row
	next    int          // order[next:] have not started
	active  []int        // regions started and not done
	row     int          // the next row expected
	index   int          // 0 before the first block, 1 with an index, -1 without
	auth    []authCoef   // f of each row of the block (authalic.go)
	scratch []rowScratch
}

// zonalZ is one region's sums for the mean index so far: area times index,
// and area, over cells holding an index value.
type zonalZ struct{ sumZ, sumZA float64 }

// NewZonalRows prepares the regions for the grid s. Regions that do not
// reach the grid get zero areas.
func NewZonalRows(s grid.Spec, regions []Region) *ZonalRows {
	z := &ZonalRows{
		spec:    s,
		rowArea: s.RowAreasKm2(),
		covers:  make([]rowCover, len(regions)),
		stats:   make([]ZonalStats, len(regions)),
		sumZ:    make([]zonalZ, len(regions)),
	}
	pool.Run(len(regions), 0, 16, func(_, lo, hi int) {
		for i := lo; i < hi; i++ {
			z.covers[i] = newRowCover(s, regions[i].Geom)
		}
	})
	for i, r := range regions {
		z.stats[i].Key = r.Key
		if z.covers[i].reaches() {
			z.order = append(z.order, i)
		}
	}
	slices.SortFunc(z.order, func(a, b int) int {
		ra, _ := z.covers[a].rows(s)
		rb, _ := z.covers[b].rows(s)
		return ra - rb
	})
	return z
}

// Rows adds the block of whole rows starting at row0: codes holds the band
// raster's codes (nodata the no-data code), n rows of Cols each, and index
// the index raster's values on the same cells, or is nil for no mean index
// (nil in every block, or in none). Blocks must come in order, each starting
// where the previous one ended, the first at row 0.
func (z *ZonalRows) Rows(row0 int, codes []uint8, nodata uint8, index []float32, indexNoData float32) error {
	s := z.spec
	if z.row == s.Rows {
		return fmt.Errorf("zonal rows: a block at row %d after the last row (%d rows)", row0, s.Rows)
	}
	if row0 != z.row {
		return fmt.Errorf("zonal rows: a block at row %d, want row %d (blocks come in order)", row0, z.row)
	}
	if s.Cols <= 0 || len(codes) == 0 || len(codes)%s.Cols != 0 {
		return fmt.Errorf("zonal rows: a block of %d codes at row %d, not whole rows of %d", len(codes), row0, s.Cols)
	}
	n := len(codes) / s.Cols
	if row0+n > s.Rows {
		return fmt.Errorf("zonal rows: a block of %d rows at row %d runs past the grid's %d rows", n, row0, s.Rows)
	}
	if index != nil && len(index) != len(codes) {
		return fmt.Errorf("zonal rows: a block at row %d holds %d index values for %d codes", row0, len(index), len(codes))
	}
	has := -1
	if index != nil {
		has = 1
	}
	if z.index != 0 && z.index != has {
		if has > 0 {
			return fmt.Errorf("zonal rows: a block at row %d with an index, the blocks before without", row0)
		}
		return fmt.Errorf("zonal rows: a block at row %d without an index, the blocks before with one", row0)
	}
	z.index = has
	row1 := row0 + n // end of the block
	for z.next < len(z.order) {
		if r0, _ := z.covers[z.order[z.next]].rows(s); r0 >= row1 {
			break
		}
		z.active = append(z.active, z.order[z.next])
		z.next++
	}
	if len(z.active) > 0 {
		z.auth = slices.Grow(z.auth[:0], n)[:n]
		pool.Run(n, 0, 8, func(_, lo, hi int) {
			for k := lo; k < hi; k++ {
				z.auth[k] = stripAuth(s, s.Rows-1-(row0+k))
			}
		})
		workers := pool.Count(len(z.active), 0, 1)
		if len(z.scratch) < workers {
			z.scratch = append(z.scratch, make([]rowScratch, workers-len(z.scratch))...)
		}
		b := zonalBlock{row0: row0, row1: row1, codes: codes, nodata: nodata, index: index, indexNoData: indexNoData}
		pool.Run(len(z.active), 0, 1, func(w, lo, hi int) {
			for _, i := range z.active[lo:hi] {
				z.add(i, &b, &z.scratch[w])
			}
		})
	}
	// Regions whose last row has passed are done: drop their polygons.
	keep := z.active[:0]
	for _, i := range z.active {
		if _, r1 := z.covers[i].rows(s); r1 >= row1 {
			keep = append(keep, i)
		} else {
			z.covers[i] = rowCover{}
		}
	}
	z.active = keep
	z.row = row1
	return nil
}

// zonalBlock is one block of rows as passed to Rows.
type zonalBlock struct {
	row0, row1  int
	codes       []uint8
	nodata      uint8
	index       []float32
	indexNoData float32
}

// add sums region i over the rows of the block, row by row, each from west
// to east: row-major order, as Zonal has always summed.
func (z *ZonalRows) add(i int, b *zonalBlock, sc *rowScratch) {
	s := z.spec
	rc := &z.covers[i]
	acc, zz := &z.stats[i], &z.sumZ[i]
	r0, r1 := rc.rows(s)
	r0, r1 = max(r0, b.row0), min(r1, b.row1-1)
	area, covered := acc.AreaKm2, acc.CoveredKm2
	sumZ, sumZA := zz.sumZ, zz.sumZA
	for r := r0; r <= r1; r++ {
		k := r - b.row0
		sh := rc.row(s.Rows-1-r, &z.auth[k], sc)
		off := k*s.Cols + rc.c0
		codes := b.codes[off : off+len(sh)]
		var index []float32
		if b.index != nil {
			index = b.index[off : off+len(sh)]
		}
		rowA := z.rowArea[r]
		for c, v := range sh {
			if v == 0 {
				continue
			}
			a := v * rowA
			area += a
			if code := codes[c]; code != b.nodata {
				covered += a
				acc.CodeKm2[code] += a
			}
			if index != nil {
				x := index[c]
				if x != b.indexNoData && !math.IsNaN(float64(x)) && !math.IsInf(float64(x), 0) {
					sumZ += a * float64(x)
					sumZA += a
				}
			}
		}
	}
	acc.AreaKm2, acc.CoveredKm2 = area, covered
	zz.sumZ, zz.sumZA = sumZ, sumZA
}

// Stats gives each region's statistics, in the order of the regions, once
// every row of the grid has been passed to Rows. The slice is the
// ZonalRows' own (not copied), the same at each call.
func (z *ZonalRows) Stats() ([]ZonalStats, error) {
	if z.row != z.spec.Rows {
		return nil, fmt.Errorf("zonal rows: statistics asked for after %d of the grid's %d rows", z.row, z.spec.Rows)
	}
	for i, m := range z.sumZ {
		if m.sumZA > 0 {
			z.stats[i].MeanZ, z.stats[i].HasMeanZ = m.sumZ/m.sumZA, true
		}
	}
	return z.stats, nil
}
