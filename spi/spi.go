package spi

import (
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// SPI is the standardized precipitation index of the total x for a
// reference sample whose non-zero totals follow a gamma(shape, scale) and
// whose share of zero totals is q (McKee et al. 1993; Stagge et al. 2015):
//
//	H = q + (1 - q) G(x)   for x > 0
//	H = q / 2              for x = 0 (the centre of the zero mass, Stagge et al. 2015)
//	SPI = Phi^-1(H)
//
// The upper tail is computed from the complemented gamma integral, so large
// totals keep their precision. A tail probability that underflows is held at
// the smallest positive float64, so the result is finite (|SPI| < 38.5).
// It returns NaN for a negative or NaN x, a q outside [0, 1), or a shape or
// scale that is not positive.
func SPI(x float64, shape, scale, q float64) float64 {
	if !(x >= 0) || !(shape > 0) || !(scale > 0) || !(q >= 0 && q < 1) ||
		math.IsInf(shape, 0) || math.IsInf(scale, 0) {
		return math.NaN()
	}
	if x == 0 {
		return spiQuantile(q/2, 1-q/2)
	}
	g, gc := gamCDF(x, shape, scale)
	return spiQuantile(q+(1-q)*g, (1-q)*gc)
}

// spiQuantile returns Phi^-1(h), where c = 1 - h is supplied separately so
// that h near 1 is computed from its small complement.
func spiQuantile(h, c float64) float64 {
	if h <= 0.5 {
		return distuv.UnitNormal.Quantile(math.Max(h, math.SmallestNonzeroFloat64))
	}
	return -distuv.UnitNormal.Quantile(math.Max(math.Min(c, 0.5), math.SmallestNonzeroFloat64))
}

// GringortenSPI is the empirical SPI of x in sample: Phi^-1 of the Gringorten
// (1963) plotting position p = (i - 0.44) / (n + 0.12), where i is the
// 1-based mid-rank of x (ties share the mean of their ranks, so
// i = below + (equal + 1) / 2). The sample should contain x; if it does not,
// x is counted as one more member (n + 1). It returns NaN for an empty
// sample or a NaN x.
func GringortenSPI(sample []float64, x float64) float64 {
	if len(sample) == 0 || math.IsNaN(x) {
		return math.NaN()
	}
	below, equal := spiCount(sample, x)
	n := len(sample)
	if equal == 0 {
		n++
		equal = 1
	}
	return GringortenCounts(below, equal, n)
}

// spiCount counts the members of sample below and equal to x.
func spiCount(sample []float64, x float64) (below, equal int) {
	for _, v := range sample {
		switch {
		case v < x:
			below++
		case v == x:
			equal++
		}
	}
	return below, equal
}

// GringortenCounts is GringortenSPI from the counts below and equal to
// x (equal >= 1) in a sample of n.
func GringortenCounts(below, equal, n int) float64 {
	i := float64(below) + float64(equal+1)/2
	p := (i - 0.44) / (float64(n) + 0.12)
	return spiQuantile(p, 1-p)
}
