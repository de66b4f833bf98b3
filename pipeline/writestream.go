package pipeline

import (
	"drygrid/geotiff"
	"drygrid/grid"
)

// writeStreamed writes index.tif and bands.tif, those of the two the run
// asks for, in one pass over the rows of res.rows, and tallies the band
// areas for the summary and the manifest.
func (w *layerWriter) writeStreamed(name string, opt geotiff.Options) error {
	if name == "bands" && w.job.Layers["index"] {
		return nil // written with index.tif
	}
	idx, bnd := "", ""
	if w.job.Layers["index"] {
		idx = w.path("index.tif")
	}
	if w.job.Layers["bands"] {
		bnd = w.path("bands.tif")
	}
	t := newBandTally(w.res.Spec)
	opt.OnBandRows = t.add
	opt.SpillDir = w.dir
	if err := geotiff.WriteIndexBandsRows(idx, bnd, w.res.Spec, grid.NoDataIndex, w.res.Scheme, w.res.rows, opt); err != nil {
		return err
	}
	w.res.tally = t
	w.res.shares()
	return nil
}
