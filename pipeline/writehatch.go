package pipeline

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"

	"drygrid/grid"
	"drygrid/polygon"
)

// farBlockRows is the number of rows of distances held at a time while
// the far cells are marked.
const farBlockRows = 64

// farCells marks the cells of the band raster b (the run's grid or its
// preview, whose cells are cells of the run's grid) that hold a value but
// whose nearest station is farther than km (Job.HatchBeyondKm): 1 there, 0
// elsewhere, on b's grid. The distances come from the interpolator's
// Support a block of rows at a time, so no more than this one byte per
// cell and one block of distances is held. It gives nil when km is 0.
func (r *Result) farCells(b *grid.Uint8, km float64) (*grid.Uint8, error) {
	if !(km > 0) || b == nil {
		return nil, nil
	}
	if r.ip == nil {
		return nil, errors.New("hatch: the result has no interpolator (not made by Run or Compute)")
	}
	spec := b.Spec
	far := grid.NewUint8(spec, 0)
	dist := make([]float32, min(farBlockRows, spec.Rows)*spec.Cols)
	for row0 := 0; row0 < spec.Rows; row0 += farBlockRows {
		n := min(farBlockRows, spec.Rows-row0)
		d := dist[:n*spec.Cols]
		if err := r.ip.Support(spec, row0, n, d, nil); err != nil {
			return nil, err
		}
		off := row0 * spec.Cols
		for i, v := range d {
			// A cell with a value always has a station within the radius;
			// the no-data distance is checked all the same.
			if b.Data[off+i] != b.NoData && v != grid.NoDataIndex && float64(v) > km {
				far.Data[off+i] = 1
			}
		}
	}
	return far, nil
}

// farGeoJSON traces the far cells into one RFC 7946 Feature (a
// MultiPolygon along cell edges, split at the antimeridian, property
// beyond_km) in a FeatureCollection, for the page; nil when no cell is far.
func farGeoJSON(far *grid.Uint8, km float64) ([]byte, error) {
	mp := polygon.PolygonizeRFC7946(far)[1]
	if len(mp) == 0 {
		return nil, nil
	}
	dec := polygon.GeoJSONDecimals(far.Spec)
	coords := make([][][][2]float64, len(mp))
	for i, p := range mp {
		coords[i] = make([][][2]float64, len(p))
		for j, ring := range p {
			coords[i][j] = make([][2]float64, len(ring))
			for k, pt := range ring {
				coords[i][j][k] = [2]float64{polygon.Round(pt[0], dec), polygon.Round(pt[1], dec)}
			}
		}
	}
	doc := map[string]any{"type": "FeatureCollection", "features": []any{map[string]any{
		"type": "Feature", "properties": map[string]any{"beyond_km": km},
		"geometry": map[string]any{"type": "MultiPolygon", "coordinates": coords},
	}}}
	var buf bytes.Buffer
	if err := json.NewEncoder(&buf).Encode(doc); err != nil {
		return nil, fmt.Errorf("hatch: encode far cells: %w", err)
	}
	return buf.Bytes(), nil
}

// farRaster computes the far cells once for the picture and the page (nil
// without Job.HatchBeyondKm, at no cost).
func (w *layerWriter) farRaster() (*grid.Uint8, error) {
	if w.far != nil {
		return w.far, nil
	}
	if w.preview == nil {
		return nil, errors.New("hatch: no preview raster (the pass did not run)")
	}
	far, err := w.res.farCells(w.preview.r, w.job.HatchBeyondKm)
	w.far = far
	return far, err
}
