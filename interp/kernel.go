package interp

import "math"

// cand is a station within the radius of a cell: chord squared, value and
// rank.
type cand struct {
	d2, v float64
	rk    int32
}

// cands are the candidates of one cell, in the order they were found.
type cands struct {
	cs  []cand
	ang []float64 // k angles squared: scratch of weigh
}

func newCands(k int) *cands { return &cands{ang: make([]float64, k)} }

// reset empties the list and makes room for up to n candidates.
func (c *cands) reset(n int) {
	if cap(c.cs) < n {
		m := max(n, 2*cap(c.cs)) // grow geometrically: rows ask for a little more each
		c.cs = make([]cand, m)
	}
	c.cs = c.cs[:n]
}

// before orders candidates by chord squared, then position in the input.
func (ip *Interpolator) before(a, b *cand) bool {
	return a.d2 < b.d2 || (a.d2 == b.d2 && ip.id[a.rk] < ip.id[b.rk])
}

// selectK keeps in cs[:k] the k smallest candidates (by chord squared, then
// position in the input), in an order that depends only on the input: it
// drops the largest n-k times, or picks the smallest k times, whichever
// takes fewer passes.
func (ip *Interpolator) selectK(cs []cand, k int) {
	n := len(cs)
	if n-k <= k {
		for m := n; m > k; m-- {
			// The largest chord, then among equal ones the last in the input.
			top := maxD2(cs[:m])
			w := -1
			for i := range m {
				if cs[i].d2 == top && (w < 0 || ip.id[cs[i].rk] > ip.id[cs[w].rk]) {
					w = i
				}
			}
			cs[w] = cs[m-1]
		}
		return
	}
	for m := 0; m < k; m++ {
		b := m
		for i := m + 1; i < n; i++ {
			if ip.before(&cs[i], &cs[b]) {
				b = i
			}
		}
		cs[m], cs[b] = cs[b], cs[m]
	}
}

// maxD2 is the largest chord squared in cs (not empty). A chord squared is
// a sum of squares: never NaN nor -0, so its bits, read as an unsigned
// integer, order as its values do, and the integer maximum (a conditional
// move, where the floating-point max takes a chain of NaN and zero tests)
// gives the same bits. Two running maxima halve the chain.
func maxD2(cs []cand) float64 {
	a := math.Float64bits(cs[0].d2)
	b := a
	i := 1
	for ; i+1 < len(cs); i += 2 {
		a = max(a, math.Float64bits(cs[i].d2))
		b = max(b, math.Float64bits(cs[i+1].d2))
	}
	if i < len(cs) {
		a = max(a, math.Float64bits(cs[i].d2))
	}
	return math.Float64frombits(max(a, b))
}

// b2i is 1 for true and 0 for false; the compiler makes it a SETcc, so
// that counting with it takes no branch.
func b2i(b bool) int {
	if b {
		return 1
	}
	return 0
}

// distKm turns a chord squared to station rank rk into a great-circle
// distance from the unit vector (cx, cy, cz).
func (ip *Interpolator) distKm(c2 float64, rk int32, cx, cy, cz float64) float64 {
	s2 := -1.0
	if c2 > 2 { // beyond 90 degrees: use the chord to the antipode
		sx, sy, sz := cx+ip.x[rk], cy+ip.y[rk], cz+ip.z[rk]
		s2 = sx*sx + sy*sy + sz*sz
	}
	return chordAngle(c2, s2) * EarthRadiusKm
}

// angleSq is the central angle squared (radians^2) for chord squared c2 to
// station rank rk: 4 asin^2(c/2) from its Maclaurin series in t = c^2/4
// (asin^2 x = sum over n >= 1 of (2x)^2n / (2 n^2 C(2n, n)), a standard
// series quoted from memory and checked against math.Asin in the tests; to
// t^7, below 1e-17 relative for c <= 0.1, that is up to 637 km), the exact
// chord angle beyond.
func (ip *Interpolator) angleSq(c2 float64, rk int32, cx, cy, cz float64) float64 {
	if c2 <= 0.01 {
		t := c2 / 4
		return 4 * t * asinSqSeries(t)
	}
	a := ip.distKm(c2, rk, cx, cy, cz) / EarthRadiusKm
	return a * a
}

// exactChordSq is the chord squared of 1 m on the unit sphere: a station
// closer than that gives its value.
var exactChordSq = func() float64 {
	c := 2 * math.Sin(exactKm/EarthRadiusKm/2)
	return c * c
}()

// asinSqSeries is 4 asin^2(c/2) / c^2 as a polynomial in t = c^2/4 (see
// angleSq), for c <= 0.1.
func asinSqSeries(t float64) float64 {
	return 1 + t*(1.0/3+t*(8.0/45+t*(4.0/35+t*(128.0/1575+t*(128.0/2079+t*(1024.0/21021))))))
}

// shortSeriesMaxT is the largest t = c^2/4 for which asinSqSeries4 is as
// exact as asinSqSeries: the first omitted term, 128/2079 t^5, stays below
// 1e-17 (a radius of up to about 337 km).
const shortSeriesMaxT = 7e-4

// asinSqSeries4 is asinSqSeries cut after t^4, for t <= shortSeriesMaxT.
func asinSqSeries4(t float64) float64 {
	return 1 + t*(1.0/3+t*(8.0/45+t*(4.0/35+t*(128.0/1575))))
}

