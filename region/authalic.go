package region

import (
	"math"

	"drygrid/grid"
)

// Shares on the ellipsoid. The area on the WGS84 ellipsoid of the part of a
// cell below a curve y(x) is a^2/2 * integral of (q(lat(y)) - q(south)) dlon,
// with q Snyder's authalic function ("Map Projections: A Working Manual",
// USGS PP 1395, 1987, eq. 3-12; q/q_pole is the sine of the authalic
// latitude). In cell units, with t the height above the row's southern edge
// (0 to 1), the share of the cell is then the integral of f(t) dx with
// f(t) = (q(lat(t)) - q(south)) / (q(north) - q(south)): planar in
// longitude and in f, not in latitude. Coverage integrates f exactly along
// each straight lon-lat edge, f being replaced, row by row, by its
// interpolating polynomial of degree authDeg (analytic within 3 radians of
// any real latitude, f is matched to below 1e-14 over a row up to 10
// degrees high).

const authDeg = 8

// authCoef holds, for one row, the coefficients of f in powers of
// x = t - 1/2, each divided by its power plus one (so that the mean of f
// over an interval of t is a sum of complete symmetric polynomials).
type authCoef [authDeg + 1]float64

// authQDiff is q(lat2) - q(lat1) for latitudes in radians, formed without
// cancellation: s2/(1-e^2 s2^2) - s1/(1-e^2 s1^2) = ds (1 + e^2 s1 s2) /
// ((1-e^2 s1^2)(1-e^2 s2^2)), and atanh(e s2) - atanh(e s1) =
// atanh(e ds / (1 - e^2 s1 s2)), with ds = s2 - s1 = 2 cos(mean) sin(half
// the difference).
func authQDiff(lat1, lat2 float64) float64 {
	const f = 1 / grid.WGS84InvF
	e2 := f * (2 - f)
	e := math.Sqrt(e2)
	s1, s2 := math.Sin(lat1), math.Sin(lat2)
	ds := 2 * math.Cos((lat1+lat2)/2) * math.Sin((lat2-lat1)/2)
	t1 := ds * (1 + e2*s1*s2) / ((1 - e2*s1*s1) * (1 - e2*s2*s2))
	t2 := math.Atanh(e*ds/(1-e2*s1*s2)) / e
	return (1 - e2) * (t1 + t2)
}

// authRow fits f for the row between latitudes south and north (degrees).
func authRow(south, north float64) authCoef {
	const n = authDeg + 1
	lo, hi := south*math.Pi/180, north*math.Pi/180
	full := authQDiff(lo, hi)
	// Interpolate at Chebyshev points: a Vandermonde system in x, solved by
	// Gaussian elimination with partial pivoting.
	var m [n][n + 1]float64
	for i := 0; i < n; i++ {
		x := 0.5 * math.Cos(float64(2*i+1)*math.Pi/(2*n))
		v := authQDiff(lo, lo+(x+0.5)*(hi-lo)) / full
		p := 1.0
		for k := 0; k < n; k++ {
			m[i][k] = p
			p *= x
		}
		m[i][n] = v
	}
	for col := 0; col < n; col++ {
		piv := col
		for r := col + 1; r < n; r++ {
			if math.Abs(m[r][col]) > math.Abs(m[piv][col]) {
				piv = r
			}
		}
		m[col], m[piv] = m[piv], m[col]
		for r := col + 1; r < n; r++ {
			k := m[r][col] / m[col][col]
			for c := col; c <= n; c++ {
				m[r][c] -= k * m[col][c]
			}
		}
	}
	var c authCoef
	for r := n - 1; r >= 0; r-- {
		s := m[r][n]
		for k := r + 1; k < n; k++ {
			s -= m[r][k] * c[k]
		}
		c[r] = s / m[r][r]
	}
	for k := range c {
		c[k] /= float64(k + 1)
	}
	return c
}

// mean is the mean of f over t in [t0, t1] (either order; f(t0) when they
// are equal). f(0) = 0 and f(1) = 1 are exact, so that a whole cell has a
// share of exactly 1.
func (c *authCoef) mean(t0, t1 float64) float64 {
	if t0 == t1 {
		switch t0 {
		case 0:
			return 0
		case 1:
			return 1
		}
	}
	// mean of x^k over [x0, x1] = h_k(x0, x1) / (k+1), with h_k the
	// complete symmetric polynomial sum_j x0^j x1^(k-j) (no cancellation,
	// unlike (x1^(k+1) - x0^(k+1)) / (x1 - x0)).
	x0, x1 := t0-0.5, t1-0.5
	h, p := 1.0, 1.0
	s := c[0]
	for k := 1; k <= authDeg; k++ {
		p *= x0
		h = x1*h + p
		s += c[k] * h
	}
	return s
}
