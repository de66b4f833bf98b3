package region

import (
	"drygrid/bands"
	"drygrid/grid"
	"fmt"
)

// ZonalStats are one region's areas on a band raster, all in km^2 on the
// WGS84 ellipsoid, each cell weighted by the share of it inside the region.
type ZonalStats struct {
	Key string // the region's name
	// Shares: the region's area inside the grid, of which covered (cells
	// holding a band code, not no data), and the area by band code.
	bands.Shares
	MeanZ    float64 // area-weighted mean of the index over cells holding one
	HasMeanZ bool    // false without an index raster or with no index cell
}

// MaskedKm2 is the region's area inside the grid where the band raster holds
// no data.
func (z ZonalStats) MaskedKm2() float64 { return z.AreaKm2 - z.CoveredKm2 }

// Zonal computes per-region, per-code areas of the band raster and, when
// index is not nil and on the same grid, the area-weighted mean index (an
// index raster on another grid is ignored: check with SameGrid first to
// report it). Regions outside the grid get zero areas. Stats come back in
// the order of regions; a nil band raster, or one whose data does not fill
// its grid, gives nil. The result does not depend on the core count:
// regions are summed independently, each in row-major cell order.
//
// Zonal is ZonalRows fed the whole raster as one block; use ZonalRows to
// pass the rasters a block of rows at a time.
func Zonal(bands *grid.Uint8, index *grid.Float32, regions []Region) []ZonalStats {
	if bands == nil || len(bands.Data) != bands.Spec.Len() {
		return nil
	}
	if SameGrid(bands, index) != nil {
		index = nil
	}
	var idx []float32
	var idxNoData float32
	if index != nil {
		idx, idxNoData = index.Data, index.NoData
	}
	z := NewZonalRows(bands.Spec, regions)
	if len(bands.Data) == 0 {
		return z.stats // a grid without cells: zero areas
	}
	if err := z.Rows(0, bands.Data, bands.NoData, idx, idxNoData); err != nil {
		return nil // not reached: the rasters were checked above
	}
	st, err := z.Stats()
	if err != nil {
		return nil // not reached: every row was passed
	}
	return st
}

// SameGrid reports an error when the index raster is not on the band
// raster's grid (nil index is fine).
func SameGrid(bands *grid.Uint8, index *grid.Float32) error {
	if index == nil {
		return nil
	}
	if index.Spec != bands.Spec || len(index.Data) != index.Spec.Len() {
		return fmt.Errorf("index raster grid (%s) differs from the band raster's (%s)", index.Spec, bands.Spec)
	}
	return nil
}
