package interp

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"drygrid/grid"
)

// TestValidateSectors: 0, 4 or 8 sectors, and at least one neighbour per
// sector (each sector keeps neighbors/sectors stations, rounded down, so
// fewer neighbours than sectors would keep none).
func TestValidateSectors(t *testing.T) {
	cases := []struct {
		sectors, neighbors int
		want               string // "" = valid
	}{
		{0, 1, ""},
		{4, 4, ""},
		{8, 12, ""},
		{8, 8, ""},
		{3, 12, "sectors 3 must be 0 (off), 4 or 8"},
		{-4, 12, "sectors -4 must be"},
		{16, 32, "sectors 16 must be"},
		{4, 3, "neighbors 3 must be at least sectors (4)"},
		{8, 6, "neighbors 6 must be at least sectors (8)"},
	}
	for _, c := range cases {
		p := Params{Power: 2, Neighbors: c.neighbors, RadiusKm: 300, MinStations: 1, Sectors: c.sectors}
		err := p.Validate()
		if (c.want == "") != (err == nil) || (err != nil && !strings.Contains(err.Error(), c.want)) {
			t.Errorf("sectors %d neighbors %d: error %v, want %q", c.sectors, c.neighbors, err, c.want)
		}
	}
}

// TestSectorOf: the sector of a direction given by its east and north
// components, sector 0 starting at north and going clockwise, a bearing on
// a boundary in the sector clockwise of it, no direction in sector 0 (the
// rules of sectors.go). Bearing -1 stands for no direction.
func TestSectorOf(t *testing.T) {
	cases := []struct {
		bearingDeg float64
		s, want    int
	}{
		{0, 4, 0}, {45, 4, 0}, {89.9, 4, 0}, {90, 4, 1}, {179.9, 4, 1}, {180, 4, 2}, {269, 4, 2}, {270, 4, 3}, {359.99, 4, 3},
		{-1, 4, 0}, {-1, 8, 0}, {45, 8, 1}, {135, 8, 3}, {225, 8, 5}, {315, 8, 7}, {134, 8, 2}, {226, 8, 5}, {314, 8, 6},
		{0, 8, 0}, {44.9, 8, 0}, {46, 8, 1}, {90, 8, 2}, {180, 8, 4}, {200, 8, 4}, {300, 8, 6}, {359.99, 8, 7},
	}
	for _, c := range cases {
		var e, n float64
		switch c.bearingDeg { // exact components on the axes and diagonals
		case -1: // no direction (a station on the cell)
			e, n = 0, 0
		case 45:
			e, n = 1, 1
		case 135:
			e, n = 1, -1
		case 225:
			e, n = -1, -1
		case 315:
			e, n = -1, 1
		case 0:
			e, n = 0, 1
		case 90:
			e, n = 1, 0
		case 180:
			e, n = 0, -1
		case 270:
			e, n = -1, 0
		default:
			n, e = math.Sincos(c.bearingDeg * degToRad)
			n, e = e, n
		}
		if got := sectorOf(e, n, c.s); got != c.want {
			t.Errorf("bearing %g, %d sectors: sector %d, want %d", c.bearingDeg, c.s, got, c.want)
		}
	}
}

// secDestination is the point at great-circle distance km and bearing brg
// (degrees) from (0, 0): lat2 = asin(sin d cos brg), lon2 = atan2(sin brg
// sin d, cos d) (Williams, Aviation Formulary, "Lat/lon given radial and
// distance", with lat1 = lon1 = 0; quoted from memory).
func secDestination(km, brg float64) (lon, lat float64) {
	d := km / EarthRadiusKm
	b := brg * degToRad
	return math.Atan2(math.Sin(b)*math.Sin(d), math.Cos(d)) / degToRad, math.Asin(math.Sin(d)*math.Cos(b)) / degToRad
}

// TestSectorsOneSidedCluster: ten stations (z = +1) lie east of the cell at
// (0, 0), on bearings 95..126.5 degrees, and two (z = -1) west of it on
// bearings 250 and 280, all exactly 100 km away, so every weight is equal
// (Shepard 1968: w = d^-2). Neighbors 12, radius 300 km, min-stations 3.
// By hand:
//   - no sectors: all 12 are used, z = (10 - 2) / 12 = 2/3, the western
//     stations' share of the weight 2/12 = 1/6;
//   - 4 sectors (quota 12/4 = 3): the east cluster is in sector 1 ([90,
//     180)) and gives 3, the west ones are in sectors 2 and 3; 5 used,
//     z = (3 - 2) / 5 = 1/5, western share 2/5;
//   - 8 sectors (quota 1): east sector 2 ([90, 135)) gives 1, west sectors
//     5 ([225, 270)) and 6 ([270, 315)) give 1 each; 3 used,
//     z = (1 - 2) / 3 = -1/3, western share 2/3.
func TestSectorsOneSidedCluster(t *testing.T) {
	var pts []Point
	for i := range 10 {
		lon, lat := secDestination(100, 95+3.5*float64(i))
		pts = append(pts, Point{lon, lat, 1})
	}
	for _, b := range []float64{250, 280} {
		lon, lat := secDestination(100, b)
		pts = append(pts, Point{lon, lat, -1})
	}
	cases := []struct {
		sectors, n int
		z, west    float64
	}{{0, 12, 2.0 / 3, 1.0 / 6}, {4, 5, 1.0 / 5, 2.0 / 5}, {8, 3, -1.0 / 3, 2.0 / 3}}
	for _, c := range cases {
		p := Params{Power: 2, Neighbors: 12, RadiusKm: 300, MinStations: 3, Sectors: c.sectors}
		ip, err := New(pts, p)
		if err != nil {
			t.Fatal(err)
		}
		z, n, ok := ip.At(0, 0)
		if !ok || n != c.n || math.Abs(z-c.z) > 1e-9 {
			t.Errorf("sectors %d: z %v from %d stations, want %v from %d", c.sectors, z, n, c.z, c.n)
		}
		// The western stations' share of the weight, measured on its own:
		// the same stations valued 1 in the west and 0 in the east.
		ind := append([]Point(nil), pts...)
		for i := range ind {
			ind[i].Z = 0
			if i >= 10 {
				ind[i].Z = 1
			}
		}
		ipw, err := New(ind, p)
		if err != nil {
			t.Fatal(err)
		}
		if west, _, _ := ipw.At(0, 0); math.Abs(west-c.west) > 1e-9 {
			t.Errorf("sectors %d: western weight share %v, want %v", c.sectors, west, c.west)
		}
		// The grid agrees at a cell centred on (0, 0).
		spec, err := gridSpecAround(0, 0)
		if err != nil {
			t.Fatal(err)
		}
		g := ip.Grid(spec, nil)
		if v := g.Data[0]; math.Abs(float64(v)-c.z) > 1e-6 {
			t.Errorf("sectors %d: Grid %v, want %v", c.sectors, v, c.z)
		}
	}
}

