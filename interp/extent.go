package interp

import (
	"math"
	"slices"
)

// Extent is the bbox of the stations widened by the search radius: every
// point within radiusKm of a station lies inside it. Latitudes are clipped
// at the poles; longitudes cover the smallest arc that holds every
// station's search circle, so when that arc crosses the antimeridian west
// is greater than east (RFC 7946 section 5.2). A circle containing a pole,
// or an arc within res of the whole circle, gives -180..180. The result
// goes straight to grid.NewSpec(west, south, east, north, res), which snaps
// it outward to res. With no points it is all zeros.
func Extent(pts []Point, radiusKm, res float64) (west, south, east, north float64) {
	if len(pts) == 0 {
		return 0, 0, 0, 0
	}
	theta := max(radiusKm, 0) / EarthRadiusKm
	thetaDeg := theta / degToRad
	south, north = 90.0, -90.0
	type arc struct{ start, end float64 }
	arcs := make([]arc, 0, len(pts))
	whole := false
	for _, p := range pts {
		south = min(south, p.Lat-thetaDeg)
		north = max(north, p.Lat+thetaDeg)
		dl := lonHalfWidth(p.Lat, theta)
		if dl >= 180 {
			whole = true
			continue
		}
		s := normLon(p.Lon - dl)
		arcs = append(arcs, arc{s, s + 2*dl})
	}
	south, north = max(south, -90), min(north, 90)
	if whole {
		return -180, south, 180, north
	}
	slices.SortFunc(arcs, func(a, b arc) int {
		switch {
		case a.start < b.start:
			return -1
		case a.start > b.start:
			return 1
		}
		return 0
	})
	// Sweep the arcs twice round the circle; gaps found on the second
	// round are the uncovered stretches, each exactly once.
	n := len(arcs)
	reach := math.Inf(-1)
	gapStart, gapLen := 0.0, -1.0
	for i := 0; i < 2*n; i++ {
		a := arcs[i%n]
		if i >= n {
			a.start += 360
			a.end += 360
		}
		if i >= n && a.start > reach && a.start-reach > gapLen {
			gapStart, gapLen = reach, a.start-reach
		}
		reach = max(reach, a.end)
	}
	if gapLen <= 0 || gapLen < res {
		return -180, south, 180, north
	}
	west = normLon(gapStart + gapLen)
	east = normLon(gapStart)
	if east == -180 {
		east = 180
	}
	return west, south, east, north
}
