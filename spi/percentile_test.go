package spi

import (
	"drygrid/internal/spitest"
	"math"
	"testing"
)

type pctCase struct {
	Sample []float64 `json:"sample"`
	X      float64   `json:"x"`
}

// SciPy 1.10: scipy.stats.percentileofscore(sample, x, kind="mean") is the
// mid-rank percentile of MidRankPercentile. Cases: ties, zeros, x below, above and
// between the sample, a one-value sample.
func TestMidRankPercentileSciPy(t *testing.T) {
	cases := []pctCase{
		{[]float64{1, 2, 3, 4}, 3},
		{[]float64{1, 2, 2, 2, 3}, 2},
		{[]float64{0, 0, 0, 5, 7, 9}, 0},
		{[]float64{0, 0, 0, 5, 7, 9}, 6},
		{[]float64{4, 5, 6}, 1},
		{[]float64{4, 5, 6}, 10},
		{[]float64{7}, 7},
		{spitest.GammaSample(9, 45, 1.5, 20, true), 20.1},
	}
	var ref []float64
	spitest.RunRef(t, &ref, cases, "pct")
	for i, c := range cases {
		if got := MidRankPercentile(c.Sample, c.X); math.Abs(got-ref[i]) > 1e-9 {
			t.Errorf("case %d: %.10f, SciPy %.10f", i, got, ref[i])
		}
	}
}

// Property (a law of mid-ranks): over a whole sample, ties or not, the
// mid-rank percentiles of its members average exactly 50, because the
// mid-ranks sum to n(n+1)/2.
func TestMidRankPercentileMeanIs50(t *testing.T) {
	x := spitest.GammaSample(11, 300, 0.7, 5, true) // many ties at 0.1 mm
	x = append(x, 0, 0, 0, 0)
	var sum float64
	for _, v := range x {
		sum += MidRankPercentile(x, v)
	}
	if m := sum / float64(len(x)); math.Abs(m-50) > 1e-9 {
		t.Errorf("mean percentile %.12f, want 50", m)
	}
}

// Median: the textbook definition (common practice), odd and even counts.
func TestMedian(t *testing.T) {
	for _, c := range []struct {
		x    []float64
		want float64
	}{{[]float64{3, 1, 2}, 2}, {[]float64{4, 1, 3, 2}, 2.5}, {[]float64{0, 0, 1}, 0}} {
		if got := Median(c.x); got != c.want {
			t.Errorf("Median(%v) = %g, want %g", c.x, got, c.want)
		}
	}
	if !math.IsNaN(Median(nil)) || !math.IsNaN(MidRankPercentile(nil, 1)) {
		t.Error("empty sample: want NaN")
	}
}
