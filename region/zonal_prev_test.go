package region

// The previous implementation of Zonal and Coverage, kept only as a test
// oracle: each region's whole coverage computed at once (a []CellWeight of
// every cell it touches, sorted and merged), then summed in row-major cell
// order. ZonalRows, the mask and Coverage must agree with it bit for bit.
// Do not use it outside tests.

import (
	"math"
	"sort"

	"drygrid/grid"
	"drygrid/internal/pool"

	"github.com/paulmach/orb"
	"github.com/tidwall/rtree"
)

// prevCoverage is the previous Coverage.
func prevCoverage(s grid.Spec, g orb.MultiPolygon) []CellWeight {
	var cov prevCovWork
	return cov.coverage(s, g, nil)
}

// prevZonal is the previous Zonal.
func prevZonal(bands *grid.Uint8, index *grid.Float32, regions []Region) []ZonalStats {
	if bands == nil || len(bands.Data) != bands.Spec.Len() {
		return nil
	}
	s := bands.Spec
	if SameGrid(bands, index) != nil {
		index = nil
	}
	var tr rtree.RTreeG[int]
	for i, r := range regions {
		b := r.Geom.Bound()
		for _, k := range [3]float64{0, -360, 360} {
			tr.Insert([2]float64{b.Min[0] + k, b.Min[1]}, [2]float64{b.Max[0] + k, b.Max[1]}, i)
		}
	}
	reach := make([]bool, len(regions))
	tr.Search([2]float64{s.West, s.South()}, [2]float64{s.East(), s.North}, func(_, _ [2]float64, i int) bool {
		reach[i] = true
		return true
	})
	rowArea := s.RowAreasKm2()
	out := make([]ZonalStats, len(regions))
	type scratch struct {
		cov prevCovWork
		buf []CellWeight
	}
	work := make([]scratch, pool.Count(len(regions), 0, 1))
	pool.Run(len(regions), 0, 1, func(w, i, _ int) {
		sc := &work[w]
		out[i], sc.buf = prevZonalOne(bands, index, regions[i], reach[i], rowArea, &sc.cov, sc.buf)
	})
	return out
}

func prevZonalOne(bands *grid.Uint8, index *grid.Float32, r Region, reach bool, rowArea []float64, cov *prevCovWork, buf []CellWeight) (ZonalStats, []CellWeight) {
	z := ZonalStats{Key: r.Key}
	if !reach {
		return z, buf
	}
	s := bands.Spec
	var sumZ, sumZA float64
	buf = cov.coverage(s, r.Geom, buf)
	for _, w := range buf {
		a := w.Frac * rowArea[w.Cell/s.Cols]
		z.AreaKm2 += a
		if c := bands.Data[w.Cell]; c != bands.NoData {
			z.CoveredKm2 += a
			z.CodeKm2[c] += a
		}
		if index != nil {
			v := index.Data[w.Cell]
			if v != index.NoData && !math.IsNaN(float64(v)) && !math.IsInf(float64(v), 0) {
				sumZ += a * float64(v)
				sumZA += a
			}
		}
	}
	if sumZA > 0 {
		z.MeanZ, z.HasMeanZ = sumZ/sumZA, true
	}
	return z, buf
}

// prevCovWork holds buffers reused across polygons.
type prevCovWork struct {
	spec       grid.Spec
	auth       []authCoef
	authOK     []bool
	part       coverPart
	clipA, cut []covPt
	buf        []float64
}

func (c *prevCovWork) coverage(s grid.Spec, g orb.MultiPolygon, all []CellWeight) []CellWeight {
	all = all[:0]
	for _, p := range g {
		if len(p) == 0 {
			continue
		}
		b := orb.MultiPolygon{p}.Bound()
		for _, k := range [3]float64{0, -360, 360} {
			if b.Max[0]+k <= s.West || b.Min[0]+k >= s.East() {
				continue
			}
			all = c.polygon(s, p, k, all)
		}
	}
	if len(all) == 0 {
		return all
	}
	if !sort.SliceIsSorted(all, func(i, j int) bool { return all[i].Cell < all[j].Cell }) {
		sort.SliceStable(all, func(i, j int) bool { return all[i].Cell < all[j].Cell })
	}
	out := all[:0]
	for _, w := range all {
		if n := len(out); n > 0 && out[n-1].Cell == w.Cell {
			out[n-1].Frac += w.Frac
			continue
		}
		out = append(out, w)
	}
	res := out[:0]
	for _, w := range out {
		if w.Frac < covMinFrac {
			continue
		}
		w.Frac = math.Min(w.Frac, 1)
		res = append(res, w)
	}
	return res
}

func (c *prevCovWork) polygon(s grid.Spec, p orb.Polygon, dlon float64, out []CellWeight) []CellWeight {
	if !covPrepare(s, p, dlon, &c.part) {
		return out
	}
	c0, c1, j0, j1 := c.part.c0, c.part.c1, c.part.j0, c.part.j1
	w := c1 - c0 + 1
	n := w * (j1 - j0 + 1)
	if cap(c.buf) < n {
		c.buf = make([]float64, n)
	}
	buf := c.buf[:n]
	clear(buf)
	for j := j0; j <= j1; j++ {
		row := buf[(j-j0)*w : (j-j0+1)*w]
		fj := float64(j)
		for ri, ring := range c.part.rings {
			if c.part.yhi[ri] <= fj || c.part.ylo[ri] >= fj+1 {
				continue
			}
			c.clipA = covClipY(ring, c.clipA[:0], fj+1, true)
			c.cut = covClipY(c.clipA, c.cut[:0], fj, false)
			prevCovIntegrate(c.cut, fj, c0, c1, row, c.rowAuth(s, j))
		}
	}
	for j := j1; j >= j0; j-- {
		r := s.Rows - 1 - j
		row := buf[(j-j0)*w : (j-j0+1)*w]
		for i, v := range row {
			if v > covMinFrac {
				out = append(out, CellWeight{Cell: s.Index(c0+i, r), Frac: v})
			}
		}
	}
	return out
}

func (c *prevCovWork) rowAuth(s grid.Spec, j int) *authCoef {
	if c.spec != s || len(c.auth) != s.Rows {
		c.spec = s
		c.auth = make([]authCoef, s.Rows)
		c.authOK = make([]bool, s.Rows)
	}
	if !c.authOK[j] {
		n, so := s.RowLats(s.Rows - 1 - j)
		c.auth[j], c.authOK[j] = authRow(so, n), true
	}
	return &c.auth[j]
}

// prevCovIntegrate is the previous covIntegrate: it adds -integral of
// f(y - base) dx along each edge of the closed ring to the columns c0..c1
// it spans (row[i] is column c0+i).
func prevCovIntegrate(ring []covPt, base float64, c0, c1 int, row []float64, f *authCoef) {
	n := len(ring)
	if n < 3 {
		return
	}
	a := ring[n-1]
	for _, b := range ring {
		if a.x != b.x {
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