// TestSectorsAntimeridian: the cell at (179.9, 0) has three stations
// (z = -1) to its west, 0.1, 0.2 and 0.3 degrees away, and one (z = +1)
// 0.2 degrees east across the antimeridian at -179.9. Along the equator
// those are great-circle distances. With 4 sectors and 4 neighbours
// (quota 1) the nearest western station and the eastern one are used:
// z = (-1/0.1^2 + 1/0.2^2) / (1/0.1^2 + 1/0.2^2) = (-100 + 25) / 125 =
// -0.6. Without sectors all four: (-100 - 25 - 11.11 + 25) / 161.11 =
// -0.68966. The stations sit 0.0001 degrees off the equator so that no
// bearing lies on a sector boundary; that moves z by under 1e-5.
func TestSectorsAntimeridian(t *testing.T) {
	pts := []Point{{179.8, 0.0001, -1}, {179.7, 0.0001, -1}, {179.6, 0.0001, -1}, {-179.9, -0.0001, 1}}
	for _, c := range []struct {
		sectors, n int
		z          float64
	}{{0, 4, -111.111111 / 161.111111}, {4, 2, -0.6}} {
		ip, err := New(pts, Params{Power: 2, Neighbors: 4, RadiusKm: 100, MinStations: 2, Sectors: c.sectors})
		if err != nil {
			t.Fatal(err)
		}
		for _, lon := range []float64{179.9, -180.1} { // both forms of the longitude
			z, n, ok := ip.At(lon, 0)
			if !ok || n != c.n || math.Abs(z-c.z) > 1e-5 {
				t.Errorf("sectors %d at %g: z %v from %d, want %v from %d", c.sectors, lon, z, n, c.z, c.n)
			}
		}
	}
}

// TestSectorsNearPole: the cell at (0, 89.9). One station (z = +1) lies
// beyond the pole at (180, 89.7) and one (z = +1) at (175, 89.6), both in
// the sector that starts at north; one (z = -1) lies due south at (0, 89.5).
// The first and the last are both 0.4 degrees away along a meridian. With 4
// sectors, 4 neighbours (quota 1) the north sector gives its nearest, so
// z = (1 - 1) / 2 = 0 from 2 stations. Without sectors all three: the
// farther northern one, about 0.4997 degrees away by the planar law of
// cosines near the pole (0.1^2 + 0.4^2 - 2 0.1 0.4 cos 175 deg), adds
// weight 1/0.4997^2 = 4.005 to 6.25 + 6.25: z = 4.005 / 16.505 = 0.2426.
func TestSectorsNearPole(t *testing.T) {
	pts := []Point{{180, 89.7, 1}, {175, 89.6, 1}, {0, 89.5, -1}}
	for _, c := range []struct {
		sectors, n int
		z, tol     float64
	}{{0, 3, 0.2426, 1e-3}, {4, 2, 0, 1e-9}, {8, 2, 0, 1e-9}} {
		nb := 4
		if c.sectors == 8 {
			nb = 8
		}
		ip, err := New(pts, Params{Power: 2, Neighbors: nb, RadiusKm: 200, MinStations: 3, Sectors: c.sectors})
		if err != nil {
			t.Fatal(err)
		}
		z, n, ok := ip.At(0, 89.9)
		if !ok || n != c.n || math.Abs(z-c.z) > c.tol {
			t.Errorf("sectors %d: z %v from %d, want %v from %d", c.sectors, z, n, c.z, c.n)
		}
	}
}

// gridSpecAround is a one-cell grid of 0.1 degrees centred on lon, lat.
func gridSpecAround(lon, lat float64) (grid.Spec, error) {
	s := grid.Spec{West: lon - 0.05, North: lat + 0.05, Res: 0.1, Cols: 1, Rows: 1}
	if clon, clat := s.Center(0, 0); math.Abs(clon-lon) > 1e-12 || math.Abs(clat-lat) > 1e-12 {
		return s, fmt.Errorf("cell centre %g, %g is not %g, %g", clon, clat, lon, lat)
	}
	return s, nil
}

// BenchmarkGridGlobalSectors is BenchmarkGridGlobal (20,000 stations, a
// global 0.1 degree grid, k = 12, 300 km) with 8 sectors.
func BenchmarkGridGlobalSectors(b *testing.B) {
	p := DefaultParams()
	p.Sectors = 8
	benchGridGlobal(b, p)
}
