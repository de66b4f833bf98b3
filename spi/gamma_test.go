package spi

import (
	"drygrid/internal/spitest"
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/mathext"
)

// Thom (1958), "A note on the gamma distribution", Monthly Weather Review 86:
// the closed-form approximation of the shape a0 = (1 + sqrt(1 + 4A/3)) / (4A)
// with A = ln(mean) - mean(ln x). Worked by hand for the sample {1, 2, 4}:
//
//	mean = 7/3 = 2.333333;  ln(mean) = 0.8472979
//	mean(ln x) = (0 + 0.6931472 + 1.3862944) / 3 = 0.6931472  (= ln 2)
//	A = 0.8472979 - 0.6931472 = 0.1541507
//	1 + 4A/3 = 1.2055342;  sqrt = 1.0979682
//	a0 = 2.0979682 / 0.6166027 = 3.40246
func TestThomShapeWorkedExample(t *testing.T) {
	a := math.Log(7.0/3) - math.Log(2) // A of the sample {1, 2, 4}, worked above
	if got := gamThomShape(a); math.Abs(got-3.40246) > 5e-5 {
		t.Errorf("Thom a0 = %.6f, worked example 3.40246", got)
	}
	// The maximum-likelihood shape solves ln a - digamma(a) = A exactly
	// (Thom 1958; Wilks, Statistical Methods in the Atmospheric Sciences,
	// section 4.6): a law, checked with gonum's digamma; and Thom's start is
	// within 2 % of it (his approximation is good to about 1 % for A < 1,
	// from memory of Wilks).
	shape, scale, err := GammaFit([]float64{1, 2, 4})
	if err != nil {
		t.Fatal(err)
	}
	if r := math.Log(shape) - mathext.Digamma(shape) - a; math.Abs(r) > 1e-12 {
		t.Errorf("likelihood equation residual %g", r)
	}
	if math.Abs(shape*scale-7.0/3) > 1e-12 {
		t.Errorf("shape*scale = %g, want the mean 7/3", shape*scale)
	}
	if d := math.Abs(gamThomShape(a)-shape) / shape; d > 0.02 {
		t.Errorf("Thom start %.5f is %.1f %% from the MLE %.5f", gamThomShape(a), 100*d, shape)
	}
}

// SciPy 1.10: scipy.stats.gamma.fit(x, floc=0) (exact MLE with location 0);
// shape and scale must agree to 1e-6 relative. Samples span shapes 0.3 to
// 80, short and long records, ties (rounded to 0.1 mm) and zeros (ignored
// by both: the script fits the positive values).
func TestGammaFitSciPy(t *testing.T) {
	samples := [][]float64{
		{1, 2, 4},
		{0.5, 3},
		spitest.GammaSample(1, 20, 0.3, 40, false),
		spitest.GammaSample(2, 30, 1, 25, true),
		spitest.GammaSample(3, 60, 2.5, 12, true),
		spitest.GammaSample(4, 100, 10, 3, false),
		spitest.GammaSample(5, 200, 80, 0.5, false),
		append([]float64{0, 0, 0}, spitest.GammaSample(6, 40, 0.8, 10, true)...),
	}
	var ref []struct{ Shape, Scale, A2 float64 }
	spitest.RunRef(t, &ref, samples, "fit")
	for i, x := range samples {
		shape, scale, err := GammaFit(x)
		if err != nil {
			t.Errorf("sample %d: %v", i, err)
			continue
		}
		if !spitest.RelClose(shape, ref[i].Shape, 1e-6) || !spitest.RelClose(scale, ref[i].Scale, 1e-6) {
			t.Errorf("sample %d: shape %.9g scale %.9g, SciPy %.9g %.9g", i, shape, scale, ref[i].Shape, ref[i].Scale)
		}
	}
}

// Degenerate samples: no MLE exists (fewer than two positive values, or all
// positive values equal, where the likelihood grows without bound in the
// shape). Common practice: report the fit as failed.
func TestGammaFitDegenerate(t *testing.T) {
	cases := []struct {
		name string
		x    []float64
		want error
	}{
		{"empty", nil, ErrGammaTooFew},
		{"zeros", []float64{0, 0, 0}, ErrGammaTooFew},
		{"one", []float64{0, 5, 0}, ErrGammaTooFew},
		{"equal", []float64{3.2, 3.2, 0, 3.2}, ErrGammaConstant},
		{"nan and inf ignored", []float64{math.NaN(), math.Inf(1), 2}, ErrGammaTooFew},
	}
	for _, c := range cases {
		if _, _, err := GammaFit(c.x); !errors.Is(err, c.want) {
			t.Errorf("%s: err %v, want %v", c.name, err, c.want)
		}
	}
	// Nearly equal values: a huge but finite shape (the asymptotic branch of
	// ln a - digamma(a)), the mean kept. As the shape grows the gamma tends
	// to the normal with the sample's (population) variance, a law: for
	// eight values 1 and one value 1 + e, the SPI of the largest tends to
	// (e - e/9) / (e sqrt(8) / 9) = sqrt(8).
	for _, e := range []float64{1e-4, 1e-6, 1e-9} {
		x := []float64{1, 1, 1, 1, 1, 1, 1, 1, 1 + e}
		shape, scale, err := GammaFit(x)
		if err != nil || !(shape > 1e7) || math.Abs(shape*scale-(1+e/9)) > 1e-12 {
			t.Errorf("nearly equal (e = %g): shape %g scale %g err %v", e, shape, scale, err)
			continue
		}
		if z := SPI(1+e, shape, scale, 0); math.Abs(z-math.Sqrt(8)) > 2e-3 {
			t.Errorf("nearly equal (e = %g): SPI of the largest %.5f, normal limit sqrt(8) = 2.82843", e, z)
		}
	}
}
