package spi

import (
	"testing"

	"drygrid/internal/spitest"
)

// idxRefScript is the SciPy reference of the index (testdata/spi_ref.py).
const idxRefScript = "../testdata/spi_ref.py"

// idxRunRef runs testdata/spi_ref.py (spitest.RunRef).
func idxRunRef(t *testing.T, out any, in any, args ...string) {
	t.Helper()
	spitest.RunRef(t, idxRefScript, out, in, args...)
}

var (
	idxGammaSample = spitest.GammaSample
	idxRelClose    = spitest.RelClose
)
