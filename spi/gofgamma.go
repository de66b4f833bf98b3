package spi

import (
	"math"

	"gonum.org/v1/gonum/mathext"
)

// gofLnPQ returns ln P(a, z) and ln Q(a, z) = ln(1 - P), the logarithms of
// the regularized lower and upper incomplete gamma integrals, for the
// Anderson-Darling sum, which evaluates them at every total of every
// station with the same a. ln Gamma(a) is passed in (computed once per
// station). Below z = a + 1 the power series of P is summed, above it the
// continued fraction of Q by the modified Lentz method (Press et al.,
// Numerical Recipes, 3rd ed., section 6.2); the other integral is the
// complement, so each tail keeps its precision. The series are stopped at a
// relative term of 1e-13, ample for A^2 (TestGofLnPQGonum checks the result
// against gonum's cephes-based integrals to 1e-11). Shapes above 200 (slow
// convergence near the mode) and any failure to converge use gonum.
func gofLnPQ(a, lga, z float64) (lnP, lnQ float64) {
	const eps = 1e-13
	const tiny = 1e-300
	if !(z > 0) {
		return math.Inf(-1), 0
	}
	if a <= 200 && !math.IsInf(z, 1) {
		lnpre := a*math.Log(z) - z - lga
		if z < a+1 {
			ap, del := a, 1/a
			sum := del
			for i := 0; i < 500; i++ {
				ap++
				del *= z / ap
				sum += del
				if del < sum*eps {
					lnP = lnpre + math.Log(sum)
					return lnP, math.Log1p(-math.Exp(lnP))
				}
			}
		} else {
			b := z + 1 - a
			c := 1 / tiny
			d := 1 / b
			h := d
			for i := 1; i < 500; i++ {
				an := -float64(i) * (float64(i) - a)
				b += 2
				d = an*d + b
				if math.Abs(d) < tiny {
					d = tiny
				}
				c = b + an/c
				if math.Abs(c) < tiny {
					c = tiny
				}
				d = 1 / d
				del := d * c
				h *= del
				if math.Abs(del-1) < eps {
					lnQ = lnpre + math.Log(h)
					return math.Log1p(-math.Exp(lnQ)), lnQ
				}
			}
		}
	}
	var p, q float64
	if z <= a {
		p = mathext.GammaIncReg(a, z)
		q = 1 - p
	} else {
		q = mathext.GammaIncRegComp(a, z)
		p = 1 - q
	}
	return math.Log(p), math.Log(q)
}
