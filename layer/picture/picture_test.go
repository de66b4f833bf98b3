package picture

import (
	"bytes"
	"fmt"
	"image"
	"io"
	"math"
	"path/filepath"
	"runtime"
	"strings"
	"testing"

	"drygrid/bands"
	"drygrid/grid"
	"drygrid/internal/layertest"
	"drygrid/internal/reftest"
	"drygrid/layer"

	"github.com/paulmach/orb"
)

// picGDALPixels reads the listed pixels of a PNG with GDAL's PNG driver.
func picGDALPixels(t *testing.T, file string, pts []image.Point) (size [3]int, rgb map[image.Point]string) {
	t.Helper()
	py := reftest.Python(t, "osgeo.gdal")
	var in strings.Builder
	for _, p := range pts {
		fmt.Fprintf(&in, "%d %d\n", p.X, p.Y)
	}
	out := reftest.RunPython(t, py, "../../testdata/page/png_pixels.py", []byte(in.String()), file)
	rgb = map[image.Point]string{}
	for _, ln := range strings.Split(strings.TrimSpace(string(out)), "\n") {
		var x, y, r, g, b int
		if strings.HasPrefix(ln, "size") {
			fmt.Sscanf(ln, "size %d %d %d", &size[0], &size[1], &size[2])
			continue
		}
		if _, err := fmt.Sscanf(ln, "%d %d %d %d %d", &x, &y, &r, &g, &b); err != nil {
			t.Fatalf("GDAL output line %q: %v", ln, err)
		}
		rgb[image.Pt(x, y)] = fmt.Sprintf("#%02x%02x%02x", r, g, b)
	}
	return size, rgb
}

// picCellPixel is the pixel under the centre of a grid cell, from the
// equirectangular mapping of the grid extent onto the map rectangle.
func picCellPixel(r image.Rectangle, spec grid.Spec, col, row int) image.Point {
	x := float64(r.Min.X) + (float64(col)+0.5)/float64(spec.Cols)*float64(r.Dx())
	y := float64(r.Min.Y) + (float64(row)+0.5)/float64(spec.Rows)*float64(r.Dy())
	return image.Pt(int(math.Floor(x)), int(math.Floor(y)))
}

// picClearOfLines reports whether a pixel is 3 px or more from every
// graticule line, so the line's tint cannot touch it.
func picClearOfLines(p *picPainter, pt image.Point) bool {
	lons, lats := p.graticuleLines()
	for _, lon := range lons {
		if math.Abs(p.l.x(lon)-float64(pt.X)) < 3 {
			return false
		}
	}
	for _, lat := range lats {
		if math.Abs(p.l.y(lat)-float64(pt.Y)) < 3 {
			return false
		}
	}
	return true
}

// TestPictureBandColoursReadByGDAL draws the islands fixture without
// stations or regions, reads the PNG back with GDAL (python3-gdal 3.6) and
// checks, for a cell of every band, that the pixel at the cell's centre has
// the band colour of docs/design.md's "Default bands" table, and that
// no-data cells are the hatched grey, distinct from "Near normal".
func TestPictureBandColoursReadByGDAL(t *testing.T) {
	f := picMakeFixture(t, 164, -48, 178, -34, 0.1)
	in := f.input()
	in.Stations, in.Regions = nil, nil
	p, err := picPaint(in, Options{})
	if err != nil {
		t.Fatal(err)
	}
	spec := f.spec
	want := map[image.Point]string{}
	found := map[uint8]bool{}
	var nodata []image.Point
	for row := 1; row < spec.Rows-1; row++ {
		for col := 1; col < spec.Cols-1; col++ {
			code := f.bands.Data[spec.Index(col, row)]
			same := true
			for _, d := range [][2]int{{-1, -1}, {0, -1}, {1, -1}, {-1, 0}, {1, 0}, {-1, 1}, {0, 1}, {1, 1}} {
				same = same && f.bands.Data[spec.Index(col+d[0], row+d[1])] == code
			}
			pt := picCellPixel(p.l.mapR, spec, col, row)
			if !same || !picClearOfLines(p, pt) {
				continue
			}
			if code == 0 {
				if len(nodata) < 20 {
					nodata = append(nodata, pt)
				}
				continue
			}
			if !found[code] {
				found[code] = true
				want[pt] = layertest.BrewerBrBG9[code]
			}
		}
	}
	if len(found) != 9 || len(nodata) < 20 {
		t.Fatalf("fixture gave clean cells for %d bands and %d no-data cells; want 9 and 20", len(found), len(nodata))
	}
	file := filepath.Join(t.TempDir(), "map.png")
	if err := WriteFile(file, in, Options{}); err != nil {
		t.Fatal(err)
	}
	pts := append([]image.Point{}, nodata...)
	for pt := range want {
		pts = append(pts, pt)
	}
	size, got := picGDALPixels(t, file, pts)
	if size[0] != 1400 || size[0] < 1200 || size[2] < 3 {
		t.Errorf("GDAL reads %d x %d px with %d bands; want 1400 px wide (>= 1200) and RGB", size[0], size[1], size[2])
	}
	for pt, c := range want {
		if got[pt] != c {
			t.Errorf("pixel %v = %s, want band colour %s", pt, got[pt], c)
		}
	}
	for _, pt := range nodata {
		if c := got[pt]; c != "#d9d9d9" && c != "#b0b0b0" {
			t.Errorf("no-data pixel %v = %s, want the hatch #d9d9d9 / #b0b0b0 (not Near normal #f5f5f5)", pt, c)
		}
	}
}

