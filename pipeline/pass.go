package pipeline

import (
	"context"
	"slices"
	"sync"

	"drygrid/bands"
	"drygrid/geotiff"
	"drygrid/grid"
	"drygrid/internal/pool"
	"drygrid/region"
)

// The pass: every layer of a run comes from one pass over the grid's rows,
// a block of rowBlock rows at a time, in order from the north. The
// interpolator fills a block of index values (on all cores), the mask
// makes the cells outside it no data, the classifier gives the block's
// band codes (rows spread over the cores), the tally adds their areas, and
// each sink takes the block in turn: the GeoTIFF encoders (when index.tif
// or bands.tif is written they drive the pass), the polygon tracer, the
// zonal statistics, the picture's and the page's preview raster, and
// Compute's whole rasters. No sink holds the index raster, so a run's
// memory is a few blocks of rows plus what each sink keeps: compressed
// tiles, open polygon boundaries, the preview.

// rowSink takes one block of rows: n rows from row0 of the index (n *
// Cols values, no data grid.NoDataIndex) and their band codes (0 = no
// data). Sinks are called one block at a time, in row order; different
// sinks of one block may run at once, so a sink touches only its own state.
type rowSink func(row0, n int, index []float32, codes []uint8) error

// pass is one run's pass over the rows.
type pass struct {
	spec    grid.Spec
	workers int
	rows    func(row0, n int, dst []float32) error // interpolated rows
	mask    *cellMask                              // nil without Job.Mask
	classes *bands.Classifier
	tally   *bands.Tally
	sinks   []rowSink
	zonal   *region.ZonalRows // with regions (addZonal)

	weights []float64 // a block's shares inside the mask
	index   []float32 // a block of rows when the pass drives itself
	codes   []uint8
}

// newPass prepares the pass of res over its grid.
func newPass(job *Job, res *Result) *pass {
	return &pass{spec: res.Spec, workers: job.Params.Workers, rows: res.rows, mask: res.mask,
		classes: bands.NewClassifier(res.Scheme), tally: bands.NewTally(res.Spec)}
}

// addZonal adds the zonal statistics of regions to the sinks (none
// without regions).
func (p *pass) addZonal(regions []region.Region) {
	if len(regions) == 0 {
		return
	}
	p.zonal = region.NewZonalRows(p.spec, regions)
	p.sinks = append(p.sinks, func(row0, _ int, index []float32, codes []uint8) error {
		return p.zonal.Rows(row0, codes, 0, index, grid.NoDataIndex)
	})
}

// finish gives res what the pass added up: the band shares from the tally
// and, with regions, their statistics.
func (p *pass) finish(res *Result) error {
	res.tally = p.tally
	res.shares()
	if p.zonal == nil {
		return nil
	}
	stats, err := p.zonal.Stats()
	if err != nil {
		return err
	}
	res.Regions = stats
	return nil
}

// block makes one block: the index rows, the mask, the codes and the
// tally, then gives it to every sink.
func (p *pass) block(row0, n int, index []float32, codes []uint8) error {
	if err := p.rows(row0, n, index); err != nil {
		return err
	}
	cols := p.spec.Cols
	if p.mask != nil {
		p.weights = slices.Grow(p.weights[:0], n*cols)[:n*cols]
		p.mask.apply(row0, n, index, p.weights)
	}
	pool.Run(n, p.workers, 16, func(_, lo, hi int) {
		p.classes.Row(codes[lo*cols:hi*cols], index[lo*cols:hi*cols], grid.NoDataIndex)
	})
	if p.mask != nil {
		p.tally.AddWeighted(row0, codes, p.weights)
	} else {
		p.tally.Add(row0, n, codes)
	}
	return p.feed(row0, n, index, codes)
}

// feed gives a block to the sinks, each on its own goroutine when there are
// several (the tracer, the zonal statistics and the preview take turns on
// two cores instead of one), and returns the first error in sink order.
func (p *pass) feed(row0, n int, index []float32, codes []uint8) error {
	switch len(p.sinks) {
	case 0:
		return nil
	case 1:
		return p.sinks[0](row0, n, index, codes)
	}
	errs := make([]error, len(p.sinks))
	var wg sync.WaitGroup
	for i, s := range p.sinks[1:] {
		wg.Go(func() { errs[i+1] = s(row0, n, index, codes) })
	}
	errs[0] = p.sinks[0](row0, n, index, codes)
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	return nil
}

// run makes every block in order, checking ctx between blocks.
func (p *pass) run(ctx context.Context) error {
	cols := p.spec.Cols
	for row0 := 0; row0 < p.spec.Rows; row0 += rowBlock {
		if err := ctx.Err(); err != nil {
			return err
		}
		n := min(rowBlock, p.spec.Rows-row0)
		p.index = slices.Grow(p.index[:0], n*cols)[:n*cols]
		p.codes = slices.Grow(p.codes[:0], n*cols)[:n*cols]
		if err := p.block(row0, n, p.index, p.codes); err != nil {
			return err
		}
	}
	return nil
}

// runTIFF makes the pass inside the GeoTIFF row encoders, which ask for the
// blocks (index.tif and bands.tif, those named not empty).
func (p *pass) runTIFF(indexPath, bandsPath string, s *bands.Scheme, opt geotiff.Options) error {
	rows := func(row0, n int, index []float32, codes []uint8) error {
		if codes == nil { // only the index file: codes for the tally and the sinks
			p.codes = slices.Grow(p.codes[:0], len(index))[:len(index)]
			codes = p.codes
		}
		return p.block(row0, n, index, codes)
	}
	return geotiff.WriteIndexBandsRows(indexPath, bandsPath, p.spec, grid.NoDataIndex, s, rows, opt)
}

// collect is Compute's sink: the whole index and band rasters.
func collect(res *Result) rowSink {
	s := res.Spec
	res.Index, res.Bands = grid.NewFloat32(s, grid.NoDataIndex), grid.NewUint8(s, 0)
	return func(row0, n int, index []float32, codes []uint8) error {
		copy(res.Index.Data[row0*s.Cols:], index)
		copy(res.Bands.Data[row0*s.Cols:], codes)
		return nil
	}
}
