package region

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"runtime"
	"strings"
	"testing"

	"drygrid/grid"
	"drygrid/internal/reftest"

	"github.com/paulmach/orb"
)

func rect(w, s, e, n float64) orb.Polygon {
	return orb.Polygon{{{w, s}, {e, s}, {e, n}, {w, n}, {w, s}}}
}

func circle(cx, cy, r float64, k int, cw bool) orb.Ring {
	var ring orb.Ring
	for i := 0; i < k; i++ {
		a := 2 * math.Pi * float64(i) / float64(k)
		if cw {
			a = -a
		}
		ring = append(ring, orb.Point{cx + r*math.Cos(a), cy + 0.8*r*math.Sin(a)})
	}
	return append(ring, ring[0])
}

func mustNorm(t testing.TB, g orb.Geometry) orb.MultiPolygon {
	t.Helper()
	mp, err := regNormalise(g)
	if err != nil {
		t.Fatal(err)
	}
	return mp
}

func weightMap(ws []CellWeight) map[int]float64 {
	m := make(map[int]float64, len(ws))
	for _, w := range ws {
		m[w.Cell] = w.Frac
	}
	return m
}

func ringsJSON(p orb.Polygon) [][][2]float64 {
	var out [][][2]float64
	for _, r := range p {
		var rr [][2]float64
		for _, q := range r {
			rr = append(rr, [2]float64{q[0], q[1]})
		}
		out = append(out, rr)
	}
	return out
}

// regionsRef sends req (marshalled to JSON) to testdata/regions_ref.py and
// decodes its answer into out.
func regionsRef(t *testing.T, py string, req map[string]any, out any) {
	t.Helper()
	b, err := json.Marshal(req)
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(reftest.RunPython(t, py, "../testdata/regions_ref.py", b), out); err != nil {
		t.Fatal(err)
	}
}

// refShares is regions_ref.py "shares": the share of each cell of s in the
// polygon p, as (cell, share) pairs, edges densified every 0.002 degrees.
func refShares(t *testing.T, py string, s grid.Spec, p orb.Polygon) [][2]float64 {
	t.Helper()
	var ref [][2]float64
	regionsRef(t, py, map[string]any{
		"mode":    "shares",
		"spec":    map[string]any{"west": s.West, "north": s.North, "res": s.Res, "cols": s.Cols, "rows": s.Rows},
		"polygon": ringsJSON(p),
		"step":    0.002,
	}, &ref)
	return ref
}

// TestCoverageAlignedRectangle: a rectangle on cell edges covers whole cells
// exactly; one offset by a quarter cell covers exact halves at its ends
// (plane geometry).
func TestCoverageAlignedRectangle(t *testing.T) {
	s, err := grid.NewSpec(0, 30, 20, 50, 0.5)
	if err != nil {
		t.Fatal(err)
	}
	ws := Coverage(s, mustNorm(t, rect(5, 35, 8, 37.5)))
	if len(ws) != 6*5 {
		t.Fatalf("%d cells, want 30", len(ws))
	}
	for _, w := range ws {
		col, row := w.Cell%s.Cols, w.Cell/s.Cols
		if w.Frac != 1 || col < 10 || col >= 16 || row < 25 || row >= 30 {
			t.Errorf("cell col %d row %d frac %v, want cols 10-15 rows 25-29 frac exactly 1", col, row, w.Frac)
		}
	}
	ws = Coverage(s, mustNorm(t, rect(5.25, 35, 8.25, 37.5)))
	if len(ws) != 7*5 {
		t.Fatalf("%d cells, want 35", len(ws))
	}
	for _, w := range ws {
		want := 1.0
		if c := w.Cell % s.Cols; c == 10 || c == 16 {
			want = 0.5
		}
		if math.Abs(w.Frac-want) > 1e-12 {
			t.Errorf("cell %d frac %v, want %v", w.Cell, w.Frac, want)
		}
	}
}

