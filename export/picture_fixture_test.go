package export

import (
	"math"
	"testing"

	"drygrid/bands"
	"drygrid/grid"

	"github.com/paulmach/orb"
)

// picFixture is an invented scenario (no real place or data): two
// fictitious islands on a grid, an analytic z field that passes through
// every default band, stations on the islands and three regions.
type picFixture struct {
	spec     grid.Spec
	z        func(lon, lat float64) float64
	land     func(lon, lat float64) bool
	bands    *grid.Uint8
	stations []PicturePoint
	regions  []PictureRegion
}

func picMakeFixture(t testing.TB, west, south, east, north, res float64) *picFixture {
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
	f := &picFixture{spec: spec}
	f.land = func(lon, lat float64) bool {
		for _, b := range blobs {
			dx, dy := (lon-b.cx)/b.rx, (lat-b.cy)/b.ry
			if dx*dx+dy*dy <= 1 {
				return true
			}
		}
		return false
	}
	f.z = func(lon, lat float64) float64 {
		u, v := (lon-w)/lw, (n-lat)/lh
		return 2.8*math.Cos(math.Pi*(u+0.6*v)) + 0.4*math.Sin(7*u)
	}
	s := bands.Default()
	f.bands = grid.NewUint8(spec, 0)
	for r := 0; r < spec.Rows; r++ {
		for c := 0; c < spec.Cols; c++ {
			lon, lat := spec.Center(c, r)
			if f.land(lon, lat) {
				f.bands.Data[spec.Index(c, r)] = s.Classify(f.z(lon, lat))
			}
		}
	}
	for i := 0; i < 60; i++ {
		// A deterministic scatter (golden-angle spiral) kept on land.
		a := float64(i) * 2.399963
		rr := math.Sqrt(float64(i)/60) * 0.45
		lon, lat := w+lw*(0.5+rr*math.Cos(a)), n-lh*(0.5+rr*math.Sin(a))
		if f.land(lon, lat) {
			if lon > 180 {
				lon -= 360 // stations come in the usual -180..180 form
			}
			f.stations = append(f.stations, PicturePoint{lon, lat})
		}
	}
	rect := func(x0, y0, x1, y1 float64) orb.Polygon {
		return orb.Polygon{orb.Ring{{x0, y0}, {x1, y0}, {x1, y1}, {x0, y1}, {x0, y0}}}
	}
	f.regions = []PictureRegion{
		{Name: "Northmere", Geom: orb.MultiPolygon{rect(w+0.08*lw, n-0.35*lh, w+0.58*lw, n-0.1*lh)}},
		{Name: "Southmere", Geom: orb.MultiPolygon{rect(w+0.08*lw, n-0.62*lh, w+0.58*lw, n-0.35*lh)}},
		{Name: "Tarrow", Geom: orb.MultiPolygon{rect(w+0.5*lw, n-0.9*lh, w+0.9*lw, n-0.48*lh)}},
	}
	return f
}

func (f *picFixture) input() PictureInput {
	return PictureInput{
		Bands: f.bands, Scheme: bands.Default(), Stations: f.stations, Regions: f.regions,
		Title:    "Kelverin Islands (fictitious) - SPI, 30 days ending 30 November 2025",
		Subtitle: "IDW power 2, 12 neighbours, 300 km; 214 stations",
	}
}
