package interp

import (
	"cmp"
	"fmt"
	"math"
	"slices"
)

// Direction sectors (Params.Sectors), after Shepard's (1968) directional
// idea: a cluster of stations on one side of a cell should not outweigh a
// lone station on the other. With Sectors = S (4 or 8) the directions
// around a cell are cut into S equal azimuth sectors: the bearing from the
// cell to a station (the forward azimuth on the sphere,
// atan2(sin dlon cos lat2, cos lat1 sin lat2 - sin lat1 cos lat2 cos dlon),
// in [0, 360) degrees, 0 = north, clockwise) falls in sector
// floor(bearing / (360 / S)), so sector 0 starts at north and a bearing on a
// boundary belongs to the sector clockwise of it. In each sector the
// neighbors/S nearest stations within the radius (rounded down; ties by
// input order) are used, and quota a sector cannot fill is NOT given to the
// others: a cell uses at most S * (neighbors/S) stations, fewer when some
// sectors hold fewer. The coverage rule is unchanged: a cell is no data when
// fewer than MinStations stations lie within the radius, whatever their
// directions; a covered cell may thus be estimated from fewer than
// MinStations stations when they all lie in one sector. The 1 m rule still
// applies (the nearest station is always chosen). At a pole the bearing
// follows the formula with the cell's own longitude. The longitude
// difference is taken in [-180, 180), with sin 180 = 0 exactly (sincosLonDiff).

// validateSectors checks Params.Sectors against Neighbors.
func (p Params) validateSectors() error {
	switch p.Sectors {
	case 0:
		return nil
	case 4, 8:
	default:
		return fmt.Errorf("interp: sectors %d must be 0 (off), 4 or 8", p.Sectors)
	}
	if p.Neighbors < p.Sectors {
		return fmt.Errorf("interp: neighbors %d must be at least sectors (%d): each sector keeps neighbors/sectors stations, rounded down",
			p.Neighbors, p.Sectors)
	}
	return nil
}

// sectorOf is the sector (0..s-1, s = 4 or 8) of the direction whose east
// and north components are e and n: floor(bearing / (360 / s)) with the
// bearing atan2(e, n) in [0, 360), found by comparisons, without the
// arctangent's rounding: a direction on a boundary (e or n zero, or |e| =
// |n|) goes to the sector clockwise of it, and (0, 0) to sector 0.
func sectorOf(e, n float64, s int) int {
	var q int // quadrant: [0, 90), [90, 180), [180, 270), [270, 360)
	var first bool
	switch {
	case e == 0 && n == 0:
		return 0
	case e >= 0 && n > 0:
		q, first = 0, e < n
	case e > 0: // n <= 0
		q, first = 1, -n < e
	case n < 0: // e <= 0
		q, first = 2, -e < -n
	default: // e < 0, n >= 0
		q, first = 3, n < -e
	}
	if s == 4 {
		return q
	}
	if first {
		return 2 * q
	}
	return 2*q + 1
}

// sectorPick moves to the front of cs the stations the sector rule keeps for
// the cell at longitude lon (degrees, in [-180, 180)) whose latitude has
// sine sp and cosine cp, and returns their number. The chosen ones come
// nearest first (by chord, then position in the input).
func (ip *Interpolator) sectorPick(cs []cand, lon, sp, cp float64) int {
	ip.sortCands(cs)
	s := ip.p.Sectors
	quota := ip.p.Neighbors / s
	var count [8]int
	w := 0
	for i := range cs {
		r := cs[i].rk
		sdl, cdl := sincosLonDiff(ip.lon[r] - lon)
		cp2 := ip.cosLat[r]
		sec := sectorOf(sdl*cp2, cp*ip.z[r]-sp*cp2*cdl, s)
		if count[sec] == quota {
			continue
		}
		count[sec]++
		cs[w], cs[i] = cs[i], cs[w]
		w++
		if w == quota*s {
			break
		}
	}
	return w
}

// sortCands orders candidates by chord squared, then position in the
// input: an insertion sort for the few of a cell, a library sort beyond.
func (ip *Interpolator) sortCands(cs []cand) {
	if len(cs) > 32 {
		slices.SortFunc(cs, func(a, b cand) int {
			if c := cmp.Compare(a.d2, b.d2); c != 0 {
				return c
			}
			return cmp.Compare(ip.id[a.rk], ip.id[b.rk])
		})
		return
	}
	for i := 1; i < len(cs); i++ {
		x := cs[i]
		j := i
		for j > 0 && ip.before(&x, &cs[j-1]) {
			cs[j] = cs[j-1]
			j--
		}
		cs[j] = x
	}
}

// sincosLonDiff is the sine and cosine of a longitude difference in
// degrees, taken in [-180, 180), with 180 degrees exact (sine 0, cosine -1):
// a station across the pole on the cell's meridian lies due north (or due
// south), whatever form its longitude was given in.
func sincosLonDiff(d float64) (s, c float64) {
	d = normLon(d)
	if d == -180 {
		return 0, -1
	}
	return math.Sincos(d * degToRad)
}

// estimateAt is estimate for the cell at lon, lat (degrees) with unit
// vector (cx, cy, cz), applying the sector rule when Params.Sectors is set.
func (ip *Interpolator) estimateAt(c *cands, n int, lon, lat, cx, cy, cz float64) (float64, int, bool) {
	if ip.p.Sectors == 0 {
		return ip.estimate(c, n, cx, cy, cz)
	}
	if n < ip.p.MinStations {
		return 0, n, false
	}
	sp, cp := math.Sincos(lat * degToRad)
	m := ip.sectorPick(c.cs[:n], normLon(lon), sp, cp)
	return ip.weigh(c, c.cs[:m], cx, cy, cz), m, true
}

// gridRowSectors is gridRow under the sector rule: every cell scans its
// longitude span out to the full radius (the k-th-nearest shortcut of
// gridRow does not hold when far stations in empty sectors are wanted).
func (ip *Interpolator) gridRowSectors(w *rowWork, lat float64, colLon, colCos, colSin []float64, dst []float32) {
	span, ok := ip.rowStations(w, lat)
	if !ok {
		return // already no data
	}
	sp, cp := math.Sincos(lat * degToRad)
	c := w.c
	c.reset(len(span.lons) + 1)
	for col := range dst {
		l := colLon[col]
		span.move(l)
		cx, cy, cz := cp*colCos[col], cp*colSin[col], sp
		n := scanSpan(w.st.slice(span.lo, span.hi), c.cs, cx, cy, cz, ip.c2max)
		if n < ip.p.MinStations {
			continue
		}
		m := ip.sectorPick(c.cs[:n], l, sp, cp)
		dst[col] = float32(ip.weigh(c, c.cs[:m], cx, cy, cz))
	}
}
