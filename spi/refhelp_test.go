package spi

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"testing"

	"drygrid/internal/reftest"

	"gonum.org/v1/gonum/stat/distuv"
)

// idxRefScript is the SciPy reference of the index (testdata/spi_ref.py).
const idxRefScript = "../testdata/spi_ref.py"

// idxRunRef runs testdata/spi_ref.py in mode with in (JSON on stdin, or nil)
// and decodes its JSON answer into out.
func idxRunRef(t *testing.T, out any, in any, args ...string) {
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
	b := reftest.RunPython(t, py, idxRefScript, stdin, args...)
	if err := json.Unmarshal(b, out); err != nil {
		t.Fatalf("decoding %s output: %v\n%s", idxRefScript, err, b)
	}
}

// idxGammaSample draws n gamma(shape, scale) values with a fixed seed,
// rounded to 0.1 (as totals in mm are) when round is set.
func idxGammaSample(seed uint64, n int, shape, scale float64, round bool) []float64 {
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

// idxRelClose reports whether got is within rel (relative) of want.
func idxRelClose(got, want, rel float64) bool {
	return math.Abs(got-want) <= rel*math.Max(math.Abs(want), 1e-300)
}
