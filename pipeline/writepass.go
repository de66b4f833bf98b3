package pipeline

import (
	"context"

	"drygrid/grid"
	"drygrid/layer/geojson"
	"drygrid/polygon"

	"github.com/paulmach/orb"
)

// runPass makes the run's one pass over the rows (pass.go): index.tif and
// bands.tif, when asked for, are written as the rows come, and the other
// layers' sinks take the rows they need; the band shares are known at its
// end.
func (w *layerWriter) runPass(ctx context.Context) error {
	job, res := w.job, w.res
	p := newPass(job, res)
	if job.Layers["map"] || job.Layers["page"] {
		w.preview = newPreview(res.Spec, previewMaxCells)
		p.sinks = append(p.sinks, w.preview.rows)
	}
	p.addZonal(w.regions)
	if job.Layers["geojson"] || (job.Layers["page"] && w.preview.f == 1) {
		t, err := newTraceSink(res.Spec, job.SimplifyKm)
		if err != nil {
			return err
		}
		w.traced = t
		p.sinks = append(p.sinks, t.rows)
	}
	var err error
	if job.Layers["index"] || job.Layers["bands"] {
		idx, bnd := "", ""
		if job.Layers["index"] {
			idx = w.path("index.tif")
		}
		if job.Layers["bands"] {
			bnd = w.path("bands.tif")
		}
		opt := w.tiffOptions()
		opt.SpillDir = w.dir
		err = p.runTIFF(idx, bnd, res.Scheme, opt)
	} else {
		err = p.run(ctx)
	}
	if err != nil {
		return err
	}
	if err := p.finish(res); err != nil {
		return err
	}
	if w.traced != nil {
		return w.traced.finish()
	}
	return nil
}

// traceSink traces the band polygons of bands.geojson from the rows as
// they come (polygon.Tracer) and adds up the band areas beside them
// (geojson.BandAreas); only open boundaries and finished polygons are held.
type traceSink struct {
	t     *polygon.Tracer
	areas *geojson.BandAreas
	polys map[uint8]orb.MultiPolygon // after finish
}

func newTraceSink(s grid.Spec, simplifyKm float64) (*traceSink, error) {
	t, err := polygon.NewTracer(s, 0, simplifyKm)
	if err != nil {
		return nil, err
	}
	return &traceSink{t: t, areas: geojson.NewBandAreas(s, 0)}, nil
}

func (t *traceSink) rows(row0, _ int, _ []float32, codes []uint8) error {
	if err := t.areas.Rows(row0, codes); err != nil {
		return err
	}
	return t.t.Rows(row0, codes)
}

func (t *traceSink) finish() (err error) {
	t.polys, err = t.t.Finish()
	return err
}

// previewMaxCells is the most cells the preview raster holds: a grid up to
// this size (the global 0.1 degree grid has 6,480,000 cells) is its own
// preview.
const previewMaxCells = 6_500_000

// preview is the band raster the picture and the page are drawn from: the
// grid itself when it has at most previewMaxCells cells, else every f-th
// cell of every f-th row, f the smallest odd number that brings it within
// that size. With f odd the preview's cells are a grid of f times the
// resolution whose cell centres are cells of the run's grid (the centre
// one of each f x f block), so its values, and the distances to the
// nearest station behind the hatching, are those of real cells. Up to f-1
// columns and rows at the east and south edges fall outside the preview.
type preview struct {
	f int
	r *grid.Uint8
}

// previewSpec is the preview's grid of s and its step f, for a preview of
// at most maxCells cells.
func previewSpec(s grid.Spec, maxCells int) (grid.Spec, int) {
	f := 1
	for s.Cols/f*(s.Rows/f) > maxCells {
		f += 2
	}
	if f == 1 {
		return s, 1
	}
	return grid.Spec{West: s.West, North: s.North, Res: s.Res * float64(f), Cols: max(1, s.Cols/f), Rows: max(1, s.Rows/f)}, f
}

// newPreview starts the preview of the grid s, of at most maxCells cells.
func newPreview(s grid.Spec, maxCells int) *preview {
	ps, f := previewSpec(s, maxCells)
	return &preview{f: f, r: grid.NewUint8(ps, 0)}
}

// rows is the preview's sink: it keeps the codes of its cells.
func (p *preview) rows(row0, n int, _ []float32, codes []uint8) error {
	ps, f := p.r.Spec, p.f
	cols := len(codes) / n
	for r := range n {
		row := row0 + r
		if row%f != f/2 || row/f >= ps.Rows {
			continue
		}
		src := codes[r*cols : (r+1)*cols]
		dst := p.r.Data[row/f*ps.Cols : (row/f+1)*ps.Cols]
		if f == 1 {
			copy(dst, src)
			continue
		}
		for c := range dst {
			dst[c] = src[c*f+f/2]
		}
	}
	return nil
}