// TestCoverageVsShapely: shares of each cell's area on the WGS84 ellipsoid
// against shapely 1.8's exact intersection of the polygon and each cell box,
// measured by pyproj 3.4's geodesic area with edges densified along lon-lat
// lines every 0.002 degrees (testdata/regions_ref.py "shares"; the reference
// converges on our shares as the step shrinks, to within 6e-10 at this step,
// while shares planar in degrees are off by up to 2e-4 here), for
// triangles in both windings, a concave polygon with a hole, many-vertex
// rings and regions smaller than one cell.
func TestCoverageVsShapely(t *testing.T) {
	py := reftest.Python(t, "shapely", "pyproj")
	s, err := grid.NewSpec(-10, -10, 10, 10, 1)
	if err != nil {
		t.Fatal(err)
	}
	tri := orb.Ring{{-7.3, -4.1}, {6.2, -8.7}, {1.1, 7.9}, {-7.3, -4.1}}
	triCW := orb.Ring{{-7.3, -4.1}, {1.1, 7.9}, {6.2, -8.7}, {-7.3, -4.1}}
	cases := map[string]orb.Polygon{
		"triangle ccw": {tri},
		"triangle cw":  {triCW},
		"concave with hole": {
			{{-8.5, -8.2}, {7.7, -8.9}, {8.3, 7.1}, {2.2, 6.4}, {3.1, -3.3}, {-4.6, -2.7}, {-3.3, 8.8}, {-9.1, 6.2}, {-8.5, -8.2}},
			{{-7.2, -6.6}, {-6.1, 3.3}, {-5.2, -6.1}, {-7.2, -6.6}},
		},
		"ellipse with hole cw": {circle(0.3, -0.4, 8.7, 97, true), circle(1.1, 0.2, 2.35, 31, false)},
		"sub-cell triangle":    {{{0.2, 0.2}, {0.5, 0.3}, {0.3, 0.7}, {0.2, 0.2}}},
		"sub-cell square on 4": {{{-0.1, -0.13}, {0.1, -0.13}, {0.1, 0.07}, {-0.1, 0.07}, {-0.1, -0.13}}},
		"thin sliver":          {{{-9.95, 2.01}, {9.93, 2.02}, {9.93, 2.03}, {-9.95, 2.01}}},
	}
	for name, p := range cases {
		ref := refShares(t, py, s, p)
		if len(ref) == 0 {
			t.Fatalf("%s: shapely found no cell in the polygon: the case checks nothing", name)
		}
		got := weightMap(Coverage(s, mustNorm(t, p)))
		for _, r := range ref {
			cell, want := int(r[0]), r[1]
			if math.Abs(got[cell]-want) > 1e-9 {
				t.Errorf("%s: cell %d share %.12f, shapely %.12f", name, cell, got[cell], want)
			}
			delete(got, cell)
		}
		for cell, f := range got {
			if f > 1e-9 {
				t.Errorf("%s: cell %d share %g, shapely has none", name, cell, f)
			}
		}
	}
}

func regionAreaKm2(s grid.Spec, g orb.MultiPolygon) float64 {
	var a float64
	for _, w := range Coverage(s, g) {
		a += w.Frac * s.CellAreaKm2(w.Cell/s.Cols)
	}
	return a
}

// TestRegionAreaVsPyproj: region areas (ellipsoidal cell area x share)
// against pyproj 3.4's geodesic polygon area on WGS84 (Karney 2013), edges
// densified every 0.002 degrees along lon-lat lines (testdata/regions_ref.py
// "area"); within 1e-8 for regions of 100+ cells.
func TestRegionAreaVsPyproj(t *testing.T) {
	py := reftest.Python(t, "pyproj", "shapely")
	s, err := grid.Global(0.1)
	if err != nil {
		t.Fatal(err)
	}
	polys := []orb.Polygon{
		rect(10, 44, 13, 47),
		{{{-61.37, -12.2}, {-50.11, -20.45}, {-48.9, -3.3}, {-61.37, -12.2}}},
		{{{20.05, 58.1}, {31.7, 57.3}, {32.4, 66.8}, {26.2, 62.1}, {19.8, 67.9}, {20.05, 58.1}},
			{{22.2, 59.4}, {23.9, 61.5}, {25.1, 59.2}, {22.2, 59.4}}},
		{circle(100.2, 1.3, 2.1, 64, false)},
		{{{-170.3, -72.2}, {-150.6, -73.9}, {-160.1, -69.05}, {-170.3, -72.2}}},
		{{{130.01, 30.02}, {131.52, 30.03}, {131.49, 31.07}, {130.04, 31.01}, {130.01, 30.02}}},
	}
	var arg [][][][2]float64
	for _, p := range polys {
		arg = append(arg, ringsJSON(p))
	}
	var ref []float64
	regionsRef(t, py, map[string]any{"mode": "area", "polygons": arg, "step": 0.002}, &ref)
	for i, p := range polys {
		g := mustNorm(t, p)
		if n := len(Coverage(s, g)); n < 100 {
			t.Fatalf("polygon %d covers %d cells, want 100+", i, n)
		}
		got := regionAreaKm2(s, g)
		if rel := math.Abs(got-ref[i]) / ref[i]; rel > 1e-8 {
			t.Errorf("polygon %d: area %.3f km2, pyproj %.3f km2 (relative error %.2g)", i, got, ref[i], rel)
		} else {
			t.Logf("polygon %d: area %.3f km2, pyproj %.3f km2 (relative error %.2g)", i, got, ref[i], rel)
		}
	}
}

