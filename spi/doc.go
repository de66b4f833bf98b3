// Package spi holds the statistics of the index step: the gamma fit of a
// station's reference totals, the standardized precipitation index (SPI),
// the empirical SPI, the mid-rank percentile, the Anderson-Darling goodness
// of fit, and the conversion between percentiles and z. In the data flow it
// turns one station's window totals into the z that is interpolated; it
// imports no other package of the project.
//
// Gamma fit (Thom 1958): a gamma with location 0 is fitted by maximum
// likelihood to the non-zero totals; with A = ln(mean) - mean(ln x) the shape
// a solves ln a - digamma(a) = A, started from a0 = (1 + sqrt(1 + 4A/3)) /
// (4A) and refined by Newton's method, and scale = mean / a.
//
// SPI (McKee et al. 1993; WMO-No. 1090, 2012), with q the share of zero
// totals and G the fitted gamma CDF:
//
//	H = q + (1 - q) G(x)   for x > 0
//	H = q / 2              for x = 0 (the centre of the zero mass, Stagge et al. 2015)
//	SPI = Phi^-1(H)
//
// The empirical SPI is Phi^-1 of the Gringorten (1963) plotting position
// (i - 0.44) / (n + 0.12), i the mid-rank. The percentile is by mid-rank:
// 100 x (count below x + half the count equal to x) / n, as SciPy's
// percentileofscore(kind="mean"). A percentile p becomes z = Phi^-1(p/100)
// with p clamped to [0.1, 99.9] (MinPercentile, MaxPercentile), so 0 and 100
// map to finite z; z becomes p = 100 Phi(z).
//
// See docs/design.md for the index step as a whole.
package spi
