package spi

import (
	"drygrid/internal/spitest"
	"math"
	"math/rand/v2"
	"testing"
)

// The Anderson-Darling statistic against SciPy-fitted gamma parameters,
// computed independently in testdata/spi_ref.py with NumPy from the formula
// of Stephens (1974) (scipy.stats.anderson has no gamma case in 1.10).
func TestADStatisticSciPy(t *testing.T) {
	samples := [][]float64{
		spitest.GammaSample(21, 30, 0.7, 20, true),
		spitest.GammaSample(22, 60, 2, 25, true),
		spitest.GammaSample(23, 100, 8, 4, false),
		idxBimodal(24, 40),
	}
	var ref []struct{ Shape, Scale, A2 float64 }
	spitest.RunRef(t, &ref, samples, "fit")
	for i, x := range samples {
		shape, scale, err := GammaFit(x)
		if err != nil {
			t.Fatal(err)
		}
		a2 := AndersonDarlingGamma(x, shape, scale)
		if !spitest.RelClose(a2, ref[i].A2, 1e-6) {
			t.Errorf("sample %d: A2 %.9f, SciPy/NumPy %.9f", i, a2, ref[i].A2)
		}
	}
}

// The 5 % points of Stephens' gamma table (D'Agostino and Stephens 1986,
// Table 4.21, quoted from memory) and of the rows below m = 1 (from a
// 200,000-sample bootstrap, see gofCrit5) against SciPy's own parametric
// bootstrap of the same case (scipy.stats.goodness_of_fit(gamma, known loc
// 0, "ad"), 2000 samples of n = 100, other seeds). Its 95 % point has a
// Monte Carlo standard error of about 0.015 (as spi_ref.py adtable
// estimates it at that size) and n = 100 is not the asymptote, so the
// tolerance is 0.04 (the table spans 0.752 to 0.887; the
// exponential case with only the scale estimated, 1.321, or the fully
// specified case, 2.492, would fail).
func TestADCriticalValuesSciPy(t *testing.T) {
	for i, shape := range []float64{0.4, 1, 4, 10} {
		var ref struct {
			Crit5       float64
			FittedShape float64 `json:"fitted_shape"`
		}
		in := map[string]any{"shape": shape, "scale": 10, "n": 100, "nmc": 2000, "seed": 100 + i}
		spitest.RunRef(t, &ref, in, "adnull")
		got := ADCritical5(ref.FittedShape)
		t.Logf("shape %.3f: table 5 %% point %.3f, SciPy bootstrap %.3f", ref.FittedShape, got, ref.Crit5)
		if math.Abs(got-ref.Crit5) > 0.04 {
			t.Errorf("shape %.3f: table 5 %% point %.3f, SciPy bootstrap %.3f", ref.FittedShape, got, ref.Crit5)
		}
	}
}

// The same 5 % points against a larger bootstrap at fixed shapes
// (testdata/spi_ref.py adtable: 20,000 gamma samples of n = 100 per shape,
// refitted by a vectorised MLE that the script checks against
// scipy.stats.gamma.fit, A^2 from SciPy's gamma cdf; a fresh seed). The
// tolerance is three of the Monte Carlo standard errors the script reports
// (0.005-0.008) plus 0.005 for n = 100 against Stephens' asymptotic rows:
// 0.02-0.03, against 0.04 above. Shapes between the table's rows check the
// interpolation in 1/m.
func TestADCriticalValuesBootstrap(t *testing.T) {
	shapes := []float64{0.35, 0.6, 3}
	var ref struct {
		Points []struct {
			Shape float64 `json:"shape"`
			Crit5 float64 `json:"crit5"`
			SE    float64 `json:"se"`
		} `json:"points"`
	}
	spitest.RunRef(t, &ref, map[string]any{"shapes": shapes, "n": 100, "nmc": 20000, "seed": 2026}, "adtable")
	if len(ref.Points) != len(shapes) {
		t.Fatalf("%d points for %d shapes", len(ref.Points), len(shapes))
	}
	for _, p := range ref.Points {
		got := ADCritical5(p.Shape)
		tol := 3*p.SE + 0.005
		t.Logf("shape %g: table %.3f, bootstrap %.3f (se %.4f)", p.Shape, got, p.Crit5, p.SE)
		if math.Abs(got-p.Crit5) > tol {
			t.Errorf("shape %g: table 5 %% point %.3f, bootstrap %.3f +- %.3f", p.Shape, got, p.Crit5, tol)
		}
	}
}