// TestSmallRegionAreaVsPyproj: regions smaller than a cell, or straddling
// a few, at latitudes 0, 45, 80, 89 and 89.95, north and south, on 0.1 and
// 1 degree grids, against pyproj 3.4's geodesic area (edges densified every
// 2e-5 degrees along lon-lat lines, testdata/regions_ref.py "area"; near the
// pole the reference needs that step: it converges on our area as the step
// squared, from 1.7e-4 off at a step of 1e-3 at 89.95 degrees), within 1e-6
// relative. A share taken planar in degrees of latitude is 1 % off at
// 80 degrees and over 10 % at 89; the share on the ellipsoid is exact.
func TestSmallRegionAreaVsPyproj(t *testing.T) {
	py := reftest.Python(t, "pyproj", "shapely")
	var polys []orb.Polygon
	for _, lat := range []float64{0.013, 45.021, 80.037, 89.011, 89.951, -45.067, -89.043} {
		x := 20.0 + lat/1000
		polys = append(polys,
			orb.Polygon{{{x + 0.011, lat + 0.004}, {x + 0.063, lat + 0.019}, {x + 0.027, lat + 0.041}, {x + 0.011, lat + 0.004}}},
			orb.Polygon{{{x + 0.071, lat - 0.006}, {x + 0.133, lat + 0.011}, {x + 0.118, lat + 0.044}, {x + 0.062, lat + 0.038}, {x + 0.071, lat - 0.006}}},
		)
	}
	var arg [][][][2]float64
	for _, p := range polys {
		arg = append(arg, ringsJSON(p))
	}
	var ref []float64
	regionsRef(t, py, map[string]any{"mode": "area", "polygons": arg, "step": 2e-5}, &ref)
	for _, res := range []float64{0.1, 1} {
		s, _ := grid.Global(res)
		for i, p := range polys {
			got := regionAreaKm2(s, mustNorm(t, p))
			if rel := math.Abs(got-ref[i]) / ref[i]; rel > 1e-6 {
				t.Errorf("%g deg grid, polygon %d (lat %.2f): area %.9f km2, pyproj %.9f km2 (relative error %.2g)", res, i, p[0][0][1], got, ref[i], rel)
			} else {
				t.Logf("%g deg grid, polygon %d (lat %.2f): area %.6f km2, pyproj %.6f km2 (relative error %.2g)", res, i, p[0][0][1], got, ref[i], rel)
			}
		}
	}
}

// TestAntimeridianAreaVsPyproj: a region drawn across 180 degrees as the
// error message asks (longitudes running past 180) has the area pyproj 3.4
// gives its two halves split at the antimeridian (RFC 7946 section 3.1.9),
// about 11,815 km2; the same ring jumping from 179.5 to -179.5, which read
// literally runs the long way round (over 4 million km2), is refused.
func TestAntimeridianAreaVsPyproj(t *testing.T) {
	py := reftest.Python(t, "pyproj", "shapely")
	east, west := rect(179.5, -17.5, 180, -16.5), rect(-180, -17.5, -179.5, -16.5)
	var ref []float64
	regionsRef(t, py, map[string]any{"mode": "area", "polygons": [][][][2]float64{ringsJSON(east), ringsJSON(west)}, "step": 1e-3}, &ref)
	want := ref[0] + ref[1]
	past := feat(`"fiji"`, `{}`, poly(`[[179.5,-17.5],[180.5,-17.5],[180.5,-16.5],[179.5,-16.5],[179.5,-17.5]]`))
	jump := feat(`"fiji"`, `{}`, poly(`[[179.5,-17.5],[-179.5,-17.5],[-179.5,-16.5],[179.5,-16.5],[179.5,-17.5]]`))
	rs, err := ParseRegions("f", []byte(past), "")
	if err != nil {
		t.Fatal(err)
	}
	s, _ := grid.Global(0.1)
	if got := regionAreaKm2(s, rs[0].Geom); math.Abs(got-want) > 1e-8*want {
		t.Errorf("past 180: %.6f km2, pyproj %.6f km2", got, want)
	}
	if _, err := ParseRegions("f", []byte(jump), ""); err == nil || !strings.Contains(err.Error(), "jumps across the antimeridian") {
		t.Errorf("ring jumping across 180: %v", err)
	}
}