// TestPictureAntimeridianReadByGDAL draws a grid from 170E to 165W: a
// station at 172.5W (given as -172.5) and the cells east of 180 must land
// right of the 180 meridian, continuing the map (RFC 7946 section 3.1.9
// splits features there; the picture must not).
func TestPictureAntimeridianReadByGDAL(t *testing.T) {
	f := picMakeFixture(t, 170, -25, -165, -10, 0.25)
	if f.spec.West != 170 || f.spec.East() != 195 {
		t.Fatalf("grid runs %g..%g, want 170..195", f.spec.West, f.spec.East())
	}
	in := f.input()
	in.Regions = nil
	in.Stations = []Point{{-172.5, -17.5}, {187.5, -12.5}, {175, -20}}
	p, err := picPaint(in, Options{})
	if err != nil {
		t.Fatal(err)
	}
	r := p.l.mapR
	at := func(lon, lat float64) image.Point { // equirectangular, lon continuous from 170
		return image.Pt(int(math.Floor(float64(r.Min.X)+(lon-170)/25*float64(r.Dx()))),
			int(math.Floor(float64(r.Min.Y)+(-10-lat)/15*float64(r.Dy()))))
	}
	stations := []image.Point{at(187.5, -17.5), at(187.5, -12.5), at(175, -20)}
	// A cell past 180: its colour from the scheme, at its place east of 180.
	col, row, ok := f.spec.Cell(-170.125, -21.125)
	if !ok {
		t.Fatal("cell at 170.125W not in grid")
	}
	code := f.bands.Data[f.spec.Index(col, row)]
	cellPt := picCellPixel(r, f.spec, col, row)
	wantCell := "#d9d9d9"
	if code != 0 {
		wantCell = layertest.BrewerBrBG9[code]
	}
	file := filepath.Join(t.TempDir(), "map.png")
	if err := WriteFile(file, in, Options{}); err != nil {
		t.Fatal(err)
	}
	_, got := picGDALPixels(t, file, append(stations, cellPt))
	for _, pt := range stations {
		if got[pt] != "#1a1a1a" {
			t.Errorf("station pixel %v = %s, want the dot colour #1a1a1a", pt, got[pt])
		}
	}
	if x180 := at(180, 0).X; stations[0].X <= x180 || cellPt.X <= x180 {
		t.Errorf("points past 180 drawn at x %d, %d; want right of the 180 meridian at %d", stations[0].X, cellPt.X, x180)
	}
	if got[cellPt] != wantCell && !(wantCell == "#d9d9d9" && got[cellPt] == "#b0b0b0") {
		t.Errorf("cell past 180 at %v = %s, want %s", cellPt, got[cellPt], wantCell)
	}
}

// TestPictureGraticuleStep: nice steps (1, 2, 5, 10, 15, 30 degrees are
// common practice on atlas maps); at most eight intervals over the axis and
// lines far enough apart for their labels; worked by hand.
func TestPictureGraticuleStep(t *testing.T) {
	for _, c := range []struct{ span, px, gap, want float64 }{
		{360, 952, 64, 30}, // 12 intervals: more than 8 even at the largest step
		{180, 476, 28, 30}, // 6 intervals of 79 px
		{100, 952, 64, 15}, // 100/10 = 10 > 8; 100/15 = 6.7, 143 px apart
		{60, 900, 64, 10},  // 60/5 = 12; 60/10 = 6
		{40, 900, 64, 5},   // 40/5 = 8, 112 px apart
		{14, 952, 64, 2},   // 14/1 = 14; 14/2 = 7, 136 px apart
		{10, 172, 64, 5},   // 2 deg would be 34 px apart; 5 deg 86 px
		{10, 95, 28, 5},    // 2 deg 19 px; 5 deg 47.5 px
		{8, 900, 64, 1},    // 8/1 = 8
		{3, 900, 60, 0.5},  // 3/0.2 = 15; 3/0.5 = 6
		{0.5, 900, 60, 0.1},
		{0.05, 900, 60, 0.1}, // narrower than the smallest step
	} {
		if got := picAxisStep(c.span, c.px, c.gap); got != c.want {
			t.Errorf("step for %g deg over %g px (labels %g px) = %g, want %g", c.span, c.px, c.gap, got, c.want)
		}
	}
}

