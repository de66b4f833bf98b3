package spi

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mathext"
)

// gofLnPQ against gonum's regularized incomplete gamma integrals
// (mathext.GammaIncReg / GammaIncRegComp, ports of Cephes igam/igamc by
// Moshier), over shapes 0.05 to 250 (above 200 gofLnPQ hands over to gonum)
// and points from far in the lower tail to far in the upper tail, on both
// sides of the switch at z = a + 1. The logarithms must agree to 1e-11
// (relative 1e-11 in P and Q) wherever gonum's values are not underflowed.
func TestGofLnPQGonum(t *testing.T) {
	worst := 0.0
	for _, a := range []float64{0.05, 0.3, 0.9, 1, 2.5, 7, 30, 99, 150, 199, 250} {
		lga, _ := math.Lgamma(a)
		for _, z := range []float64{1e-8, 0.01, 0.3, 1, a * 0.5, a * 0.9, a, a + 0.5, a + 1, a + 1.0001, a + 2,
			a * 1.5, 3 * a, 10 * a, a + 30, a + 300} {
			lp, lq := gofLnPQ(a, lga, z)
			p, q := mathext.GammaIncReg(a, z), mathext.GammaIncRegComp(a, z)
			if p > 1e-300 {
				worst = math.Max(worst, math.Abs(lp-math.Log(p)))
				if math.Abs(lp-math.Log(p)) > 1e-11 {
					t.Errorf("a %g z %g: ln P %.15g, gonum %.15g", a, z, lp, math.Log(p))
				}
			}
			if q > 1e-300 {
				worst = math.Max(worst, math.Abs(lq-math.Log(q)))
				if math.Abs(lq-math.Log(q)) > 1e-11 {
					t.Errorf("a %g z %g: ln Q %.15g, gonum %.15g", a, z, lq, math.Log(q))
				}
			}
		}
	}
	t.Logf("largest difference in ln P, ln Q: %.2g", worst)
	if lp, lq := gofLnPQ(2, 0, 0); !math.IsInf(lp, -1) || lq != 0 {
		t.Errorf("z = 0: %g %g", lp, lq)
	}
	if lp, lq := gofLnPQ(2, 0, math.Inf(1)); lp != 0 || !math.IsInf(lq, -1) {
		t.Errorf("z = +Inf: %g %g", lp, lq)
	}
}
