package geojson

import (
	"math"
	"math/rand/v2"
	"testing"

	"drygrid/bands"
	"drygrid/grid"
	"drygrid/internal/reftest"
	"drygrid/polygon"

	"github.com/paulmach/orb"
)

// polySmooth is a smooth classified field, full coverage or with no data.
func polySmooth(seed uint64, cols, rows int, res float64, nodata bool) *grid.Uint8 {
	rng := rand.New(rand.NewPCG(seed, 99))
	sp := grid.Spec{West: -20 + float64(rng.IntN(10)), North: 60 - float64(rng.IntN(10)), Res: res, Cols: cols, Rows: rows}
	r := grid.NewUint8(sp, 0)
	fx, fy, ph := 0.05+0.2*rng.Float64(), 0.05+0.2*rng.Float64(), 6*rng.Float64()
	s := bands.Default()
	for i := range r.Data {
		x, y := float64(i%cols), float64(i/cols)
		z := 1.8*math.Sin(fx*x+ph)*math.Cos(fy*y) + 0.7*math.Sin(0.3*x-0.2*y) + 0.03*rng.NormFloat64()
		if nodata && math.Cos(0.11*x+ph)*math.Sin(0.13*y) < -0.5 {
			continue
		}
		r.Data[i] = s.Classify(z)
	}
	return r
}

// polySimplifyCases: smooth fields (full coverage and with no data), noisy
// rasters, and rasters crossing the antimeridian, each with a tolerance.
func polySimplifyCases() []struct {
	c  polyCase
	km float64
} {
	var out []struct {
		c  polyCase
		km float64
	}
	add := func(name string, r *grid.Uint8, km float64) {
		out = append(out, struct {
			c  polyCase
			km float64
		}{polyCase{name, r}, km})
	}
	for k := 0; k < 30; k++ {
		add("smooth-full", polySmooth(uint64(k), 30+k, 25+k%7, 0.1, false), []float64{5, 12, 40}[k%3])
		add("smooth-nodata", polySmooth(uint64(100+k), 28+k, 30, 0.25, true), []float64{8, 30, 100}[k%3])
	}
	for _, c := range polyRandomCases(21, 120) {
		add(c.name, c.r, []float64{3, 15, 60, 500}[len(out)%4])
	}
	for _, c := range polyAntimeridianCases() {
		add(c.name, c.r, 80)
	}
	return out
}

// TestSimplifyShapely: simplified layers stay valid for shapely 1.8
// (explain_validity), keep RFC 7946 orientations, never overlap, and for
// rasters without no data the union of the bands still covers exactly the
// grid: no gaps (shapely unary_union area vs cols x rows x res^2).
func TestSimplifyShapely(t *testing.T) {
	py := reftest.Python(t, "shapely", "shapely.validation")
	var cases []polyFC
	for _, sc := range polySimplifyCases() {
		if !hasValidCodes(sc.c.r) {
			continue
		}
		cases = append(cases, polyFCOf(t, sc.c.name, sc.c.r, Options{SimplifyKm: sc.km}))
	}
	polyRunShapely(t, py, cases, len(cases))
}

