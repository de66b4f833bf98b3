package region

import (
	"encoding/json"
	"math"
	"math/big"
	"math/rand/v2"
	"strings"
	"testing"

	"drygrid/internal/reftest"

	"github.com/paulmach/orb"
)

// ratOrient is the reference: the sign of (b-a) x (c-a) in exact rational
// arithmetic (math/big), written out independently of orient.go.
func ratOrient(a, b, c orb.Point) int {
	f := func(v float64) *big.Rat { return new(big.Rat).SetFloat64(v) }
	bx := new(big.Rat).Sub(f(b[0]), f(a[0]))
	by := new(big.Rat).Sub(f(b[1]), f(a[1]))
	cx := new(big.Rat).Sub(f(c[0]), f(a[0]))
	cy := new(big.Rat).Sub(f(c[1]), f(a[1]))
	return new(big.Rat).Mul(bx, cy).Cmp(new(big.Rat).Mul(by, cx))
}

func naiveOrient(a, b, c orb.Point) int {
	return sign((b[0]-a[0])*(c[1]-a[1]) - (b[1]-a[1])*(c[0]-a[0]))
}

// TestOrientNearCollinear: the published hard case of Kettner, Mehlhorn,
// Pion, Schirra and Yap, "Classroom examples of robustness problems in
// geometric computations", Computational Geometry 40 (2008) 61-78, figure
// 2: p = (0.5 + i u, 0.5 + j u), u = 2^-53, i, j in 0..255, against
// q = (12, 12) and r = (24, 24), where plain floating point gets the sign
// wrong in a broken pattern; and points on y = x (and on other lines) moved
// by one ulp, at magnitudes from 1e-300 to 1e300. The reference is exact
// rational arithmetic.
func TestOrientNearCollinear(t *testing.T) {
	var n, naiveWrong int
	check := func(a, b, c orb.Point) {
		t.Helper()
		n++
		want := ratOrient(a, b, c)
		if naiveOrient(a, b, c) != want {
			naiveWrong++
		}
		// The sign of a turn does not depend on which point starts it, and
		// reverses with the order.
		for _, tr := range [][3]orb.Point{{a, b, c}, {b, c, a}, {c, a, b}} {
			if got := regOrient(tr[0], tr[1], tr[2]); got != want {
				t.Fatalf("orient(%v, %v, %v) = %d, exact %d", tr[0], tr[1], tr[2], got, want)
			}
			if got := regOrient(tr[1], tr[0], tr[2]); got != -want {
				t.Fatalf("orient(%v, %v, %v) = %d, exact %d", tr[1], tr[0], tr[2], got, -want)
			}
		}
		if got := orientExact(a, b, c); got != want {
			t.Fatalf("orientExact(%v, %v, %v) = %d, exact %d", a, b, c, got, want)
		}
	}
	u := math.Ldexp(1, -53)
	for i := 0; i < 256; i++ {
		for j := 0; j < 256; j++ {
			check(orb.Point{0.5 + float64(i)*u, 0.5 + float64(j)*u}, orb.Point{12, 12}, orb.Point{24, 24})
		}
	}
	rng := rand.New(rand.NewPCG(17, 1997))
	for k := 0; k < 20000; k++ {
		scale := math.Pow(10, float64(rng.IntN(601)-300))
		x0, x1 := scale*(rng.Float64()*2-1), scale*(rng.Float64()*2-1)
		t := rng.Float64()
		xm := x0 + t*(x1-x0)
		slope := []float64{1, 0.3, -7.1, 1e-3}[k%4]
		a, b := orb.Point{x0, slope * x0}, orb.Point{x1, slope * x1}
		c := orb.Point{xm, slope * xm}
		switch rng.IntN(3) {
		case 0:
			c[0] = math.Nextafter(c[0], math.Inf(1))
		case 1:
			c[1] = math.Nextafter(c[1], math.Inf(-1))
		}
		check(a, b, c)
	}
	// Exactly collinear, and on top of each other.
	check(orb.Point{1, 1}, orb.Point{2, 2}, orb.Point{3, 3})
	check(orb.Point{0.1, 0.2}, orb.Point{0.1, 0.2}, orb.Point{0.3, 0.4})
	if naiveWrong == 0 {
		t.Fatal("plain floating point got every sign right: the cases test nothing")
	}
	t.Logf("%d triples, %d of which plain floating point gets wrong", n, naiveWrong)
}

// TestHoleHairInsideVsShapely: a hole whose corner lies 2.5e-17 degrees
// inside the exterior ring's edge (as in real boundaries after GEOS repair)
// is a valid polygon for shapely (GEOS) and is accepted; the same hole
// 2.5e-17 degrees outside is invalid for shapely and refused. The corners
// were found by exact rational arithmetic; the crossing test that
// interpolated the edge's longitude called the inside one outside.
func TestHoleHairInsideVsShapely(t *testing.T) {
	py := reftest.Python(t, "shapely")
	ext := orb.Ring{{12.3456789, 41.9876543}, {13.9876543, 43.3216789}, {12.1, 44.2}, {11.2, 42.5}, {12.3456789, 41.9876543}}
	in := orb.Point{12.735811964869928, 42.30461830921103}
	out := orb.Point{13.770157030080089, 43.144973019689004}
	hole := func(p orb.Point) orb.Ring { return orb.Ring{p, {12.5, 43.3}, {12.0, 42.9}, p} }
	polys := []orb.Polygon{{ext, hole(in)}, {ext, hole(out)}}
	var ref [][2]any
	regionsRef(t, py, map[string]any{"mode": "validity", "polygons": []any{ringsJSON(polys[0]), ringsJSON(polys[1])}}, &ref)
	if ref[0][0] != true || ref[1][0] != false {
		t.Fatalf("shapely: %v; the cases need the inside hole valid and the outside one invalid", ref)
	}
	for i, p := range polys {
		js, _ := json.Marshal(map[string]any{"type": "Polygon", "coordinates": ringsJSON(p)})
		_, err := ParseRegions("f", js, "")
		if valid := ref[i][0] == true; valid != (err == nil) {
			t.Errorf("polygon %d: shapely valid %v (%v), ParseRegions error %v", i, valid, ref[i][1], err)
		}
		if err != nil && !strings.Contains(err.Error(), "ring 1 (a hole) has position 0 outside the exterior ring") {
			t.Errorf("polygon %d: %v", i, err)
		}
	}
	if !regInsideOrOn(in, ext) || regInsideOrOn(out, ext) {
		t.Errorf("inside %v, outside %v: want true, false", regInsideOrOn(in, ext), regInsideOrOn(out, ext))
	}
}
