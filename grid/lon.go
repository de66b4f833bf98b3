package grid

import "math"

// WrapLon brings a longitude in degrees into [-180, 180]. Values already in
// that range are returned as they are, so 180 stays 180 and -180 stays -180;
// others are shifted by a multiple of 360 into [-180, 180). This is the range
// RFC 7946 section 3.1.9 expects of GeoJSON positions, and the one the layer
// encoders write station longitudes in.
func WrapLon(lon float64) float64 {
	if lon > 180 || lon < -180 {
		lon = math.Mod(lon+180, 360)
		if lon < 0 {
			lon += 360
		}
		lon -= 180
	}
	return lon
}