// shepardSums4 is, over cs in order, the sums of w = 1 / (c^2 *
// asinSqSeries4(c^2/4)) and of w * v, the smallest and largest v (as the
// built-in min and max give them), and whether a candidate lies within
// 1 m (the same answer as weigh's test of each in turn). The weights of two candidates are computed side by side (the same
// operations in the same order for each, so the same bits as one at a
// time): their long chains of dependent multiplications then overlap in
// the processor instead of queueing one behind the other. The sums are
// taken one candidate after the other, in order.
func shepardSums4(cs []cand) (sw, swz, lo, hi float64, ex bool) {
	lo, hi = math.Inf(1), math.Inf(-1)
	const c1, c2, c3, c4 = 1.0 / 3, 8.0 / 45, 4.0 / 35, 128.0 / 1575
	e := 0
	i := 0
	for ; i+2 <= len(cs); i += 2 {
		x := cs[i : i+2 : i+2]
		a0, a1 := x[0].d2, x[1].d2
		t0, t1 := a0/4, a1/4
		q0, q1 := t0*c4, t1*c4
		q0, q1 = c3+q0, c3+q1
		q0, q1 = t0*q0, t1*q1
		q0, q1 = c2+q0, c2+q1
		q0, q1 = t0*q0, t1*q1
		q0, q1 = c1+q0, c1+q1
		q0, q1 = t0*q0, t1*q1
		q0, q1 = 1+q0, 1+q1
		w0, w1 := 1/(a0*q0), 1/(a1*q1)
		e |= b2i(a0 < exactChordSq) | b2i(a1 < exactChordSq)
		v0, v1 := x[0].v, x[1].v
		sw += w0
		swz += w0 * v0
		sw += w1
		swz += w1 * v1
		lo = min(lo, v0, v1)
		hi = max(hi, v0, v1)
	}
	for ; i < len(cs); i++ {
		x := &cs[i]
		e |= b2i(x.d2 < exactChordSq)
		w := 1 / (x.d2 * asinSqSeries4(x.d2/4))
		sw += w
		swz += w * x.v
		lo, hi = min(lo, x.v), max(hi, x.v)
	}
	return sw, swz, lo, hi, e != 0
}

// estimate applies the coverage rule, the k-nearest choice, the 1 m rule and
// Shepard's (1968) weights to the first n candidates in c.
func (ip *Interpolator) estimate(c *cands, n int, cx, cy, cz float64) (float64, int, bool) {
	if n < ip.p.MinStations {
		return 0, n, false
	}
	cs := c.cs[:n]
	if n > ip.k {
		ip.selectK(cs, ip.k)
		n = ip.k
		cs = cs[:n]
	}
	return ip.weigh(c, cs, cx, cy, cz), n, true
}

// weigh is the 1 m rule and Shepard's (1968) weighted mean over the chosen
// candidates cs (at most k of them, a prefix of c.cs) of the cell at the
// unit vector (cx, cy, cz).
func (ip *Interpolator) weigh(c *cands, cs []cand, cx, cy, cz float64) float64 {
	n := len(cs)
	lo, hi := math.Inf(1), math.Inf(-1)
	var sw, swz float64
	switch {
	case ip.fast && ip.c2max/4 <= shortSeriesMaxT: // power 2, radius up to 337 km
		// Whether any candidate is within 1 m is the same test as the
		// first one found within 1 m; it is taken after the loop, so the
		// loop has no branch (a weight of +Inf is then thrown away).
		var ex bool
		sw, swz, lo, hi, ex = shepardSums4(cs)
		if ex {
			return ip.exactValue(cs)
		}
	case ip.fast: // power 2, radius up to 637 km: no square roots, no arcsines
		ex := 0
		for i := range cs {
			x := &cs[i]
			ex |= b2i(x.d2 < exactChordSq)
			w := 1 / (x.d2 * asinSqSeries(x.d2/4))
			sw += w
			swz += w * x.v
			lo, hi = min(lo, x.v), max(hi, x.v)
		}
		if ex != 0 {
			return ip.exactValue(cs)
		}
	default:
		a0 := math.Inf(1)
		ang := c.ang[:n]
		for i := range cs {
			x := &cs[i]
			if x.d2 < exactChordSq {
				return ip.exactValue(cs)
			}
			ang[i] = ip.angleSq(x.d2, x.rk, cx, cy, cz)
			a0 = min(a0, ang[i])
		}
		p := ip.p.Power
		for i := range cs {
			v := cs[i].v
			w := relWeightSq(a0/ang[i], p)
			sw += w
			swz += w * v
			lo, hi = min(lo, v), max(hi, v)
		}
	}
	// The exact value is a convex combination of the station values; the
	// clamp only removes rounding beyond them (and makes a constant field
	// give that constant exactly).
	return min(max(swz/sw, lo), hi)
}

// exactValue is the value of the nearest candidate, ties to the first in
// the input: the 1 m rule.
func (ip *Interpolator) exactValue(cs []cand) float64 {
	best := 0
	for i := 1; i < len(cs); i++ {
		if ip.before(&cs[i], &cs[best]) {
			best = i
		}
	}
	return cs[best].v
}

// relWeightSq is (d_nearest/d)^p from q = (d_nearest/d)^2 in (0, 1]:
// Shepard's weight d^-p scaled by d_nearest^p, which cancels in the weighted
// mean and keeps large powers from overflowing.
func relWeightSq(q, p float64) float64 {
	switch p {
	case 1:
		return math.Sqrt(q)
	case 2:
		return q
	case 3:
		return q * math.Sqrt(q)
	case 4:
		return q * q
	}
	return math.Pow(q, p/2)
}
