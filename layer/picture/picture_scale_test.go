package picture

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"

	"drygrid/internal/reftest"

	"github.com/paulmach/orb"
)

// TestKmPerDegreeLonPyproj checks the length of a degree of longitude on
// the WGS84 ellipsoid, the scale bar's base, against pyproj's geodesic
// (testdata/picture/parallel_ref.py) at latitudes from the equator to 85
// degrees, both hemispheres.
func TestKmPerDegreeLonPyproj(t *testing.T) {
	py := reftest.Python(t, "pyproj")
	lats := []string{"0", "-12.5", "30", "-41", "45", "60", "-75", "85"}
	out := reftest.RunPython(t, py, "../../testdata/picture/parallel_ref.py", nil, lats...)
	n := 0
	for _, ln := range strings.Split(strings.TrimSpace(string(out)), "\n") {
		var lat, km float64
		if _, err := fmt.Sscanf(ln, "%g %g", &lat, &km); err != nil {
			t.Fatalf("pyproj line %q: %v", ln, err)
		}
		n++
		if got := KmPerDegreeLon(lat); math.Abs(got-km) > 1e-7*km {
			t.Errorf("km per degree of longitude at %g = %.9f, pyproj %.9f", lat, got, km)
		}
	}
	if n != len(lats) {
		t.Fatalf("pyproj gave %d lines, want %d", n, len(lats))
	}
	// A published constant: at the equator a degree is 2 pi a / 360 with
	// WGS84 a = 6378137 m, 111.319 491 km.
	if got := KmPerDegreeLon(0); math.Abs(got-2*math.Pi*6378.137/360) > 1e-9 {
		t.Errorf("at the equator %.9f km", got)
	}
}

// TestPictureScaleBar: the bar's length in pixels times the picture's km
// per pixel along the centre parallel is the km it is labelled with (to a
// pixel), and the km per pixel is a degree of longitude at the centre
// latitude over the pixels a degree takes on the map.
func TestPictureScaleBar(t *testing.T) {
	for _, c := range [][5]float64{{164, -48, 178, -34, 0.1}, {170, -25, -165, -10, 0.25}, {-180, -90, 180, 90, 1}, {60, 5, 160, 15, 0.2}} {
		f := picMakeFixture(t, c[0], c[1], c[2], c[3], c[4])
		p, err := picPaint(f.input(), Options{})
		if err != nil {
			t.Fatal(err)
		}
		spec := f.spec
		lat := spec.North - float64(spec.Rows)*spec.Res/2
		pxPerDeg := float64(p.l.mapR.Dx()) / (float64(spec.Cols) * spec.Res)
		if want := KmPerDegreeLon(lat) / pxPerDeg; math.Abs(p.kmPerPx()-want) > 1e-9*want {
			t.Errorf("%v: km per px %g, want %g", c, p.kmPerPx(), want)
		}
		if p.scaleKm <= 0 || p.scalePx < 10 {
			t.Fatalf("%v: no scale bar (%g km, %d px)", c, p.scaleKm, p.scalePx)
		}
		if d := math.Abs(float64(p.scalePx)*p.kmPerPx() - p.scaleKm); d > p.kmPerPx() {
			t.Errorf("%v: bar of %d px is %g km, labelled %g km", c, p.scalePx, float64(p.scalePx)*p.kmPerPx(), p.scaleKm)
		}
		// A round number of km: 1, 2 or 5 times a power of ten.
		m := p.scaleKm / math.Pow(10, math.Floor(math.Log10(p.scaleKm)+1e-12))
		if math.Abs(m-1) > 1e-9 && math.Abs(m-2) > 1e-9 && math.Abs(m-5) > 1e-9 {
			t.Errorf("%v: bar of %g km is not 1, 2 or 5 x 10^k", c, p.scaleKm)
		}
	}
}

