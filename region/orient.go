package region

import (
	"math"
	"math/big"

	"github.com/paulmach/orb"
)

// Robust orientation, after J. R. Shewchuk, "Adaptive Precision
// Floating-Point Arithmetic and Fast Robust Geometric Predicates", Discrete
// & Computational Geometry 18 (1997) 305-363: the determinant is first
// formed in plain floating point, and trusted when it exceeds the error
// bound of that computation (his ccwerrboundA); otherwise it is formed
// exactly, as a sum of the six products of coordinates, each split into an
// exact two-term expansion (his Two-Product, by a fused multiply-add) and
// added up by Grow-Expansion. Products so small that the split would
// underflow go to math/big rationals instead.

// orientErrA is Shewchuk's ccwerrboundA, (3 + 16 eps) eps with eps = 2^-53.
const orientErrA = (3 + 16*0x1p-53) * 0x1p-53

// regOrient is the sign of the turn a -> b -> c: +1 when c lies left of the
// line through a and b (counter-clockwise), -1 when right, 0 when the three
// points are exactly collinear. The sign is exact for any float64 input.
func regOrient(a, b, c orb.Point) int {
	acx, bcy := a[0]-c[0], b[1]-c[1]
	acy, bcx := a[1]-c[1], b[0]-c[0]
	detl, detr := acx*bcy, acy*bcx
	det := detl - detr
	sum := math.Abs(detl) + math.Abs(detr)
	if !(sum >= 0x1p-900 && sum <= 0x1p900) {
		// Zero, or so small or large that a product may have underflowed
		// or overflowed, which the error bound does not allow for.
		if sum == 0 && (acx == 0 || bcy == 0) && (acy == 0 || bcx == 0) {
			return 0 // each product has an exactly zero factor
		}
		return orientExact(a, b, c)
	}
	switch {
	case detl > 0 && detr <= 0, detl < 0 && detr >= 0, detl == 0:
		// The two terms do not cancel: the rounded signs are exact (a
		// product rounds to zero only when a factor is zero, the other
		// product being far from underflow here).
		return sign(det)
	}
	if bound := orientErrA * sum; det >= bound || -det >= bound {
		return sign(det)
	}
	return orientExact(a, b, c)
}

func sign(v float64) int {
	switch {
	case v > 0:
		return 1
	case v < 0:
		return -1
	}
	return 0
}

// orientExact is the exact sign of (ax-cx)(by-cy) - (ay-cy)(bx-cx)
// = ax*by - ax*cy - cx*by - ay*bx + ay*cx + cy*bx.
func orientExact(a, b, c orb.Point) int {
	terms := [6][3]float64{ // x, y, sign
		{a[0], b[1], 1}, {a[0], c[1], -1}, {c[0], b[1], -1},
		{a[1], b[0], -1}, {a[1], c[0], 1}, {c[1], b[0], 1},
	}
	var buf [13]float64
	e := buf[:0]
	for _, t := range terms {
		p := t[0] * t[1]
		if (p == 0 && t[0] != 0 && t[1] != 0) || (p != 0 && (math.Abs(p) < 0x1p-900 || math.Abs(p) > 0x1p900)) {
			return orientRat(a, b, c)
		}
		lo := math.FMA(t[0], t[1], -p) // p + lo == x*y exactly
		e = growExpansion(e, t[2]*lo)
		e = growExpansion(e, t[2]*p)
	}
	for i := len(e) - 1; i >= 0; i-- {
		if e[i] != 0 {
			return sign(e[i])
		}
	}
	return 0
}

// twoSum is Knuth's and Shewchuk's Two-Sum: x + y == a + b exactly, with x
// the rounded sum.
func twoSum(a, b float64) (x, y float64) {
	x = a + b
	bv := x - a
	av := x - bv
	return x, (a - av) + (b - bv)
}

// growExpansion adds b to the nonoverlapping expansion e (components in
// increasing magnitude), in place, dropping zero components (Shewchuk's
// Grow-Expansion with zero elimination); the largest component, last, has
// the sign of the sum.
func growExpansion(e []float64, b float64) []float64 {
	q := b
	out := e[:0]
	for _, c := range e {
		var h float64
		q, h = twoSum(q, c)
		if h != 0 {
			out = append(out, h)
		}
	}
	if q != 0 {
		out = append(out, q)
	}
	return out
}

// orientRat is the exact sign in rational arithmetic.
func orientRat(a, b, c orb.Point) int {
	r := func(v float64) *big.Rat { return new(big.Rat).SetFloat64(v) }
	ax, ay, bx, by, cx, cy := r(a[0]), r(a[1]), r(b[0]), r(b[1]), r(c[0]), r(c[1])
	l := new(big.Rat).Mul(ax.Sub(ax, cx), by.Sub(by, cy))
	rr := new(big.Rat).Mul(ay.Sub(ay, cy), bx.Sub(bx, cx))
	return l.Cmp(rr)
}
