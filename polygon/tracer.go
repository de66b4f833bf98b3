package polygon

import (
	"fmt"
	"math"

	"drygrid/grid"

	"github.com/paulmach/orb"
)

// Tracer dissolves the cells of a band raster into polygons, fed row block
// by row block, in order (row 0 north). It is the one tracer of the
// package: Polygonize, PolygonizeRFC7946 and PolygonizeSimplified feed it
// every row of a whole raster at once.
//
// It holds two cell rows, a few numbers per vertex column, the open
// boundary chains and the closed rings, never a number per cell: memory is
// O(columns + boundary vertices + components). The result equals
// PolygonizeSimplified on the whole raster (PolygonizeRFC7946 when
// simplifyKm is 0), whatever the block sizes were: the rows are swept one
// at a time, so the blocks only decide how many come per call.
//
// The polygons come in a canonical order (see the package doc, "Order"):
// each ring starts at its north-most, then west-most vertex and keeps its
// orientation; the polygons of a code are ordered by their shell's start
// vertex, north to south then west to east, and the holes of a polygon
// likewise. On a grid split at 180 the polygons of the western part come
// before those of the eastern part.
type Tracer struct {
	spec   grid.Spec
	parts  []tracerPart
	next   int  // next row expected
	done   bool // Finish was called
	nodata uint8
}

// tracerPart is one column range of the grid, swept on its own (the two
// sides of the antimeridian are two parts).
type tracerPart struct {
	c0, c1 int // columns c0..c1-1 of each row
	sweep  *polySweep
	lons   []float64 // longitude of each vertex column of the part
}

// NewTracer starts tracing a band raster on grid s whose cells with code
// nodata belong to no polygon. simplifyKm > 0 simplifies the shared
// boundaries as PolygonizeSimplified does; 0 keeps the exact cell edges. A
// grid that crosses the antimeridian is split at 180 as PolygonizeRFC7946
// does (two column parts, the eastern one shifted by -360, a column that
// straddles 180 cut along it into both parts).
//
// Errors: a grid without cells, with a resolution or west edge that is not
// a finite number (> 0 for the resolution), with more vertices than an
// int32 counts, or a tolerance that is negative or not finite.
func NewTracer(s grid.Spec, nodata uint8, simplifyKm float64) (*Tracer, error) {
	if math.IsNaN(simplifyKm) || simplifyKm < 0 || math.IsInf(simplifyKm, 0) {
		return nil, fmt.Errorf("polygon: simplify tolerance %g km must be a finite number >= 0", simplifyKm)
	}
	return newTracer(s, nodata, simplifyKm, true)
}

// newTracer is NewTracer with the split at 180 optional (Polygonize keeps
// the grid's own longitudes).
func newTracer(s grid.Spec, nodata uint8, km float64, split bool) (*Tracer, error) {
	if !specUsable(s) {
		return nil, fmt.Errorf("polygon: grid %s cannot be traced (no cells, or a resolution or west edge that is not a finite number)", s)
	}
	if int64(s.Cols+1)*int64(s.Rows+1) > math.MaxInt32 {
		return nil, fmt.Errorf("polygon: grid %s has more vertices than the tracer counts (%d)", s, math.MaxInt32)
	}
	t := &Tracer{spec: s, nodata: nodata}
	d := GeoJSONDecimals(s)
	lats := polyLatTable(s, d)
	add := func(c0, c1 int, lon func(i int) float64) {
		if c1 <= c0 {
			return
		}
		lons := make([]float64, c1-c0+1)
		for i := range lons {
			lons[i] = lon(c0 + i)
		}
		t.parts = append(t.parts, tracerPart{c0: c0, c1: c1, lons: lons, sweep: newPolySweep(c1-c0, s.Rows, nodata, km, lons, lats)})
	}
	if !split || !s.CrossesAntimeridian() {
		add(0, s.Cols, func(i int) float64 { return Round(s.West+float64(i)*s.Res, d) })
		return t, nil
	}
	x := (180 - s.West) / s.Res // column edge index of 180, maybe fractional
	kw := min(max(int(math.Ceil(x-1e-9)), 0), s.Cols)
	ke := min(max(int(math.Floor(x+1e-9)), 0), s.Cols)
	add(0, kw, func(i int) float64 { return Round(math.Min(s.West+float64(i)*s.Res, 180), d) })
	add(ke, s.Cols, func(i int) float64 { return Round(math.Max(s.West+float64(i)*s.Res, 180)-360, d) })
	return t, nil
}

// specUsable: a grid the tracer can sweep.
func specUsable(s grid.Spec) bool {
	return s.Cols > 0 && s.Rows > 0 && s.Res > 0 && !math.IsInf(s.Res, 0) &&
		!math.IsNaN(s.West) && !math.IsInf(s.West, 0)
}

// Rows feeds the rows row0, row0+1, ... held in codes (whole rows of
// Spec.Cols codes each, row-major). Blocks must come in order, the first
// at row 0 and each starting where the previous one ended; any number of
// rows per block. An error (rows out of order, a length that is not whole
// rows, rows past the grid, a call after Finish) leaves the tracer as it
// was.
func (t *Tracer) Rows(row0 int, codes []uint8) error {
	cols := t.spec.Cols
	switch {
	case t.done:
		return fmt.Errorf("polygon: rows fed after Finish")
	case row0 != t.next:
		return fmt.Errorf("polygon: rows out of order: block starts at row %d, row %d expected", row0, t.next)
	case len(codes)%cols != 0:
		return fmt.Errorf("polygon: block of %d codes is not whole rows of %d", len(codes), cols)
	case row0+len(codes)/cols > t.spec.Rows:
		return fmt.Errorf("polygon: block of rows %d..%d runs past the grid's %d rows", row0, row0+len(codes)/cols-1, t.spec.Rows)
	}
	for k := 0; k < len(codes); k += cols {
		line := codes[k : k+cols]
		for _, p := range t.parts {
			p.sweep.row(line[p.c0:p.c1])
		}
		t.next++
	}
	return nil
}

// Finish closes the sweep after the last row and returns each code's
// MultiPolygon, in the canonical order (see Tracer). It is an error if rows
// are missing or Finish was already called.
func (t *Tracer) Finish() (map[uint8]orb.MultiPolygon, error) {
	if t.done {
		return nil, fmt.Errorf("polygon: Finish called twice")
	}
	if t.next != t.spec.Rows {
		return nil, fmt.Errorf("polygon: Finish after %d of %d rows", t.next, t.spec.Rows)
	}
	t.done = true
	out := map[uint8]orb.MultiPolygon{}
	for k := range t.parts {
		p := &t.parts[k]
		p.sweep.row(nil) // the vertex row along the south edge
		for code, mp := range p.sweep.polygons() {
			out[code] = append(out[code], mp...)
		}
		p.sweep = nil
	}
	return out, nil
}
