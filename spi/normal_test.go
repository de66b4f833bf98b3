package spi

import (
	"bytes"
	"fmt"
	"math"
	"strconv"
	"strings"
	"testing"

	"drygrid/internal/reftest"
)

// Abramowitz and Stegun (1964), "Handbook of Mathematical Functions",
// Table 26.1 (the normal probability function P(x)) and the percentage
// points of the normal distribution (Table 26.5 / eq. 26.2.23). Values
// quoted from memory of the handbook tables, to the 6 decimals it prints
// for them; the tolerance is half a unit in the last place.
func TestNormalAgainstAbramowitzStegun(t *testing.T) {
	quantiles := []struct{ p, z float64 }{
		{0.975, 1.959964},
		{0.95, 1.644854},
		{0.99, 2.326348},
		{0.999, 3.090232},
		{0.9, 1.281552},
		{0.995, 2.575829},
		{0.5, 0},
	}
	for _, c := range quantiles {
		if got := PercentileToZ(100 * c.p); math.Abs(got-c.z) > 5e-7 {
			t.Errorf("Phi^-1(%v) = %.7f, A&S %.6f", c.p, got, c.z)
		}
		// Symmetry Phi^-1(1-p) = -Phi^-1(p) (A&S 26.2.4).
		if got := PercentileToZ(100 * (1 - c.p)); math.Abs(got+c.z) > 5e-7 {
			t.Errorf("Phi^-1(%v) = %.7f, A&S %.6f", 1-c.p, got, -c.z)
		}
	}
	cdf := []struct{ z, p float64 }{
		{1, 0.841345},
		{2, 0.977250},
		{0.5, 0.691462},
		{1.5, 0.933193},
		{3, 0.998650},
		{0, 0.5},
	}
	for _, c := range cdf {
		if got := ZToPercentile(c.z) / 100; math.Abs(got-c.p) > 5e-7 {
			t.Errorf("Phi(%v) = %.7f, A&S %.6f", c.z, got, c.p)
		}
		if got := ZToPercentile(-c.z) / 100; math.Abs(got-(1-c.p)) > 5e-7 {
			t.Errorf("Phi(%v) = %.7f, A&S %.6f", -c.z, got, 1-c.p)
		}
	}
}

// Against SciPy 1.10 (python3-scipy): scipy.stats.norm.ppf and norm.cdf
// over a sweep, to 1e-9 (testdata/classes/normal_ref.py).
func TestNormalAgainstSciPy(t *testing.T) {
	py := reftest.Python(t, "scipy.stats")
	var in bytes.Buffer
	var ps, zs []float64
	for p := 0.001; p < 0.9995; p += 0.00499 {
		ps = append(ps, p)
	}
	ps = append(ps, 0.001, 0.999, 0.5, 0.158655, 0.022750)
	for z := -6.0; z <= 6.0; z += 0.05 {
		zs = append(zs, z)
	}
	for _, p := range ps {
		fmt.Fprintf(&in, "ppf %.17g\n", p)
	}
	for _, z := range zs {
		fmt.Fprintf(&in, "cdf %.17g\n", z)
	}
	out := strings.Fields(string(reftest.RunPython(t, py, "../testdata/classes/normal_ref.py", in.Bytes())))
	if len(out) != len(ps)+len(zs) {
		t.Fatalf("reference gave %d values for %d requests", len(out), len(ps)+len(zs))
	}
	ref := func(i int) float64 {
		v, err := strconv.ParseFloat(out[i], 64)
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
	worst := 0.0
	for i, p := range ps {
		want, got := ref(i), PercentileToZ(100*p)
		worst = max(worst, math.Abs(got-want))
		if math.Abs(got-want) > 1e-9 {
			t.Errorf("PercentileToZ(%v) = %.12g, scipy norm.ppf %.12g", 100*p, got, want)
		}
	}
	for i, z := range zs {
		want, got := ref(len(ps)+i), ZToPercentile(z)/100
		// Relative in the tails, where Phi is tiny.
		if d := math.Abs(got - want); d > 1e-9*math.Max(want, 1e-6) {
			t.Errorf("ZToPercentile(%v)/100 = %.12g, scipy norm.cdf %.12g", z, got, want)
		}
	}
	t.Logf("%d quantiles, worst |z - scipy| %.2g", len(ps), worst)
}

// Percentiles are clamped to [0.1, 99.9] before z = Phi^-1(p/100).
func TestPercentileClamp(t *testing.T) {
	lo, hi := PercentileToZ(0.1), PercentileToZ(99.9)
	// Phi^-1(0.999) = 3.090232 (A&S, as above).
	if math.Abs(hi-3.090232) > 5e-7 || math.Abs(lo+3.090232) > 5e-7 {
		t.Fatalf("clamp ends %v %v", lo, hi)
	}
	for _, p := range []float64{0, -1, -1e300, math.Inf(-1), 0.05, 0.1} {
		if got := PercentileToZ(p); got != lo {
			t.Errorf("PercentileToZ(%v) = %v, want the 0.1 clamp %v", p, got, lo)
		}
	}
	for _, p := range []float64{100, 101, 1e300, math.Inf(1), 99.95, 99.9} {
		if got := PercentileToZ(p); got != hi {
			t.Errorf("PercentileToZ(%v) = %v, want the 99.9 clamp %v", p, got, hi)
		}
	}
	if !math.IsNaN(PercentileToZ(math.NaN())) || !math.IsNaN(ZToPercentile(math.NaN())) {
		t.Error("NaN must stay NaN")
	}
	if ZToPercentile(math.Inf(1)) != 100 || ZToPercentile(math.Inf(-1)) != 0 {
		t.Error("Phi(+/-Inf) must be 100 / 0 percent")
	}
	// Just inside the clamp the value still moves.
	if PercentileToZ(0.1000001) <= lo || PercentileToZ(99.8999999) >= hi {
		t.Error("values inside [0.1, 99.9] must not be clamped")
	}
}

// Laws: the two conversions are inverse on the unclamped range, and
// PercentileToZ is strictly increasing there.
func TestPercentileRoundTrip(t *testing.T) {
	prev := math.Inf(-1)
	for p := 0.1; p <= 99.9; p += 0.0997 {
		z := PercentileToZ(p)
		if z <= prev {
			t.Fatalf("not increasing at p = %v", p)
		}
		prev = z
		if back := ZToPercentile(z); math.Abs(back-p) > 1e-10*100 {
			t.Errorf("ZToPercentile(PercentileToZ(%v)) = %.15g", p, back)
		}
	}
	for z := -3.0; z <= 3.0; z += 0.01 {
		if back := PercentileToZ(ZToPercentile(z)); math.Abs(back-z) > 1e-9 {
			t.Errorf("PercentileToZ(ZToPercentile(%v)) = %.15g", z, back)
		}
	}
}
