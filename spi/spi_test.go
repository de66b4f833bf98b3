package spi

import (
	"drygrid/internal/spitest"
	"math"
	"testing"
)

type spiCase struct {
	X     float64 `json:"x"`
	Shape float64 `json:"shape"`
	Scale float64 `json:"scale"`
	Q     float64 `json:"q"`
}

// SciPy 1.10: H = q + (1 - q) gamma.cdf(x) (x > 0), q / 2 (x = 0), then
// norm.ppf(H) (McKee et al. 1993; Stagge et al. 2015 for the zero mass).
func TestSPISciPy(t *testing.T) {
	cases := []spiCase{
		{10, 2, 10, 0}, {20, 2, 10, 0}, {60, 2, 10, 0}, {0.5, 2, 10, 0},
		{3, 0.4, 30, 0.2}, {150, 0.4, 30, 0.2}, {0, 0.4, 30, 0.2}, {0, 1, 1, 0.5},
		{95, 50, 2, 0}, {140, 50, 2, 0.05}, {1e-3, 3, 5, 0.1},
	}
	var ref []float64
	spitest.RunRef(t, &ref, cases, "spi")
	for i, c := range cases {
		got := SPI(c.X, c.Shape, c.Scale, c.Q)
		if math.Abs(got-ref[i]) > 1e-9 {
			t.Errorf("SPI%+v = %.12f, SciPy %.12f", c, got, ref[i])
		}
	}
}

// Invalid arguments give NaN, never a panic (gonum's incomplete gamma and
// normal quantile panic on them).
func TestSPIInvalid(t *testing.T) {
	for _, c := range []spiCase{{-1, 2, 1, 0}, {math.NaN(), 2, 1, 0}, {1, 0, 1, 0}, {1, 2, -1, 0},
		{1, 2, 1, 1}, {1, 2, 1, -0.1}, {1, math.Inf(1), 1, 0}, {1, 2, 1, math.NaN()}} {
		if got := SPI(c.X, c.Shape, c.Scale, c.Q); !math.IsNaN(got) {
			t.Errorf("SPI%+v = %g, want NaN", c, got)
		}
	}
	// Far in the upper tail the complement keeps the value finite and large.
	if got := SPI(1e4, 2, 1, 0); math.IsInf(got, 0) || got < 30 {
		t.Errorf("SPI far upper tail = %g", got)
	}
}

// Property (the probability integral transform, a law): if the gamma fits,
// the SPI of each year of a long series against the whole series is close
// to standard normal. 2000 values of gamma(2, 10), fixed seed. For 2000
// independent N(0, 1) values the mean has standard error 1/sqrt(2000) =
// 0.022 and the standard deviation about 1/sqrt(2 x 2000) = 0.016; the
// fitted parameters add a little, so the tolerances are 0.07 (3 se) and
// 0.05 (3 se).
func TestSPIStandardNormalProperty(t *testing.T) {
	x := spitest.GammaSample(42, 2000, 2, 10, false)
	shape, scale, err := GammaFit(x)
	if err != nil {
		t.Fatal(err)
	}
	var sum, sum2 float64
	for _, v := range x {
		z := SPI(v, shape, scale, 0)
		sum += z
		sum2 += z * z
	}
	n := float64(len(x))
	mean := sum / n
	sd := math.Sqrt(sum2/n - mean*mean)
	if math.Abs(mean) > 0.07 || math.Abs(sd-1) > 0.05 {
		t.Errorf("SPI of the series: mean %.4f sd %.4f, want about 0 and 1", mean, sd)
	}
}

// The Gringorten (1963) position (i - 0.44) / (n + 0.12) with mid-rank ties:
// hand values. n = 5, x the 3rd of 5 distinct values: p = 2.56/5.12 = 0.5,
// so the SPI is exactly 0; the smallest of 5: p = 0.56/5.12 = 0.109375,
// Phi^-1(0.109375) = -1.2297 (Abramowitz and Stegun 1964, table 26.1, by
// interpolation: Phi(-1.23) = 0.10935; the table value is from memory). Ties {1, 2, 2, 3}: x = 2 has
// mid-rank 2.5, p = 2.06/4.12 = 0.5.
func TestGringortenSPI(t *testing.T) {
	s := []float64{5, 1, 3, 2, 4}
	if got := GringortenSPI(s, 3); math.Abs(got) > 1e-12 {
		t.Errorf("middle of 5: %g, want 0", got)
	}
	if got := GringortenSPI(s, 1); math.Abs(got-(-1.2297)) > 5e-4 {
		t.Errorf("smallest of 5: %.4f, want -1.2297", got)
	}
	if got := GringortenSPI([]float64{1, 2, 2, 3}, 2); math.Abs(got) > 1e-12 {
		t.Errorf("tied middle: %g, want 0", got)
	}
	// Not in the sample: counted as one more member, here the middle of 5.
	if got := GringortenSPI([]float64{1, 2, 4, 5}, 3); math.Abs(got) > 1e-12 {
		t.Errorf("inserted middle: %g, want 0", got)
	}
	// Symmetry (a law of the position): the largest is minus the smallest.
	if a, b := GringortenSPI(s, 5), GringortenSPI(s, 1); math.Abs(a+b) > 1e-12 {
		t.Errorf("largest %g, smallest %g: not symmetric", a, b)
	}
	if !math.IsNaN(GringortenSPI(nil, 1)) {
		t.Error("empty sample: want NaN")
	}
}