// TestSimplifyLaws checks on the Go side that simplification keeps only
// original vertices (grid lattice), that every segment inside a fully
// covered raster is shared by exactly two rings in opposite directions
// (each shared edge simplified once), that orientations hold (planar area
// sign), that km = 0 is the exact layer, and that a smooth field loses most
// of its vertices.
func TestSimplifyLaws(t *testing.T) {
	for _, sc := range polySimplifyCases() {
		r, sp := sc.c.r, sc.c.r.Spec
		polys := polygon.PolygonizeSimplified(r, sc.km)
		exact := polygon.PolygonizeRFC7946(r)
		full := true
		for _, c := range r.Data {
			full = full && c != r.NoData
		}
		type seg [2]orb.Point
		segs := map[seg]int{}
		nv, ne := 0, 0
		if len(polys) != len(exact) {
			t.Fatalf("%s: %d bands after simplifying, %d exact", sc.c.name, len(polys), len(exact))
		}
		for code, mp := range polys {
			if len(mp) != len(exact[code]) {
				t.Fatalf("%s: code %d: %d polygons, exact layer %d", sc.c.name, code, len(mp), len(exact[code]))
			}
			for _, p := range mp {
				for ri, ring := range p {
					if len(ring) < 4 || ring[0] != ring[len(ring)-1] {
						t.Fatalf("%s: degenerate ring %v", sc.c.name, ring)
					}
					if a := ringArea(ring); (ri == 0) != (a > 0) {
						t.Fatalf("%s: code %d ring %d signed area %g", sc.c.name, code, ri, a)
					}
					nv += len(ring)
					for k := 0; k+1 < len(ring); k++ {
						segs[seg{ring[k], ring[k+1]}]++
						if !sp.CrossesAntimeridian() {
							fi := (ring[k][0] - sp.West) / sp.Res
							fj := (sp.North - ring[k][1]) / sp.Res
							if math.Abs(fi-math.Round(fi)) > 1e-6 || math.Abs(fj-math.Round(fj)) > 1e-6 {
								t.Fatalf("%s: vertex %v is not a grid vertex", sc.c.name, ring[k])
							}
						}
					}
				}
			}
			for _, p := range exact[code] {
				for _, ring := range p {
					ne += len(ring)
				}
			}
		}
		if !sp.CrossesAntimeridian() {
			polyPlanarCheck(t, sc.c.name, sp, polys)
		}
		if full && !sp.CrossesAntimeridian() {
			for s, n := range segs {
				onBorder := func(p orb.Point) (x, y bool) {
					return p[0] == polygon.Round(sp.West, 6) || math.Abs(p[0]-sp.East()) < 1e-9, p[1] == sp.North || math.Abs(p[1]-sp.South()) < 1e-9
				}
				ax, ay := onBorder(s[0])
				bx, by := onBorder(s[1])
				border := (ax && bx && s[0][0] == s[1][0]) || (ay && by && s[0][1] == s[1][1])
				if border {
					continue
				}
				if n != 1 || segs[seg{s[1], s[0]}] != 1 {
					t.Fatalf("%s: inner segment %v used %d times, reverse %d: not shared exactly once", sc.c.name, s, n, segs[seg{s[1], s[0]}])
				}
			}
		}
		if sc.c.name == "smooth-full" && sc.km >= 12 && float64(nv) > 0.7*float64(ne) {
			t.Errorf("%s at %g km: %d of %d positions kept, expected a real reduction", sc.c.name, sc.km, nv, ne)
		}
	}
	r := polySmooth(1, 40, 30, 0.1, true)
	a, b := polygon.PolygonizeSimplified(r, 0), polygon.PolygonizeRFC7946(r)
	for code := range b {
		if !orb.Equal(a[code], b[code]) {
			t.Errorf("km = 0: code %d differs from the exact layer", code)
		}
	}
}

func ringArea(r orb.Ring) float64 {
	s := 0.0
	for i := 0; i+1 < len(r); i++ {
		s += (r[i][0]-r[0][0])*(r[i+1][1]-r[0][1]) - (r[i+1][0]-r[0][0])*(r[i][1]-r[0][1])
	}
	return s / 2
}