// TestPictureDegreeLabels: hemisphere letters as on atlas maps (common
// practice): no letter on 0 and 180; longitudes past 180 read west.
func TestPictureDegreeLabels(t *testing.T) {
	for _, c := range []struct {
		lon  bool
		v    float64
		dec  int
		want string
	}{
		{true, 190, 0, "170°W"}, {true, 180, 0, "180°"}, {true, -180, 0, "180°"}, {true, 0, 0, "0°"},
		{true, -120, 0, "120°W"}, {true, 175, 0, "175°E"}, {true, 359, 0, "1°W"}, {true, 172.5, 1, "172.5°E"},
		{false, -40, 0, "40°S"}, {false, 0, 0, "0°"}, {false, 90, 0, "90°N"}, {false, -40.5, 1, "40.5°S"},
	} {
		f := picLatLabel
		if c.lon {
			f = picLonLabel
		}
		if got := f(c.v, c.dec); got != c.want {
			t.Errorf("label(%g, lon %v) = %q, want %q", c.v, c.lon, got, c.want)
		}
	}
	lines := picStepsFrom(-0.35, 0.35, 0.1)
	if len(lines) != 7 || lines[0] != -0.3 || lines[3] != 0 || lines[6] != 0.3 {
		t.Errorf("steps from -0.35 to 0.35 by 0.1 = %v, want -0.3 .. 0.3 exactly", lines)
	}
}

// TestPictureDeterministic: the same input gives the same bytes whatever
// GOMAXPROCS is (output never depends on the number of cores:
// docs/design.md, "Command line").
func TestPictureDeterministic(t *testing.T) {
	f := picMakeFixture(t, 164, -48, 178, -34, 0.1)
	var outs [][]byte
	for _, procs := range []int{1, 2, 1} {
		prev := runtime.GOMAXPROCS(procs)
		var b bytes.Buffer
		err := Encode(&b, f.input(), Options{})
		runtime.GOMAXPROCS(prev)
		if err != nil {
			t.Fatal(err)
		}
		outs = append(outs, b.Bytes())
	}
	if !bytes.Equal(outs[0], outs[1]) || !bytes.Equal(outs[0], outs[2]) {
		t.Error("picture bytes differ between runs")
	}
}

// TestPictureCaution: the caution is drawn, ours by default, the caller's
// when given; the legend names every band and the no-data swatch.
func TestPictureCaution(t *testing.T) {
	f := picMakeFixture(t, 164, -48, 178, -34, 0.5)
	for _, c := range []struct{ in, want string }{{"", layer.Caution}, {"Estimates only; ask the weather service.", "Estimates only; ask the weather service."}} {
		in := f.input()
		in.Caution = c.in
		p, err := picPaint(in, Options{Width: 1200})
		if err != nil {
			t.Fatal(err)
		}
		if got := strings.Join(p.cautionLines, " "); got != c.want {
			t.Errorf("caution drawn = %q, want %q", got, c.want)
		}
		if p.img.Bounds().Dx() != 1200 {
			t.Errorf("width %d, want 1200", p.img.Bounds().Dx())
		}
	}
	for _, w := range []string{"official", "national meteorological or hydrological service", "local rules", "estimates"} {
		if !strings.Contains(layer.Caution, w) {
			t.Errorf("layer.Caution lacks %q", w)
		}
	}
}