// The table's ends and interpolation: m = 1 and m = infinity (the normal
// case, D'Agostino and Stephens Table 4.7: 0.752) are the printed values;
// between rows the value lies between its neighbours.
func TestADCritical5Table(t *testing.T) {
	if got := ADCritical5(1); got != 0.786 {
		t.Errorf("m = 1: %g", got)
	}
	if got := ADCritical5(0.1); got != 0.887 {
		t.Errorf("m = 0.1 (below the table): %g, want the m = 0.25 row", got)
	}
	if got := ADCritical5(1e9); math.Abs(got-0.752) > 1e-6 {
		t.Errorf("m large: %g, want 0.752", got)
	}
	if got := ADCritical5(2.5); got <= 0.762 || got >= 0.768 {
		t.Errorf("m = 2.5: %g, want between 0.762 and 0.768", got)
	}
}

// Property (the size of a test is its significance level): gamma samples
// with estimated parameters are rejected about 5 % of the time, for shapes
// 2.5 and 0.6; 400 samples of n = 50 each give a binomial standard error
// of 1.1 %, so the rate must lie in [1.5 %, 9 %]. Clearly bimodal samples
// (two normal modes 20 and 200) are rejected nearly always.
func TestADAcceptReject(t *testing.T) {
	for _, shape := range []float64{2.5, 0.6} {
		idxADSize(t, shape)
	}
	rejected := 0
	for i := 0; i < 50; i++ {
		x := idxBimodal(uint64(5000+i), 50)
		shape, scale, err := GammaFit(x)
		if err != nil {
			t.Fatal(err)
		}
		if _, ok, _ := GammaFitOK(x, shape, scale); !ok {
			rejected++
		}
	}
	if rejected < 48 {
		t.Errorf("bimodal samples rejected %d of 50, want nearly all", rejected)
	}
	if _, ok, tested := GammaFitOK([]float64{1, 2, 3, 0, 0}, 2, 1); tested || !ok {
		t.Error("3 positive values: want untested")
	}
}

// idxADSize checks the rejection rate of gamma(shape) samples.
func idxADSize(t *testing.T, shape float64) {
	t.Helper()
	rejected := 0
	const m = 400
	for i := 0; i < m; i++ {
		x := spitest.GammaSample(uint64(1000+i), 50, shape, 30, false)
		shape, scale, err := GammaFit(x)
		if err != nil {
			t.Fatal(err)
		}
		if _, ok, tested := GammaFitOK(x, shape, scale); !tested {
			t.Fatal("50 values not tested")
		} else if !ok {
			rejected++
		}
	}
	t.Logf("shape %g: gamma samples rejected %d of %d", shape, rejected, m)
	if rate := float64(rejected) / m; rate < 0.015 || rate > 0.09 {
		t.Errorf("shape %g: gamma samples rejected at rate %.3f, want about 0.05", shape, rate)
	}
}

// idxBimodal draws n values from an even mix of N(20, 2) and N(200, 10).
func idxBimodal(seed uint64, n int) []float64 {
	r := rand.New(rand.NewPCG(seed, 2))
	x := make([]float64, n)
	for i := range x {
		if r.IntN(2) == 0 {
			x[i] = 20 + 2*r.NormFloat64()
		} else {
			x[i] = 200 + 10*r.NormFloat64()
		}
		x[i] = math.Max(x[i], 0.1)
	}
	return x
}
