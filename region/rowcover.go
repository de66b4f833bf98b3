package region

import (
	"math"

	"drygrid/grid"

	"github.com/paulmach/orb"
)

// rowCover is one region's polygons made ready to give its coverage one grid
// row at a time: each polygon at each shift of -360, 0 or +360 degrees that
// reaches the grid, in grid units. Coverage, the mask and ZonalRows all take
// their shares from it, so they agree bit for bit. It holds the polygons and
// nothing per cell.
type rowCover struct {
	parts  []coverPart
	c0, c1 int // columns the parts span
	j0, j1 int // strips (rows counted from the south) the parts span
}

// coverPart is one polygon at one shift, in grid units (columns from the
// west, strips from the south).
type coverPart struct {
	rings    [][]covPt
	ylo, yhi []float64 // each ring's range of strips
	c0, c1   int
	j0, j1   int
}

// rowScratch holds one goroutine's buffers for rowCover.row: a ring clipped
// to a strip, one part's shares and the region's shares (one row each).
type rowScratch struct {
	clipA, cut []covPt
	part, sum  []float64
}

// newRowCover prepares g on the grid s as Coverage maps it: each non-empty
// polygon shifted by -360, 0 or +360 degrees wherever its bounding box
// overlaps the grid. The result reaches no cell when it has no parts.
func newRowCover(s grid.Spec, g orb.MultiPolygon) rowCover {
	rc := rowCover{c0: s.Cols, c1: -1, j0: s.Rows, j1: -1}
	for _, p := range g {
		if len(p) == 0 {
			continue
		}
		b := orb.MultiPolygon{p}.Bound()
		for _, k := range [3]float64{0, -360, 360} {
			if b.Max[0]+k <= s.West || b.Min[0]+k >= s.East() {
				continue
			}
			var cp coverPart
			if !covPrepare(s, p, k, &cp) {
				continue
			}
			rc.parts = append(rc.parts, cp)
			rc.c0, rc.c1 = min(rc.c0, cp.c0), max(rc.c1, cp.c1)
			rc.j0, rc.j1 = min(rc.j0, cp.j0), max(rc.j1, cp.j1)
		}
	}
	return rc
}

// reaches reports whether the region may cover a cell of the grid.
func (rc *rowCover) reaches() bool { return len(rc.parts) > 0 }

// rows gives the grid rows (0 the northernmost) the region may cover, r0 to
// r1; r0 > r1 when it covers none.
func (rc *rowCover) rows(s grid.Spec) (r0, r1 int) {
	return s.Rows - 1 - rc.j1, s.Rows - 1 - rc.j0
}

// row gives the region's share of each cell of strip j (counted from the
// south; f its authalic height, authRow) over columns rc.c0..rc.c1, in
// sc.sum: 0 where the region does not reach, else the share in
// (covMinFrac, 1]. As Coverage has always made them: each part's shares
// above covMinFrac, summed in part order, then capped at 1 (parts of a
// MultiPolygon are meant not to overlap). j must be within rc.j0..rc.j1.
func (rc *rowCover) row(j int, f *authCoef, sc *rowScratch) []float64 {
	sc.sum = grow(sc.sum, rc.c1-rc.c0+1)
	sum := sc.sum
	clear(sum)
	fj := float64(j)
	if len(rc.parts) == 1 {
		// One part: integrate straight into sum.
		p := &rc.parts[0]
		sc.integrate(p, j, fj, sum, f)
		for i, v := range sum {
			if v > covMinFrac {
				sum[i] = math.Min(v, 1)
			} else {
				sum[i] = 0
			}
		}
		return sum
	}
	for pi := range rc.parts {
		p := &rc.parts[pi]
		if j < p.j0 || j > p.j1 {
			continue
		}
		sc.part = grow(sc.part, p.c1-p.c0+1)
		clear(sc.part)
		sc.integrate(p, j, fj, sc.part, f)
		dst := sum[p.c0-rc.c0:]
		for i, v := range sc.part {
			if v > covMinFrac {
				dst[i] += v
			}
		}
	}
	for i, v := range sum {
		if v < covMinFrac {
			sum[i] = 0
		} else {
			sum[i] = math.Min(v, 1)
		}
	}
	return sum
}

// integrate adds the shares of part p on strip j (fj as a float) to
// dst[:p.c1-p.c0+1], ring by ring: each ring clipped to the strip, then
// integrated (covIntegrate).
func (sc *rowScratch) integrate(p *coverPart, j int, fj float64, dst []float64, f *authCoef) {
	for ri, ring := range p.rings {
		if p.yhi[ri] <= fj || p.ylo[ri] >= fj+1 {
			continue // a ring wholly above or below adds nothing to the strip
		}
		sc.clipA = covClipY(ring, sc.clipA[:0], fj+1, true)
		sc.cut = covClipY(sc.clipA, sc.cut[:0], fj, false)
		covIntegrate(sc.cut, fj, p.c0, p.c1, dst, f)
	}
}

// stripAuth is f (see authalic.go) for strip j (counted from the south) of s.
func stripAuth(s grid.Spec, j int) authCoef {
	n, so := s.RowLats(s.Rows - 1 - j)
	return authRow(so, n)
}

// grow gives b with length n.
func grow(b []float64, n int) []float64 {
	if cap(b) < n {
		return make([]float64, n)
	}
	return b[:n]
}
