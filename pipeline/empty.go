package pipeline

import (
	"fmt"
	"strconv"

	"drygrid/grid"
	"drygrid/interp"
	"drygrid/station"
)

// Empty maps are refused: a grid that holds no station, or whose cells all
// lack a value, would be published as an all-empty map reading "0.0 % in
// drought", a wrong answer rather than no answer. Job.AllowEmpty
// (--allow-empty, allow_empty = true in a job file's [grid]) publishes it
// all the same.

// allowEmptyHint says how to ask for an empty map.
const allowEmptyHint = "To publish it all the same, use --allow-empty (in a job file: allow_empty = true in [grid])"

// checkInside refuses a grid holding none of the stations, before any
// cell is computed. A bbox with west > east is named as the likely cause:
// it is a grid across the antimeridian, most often a swapped bbox.
func checkInside(job *Job, vals *station.Values, spec grid.Spec, pts []interp.Point) error {
	if job.AllowEmpty || len(pts) == 0 {
		return nil
	}
	for _, p := range pts {
		if _, _, ok := spec.Cell(p.Lon, p.Lat); ok {
			return nil
		}
	}
	what := "the grid (" + spec.String() + ")"
	hint := "check the bbox and the stations' coordinates."
	if b := job.BBox; b != nil {
		what = "the grid of bbox " + fmtBBox(*b)
		if b[0] > b[2] {
			hint = fmt.Sprintf("west > east means a grid across the antimeridian, %s degrees wide here; did you swap west and east?",
				strconv.FormatFloat(b[2]+360-b[0], 'f', -1, 64))
		}
	}
	return fmt.Errorf("none of the %d stations of %s lies inside %s, so the map would show none of them; %s %s",
		len(pts), vals.Path, what, hint, allowEmptyHint)
}

// checkCovered refuses a grid with no covered cell, once the band shares
// are tallied.
func checkCovered(job *Job, res *Result) error {
	if res.mask != nil && res.tally.Inside == 0 {
		return fmt.Errorf("mask %s covers no cell of the grid (%s): its polygons reach the grid's box but no cell, so every cell would be no data; check the bbox (--bbox, [grid] bbox) and the mask's polygons",
			job.Mask, res.Spec)
	}
	if job.AllowEmpty || res.CoveredCells > 0 {
		return nil
	}
	p := job.Params
	if res.mask != nil {
		return fmt.Errorf("no cell of the grid (%s) inside the mask %s has a value: every such cell has fewer than %d stations (min stations) within %g km (the search radius), so the map would be empty and read 0.0 %% in drought; lower the min stations, widen the radius or check the mask. %s",
			res.Spec, job.Mask, p.MinStations, p.RadiusKm, allowEmptyHint)
	}
	return fmt.Errorf("no cell of the grid (%s) has a value: every cell has fewer than %d stations (min stations) within %g km (the search radius), so the map would be empty and read 0.0 %% in drought; lower the min stations or widen the radius. %s",
		res.Spec, p.MinStations, p.RadiusKm, allowEmptyHint)
}

// fmtBBox writes a bbox as W,S,E,N.
func fmtBBox(b [4]float64) string {
	s := ""
	for i, v := range b {
		if i > 0 {
			s += ","
		}
		s += strconv.FormatFloat(v, 'f', -1, 64)
	}
	return s
}
