// Package spitest holds test support for the index step, shared by the
// tests of spi and station: the call of the SciPy reference script
// (testdata/spi_ref.py), gamma samples drawn with a fixed seed, and a
// relative comparison. Only tests import it.
package spitest

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"testing"

	"drygrid/internal/reftest"

	"gonum.org/v1/gonum/stat/distuv"
)

// Script is the SciPy reference of the index step, as a path from the
// directory of a package one level below the module's root (spi, station).
const Script = "../testdata/spi_ref.py"

// RunRef runs the SciPy reference script (Script) in the mode args name,
// with in as JSON on stdin (or nothing when nil), and decodes its JSON
// answer into out.
func RunRef(t *testing.T, out any, in any, args ...string) {
	t.Helper()
	py := reftest.Python(t, "numpy", "scipy.stats")
	var stdin []byte
	if in != nil {
		b, err := json.Marshal(in)
		if err != nil {
			t.Fatal(err)
		}
		stdin = b
	}
	b := reftest.RunPython(t, py, Script, stdin, args...)
	if err := json.Unmarshal(b, out); err != nil {
		t.Fatalf("decoding %s output: %v\n%s", Script, err, b)
	}
}

// GammaSample draws n gamma(shape, scale) values with a fixed seed,
// rounded to 0.1 (as totals in mm are) when round is set.
func GammaSample(seed uint64, n int, shape, scale float64, round bool) []float64 {
	g := distuv.Gamma{Alpha: shape, Beta: 1 / scale, Src: rand.New(rand.NewPCG(seed, 1))}
	x := make([]float64, n)
	for i := range x {
		x[i] = g.Rand()
		if round {
			x[i] = math.Round(x[i]*10) / 10
		}
	}
	return x
}

// RelClose reports whether got is within rel (relative) of want.
func RelClose(got, want, rel float64) bool {
	return math.Abs(got-want) <= rel*math.Max(math.Abs(want), 1e-300)
}
