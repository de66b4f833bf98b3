package interp

import "math"

const degToRad = math.Pi / 180

// DistanceKm is the great-circle distance in km between two points given in
// degrees (any longitude form) on the sphere of radius EarthRadiusKm.
//
// It is the haversine formula written as theta = 2 atan2(sqrt(h), sqrt(1-h)),
// with both h and 1-h computed as sums of non-negative terms
// (1-h is the haversine of the distance to the antipode), so that it keeps
// full precision for points a metre apart and for nearly antipodal points.
func DistanceKm(lon1, lat1, lon2, lat2 float64) float64 {
	p1, p2 := lat1*degToRad, lat2*degToRad
	dl := (lon2 - lon1) * degToRad
	sdp, sdl := math.Sin((p2-p1)/2), math.Sin(dl/2)
	ssp, cdl := math.Sin((p1+p2)/2), math.Cos(dl/2)
	cc := math.Cos(p1) * math.Cos(p2)
	h := sdp*sdp + cc*sdl*sdl
	g := ssp*ssp + cc*cdl*cdl // 1 - h
	return 2 * math.Atan2(math.Sqrt(h), math.Sqrt(g)) * EarthRadiusKm
}

// normLon maps a longitude in degrees to [-180, 180).
func normLon(lon float64) float64 {
	if lon >= -180 && lon < 180 {
		return lon
	}
	l := math.Mod(lon+180, 360)
	if l < 0 {
		l += 360
	}
	l -= 180
	if l >= 180 { // rounding of lon+180
		l -= 360
	}
	return l
}

// unitVector is the point on the unit sphere for lon, lat in degrees. The
// longitude is normalised first, so that every form of one longitude gives
// the same bits.
func unitVector(lon, lat float64) (x, y, z float64) {
	sl, cl := math.Sincos(normLon(lon) * degToRad)
	sp, cp := math.Sincos(lat * degToRad)
	return cp * cl, cp * sl, sp
}

// chordSq is the chord squared dx^2 + dy^2 + dz^2 between two unit vectors
// whose difference is (dx, dy, dz), rounded after every operation (the
// conversions keep the compiler from fusing them): every path of the
// grid, and the lane kernel (package lanes, in Go and in assembly),
// computes it so, to the same bits, and so agrees on ties at the k-th
// distance.
func chordSq(dx, dy, dz float64) float64 {
	return float64(dx*dx) + float64(dy*dy) + float64(dz*dz)
}

// chordAngle is the central angle in radians for two unit vectors whose
// chord length squared is c2 and whose sum has length squared s2 (the chord
// to the antipode). s2 is only read when the angle is over 90 degrees;
// pass a negative s2 to have it taken as 4 - c2.
func chordAngle(c2, s2 float64) float64 {
	if c2 <= 2 {
		return 2 * asinSmall(math.Sqrt(c2)/2)
	}
	if s2 < 0 {
		s2 = 4 - c2
	}
	return math.Pi - 2*math.Asin(math.Sqrt(s2)/2)
}

// asinSmall is arcsin(x) for x in [0, 1]: the Maclaurin series
// x + x^3/6 + 3x^5/40 + ... to x^13 for x <= 0.05 (the first omitted term is
// below 1e-17 relative there), math.Asin above.
func asinSmall(x float64) float64 {
	if x > 0.05 {
		return math.Asin(x)
	}
	x2 := x * x
	// Coefficients (2n)! / (4^n (n!)^2 (2n+1)), n = 0..6.
	return x * (1 + x2*(1.0/6+x2*(3.0/40+x2*(5.0/112+x2*(35.0/1152+x2*(63.0/2816+x2*(231.0/13312)))))))
}

// lonHalfWidth is the largest longitude difference, in degrees, of a point
// within the angle theta (radians) of a point at latitude lat (degrees):
// asin(sin theta / cos lat) (Matuschek, "Finding points within a distance of
// a latitude/longitude using bounding coordinates"), or 180 when the
// circle contains a pole.
func lonHalfWidth(lat, theta float64) float64 {
	phi := math.Abs(lat) * degToRad
	if phi+theta >= math.Pi/2 {
		return 180
	}
	s := math.Sin(theta) / math.Cos(phi)
	if s >= 1 {
		return 180
	}
	return math.Asin(s) / degToRad
}