// TestPictureProducedLine: the production line is drawn under the caution
// as given, and makes the picture taller; without it nothing is drawn.
func TestPictureProducedLine(t *testing.T) {
	f := picMakeFixture(t, 164, -48, 178, -34, 0.5)
	in := f.input()
	p0, err := picPaint(in, Options{})
	if err != nil {
		t.Fatal(err)
	}
	in.Produced = "made 2026-12-01 06:00 UTC · SPI, 30 days ending 2026-11-30 · data: Kelverin Met Service (fictitious)"
	p1, err := picPaint(in, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(p0.producedLines) != 0 || strings.Join(p1.producedLines, " ") != in.Produced {
		t.Errorf("production lines %q / %q", p0.producedLines, p1.producedLines)
	}
	if p1.height <= p0.height || p1.producedTop < p1.cautionTop+p1.cautionH {
		t.Errorf("production line at %d, caution ends %d; heights %d, %d", p1.producedTop, p1.cautionTop+p1.cautionH, p0.height, p1.height)
	}
	if !picHasGlyphs(p1.fSmall, in.Produced) {
		t.Error("the font lacks a glyph of the production line")
	}
}

// picManyStations invents n stations spread over the fixture's grid with
// a dense cluster, from a fixed seed.
func picManyStations(f *picFixture, n int) []Point {
	rng := rand.New(rand.NewPCG(18, 3))
	s := f.spec
	pts := make([]Point, n)
	for i := range pts {
		if i%4 == 0 { // a quarter in a tight cluster
			pts[i] = Point{s.West + float64(s.Cols)*s.Res*0.3 + rng.NormFloat64()*0.2, s.North - float64(s.Rows)*s.Res*0.6 + rng.NormFloat64()*0.2}
			continue
		}
		pts[i] = Point{s.West + rng.Float64()*float64(s.Cols)*s.Res, s.North - rng.Float64()*float64(s.Rows)*s.Res}
	}
	return pts
}

// picManyRegions invents a k x k grid of square regions with names over
// the fixture's grid, for label placement.
func picManyRegions(f *picFixture, k int) []Region {
	s := f.spec
	w, h := float64(s.Cols)*s.Res/float64(k), float64(s.Rows)*s.Res/float64(k)
	var out []Region
	for i := 0; i < k; i++ {
		for j := 0; j < k; j++ {
			x0, y1 := s.West+float64(i)*w, s.North-float64(j)*h
			x1, y0 := x0+w, y1-h
			ring := orb.Ring{{x0, y0}, {x1, y0}, {x1, y1}, {x0, y1}, {x0, y0}}
			out = append(out, Region{Name: "Dist " + strconv.Itoa(i*k+j), Geom: orb.MultiPolygon{{ring}}})
		}
	}
	return out
}

// TestPictureMarkersBounded: 20,000 invented stations draw at most
// MaxMarkers markers (2,000), smaller than full size, and the legend says
// how many of how many are shown; with the fixture's few stations, far
// apart, every one is drawn at full size; "all" draws every station and
// "none" none (nor a legend entry).
func TestPictureMarkersBounded(t *testing.T) {
	f := picMakeFixture(t, 164, -48, 178, -34, 0.1)
	in := f.input()
	in.Stations = picManyStations(f, 20000)
	p, err := picPaint(in, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if n := p.stationsDrawn(); n > MaxMarkers || n < 100 {
		t.Errorf("20,000 stations: %d markers drawn, want 100..%d", n, MaxMarkers)
	}
	if p.marks.inside != 20000 || p.marks.r >= picDotR*p.s {
		t.Errorf("inside %d, radius %g: want 20000 inside and markers shrunk", p.marks.inside, p.marks.r)
	}
	label := picStationLabel(p.stationsDrawn(), 20000)
	if !strings.Contains(label, "of 20,000 shown") {
		t.Errorf("legend label %q", label)
	}
	// Thinning keeps at most one marker per cell.
	seen := map[[2]int]bool{}
	for _, k := range p.marks.list {
		c := [2]int{int(k.x) / p.marks.cell, int(k.y) / p.marks.cell}
		if seen[c] {
			t.Fatalf("two markers in cell %v", c)
		}
		seen[c] = true
	}

	few := f.input()
	pf, err := picPaint(few, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if pf.marks.inside < 5 || pf.stationsDrawn() != pf.marks.inside || pf.marks.r != picDotR*pf.s {
		t.Errorf("few stations: %d of %d drawn, radius %g; want all at full size", pf.stationsDrawn(), pf.marks.inside, pf.marks.r)
	}
	in500 := f.input()
	in500.Stations = picManyStations(f, FewStations)
	p500, err := picPaint(in500, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if p500.stationsDrawn() != FewStations {
		t.Errorf("%d stations (a quarter clustered): %d drawn, want all", FewStations, p500.stationsDrawn())
	}
	all, err := picPaint(in, Options{Stations: MarksAll})
	if err != nil {
		t.Fatal(err)
	}
	if all.stationsDrawn() != 20000 {
		t.Errorf("all: %d drawn", all.stationsDrawn())
	}
	none, err := picPaint(in, Options{Stations: MarksNone})
	if err != nil {
		t.Fatal(err)
	}
	if none.stationsDrawn() != 0 {
		t.Errorf("none: %d drawn", none.stationsDrawn())
	}
	for _, it := range none.legendItems() {
		if strings.HasPrefix(it.label, "Station") {
			t.Errorf("none: legend has %q", it.label)
		}
	}
	if _, err := picPaint(in, Options{Stations: "some"}); err == nil {
		t.Error("station markers \"some\" accepted")
	}
}

// TestPictureLabelsApart: with many named regions, with few and with
// 20,000 stations, in auto and all modes, no two name boxes overlap, no
// name box covers a drawn marker (halo included), and names are placed.
func TestPictureLabelsApart(t *testing.T) {
	f := picMakeFixture(t, 164, -48, 178, -34, 0.1)
	for _, c := range []struct {
		name     string
		stations []Point
		mode     StationMarks
		regions  []Region
	}{
		{"fixture", f.stations, MarksAuto, f.regions},
		{"grid of regions, few stations", f.stations, MarksAuto, picManyRegions(f, 6)},
		{"grid of regions, 20,000 stations", picManyStations(f, 20000), MarksAuto, picManyRegions(f, 6)},
		{"grid of regions, 2,000 stations, all", picManyStations(f, 2000), MarksAll, picManyRegions(f, 6)},
		{"many small regions", f.stations, MarksAuto, picManyRegions(f, 14)},
	} {
		in := f.input()
		in.Stations, in.Regions = c.stations, c.regions
		p, err := picPaint(in, Options{Stations: c.mode})
		if err != nil {
			t.Fatal(err)
		}
		if len(p.labels) == 0 && c.mode == MarksAuto {
			t.Errorf("%s: no name placed", c.name)
		}
		for i, a := range p.labels {
			for _, b := range p.labels[i+1:] {
				if a.box.Overlaps(b.box) {
					t.Errorf("%s: names %q %v and %q %v overlap", c.name, a.name, a.box, b.name, b.box)
				}
			}
			for _, k := range p.marks.list {
				if mb := p.marks.box(k, p.l.mapR.Min.X, p.l.mapR.Min.Y); mb.Overlaps(a.box) {
					t.Errorf("%s: name %q %v covers the marker at %v", c.name, a.name, a.box, mb)
				}
			}
			if !a.box.In(p.l.mapR) {
				t.Errorf("%s: name %q outside the map", c.name, a.name)
			}
		}
		t.Logf("%s: %d names of %d regions, %d markers", c.name, len(p.labels), len(c.regions), p.stationsDrawn())
	}
}
