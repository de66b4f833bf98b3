package grid

import "math"

// WGS84 defining constants (NIMA TR8350.2, 3rd ed., 2000).
const (
	WGS84A    = 6378137.0             // semi-major axis, m
	WGS84InvF = 298.257223563         // inverse flattening
	wgs84F    = 1 / WGS84InvF         // flattening
	wgs84E2   = wgs84F * (2 - wgs84F) // first eccentricity squared
)

// authalicQ is q(phi) of Snyder (1987), "Map Projections: A Working Manual",
// USGS PP 1395, eq. 3-12: q = (1-e^2)[sin/(1-e^2 sin^2) - ln((1-e sin)/(1+e sin))/(2e)].
func authalicQ(sinPhi float64) float64 {
	e := math.Sqrt(wgs84E2)
	es := e * sinPhi
	return (1 - wgs84E2) * (sinPhi/(1-es*es) - math.Log((1-es)/(1+es))/(2*e))
}

// qPole is q at 90 degrees; the authalic latitude beta has sin(beta) = q/qPole.
var qPole = authalicQ(1)

// AuthalicRadiusM is the radius of the sphere with the WGS84 ellipsoid's
// surface area: R_q = a sqrt(q_p / 2) (Snyder 1987, eq. 3-13).
var AuthalicRadiusM = WGS84A * math.Sqrt(qPole/2)

// BandAreaKm2 is the area on the WGS84 ellipsoid of the zone between
// latitudes lat1 and lat2 (degrees) and dlon degrees wide. It is exact for a
// lat-lon quadrangle: A = R_q^2 * dlon * |sin(beta2) - sin(beta1)|, with beta
// the authalic latitude, i.e. A = a^2/2 * dlon * |q(lat2) - q(lat1)|.
func BandAreaKm2(lat1, lat2, dlonDeg float64) float64 {
	q1 := authalicQ(math.Sin(lat1 * math.Pi / 180))
	q2 := authalicQ(math.Sin(lat2 * math.Pi / 180))
	a := WGS84A / 1000
	return a * a / 2 * (dlonDeg * math.Pi / 180) * math.Abs(q2-q1)
}

// CellAreaKm2 is the ellipsoidal area of one cell of the given row; every
// cell of a row has the same area.
func (s Spec) CellAreaKm2(row int) float64 {
	n, so := s.RowLats(row)
	return BandAreaKm2(so, n, s.Res)
}

// RowAreasKm2 gives the cell area of every row, north to south.
func (s Spec) RowAreasKm2() []float64 {
	out := make([]float64, s.Rows)
	for r := range out {
		out[r] = s.CellAreaKm2(r)
	}
	return out
}

// AreaKm2 is the area of the whole grid on the ellipsoid.
func (s Spec) AreaKm2() float64 {
	n, so := s.North, s.South()
	return BandAreaKm2(so, n, float64(s.Cols)*s.Res)
}
