package pipeline

import (
	"drygrid/bands"
	"drygrid/geotiff"
	"drygrid/grid"
	"slices"
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
	t := bands.NewTally(w.res.Spec)
	c := bands.NewClassifier(w.res.Scheme)
	var scratch []uint8
	rows := func(row0, n int, index []float32, codes []uint8) error {
		if err := w.res.rows(row0, n, index); err != nil {
			return err
		}
		if codes == nil { // only the index is written: codes for the tally alone
			scratch = slices.Grow(scratch[:0], len(index))[:len(index)]
			codes = scratch
		}
		if m := w.res.mask; m != nil { // cells outside no data, edge cells weighted
			m.apply(row0, n, index, codes)
			return nil
		}
		c.Row(codes, index, grid.NoDataIndex)
		t.Add(row0, n, codes)
		return nil
	}
	opt.SpillDir = w.dir
	if err := geotiff.WriteIndexBandsRows(idx, bnd, w.res.Spec, grid.NoDataIndex, w.res.Scheme, rows, opt); err != nil {
		return err
	}
	w.res.tally = t
	if w.res.mask != nil {
		w.res.tally = w.res.mask.tally
	}
	w.res.shares()
	return nil
}
