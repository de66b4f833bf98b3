package spi

import (
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// Percentile clamp: percentiles are limited to [0.1, 99.9]
// before conversion so that 0 and 100 map to finite z.
const (
	MinPercentile = 0.1
	MaxPercentile = 99.9
)

var stdNormal = distuv.UnitNormal

// PercentileToZ is z = Phi^-1(p/100) with p clamped to [0.1, 99.9]; NaN
// stays NaN.
func PercentileToZ(p float64) float64 {
	if math.IsNaN(p) {
		return math.NaN()
	}
	p = min(max(p, MinPercentile), MaxPercentile)
	return stdNormal.Quantile(p / 100)
}

// ZToPercentile is 100 Phi(z).
func ZToPercentile(z float64) float64 {
	if math.IsNaN(z) {
		return math.NaN()
	}
	return 100 * stdNormal.CDF(z)
}
