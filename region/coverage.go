package region

import (
	"drygrid/grid"
	"math"

	"github.com/paulmach/orb"
)

// CellWeight is one grid cell touched by a region and the share of the
// cell's area that lies inside the region.
type CellWeight struct {
	Cell int     // row-major index, grid.Spec.Index(col, row)
	Frac float64 // share of the cell inside the region, in (0, 1]
}

// covSnap pulls coordinates within this many cells of a cell edge onto the
// edge (1e-7 of a 0.1 deg cell is about a millimetre), so that grid-aligned
// regions get exact shares instead of float-noise slivers.
const covSnap = 1e-7

// covMinFrac drops shares below this (noise from cancelling edges).
const covMinFrac = 1e-12

// Coverage gives every cell of s that the polygon g overlaps and the share
// of the cell's area inside g, exactly: g is clipped to each cell, not tested
// at cell centres, so a region smaller than one cell gets its true share.
// Cells are returned in row-major order.
//
// The share is of the cell's area on the WGS84 ellipsoid, so that the cell
// area times the share is the region's area in the cell, exact at any
// latitude and for any cell size (a share taken planar in degrees of
// latitude would be 1 % off at 80 degrees and over 10 % at 89). Edges of g
// are straight lines in longitude-latitude; along each, the area below it
// is integrated in the authalic height of the row (see authalic.go).
//
// Rings must be oriented as Region.Geom is (exteriors CCW, holes CW); parts
// of a MultiPolygon must not overlap (shares are capped at 1).
//
// Antimeridian: g's longitudes may run past 180 (or below -180), and a region
// may come split into parts on both sides. Each part is mapped onto the grid
// shifted by -360, 0 or +360 degrees wherever that shift overlaps the grid,
// so a part at 170..190 lands on a global grid at 170..180 and -180..-170,
// and a part at -180..-170 lands on a grid running 170..190 at 180..190.
//
// The method: for each grid row, each ring is clipped to the row's latitude
// band (Sutherland-Hodgman against two horizontal lines), and the area
// integral -∮ f(y) dx of the clipped ring (f the authalic height, 0 at the
// row's southern edge and 1 at its northern) is split among the columns
// each edge spans; clipping to a column only adds vertical edges, on which
// dx = 0, so the per-column sums are the exact clipped shares. The rows are
// made one at a time by rowCover (rowcover.go), which Mask and ZonalRows use
// too.
func Coverage(s grid.Spec, g orb.MultiPolygon) []CellWeight {
	rc := newRowCover(s, g)
	var out []CellWeight
	var sc rowScratch
	for j := rc.j1; j >= rc.j0; j-- { // north to south: row-major order
		r := s.Rows - 1 - j
		f := stripAuth(s, j)
		for i, v := range rc.row(j, &f, &sc) {
			if v > 0 {
				out = append(out, CellWeight{Cell: s.Index(rc.c0+i, r), Frac: v})
			}
		}
	}
	return out
}

type covPt struct{ x, y float64 }

func covSnapped(v float64) float64 {
	if r := math.Round(v); math.Abs(v-r) < covSnap {
		return r
	}
	return v
}

