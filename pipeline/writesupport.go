package pipeline

import (
	"fmt"
	"slices"

	"drygrid/geotiff"
	"drygrid/grid"
)

// writeSupport writes the support layer, streamed row block by row block
// through the Float32 row encoder (geotiff.WriteIndexRows, the index's
// format: tiled, DEFLATE with the floating-point predictor, no-data-aware
// mean overviews, GDAL_NODATA -9999):
//
//   - support.tif: the great-circle distance in km from each cell centre
//     to the nearest station within the search radius, no data (-9999)
//     where no station lies within it;
//   - support_count.tif: the number of stations the weighting uses there
//     (within the radius, at most --neighbors; with --sectors those the
//     sector rule keeps), a whole number stored as Float32 (exact up to
//     2^24), 0 where no station lies within the radius. A cell counted
//     below --min-stations is no data in index.tif.
//
// Two files, one value each, keep every reader simple (gdalinfo, QGIS, a
// COG viewer) and need no new raster kind in package geotiff. Each file is
// one pass of interp.Support, which holds no raster.
func (w *layerWriter) writeSupport(opt geotiff.Options) error {
	p := w.job.Params
	spec := w.res.Spec
	opt.SpillDir = w.dir
	opt.Units = "km"
	opt.Description = fmt.Sprintf("distance to the nearest station within %g km", p.RadiusKm)
	var count []uint16
	err := geotiff.WriteIndexRows(w.path("support.tif"), spec, grid.NoDataIndex, func(row0, n int, dist []float32, _ []uint8) error {
		return w.res.SupportRows(row0, n, dist, nil)
	}, opt)
	if err != nil {
		return err
	}
	opt.Units = ""
	opt.Description = fmt.Sprintf("stations used: within %g km, at most %d", p.RadiusKm, p.Neighbors)
	if p.Sectors > 0 {
		opt.Description += fmt.Sprintf(", %d sectors", p.Sectors)
	}
	return geotiff.WriteIndexRows(w.path("support_count.tif"), spec, grid.NoDataIndex, func(row0, n int, dst []float32, _ []uint8) error {
		count = slices.Grow(count[:0], len(dst))[:len(dst)]
		if err := w.res.SupportRows(row0, n, nil, count); err != nil {
			return err
		}
		for i, c := range count {
			dst[i] = float32(c)
		}
		return nil
	}, opt)
}
