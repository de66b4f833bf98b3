package polygon_test

import (
	"drygrid/grid"
	"drygrid/internal/rastertest"
	"drygrid/polygon"
	"math"
	"reflect"
	"testing"

	"github.com/paulmach/orb"
)

// TestSimplifyLaws checks on the Go side that simplification keeps only
// original vertices (grid lattice), that every segment inside a fully
// covered raster is shared by exactly two rings in opposite directions
// (each shared edge simplified once), that orientations hold (planar area
// sign), that km = 0 is the exact layer, and that a smooth field loses most
// of its vertices.
func TestSimplifyLaws(t *testing.T) {
	for _, sc := range rastertest.SimplifyCases() {
		r, sp := sc.C.R, sc.C.R.Spec
		polys := polygon.PolygonizeSimplified(r, sc.Km)
		exact := polygon.PolygonizeRFC7946(r)
		full := true
		for _, c := range r.Data {
			full = full && c != r.NoData
		}
		type seg [2]orb.Point
		segs := map[seg]int{}
		nv, ne := 0, 0
		if len(polys) != len(exact) {
			t.Fatalf("%s: %d bands after simplifying, %d exact", sc.C.Name, len(polys), len(exact))
		}
		for code, mp := range polys {
			if len(mp) != len(exact[code]) {
				t.Fatalf("%s: code %d: %d polygons, exact layer %d", sc.C.Name, code, len(mp), len(exact[code]))
			}
			for _, p := range mp {
				for ri, ring := range p {
					if len(ring) < 4 || ring[0] != ring[len(ring)-1] {
						t.Fatalf("%s: degenerate ring %v", sc.C.Name, ring)
					}
					if a := rastertest.RingArea(ring); (ri == 0) != (a > 0) {
						t.Fatalf("%s: code %d ring %d signed area %g", sc.C.Name, code, ri, a)
					}
					nv += len(ring)
					for k := 0; k+1 < len(ring); k++ {
						segs[seg{ring[k], ring[k+1]}]++
						if !sp.CrossesAntimeridian() {
							fi := (ring[k][0] - sp.West) / sp.Res
							fj := (sp.North - ring[k][1]) / sp.Res
							if math.Abs(fi-math.Round(fi)) > 1e-6 || math.Abs(fj-math.Round(fj)) > 1e-6 {
								t.Fatalf("%s: vertex %v is not a grid vertex", sc.C.Name, ring[k])
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
			rastertest.PlanarCheck(t, sc.C.Name, sp, polys)
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
					t.Fatalf("%s: inner segment %v used %d times, reverse %d: not shared exactly once", sc.C.Name, s, n, segs[seg{s[1], s[0]}])
				}
			}
		}
		if sc.C.Name == "smooth-full" && sc.Km >= 12 && float64(nv) > 0.7*float64(ne) {
			t.Errorf("%s at %g km: %d of %d positions kept, expected a real reduction", sc.C.Name, sc.Km, nv, ne)
		}
	}
	r := rastertest.Smooth(1, 40, 30, 0.1, true)
	a, b := polygon.PolygonizeSimplified(r, 0), polygon.PolygonizeRFC7946(r)
	for code := range b {
		if !orb.Equal(a[code], b[code]) {
			t.Errorf("km = 0: code %d differs from the exact layer", code)
		}
	}
}

// FuzzSimplify simplifies arbitrary small rasters (byte 0: width, byte 1:
// tolerance, byte 2: the block sizes the rows are fed in) and checks the
// planar arrangement, orientations and polygon counts of the result, and
// that the layer fed in blocks equals the whole raster's.
func FuzzSimplify(f *testing.F) {
	f.Add([]byte{4, 30, 1, 1, 1, 2, 2, 1, 1, 2, 2, 3, 3, 3, 3, 1, 0, 0, 1})
	f.Add([]byte{3, 200, 2, 1, 1, 1, 1, 0, 1, 1, 1, 0})
	f.Fuzz(func(t *testing.T, b []byte) {
		if len(b) < 4 || len(b) > 600 {
			return
		}
		cols := 1 + int(b[0])%24
		km := 1 + float64(b[1])
		sizes := []byte{b[2], b[2] / 3, b[2] / 7}
		cells := b[3:]
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
					if len(ring) < 4 || ring[0] != ring[len(ring)-1] || (ri == 0) != (rastertest.RingArea(ring) > 0) {
						t.Fatalf("code %d: bad ring %v", code, ring)
					}
				}
			}
		}
		rastertest.PlanarCheck(t, "fuzz", r.Spec, polys)
		if got := feedBlocks(t, r, km, sizes); !reflect.DeepEqual(got, polys) {
			t.Fatalf("blocks %v: another layer than the whole raster's", sizes)
		}
	})
}