// TestPictureRejects: inputs that cannot be drawn give errors, not panics.
func TestPictureRejects(t *testing.T) {
	spec := grid.Spec{West: 0, North: 10, Res: 1, Cols: 10, Rows: 10}
	good := grid.NewUint8(spec, 0)
	short := &grid.Uint8{Spec: spec, Data: make([]uint8, 5)}
	for name, c := range map[string]struct {
		in  Input
		opt Options
	}{
		"no bands":    {Input{Scheme: bands.Default()}, Options{}},
		"no scheme":   {Input{Bands: good}, Options{}},
		"short data":  {Input{Bands: short, Scheme: bands.Default()}, Options{}},
		"empty grid":  {Input{Bands: &grid.Uint8{Spec: grid.Spec{Res: 1}}, Scheme: bands.Default()}, Options{}},
		"NaN res":     {Input{Bands: &grid.Uint8{Spec: grid.Spec{Res: math.NaN(), Cols: 1, Rows: 1}, Data: []uint8{0}}, Scheme: bands.Default()}, Options{}},
		"narrow":      {Input{Bands: good, Scheme: bands.Default()}, Options{Width: 100}},
		"huge width":  {Input{Bands: good, Scheme: bands.Default()}, Options{Width: 100000}},
		"empty bands": {Input{Bands: good, Scheme: &bands.Scheme{}}, Options{}},
	} {
		var b bytes.Buffer
		if err := Encode(&b, c.in, c.opt); err == nil || !strings.HasPrefix(err.Error(), "picture: ") {
			t.Errorf("%s: err = %v, want a picture: error", name, err)
		}
	}
}

// TestPictureOddInputs: odd but legal inputs draw without panicking; codes
// outside the scheme show as no data.
func TestPictureOddInputs(t *testing.T) {
	inf, nan := math.Inf(1), math.NaN()
	weird := []Region{
		{Name: "", Geom: nil},
		{Name: "Empty", Geom: orb.MultiPolygon{{}}},
		{Name: "Far", Geom: orb.MultiPolygon{{{{1e300, 1e300}, {-1e300, 5}, {nan, 1}, {inf, -inf}, {1e300, 1e300}}}}},
		{Name: "A very long region name that cannot fit anywhere at all", Geom: orb.MultiPolygon{{{{0, 0}, {1, 0}, {1, 1}, {0, 0}}}}},
	}
	stations := []Point{{nan, 0}, {inf, 5}, {0.5, -inf}, {1e308, 1e308}, {0.5, 0.5}}
	for _, spec := range []grid.Spec{
		{West: 0, North: 1, Res: 1, Cols: 1, Rows: 1},
		{West: -180, North: 0.1, Res: 0.1, Cols: 3600, Rows: 1},
		{West: 0, North: 90, Res: 0.1, Cols: 1, Rows: 1800},
		{West: 179, North: 1, Res: 1, Cols: 2, Rows: 1},
	} {
		b := grid.NewUint8(spec, 0)
		for i := range b.Data {
			b.Data[i] = uint8(i % 256) // includes 0, 1..9 and codes no band holds
		}
		var buf bytes.Buffer
		in := Input{Bands: b, Scheme: bands.Default(), Stations: stations, Regions: weird, Title: strings.Repeat("Long title ", 30)}
		p, err := picPaint(in, Options{Width: 600})
		if err != nil {
			t.Fatalf("%v: %v", spec, err)
		}
		if err := Encode(&buf, in, Options{Width: 600}); err != nil {
			t.Fatalf("%v: %v", spec, err)
		}
		if p.noDataCodes[200] != true || p.noDataCodes[0] != true || p.noDataCodes[3] != false {
			t.Errorf("%v: codes 0 and 200 must be no data, 3 a band", spec)
		}
	}
}

// BenchmarkPictureGlobal draws a global 0.1 degree band raster (6.48 M
// cells) into the default 1400 px picture.
func BenchmarkPictureGlobal(b *testing.B) {
	spec, _ := grid.Global(0.1)
	r := grid.NewUint8(spec, 0)
	for i := range r.Data {
		r.Data[i] = uint8(i/3600%10) % 10
	}
	in := Input{Bands: r, Scheme: bands.Default(), Title: "Global"}
	for b.Loop() {
		if err := Encode(io.Discard, in, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}

// TestPictureStationCount: the legend counts the stations drawn, those
// inside the grid (any longitude form), not those given.
func TestPictureStationCount(t *testing.T) {
	f := picMakeFixture(t, 170, -25, -165, -10, 0.5)
	in := f.input()
	in.Stations = []Point{{-172.5, -17.5}, {187.5, -12.5}, {175, -20}, {160, -20}, {-160, -20}, {175, 0}, {math.NaN(), -20}}
	p, err := picPaint(in, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if n := p.stationsDrawn(); n != 3 {
		t.Errorf("stations drawn = %d, want 3 (172.5W twice in two forms, 175E)", n)
	}
	if picStationLabel(3, 3) != "Stations (3)" || picStationLabel(1, 1) != "Station (1)" || picStationLabel(1990, 20000) != "Stations (1,990 of 20,000 shown)" {
		t.Error("station legend label")
	}
}
