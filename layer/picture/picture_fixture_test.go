package picture

import (
	"testing"

	"drygrid/bands"
	"drygrid/grid"
	"drygrid/internal/layertest"
)

// picFixture is layertest's invented scenario with its stations and regions
// as the picture takes them.
type picFixture struct {
	*layertest.Fixture
	spec     grid.Spec
	bands    *grid.Uint8
	stations []Point
	regions  []Region
}

func picMakeFixture(t testing.TB, west, south, east, north, res float64) *picFixture {
	t.Helper()
	f := layertest.NewFixture(t, west, south, east, north, res)
	p := &picFixture{Fixture: f, spec: f.Spec, bands: f.Bands}
	for _, s := range f.Stations {
		p.stations = append(p.stations, Point{s.Lon, s.Lat})
	}
	for _, r := range f.Regions {
		p.regions = append(p.regions, Region{Name: r.Name, Geom: r.Geom})
	}
	return p
}

func (f *picFixture) input() Input {
	return Input{
		Bands: f.bands, Scheme: bands.Default(), Stations: f.stations, Regions: f.regions,
		Title:    "Kelverin Islands (fictitious) - SPI, 30 days ending 30 November 2025",
		Subtitle: "IDW power 2, 12 neighbours, 300 km; 214 stations",
	}
}
