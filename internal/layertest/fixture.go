package layertest

import (
	"math"
	"os"
	"testing"

	"drygrid/bands"
	"drygrid/grid"

	"github.com/paulmach/orb"
)

// LookDir is $name when set (the files are kept there for a person, or a
// headless browser, to look at), else a temporary directory.
func LookDir(t *testing.T, name string) string {
	if dir := os.Getenv(name); dir != "" {
		return dir
	}
	return t.TempDir()
}

// Fixture is an invented scenario (no real place or data): two
// fictitious islands on a grid, an analytic z field that passes through
// every default band, stations on the islands and three regions.
type Fixture struct {
	Spec     grid.Spec
	Z        func(lon, lat float64) float64
	Land     func(lon, lat float64) bool
	Bands    *grid.Uint8
	Stations []Point
	Regions  []Region
}

// Point is a station location in degrees.
type Point struct{ Lon, Lat float64 }

// Region is a named outline.
type Region struct {
	Name string
	Geom orb.MultiPolygon
}

// BrewerBrBG9 are the colours of ColorBrewer's 9-class brown/blue-green
// diverging scheme (BrBG; Cynthia Brewer, Penn State, Apache-2.0) by the
// default band codes 1 (driest) to 9 (wettest): the reference the default
// bands' colours are checked against.
var BrewerBrBG9 = map[uint8]string{
	1: "#8c510a", 2: "#bf812d", 3: "#dfc27d", 4: "#f6e8c3", 5: "#f5f5f5",
	6: "#c7eae5", 7: "#80cdc1", 8: "#35978f", 9: "#01665e",
}

// NewFixture makes the fixture on the grid of the given bounds and
// resolution.
func NewFixture(t testing.TB, west, south, east, north, res float64) *Fixture {
	t.Helper()
	spec, err := grid.NewSpec(west, south, east, north, res)
	if err != nil {
		t.Fatal(err)
	}
	w, n := spec.West, spec.North
	lw, lh := float64(spec.Cols)*spec.Res, float64(spec.Rows)*spec.Res
	// Island centres and radii as fractions of the extent.
	type blob struct{ cx, cy, rx, ry float64 }
	blobs := []blob{{w + 0.33*lw, n - 0.35*lh, 0.24 * lw, 0.26 * lh}, {w + 0.70*lw, n - 0.68*lh, 0.2 * lw, 0.22 * lh}}
	f := &Fixture{Spec: spec}
	f.Land = func(lon, lat float64) bool {
		for _, b := range blobs {
			dx, dy := (lon-b.cx)/b.rx, (lat-b.cy)/b.ry
			if dx*dx+dy*dy <= 1 {
				return true
			}
		}
		return false
	}
	f.Z = func(lon, lat float64) float64 {
		u, v := (lon-w)/lw, (n-lat)/lh
		return 2.8*math.Cos(math.Pi*(u+0.6*v)) + 0.4*math.Sin(7*u)
	}
	s := bands.Default()
	f.Bands = grid.NewUint8(spec, 0)
	for r := 0; r < spec.Rows; r++ {
		for c := 0; c < spec.Cols; c++ {
			lon, lat := spec.Center(c, r)
			if f.Land(lon, lat) {
				f.Bands.Data[spec.Index(c, r)] = s.Classify(f.Z(lon, lat))
			}
		}
	}
	for i := 0; i < 60; i++ {
		// A deterministic scatter (golden-angle spiral) kept on land.
		a := float64(i) * 2.399963
		rr := math.Sqrt(float64(i)/60) * 0.45
		lon, lat := w+lw*(0.5+rr*math.Cos(a)), n-lh*(0.5+rr*math.Sin(a))
		if f.Land(lon, lat) {
			if lon > 180 {
				lon -= 360 // stations come in the usual -180..180 form
			}
			f.Stations = append(f.Stations, Point{lon, lat})
		}
	}
	rect := func(x0, y0, x1, y1 float64) orb.Polygon {
		return orb.Polygon{orb.Ring{{x0, y0}, {x1, y0}, {x1, y1}, {x0, y1}, {x0, y0}}}
	}
	f.Regions = []Region{
		{Name: "Northmere", Geom: orb.MultiPolygon{rect(w+0.08*lw, n-0.35*lh, w+0.58*lw, n-0.1*lh)}},
		{Name: "Southmere", Geom: orb.MultiPolygon{rect(w+0.08*lw, n-0.62*lh, w+0.58*lw, n-0.35*lh)}},
		{Name: "Tarrow", Geom: orb.MultiPolygon{rect(w+0.5*lw, n-0.9*lh, w+0.9*lw, n-0.48*lh)}},
	}
	return f
}
