package grid

import (
	"math"
	"testing"
)

// FuzzNewSpec: NewSpec never panics; it gives an error or a grid of at
// least one cell whose edges are multiples of the resolution and that
// covers the bbox (latitudes up to the outermost multiple of res within the
// poles, longitudes up to the 360-degree cap).
func FuzzNewSpec(f *testing.F) {
	f.Add(-10.03, 30.01, 9.98, 49.99, 0.1)
	f.Add(170.0, -20.0, -170.0, 0.0, 1.0)
	f.Add(190.0, 10.0, 200.0, 20.0, 0.25)
	f.Add(0.0, -90.0, 360.0, 90.0, 0.7)
	f.Add(-180.0, -90.0, 180.0, 90.0, 0.1)
	f.Add(0.0, 80.0, 10.0, 90.0, 50.0) // res over MaxRes: an error
	f.Add(1e-300, 0.0, 1.0, 1.0, 1e-300)
	f.Fuzz(func(t *testing.T, w, s, e, n, res float64) {
		specFuzzCheck(t, w, s, e, n, res)
		// Random floats rarely land in the valid domain, so also try the
		// inputs folded into it (coarse res keeps the grids small).
		fold := func(v, lo, span float64) float64 { return lo + math.Mod(math.Abs(v), span) }
		specFuzzCheck(t, fold(w, -180, 540), fold(s, -90, 180), fold(e, -180, 540), fold(n, -90, 180), fold(res, 0.01, 10))
	})
}

func specFuzzCheck(t *testing.T, w, s, e, n, res float64) {
	sp, err := NewSpec(w, s, e, n, res)
	if err != nil {
		return
	}
	if sp.Cols < 1 || sp.Rows < 1 || sp.Res != res {
		t.Fatalf("NewSpec(%g,%g,%g,%g,%g) = %+v", w, s, e, n, res, sp)
	}
	tol := 1e-6 * res
	isMultiple := func(v float64) bool {
		k := v / res
		return math.Abs(k-math.Round(k)) <= 1e-6*math.Max(1, math.Abs(k))
	}
	// West may have been wrapped by 360 (a res that does not divide 360).
	if !isMultiple(sp.West) && !isMultiple(sp.West-360) {
		t.Fatalf("West %g is not a multiple of %g", sp.West, res)
	}
	if !isMultiple(sp.North) || !isMultiple(sp.South()) {
		t.Fatalf("North %g / South %g not multiples of %g", sp.North, sp.South(), res)
	}
	if sp.West < -180 || sp.West >= 180 || sp.North > 90+tol || sp.South() < -90-tol {
		t.Fatalf("%+v outside the documented range", sp)
	}
	top := math.Floor(90/res+snapTol) * res
	if sp.North < n-tol && sp.North < top-tol {
		t.Fatalf("North %g does not cover %g", sp.North, n)
	}
	if sp.South() > s+tol && sp.South() > -top+tol {
		t.Fatalf("South %g does not cover %g", sp.South(), s)
	}
	width := float64(sp.Cols) * res
	if width > 360+tol {
		t.Fatalf("width %g over 360", width)
	}
	full := float64(sp.Cols) >= math.Floor(360/res+snapTol)
	if full {
		return
	}
	// Longitudes: the bbox's west and east lie inside the grid.
	for _, lon := range []float64{w, e} {
		x := math.Mod(lon-sp.West, 360)
		if x < 0 {
			x += 360
		}
		if x > 360-tol {
			x = 0
		}
		if x > width+tol {
			t.Fatalf("%+v (east %g) does not cover longitude %g of bbox %g,%g,%g,%g", sp, sp.East(), lon, w, s, e, n)
		}
	}
}
