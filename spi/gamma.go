package spi

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mathext"
)

// Errors GammaFit returns for samples a two-parameter gamma cannot be fitted to.
var (
	// ErrGammaTooFew: fewer than two positive values.
	ErrGammaTooFew = errors.New("fewer than 2 non-zero totals")
	// ErrGammaConstant: every positive value is the same, so the shape is unbounded.
	ErrGammaConstant = errors.New("all non-zero totals are equal")
)

// GammaFit fits a gamma distribution with location 0 to the positive values
// of x by maximum likelihood and returns its shape and scale. Zeros (and
// negative or non-finite values) are ignored: the caller accounts for the
// zero mass separately (see SPI).
//
// Method (Thom 1958; Wilks, "Statistical Methods in the Atmospheric Sciences"):
// with A = ln(mean) - mean(ln x), the likelihood equation for the shape a is
// ln a - digamma(a) = A. Thom's closed-form approximation
// a0 = (1 + sqrt(1 + 4A/3)) / (4A) starts Newton's method on that equation;
// the scale is mean / a.
func GammaFit(x []float64) (shape, scale float64, err error) {
	var n int
	var mean float64 // running mean: no overflow for huge values
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range x {
		if !(v > 0) || math.IsInf(v, 1) {
			continue
		}
		n++
		mean += (v - mean) / float64(n)
		lo = math.Min(lo, v)
		hi = math.Max(hi, v)
	}
	if n < 2 {
		return 0, 0, ErrGammaTooFew
	}
	if lo == hi {
		return 0, 0, ErrGammaConstant
	}
	// A = ln(mean) - mean(ln x) = ln(1 + mean(d)) - mean(ln(1 + d)) with
	// d = x/mean - 1, by log1p where d is small: this keeps A accurate when
	// the values are nearly equal and A is tiny (no cancellation of two
	// logarithms near ln(mean)).
	lnMean := math.Log(mean)
	var md, ml float64
	for _, v := range x {
		if !(v > 0) || math.IsInf(v, 1) {
			continue
		}
		d := (v - mean) / mean
		md += d
		if math.Abs(d) < 0.5 {
			ml += math.Log1p(d)
		} else {
			ml += math.Log(v) - lnMean
		}
	}
	a := math.Log1p(md/float64(n)) - ml/float64(n)
	shape, err = gamShapeMLE(a)
	if err != nil {
		return 0, 0, err
	}
	return shape, mean / shape, nil
}

// gamThomShape is Thom's (1958) closed-form approximation of the gamma shape
// from A = ln(mean) - mean(ln x).
func gamThomShape(a float64) float64 {
	return (1 + math.Sqrt(1+4*a/3)) / (4 * a)
}

// gamShapeMLE solves ln k - digamma(k) = a (a > 0) for the shape k by
// Newton's method from Thom's start. f(k) = ln k - digamma(k) - a is
// decreasing and convex, with f'(k) = 1/k - trigamma(k); trigamma is the
// Hurwitz zeta function zeta(2, k).
func gamShapeMLE(a float64) (float64, error) {
	k := gamThomShape(a)
	for i := 0; i < 100; i++ {
		g, d := gamLnMinusDigamma(k)
		f := g - a
		if d == 0 || math.IsNaN(d) || math.IsNaN(f) {
			break
		}
		next := k - f/d
		if next <= 0 {
			next = k / 2
		}
		if math.Abs(next-k) <= 1e-13*k {
			return next, nil
		}
		k = next
	}
	if k > 0 && !math.IsInf(k, 0) && !math.IsNaN(k) {
		// Not converged to 1e-13 but the likelihood equation holds.
		if g, _ := gamLnMinusDigamma(k); math.Abs(g-a) <= 1e-9*a {
			return k, nil
		}
	}
	return 0, fmt.Errorf("gamma shape did not converge (A = %g)", a)
}

// gamLnMinusDigamma returns ln k - digamma(k) and its derivative
// 1/k - trigamma(k). For k >= 100 it uses the asymptotic series
// (Abramowitz and Stegun 1964, 6.3.18 and 6.4.12)
//
//	ln k - digamma(k) = 1/(2k) + 1/(12k^2) - 1/(120k^4) + 1/(252k^6) - ...
//
// whose truncation error is below 1e-16 relative there, and which avoids
// the cancellation of ln k against digamma(k) for large shapes.
func gamLnMinusDigamma(k float64) (g, d float64) {
	if k < 100 {
		return math.Log(k) - mathext.Digamma(k), 1/k - mathext.Zeta(2, k)
	}
	r := 1 / k
	r2 := r * r
	g = r * (0.5 + r*(1.0/12+r2*(-1.0/120+r2*(1.0/252))))
	d = -r2 * (0.5 + r*(1.0/6+r2*(-1.0/30+r2*(1.0/42))))
	return g, d
}

// gamCDF is the gamma distribution function at x (x >= 0) and its
// complement, each computed directly so that both tails keep their precision.
func gamCDF(x, shape, scale float64) (p, c float64) {
	if !(x > 0) {
		return 0, 1
	}
	if math.IsInf(x, 1) {
		return 1, 0
	}
	z := x / scale
	return mathext.GammaIncReg(shape, z), mathext.GammaIncRegComp(shape, z)
}