// TestGlobeArea: the whole Earth as one region is the WGS84 ellipsoid's
// surface, 510,065,621.7 km^2 (Moritz 2000, Geodetic Reference System 1980,
// J. Geodesy 74, from memory; the WGS84 value differs below 0.1 km^2, and
// grid's TestGlobalGridSumsToEarthSurface holds the cell areas to it).
func TestGlobeArea(t *testing.T) {
	s, _ := grid.Global(1)
	b := grid.NewUint8(s, 0)
	rs := []Region{{Key: "earth", Geom: mustNorm(t, rect(-180, -90, 180, 90))}}
	st := Zonal(b, nil, rs)
	if math.Abs(st[0].AreaKm2-510065621.7) > 0.1 {
		t.Errorf("globe %.3f km2, want 510065621.7", st[0].AreaKm2)
	}
	if st[0].CoveredKm2 != 0 || st[0].HasMeanZ {
		t.Errorf("an all-no-data raster covers %g km2 (mean z %v)", st[0].CoveredKm2, st[0].HasMeanZ)
	}
}

// TestCoverageAntimeridian: a region drawn as one piece past 180 and the
// same region split at the antimeridian (RFC 7946 section 3.1.9) give the
// same cells, on a grid crossing the antimeridian and on a global grid.
func TestCoverageAntimeridian(t *testing.T) {
	whole := mustNorm(t, rect(175, -2, 185, 3))
	split := mustNorm(t, orb.MultiPolygon{rect(175, -2, 180, 3), rect(-180, -2, -175, 3)})
	cross, _ := grid.NewSpec(170, -10, -170, 10, 0.5)
	glob, _ := grid.Global(0.5)
	for _, s := range []grid.Spec{cross, glob} {
		a, b := Coverage(s, whole), Coverage(s, split)
		if len(a) != 200 || len(b) != 200 {
			t.Fatalf("%s: %d and %d cells, want 20 x 10 = 200", s, len(a), len(b))
		}
		for i := range a {
			if a[i] != b[i] || a[i].Frac != 1 {
				t.Errorf("%s: cell %d: %+v vs %+v, want equal whole cells", s, i, a[i], b[i])
			}
		}
	}
	// On the global grid: 10 columns at each end of the rows.
	cols := map[int]bool{}
	for _, w := range Coverage(glob, whole) {
		cols[w.Cell%glob.Cols] = true
	}
	if !cols[0] || !cols[9] || !cols[710] || !cols[719] || cols[10] || cols[709] {
		t.Errorf("global grid columns %v, want 0-9 and 710-719", cols)
	}
}

// TestTilingProperty: regions that tile the grid share out every cell
// exactly once, their areas add up to the grid's, their covered areas to the
// grid's covered area, and per region the band areas plus the masked area
// make the region's area (a law of any partition).
func TestTilingProperty(t *testing.T) {
	s, _ := grid.NewSpec(-20, -15, 25, 18, 0.5)
	rowA := s.RowAreasKm2()
	for seed := uint64(1); seed <= 25; seed++ {
		rng := rand.New(rand.NewPCG(seed, 7))
		nx, ny, sub := 1+rng.IntN(12), 1+rng.IntN(9), 1+rng.IntN(6)
		rs, err := jitterTiling(rng, s.West, s.South(), s.East(), s.North, nx, ny, sub)
		if err != nil {
			t.Fatalf("seed %d: %v", seed, err)
		}
		sum := make([]float64, s.Len())
		for _, r := range rs {
			for _, w := range Coverage(s, r.Geom) {
				sum[w.Cell] += w.Frac
			}
		}
		for i, v := range sum {
			if math.Abs(v-1) > 1e-9 {
				t.Fatalf("seed %d (%dx%d tiles, %d segments): cell %d shares add to %.12f, want 1", seed, nx, ny, sub, i, v)
			}
		}
		b := grid.NewUint8(s, 0)
		var covered float64
		for i := range b.Data {
			if c := uint8(rng.IntN(11)); c < 10 {
				b.Data[i] = c
				if c != 0 {
					covered += rowA[i/s.Cols]
				}
			}
		}
		st := Zonal(b, nil, rs)
		var area, cov float64
		for _, z := range st {
			area += z.AreaKm2
			cov += z.CoveredKm2
			var bands float64
			for _, a := range z.CodeKm2 {
				bands += a
			}
			if math.Abs(bands+z.MaskedKm2()-z.AreaKm2) > 1e-9*z.AreaKm2 {
				t.Errorf("seed %d region %s: bands %.6f + masked %.6f != area %.6f", seed, z.Key, bands, z.MaskedKm2(), z.AreaKm2)
			}
		}
		if math.Abs(area-s.AreaKm2()) > 1e-9*s.AreaKm2() || math.Abs(cov-covered) > 1e-9*s.AreaKm2() {
			t.Errorf("seed %d: tiles add to %.3f km2 (grid %.3f), covered %.3f (grid %.3f)", seed, area, s.AreaKm2(), cov, covered)
		}
	}
}

