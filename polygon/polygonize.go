package polygon

import (
	"math"

	"drygrid/grid"

	"github.com/paulmach/orb"
)

// Polygonize dissolves every cell of each code (except r.NoData) into a
// MultiPolygon whose rings follow cell edges, with collinear vertices
// dropped; exterior rings counter-clockwise, holes clockwise (RFC 7946
// section 3.1.6), coordinates in degrees rounded to the decimals the grid
// needs (see GeoJSONDecimals). Used by the GeoJSON writer and by the picture
// and page code.
//
// Connectivity rule: the cells of one code are 4-connected (they join across
// shared edges, never across a corner alone). Each Polygon is one
// 4-connected set of cells. Where two cells of a code touch only at a corner
// (a saddle vertex), the tracer pairs the ring edges at that vertex so that
// no ring visits a vertex twice: diagonal neighbours become separate
// polygons touching at a point, a hole that touches its own shell at a
// corner becomes a hole touching the shell at a point, and holes that touch
// diagonally become separate holes touching at a point. All of these are
// valid in the OGC Simple Features sense (and for shapely/GEOS).
//
// Coordinates follow the grid: on a grid that crosses the antimeridian they
// run east past 180. PolygonizeRFC7946 splits them at 180 instead. A nil
// raster, or one whose data does not match its grid, gives an empty map.
// The rings and polygons come in the canonical order of Tracer, which
// Polygonize feeds the whole raster to.
func Polygonize(r *grid.Uint8) map[uint8]orb.MultiPolygon { return polyWhole(r, 0, false) }

// PolygonizeRFC7946 is Polygonize with a grid that crosses the antimeridian
// split at 180 (RFC 7946 section 3.1.9): the part east of 180 is shifted by
// -360, so every longitude lies in [-180, 180]. A column that straddles 180
// (when the resolution does not divide 180) is cut along 180 into both
// parts. On other grids it equals Polygonize.
func PolygonizeRFC7946(r *grid.Uint8) map[uint8]orb.MultiPolygon { return polyWhole(r, 0, true) }

// polyWhole feeds a whole raster to a Tracer, simplifying to km when
// km > 0 and splitting at 180 when split.
func polyWhole(r *grid.Uint8, km float64, split bool) map[uint8]orb.MultiPolygon {
	if r == nil || len(r.Data) != r.Spec.Len() {
		return map[uint8]orb.MultiPolygon{}
	}
	t, err := newTracer(r.Spec, r.NoData, km, split)
	if err != nil {
		return map[uint8]orb.MultiPolygon{}
	}
	if err := t.Rows(0, r.Data); err != nil {
		return map[uint8]orb.MultiPolygon{}
	}
	out, err := t.Finish()
	if err != nil {
		return map[uint8]orb.MultiPolygon{}
	}
	return out
}

// GeoJSONDecimals is the number of decimals that represents every cell edge
// of the grid exactly: the fewest d <= 9 for which Res, West and North are
// whole multiples of 10^-d (0.1 -> 1, 0.25 -> 2, 0.01 -> 2). A resolution
// with no short decimal form (1/12 deg) gets 9 decimals (about 0.1 mm).
func GeoJSONDecimals(s grid.Spec) int {
	p := 1.0
	for d := 0; d < 9; d++ {
		ok := true
		for _, v := range []float64{s.Res, s.West, s.North} {
			x := v * p
			if math.Abs(x-math.Round(x)) > 1e-6*math.Max(1, math.Abs(x))*1e-3 {
				ok = false
			}
		}
		if ok {
			return d
		}
		p *= 10
	}
	return 9
}

// Round rounds v to d decimals, giving the float64 nearest that decimal
// (so 0.30000000000000004 becomes 0.3).
func Round(v float64, d int) float64 {
	p := math.Pow(10, float64(d))
	r := math.Round(v*p) / p
	if r == 0 {
		return 0 // no negative zero
	}
	return r
}

func polyLatTable(s grid.Spec, d int) []float64 {
	lats := make([]float64, s.Rows+1)
	for j := range lats {
		lats[j] = Round(s.North-float64(j)*s.Res, d)
	}
	return lats
}
