package spi

import (
	"math"
	"sort"
)

// MidRankPercentile is the percentile (0-100) of x in sample by mid-rank:
// 100 x (count below x + half the count equal to x) / n. This is SciPy's
// percentileofscore(sample, x, kind="mean"). It returns NaN for an empty
// sample or a NaN x.
func MidRankPercentile(sample []float64, x float64) float64 {
	if len(sample) == 0 || math.IsNaN(x) {
		return math.NaN()
	}
	below, equal := spiCount(sample, x)
	return 100 * (float64(below) + float64(equal)/2) / float64(len(sample))
}

// Median is the median of sample (the mean of the two middle values for an
// even count); NaN for an empty sample. sample is not modified.
func Median(sample []float64) float64 {
	if len(sample) == 0 {
		return math.NaN()
	}
	s := append([]float64(nil), sample...)
	sort.Float64s(s)
	return SortedMedian(s)
}

// SortedMedian is the median of an ascending, non-empty sample.
func SortedMedian(s []float64) float64 {
	n := len(s)
	if n%2 == 1 {
		return s[n/2]
	}
	return (s[n/2-1] + s[n/2]) / 2
}

// SortedCount counts the members of an ascending sample below and equal
// to x by binary search.
func SortedCount(s []float64, x float64) (below, equal int) {
	below = sort.SearchFloat64s(s, x)
	hi := sort.Search(len(s), func(i int) bool { return s[i] > x })
	return below, hi - below
}