// TestZonalMeanZ: a region over half of one cell and the whole of its
// neighbour (same row, same area) weighs their codes and z 1 : 2 (arithmetic).
func TestZonalMeanZ(t *testing.T) {
	s, _ := grid.NewSpec(0, 0, 4, 2, 1)
	b := grid.NewUint8(s, 0)
	z := grid.NewFloat32(s, grid.NoDataIndex)
	b.Data[s.Index(1, 0)], z.Data[s.Index(1, 0)] = 1, -2
	b.Data[s.Index(2, 0)], z.Data[s.Index(2, 0)] = 5, 1
	rs := []Region{{Key: "r", Geom: mustNorm(t, rect(1.5, 1, 3, 2))}, {Key: "far", Geom: mustNorm(t, rect(50, 1, 51, 2))}}
	st := Zonal(b, z, rs)
	a := s.CellAreaKm2(0)
	r := st[0]
	if math.Abs(r.AreaKm2-1.5*a) > 1e-9 || math.Abs(r.CodeKm2[1]-0.5*a) > 1e-9 || math.Abs(r.CodeKm2[5]-a) > 1e-9 || !r.HasMeanZ || math.Abs(r.MeanZ-0) > 1e-12 {
		t.Errorf("stats %+v, want area %.3f, code1 %.3f, code5 %.3f, mean z 0", r, 1.5*a, 0.5*a, a)
	}
	if st[1].AreaKm2 != 0 || st[1].HasMeanZ || st[1].Key != "far" {
		t.Errorf("region off the grid: %+v", st[1])
	}
	other, _ := grid.NewSpec(0, 0, 4, 3, 1)
	wrong := grid.NewFloat32(other, grid.NoDataIndex)
	if err := SameGrid(b, wrong); err == nil {
		t.Error("SameGrid accepts an index raster on another grid")
	}
	if st := Zonal(b, wrong, rs); st[0].HasMeanZ || math.Abs(st[0].AreaKm2-1.5*a) > 1e-9 {
		t.Errorf("index on another grid: %+v, want it ignored", st[0])
	}
}

// BenchmarkZonalGlobal3000: 3,000 jittered regions (60 x 50, 32 vertices
// each) tiling the globe, over the global 0.1 deg band raster.
func BenchmarkZonalGlobal3000(b *testing.B) {
	s, _ := grid.Global(0.1)
	rng := rand.New(rand.NewPCG(3, 3000))
	rs, err := jitterTiling(rng, -180, -90, 180, 90, 60, 50, 8)
	if err != nil {
		b.Fatal(err)
	}
	bands := grid.NewUint8(s, 0)
	for i := range bands.Data {
		bands.Data[i] = uint8(i / 7919 % 10)
	}
	idx := grid.NewFloat32(s, grid.NoDataIndex)
	for i := range idx.Data {
		idx.Data[i] = float32(i%101)/25 - 2
	}
	b.ResetTimer()
	for b.Loop() {
		if st := Zonal(bands, idx, rs); len(st) != 3000 {
			b.Fatal(len(st))
		}
	}
}

// TestZonalCoreCount: results are bit-identical for any GOMAXPROCS (output
// never depends on the core count).
func TestZonalCoreCount(t *testing.T) {
	s, _ := grid.NewSpec(-20, -15, 25, 18, 0.25)
	rs, err := jitterTiling(rand.New(rand.NewPCG(9, 9)), s.West, s.South(), s.East(), s.North, 9, 7, 5)
	if err != nil {
		t.Fatal(err)
	}
	b, z := grid.NewUint8(s, 0), grid.NewFloat32(s, grid.NoDataIndex)
	for i := range b.Data {
		b.Data[i], z.Data[i] = uint8(i%10), float32(i%17)/4-2
	}
	prev := runtime.GOMAXPROCS(1)
	one := Zonal(b, z, rs)
	runtime.GOMAXPROCS(4)
	four := Zonal(b, z, rs)
	runtime.GOMAXPROCS(prev)
	for i := range one {
		if one[i].AreaKm2 != four[i].AreaKm2 || one[i].MeanZ != four[i].MeanZ || one[i].CoveredKm2 != four[i].CoveredKm2 {
			t.Fatalf("region %s differs with 1 and 4 cores: %+v vs %+v", one[i].Key, one[i], four[i])
		}
	}
}