// polyPlanarCheck checks, in grid vertex units (exact integers), that the
// segments of all rings of a simplified layer form a planar arrangement:
// two segments are either the same boundary walked in opposite directions
// by two neighbouring rings, or share at most one end point without
// overlapping, or do not meet at all (OGC Simple Features: rings simple,
// touching only at points; polygons' interiors disjoint). Exact layers are
// checked by shapely instead (their T-junctions touch edge interiors).
func polyPlanarCheck(t testing.TB, name string, sp grid.Spec, polys map[uint8]orb.MultiPolygon) {
	t.Helper()
	type pt [2]int64
	type seg struct{ a, b pt }
	var segs []seg
	dir := map[seg]bool{}
	toPt := func(p orb.Point) pt {
		return pt{int64(math.Round((p[0] - sp.West) / sp.Res)), int64(math.Round((sp.North - p[1]) / sp.Res))}
	}
	for code, mp := range polys {
		for _, p := range mp {
			for _, ring := range p {
				for k := 0; k+1 < len(ring); k++ {
					s := seg{toPt(ring[k]), toPt(ring[k+1])}
					if s.a == s.b || dir[s] {
						t.Fatalf("%s: code %d: zero-length or repeated segment %v", name, code, s)
					}
					dir[s] = true
					segs = append(segs, s)
				}
			}
		}
	}
	orient := func(a, b, c pt) int64 { return (b[0]-a[0])*(c[1]-a[1]) - (b[1]-a[1])*(c[0]-a[0]) }
	on := func(a, b, c pt) bool { // c on segment ab, given collinear
		return min(a[0], b[0]) <= c[0] && c[0] <= max(a[0], b[0]) && min(a[1], b[1]) <= c[1] && c[1] <= max(a[1], b[1])
	}
	for x := range segs {
		for y := x + 1; y < len(segs); y++ {
			s, u := segs[x], segs[y]
			if s.a == u.b && s.b == u.a {
				continue // a shared boundary, walked both ways
			}
			var shared, other1, other2 pt
			switch {
			case s.a == u.a:
				shared, other1, other2 = s.a, s.b, u.b
			case s.a == u.b:
				shared, other1, other2 = s.a, s.b, u.a
			case s.b == u.a:
				shared, other1, other2 = s.b, s.a, u.b
			case s.b == u.b:
				shared, other1, other2 = s.b, s.a, u.a
			default:
				o1, o2 := orient(s.a, s.b, u.a), orient(s.a, s.b, u.b)
				o3, o4 := orient(u.a, u.b, s.a), orient(u.a, u.b, s.b)
				meet := ((o1 > 0) != (o2 > 0) && o1 != 0 && o2 != 0 && (o3 > 0) != (o4 > 0) && o3 != 0 && o4 != 0) ||
					(o1 == 0 && on(s.a, s.b, u.a)) || (o2 == 0 && on(s.a, s.b, u.b)) ||
					(o3 == 0 && on(u.a, u.b, s.a)) || (o4 == 0 && on(u.a, u.b, s.b))
				if meet {
					t.Fatalf("%s: segments %v and %v meet", name, s, u)
				}
				continue
			}
			d1 := pt{other1[0] - shared[0], other1[1] - shared[1]}
			d2 := pt{other2[0] - shared[0], other2[1] - shared[1]}
			if d1[0]*d2[1]-d1[1]*d2[0] == 0 && d1[0]*d2[0]+d1[1]*d2[1] > 0 {
				t.Fatalf("%s: segments %v and %v overlap", name, s, u)
			}
		}
	}
}

// FuzzSimplify simplifies arbitrary small rasters (byte 0: width, byte 1:
// tolerance) and checks the planar arrangement, orientations and polygon
// counts of the result.
func FuzzSimplify(f *testing.F) {
	f.Add([]byte{4, 30, 1, 1, 2, 2, 1, 1, 2, 2, 3, 3, 3, 3, 1, 0, 0, 1})
	f.Add([]byte{3, 200, 1, 1, 1, 1, 0, 1, 1, 1, 0})
	f.Fuzz(func(t *testing.T, b []byte) {
		if len(b) < 3 || len(b) > 600 {
			return
		}
		cols := 1 + int(b[0])%24
		km := 1 + float64(b[1])
		cells := b[2:]
		rows := len(cells) / cols
		if rows == 0 {
			return
		}
		r := grid.NewUint8(grid.Spec{West: 20, North: 50, Res: 0.1, Cols: cols, Rows: rows}, 0)
		for i := range r.Data {
			r.Data[i] = cells[i] % 4
		}
		polys, exact := polygon.PolygonizeSimplified(r, km), polygon.Polygonize(r)
		for code, mp := range polys {
			if len(mp) != len(exact[code]) {
				t.Fatalf("code %d: %d polygons, exact %d", code, len(mp), len(exact[code]))
			}
			for _, p := range mp {
				for ri, ring := range p {
					if len(ring) < 4 || ring[0] != ring[len(ring)-1] || (ri == 0) != (ringArea(ring) > 0) {
						t.Fatalf("code %d: bad ring %v", code, ring)
					}
				}
			}
		}
		polyPlanarCheck(t, "fuzz", r.Spec, polys)
	})
}
