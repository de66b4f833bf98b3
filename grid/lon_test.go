package grid

import (
	"math"
	"testing"
)

func TestWrapLon(t *testing.T) {
	for _, c := range []struct{ in, want float64 }{
		{0, 0},
		{-0.5, -0.5},
		{179.5, 179.5},
		{180, 180},   // kept, not turned into -180
		{-180, -180}, // kept
		{180.5, -179.5},
		{-180.5, 179.5},
		{190, -170},
		{-190, 170},
		{360, 0},
		{-360, 0},
		{540, -180}, // outside the range: shifted into [-180, 180)
		{-540, -180},
		{725, 5},
		{-725, -5},
	} {
		if got := WrapLon(c.in); got != c.want {
			t.Errorf("WrapLon(%g) = %g, want %g", c.in, got, c.want)
		}
	}
	if got := WrapLon(math.NaN()); !math.IsNaN(got) {
		t.Errorf("WrapLon(NaN) = %g, want NaN", got)
	}
}
