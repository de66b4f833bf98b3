package region

import (
	"drygrid/bands"
	"drygrid/grid"
	"drygrid/internal/pool"
	"fmt"
	"math"

	"github.com/tidwall/rtree"
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
// the order of regions; a nil band raster gives nil. The result does not depend on the core count: regions
// are summed independently, each in row-major cell order.
//
// An rtree over the region bounds (shifted by -360, 0, +360 for the
// antimeridian, see Coverage) picks the regions that reach the grid.
func Zonal(bands *grid.Uint8, index *grid.Float32, regions []Region) []ZonalStats {
	if bands == nil || len(bands.Data) != bands.Spec.Len() {
		return nil
	}
	s := bands.Spec
	if SameGrid(bands, index) != nil {
		index = nil
	}
	var tr rtree.RTreeG[int]
	for i, r := range regions {
		b := r.Geom.Bound()
		for _, k := range [3]float64{0, -360, 360} {
			tr.Insert([2]float64{b.Min[0] + k, b.Min[1]}, [2]float64{b.Max[0] + k, b.Max[1]}, i)
		}
	}
	reach := make([]bool, len(regions))
	tr.Search([2]float64{s.West, s.South()}, [2]float64{s.East(), s.North}, func(_, _ [2]float64, i int) bool {
		reach[i] = true
		return true
	})
	rowArea := s.RowAreasKm2()
	out := make([]ZonalStats, len(regions))
	type scratch struct {
		cov covWork
		buf []CellWeight
	}
	work := make([]scratch, pool.Count(len(regions), 0, 1))
	pool.Run(len(regions), 0, 1, func(w, i, _ int) {
		sc := &work[w]
		out[i], sc.buf = zonalOne(bands, index, regions[i], reach[i], rowArea, &sc.cov, sc.buf)
	})
	return out
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

func zonalOne(bands *grid.Uint8, index *grid.Float32, r Region, reach bool, rowArea []float64, cov *covWork, buf []CellWeight) (ZonalStats, []CellWeight) {
	z := ZonalStats{Key: r.Key}
	if !reach {
		return z, buf
	}
	s := bands.Spec
	var sumZ, sumZA float64
	buf = cov.coverage(s, r.Geom, buf)
	for _, w := range buf {
		a := w.Frac * rowArea[w.Cell/s.Cols]
		z.AreaKm2 += a
		if c := bands.Data[w.Cell]; c != bands.NoData {
			z.CoveredKm2 += a
			z.CodeKm2[c] += a
		}
		if index != nil {
			v := index.Data[w.Cell]
			if v != index.NoData && !math.IsNaN(float64(v)) && !math.IsInf(float64(v), 0) {
				sumZ += a * float64(v)
				sumZA += a
			}
		}
	}
	if sumZA > 0 {
		z.MeanZ, z.HasMeanZ = sumZ/sumZA, true
	}
	return z, buf
}