// covPrepare maps polygon p, shifted by dlon degrees, into grid units of s
// (columns from the west, strips from the south, snapped to cell edges
// within covSnap) as cp: its rings (open, of 3 or more positions) and their
// latitude ranges, reusing cp's slices, and the columns c0..c1 and strips
// j0..j1 it may cover. It reports false when p covers no cell.
func covPrepare(s grid.Spec, p orb.Polygon, dlon float64, cp *coverPart) bool {
	south := s.South()
	cp.rings, cp.ylo, cp.yhi = cp.rings[:0], cp.ylo[:0], cp.yhi[:0]
	xmin, xmax := math.Inf(1), math.Inf(-1)
	ymin, ymax := math.Inf(1), math.Inf(-1)
	for _, ring := range p {
		pts := make([]covPt, 0, len(ring))
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, q := range ring {
			pt := covPt{covSnapped((q[0] + dlon - s.West) / s.Res), covSnapped((q[1] - south) / s.Res)}
			pts = append(pts, pt)
			lo, hi = math.Min(lo, pt.y), math.Max(hi, pt.y)
			xmin, xmax = math.Min(xmin, pt.x), math.Max(xmax, pt.x)
		}
		if len(pts) > 1 && pts[0] == pts[len(pts)-1] {
			pts = pts[:len(pts)-1] // the clipper closes rings itself
		}
		if len(pts) < 3 {
			continue
		}
		ymin, ymax = math.Min(ymin, lo), math.Max(ymax, hi)
		cp.rings = append(cp.rings, pts)
		cp.ylo, cp.yhi = append(cp.ylo, lo), append(cp.yhi, hi)
	}
	if len(cp.rings) == 0 {
		cp.c0, cp.c1, cp.j0, cp.j1 = 0, -1, 0, -1
		return false
	}
	// Window of cells: columns c0..c1, strips j0..j1 counted from the south.
	cp.c0 = max(0, int(math.Floor(xmin)))
	cp.c1 = min(s.Cols-1, int(math.Ceil(xmax))-1)
	cp.j0 = max(0, int(math.Floor(ymin)))
	cp.j1 = min(s.Rows-1, int(math.Ceil(ymax))-1)
	return cp.c0 <= cp.c1 && cp.j0 <= cp.j1
}

// covClipY clips a closed ring (implicitly closed) to y <= lim (below) or
// y >= lim, Sutherland-Hodgman style.
func covClipY(in, out []covPt, lim float64, below bool) []covPt {
	inside := func(p covPt) bool {
		if below {
			return p.y <= lim
		}
		return p.y >= lim
	}
	n := len(in)
	if n == 0 {
		return out
	}
	prev := in[n-1]
	pin := inside(prev)
	for _, cur := range in {
		cin := inside(cur)
		if cin != pin {
			t := (lim - prev.y) / (cur.y - prev.y)
			out = append(out, covPt{prev.x + t*(cur.x-prev.x), lim})
		}
		if cin {
			out = append(out, cur)
		}
		prev, pin = cur, cin
	}
	return out
}

// covIntegrate adds -integral of f(y - base) dx along each edge of the
// closed ring to the columns c0..c1 it spans (row[i] is column c0+i): the
// share of each cell's ellipsoidal area that the ring encloses, f being the
// row's authalic height (see authalic.go). An edge along the strip's
// southern edge (y = base) adds nothing, f being exactly 0 there, and is
// skipped.
func covIntegrate(ring []covPt, base float64, c0, c1 int, row []float64, f *authCoef) {
	n := len(ring)
	if n < 3 {
		return
	}
	a := ring[n-1]
	for _, b := range ring {
		if a.x != b.x && (a.y != base || b.y != base) {
			lo, hi := a, b
			sign := -1.0
			if b.x < a.x {
				lo, hi = b, a
				sign = 1
			}
			ylo, yhi := lo.y-base, hi.y-base
			slope := (yhi - ylo) / (hi.x - lo.x)
			cs := max(c0, int(math.Floor(lo.x)))
			ce := min(c1, int(math.Ceil(hi.x))-1)
			for col := cs; col <= ce; col++ {
				u0 := math.Max(lo.x, float64(col))
				u1 := math.Min(hi.x, float64(col+1))
				if u1 <= u0 {
					continue
				}
				y0 := ylo + slope*(u0-lo.x)
				y1 := ylo + slope*(u1-lo.x)
				if u0 == lo.x {
					y0 = ylo
				}
				if u1 == hi.x {
					y1 = yhi
				}
				row[col-c0] += sign * (u1 - u0) * f.mean(y0, y1)
			}
		}
		a = b
	}
}
