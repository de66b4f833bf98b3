package pipeline

import (
	"errors"
	"fmt"
	"strconv"
	"strings"

	"drygrid/grid"
	"drygrid/region"
)

// The mask (Job.Mask): cells wholly outside its polygons are no data in
// index.tif and bands.tif, and so in every layer; cells on its edge keep
// their value, and their areas count by their exact share inside (region's
// coverage, on the ellipsoid) in the band shares, the summary and the
// manifest. It applies row by row, on the streamed path as in memory.

// cellMask applies a mask to the rows of a run.
type cellMask struct {
	m    *region.Mask
	cols int
}

// newCellMask prepares the mask of the job on the grid s, or nil without
// one. A mask that does not reach the grid is refused: every cell would be
// no data.
func newCellMask(job *Job, in *inputs, s grid.Spec) (*cellMask, error) {
	if in.mask == nil {
		return nil, nil
	}
	m, err := region.NewMask(s, in.mask)
	if err != nil {
		return nil, fmt.Errorf("mask %s: %w; check the bbox (--bbox, [grid] bbox) and that the mask's positions are longitude, latitude in degrees (EPSG:4326)",
			job.Mask, err)
	}
	return &cellMask{m: m, cols: s.Cols}, nil
}

// apply masks n rows from row0 of index (n * Cols values) in place: cells
// with no share inside the mask become no data. It writes each cell's
// share inside into weights (n * Cols), by which the tally weighs its area.
func (c *cellMask) apply(row0, n int, index []float32, weights []float64) {
	cols := c.cols
	for r := range n {
		w := weights[r*cols : (r+1)*cols]
		c.m.Row(row0+r, w)
		idx := index[r*cols : (r+1)*cols]
		for i, v := range w {
			if v <= 0 {
				idx[i] = grid.NoDataIndex
			}
		}
	}
}

// readMask reads the job's mask: the regions' polygons for MaskRegions,
// else the mask file.
func readMask(job *Job, in *inputs) error {
	switch job.Mask {
	case "":
		return nil
	case MaskRegions:
		in.mask = in.regions
		return nil
	}
	m, err := region.ReadMask(job.Mask)
	if err != nil {
		return maskErrPos(job.Mask, err)
	}
	in.mask = m
	return nil
}

// maskErrPos adds the line and column to a JSON syntax error in the mask
// file, as regionsErrPos does for the regions file.
func maskErrPos(path string, err error) error {
	inner := errors.Unwrap(err) // the regions reader's error
	if inner == nil {
		return err
	}
	if e := regionsErrPos(path, inner); e != inner {
		return fmt.Errorf("mask%s", strings.TrimPrefix(e.Error(), "regions"))
	}
	return err
}

// maskFigures are the mask's figures for the manifest: the cells inside
// it, its area within the grid and the covered part of that.
func maskFigures(res *Result) map[string]any {
	t := res.tally
	return map[string]any{"cells_inside": t.Inside, "area_km2": round3(t.AreaKm2), "covered_km2": round3(t.CoveredKm2)}
}

// round3 rounds to three decimals, for figures in km^2.
func round3(v float64) float64 {
	f, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'f', 3, 64), 64)
	return f
}
