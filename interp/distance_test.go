package interp

import (
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"

	"drygrid/internal/reftest"
)

// vincentyKm is Vincenty's (1975) formula specialised to the sphere, the
// atan2 form of the central angle: a second, independent formula for the
// great-circle distance, well conditioned at every distance.
func vincentyKm(lon1, lat1, lon2, lat2 float64) float64 {
	p1, p2 := lat1*math.Pi/180, lat2*math.Pi/180
	dl := (lon2 - lon1) * math.Pi / 180
	a := math.Cos(p2) * math.Sin(dl)
	b := math.Cos(p1)*math.Sin(p2) - math.Sin(p1)*math.Cos(p2)*math.Cos(dl)
	c := math.Sin(p1)*math.Sin(p2) + math.Cos(p1)*math.Cos(p2)*math.Cos(dl)
	return math.Atan2(math.Hypot(a, b), c) * 6371.0088
}

// TestDegreeOfLatitude: on a sphere of R = 6371.0088 km (IUGG mean radius,
// Moritz 2000) one degree of arc is pi R / 180 = 111.19508 km (the issue
// quotes 111.195 km), wherever it is measured along a meridian.
func TestDegreeOfLatitude(t *testing.T) {
	const want = 111.19508 // pi * 6371.0088 / 180 = 111.195083724..., to 5 decimals
	for _, c := range [][4]float64{{0, 0, 0, 1}, {30, 45, 30, 46}, {-170, -80, -170, -81}, {179.5, 89, 179.5, 90}} {
		got := DistanceKm(c[0], c[1], c[2], c[3])
		if math.Abs(got-want) > 5e-6 {
			t.Errorf("DistanceKm%v = %.8f km, want %.5f", c, got, want)
		}
	}
	if got := DistanceKm(0, 0, 0, 1); fmt.Sprintf("%.3f", got) != "111.195" {
		t.Errorf("one degree = %.6f km, the issue says 111.195", got)
	}
}

// distanceCases are short and near-antipodal pairs; want is the value by
// construction where there is one (a meridian arc is R * dlat; antipodes
// are pi R apart), else 0 to rely on the second formula only.
var distanceCases = []struct {
	name                   string
	lon1, lat1, lon2, lat2 float64
	want                   float64 // km; 0 = none by construction
}{
	{"1 m along a meridian", 10, 45, 10, 45 + 0.001/6371.0088*180/math.Pi, 0.001},
	{"10 m along a meridian", -75, -33, -75, -33 + 0.01/6371.0088*180/math.Pi, 0.01},
	{"1 m east at 60N", 20, 60, 20 + 0.001/(6371.0088*0.5)*180/math.Pi, 60, 0},
	{"10 m diagonal across the antimeridian", 179.99995, -10, -179.99996, -10.00005, 0},
	{"antipodes on the equator", 0, 0, 180, 0, math.Pi * 6371.0088},
	{"antipodes at 45", 30, 45, -150, -45, math.Pi * 6371.0088},
	{"near antipodal, 10 m short", 0, 0, 180 - 0.01/6371.0088*180/math.Pi, 0, math.Pi*6371.0088 - 0.01},
	{"near antipodal, off both axes", 10, 20, -170.0001, -19.9999, 0},
	{"pole to pole", 0, 90, 123, -90, math.Pi * 6371.0088},
}

// TestDistanceAgainstVincenty checks DistanceKm (haversine form) against
// Vincenty's spherical formula and against the value by construction.
func TestDistanceAgainstVincenty(t *testing.T) {
	for _, c := range distanceCases {
		got := DistanceKm(c.lon1, c.lat1, c.lon2, c.lat2)
		v := vincentyKm(c.lon1, c.lat1, c.lon2, c.lat2)
		// 1e-9 relative, and 1e-9 m absolute for the short ones.
		if math.Abs(got-v) > 1e-9*v+1e-12 {
			t.Errorf("%s: DistanceKm %.15g km, Vincenty %.15g km", c.name, got, v)
		}
		if c.want != 0 && math.Abs(got-c.want) > 1e-8*c.want {
			t.Errorf("%s: DistanceKm %.15g km, by construction %.15g km", c.name, got, c.want)
		}
	}
}

// TestDistanceAgainstPyproj checks the same pairs, plus random ones, against
// pyproj's Geod(a=R, b=R) (GeographicLib geodesics, Karney 2013, on a sphere
// of the IUGG mean radius), a third, outside implementation.
func TestDistanceAgainstPyproj(t *testing.T) {
	py := reftest.Python(t, "pyproj")
	var pairs [][4]float64
	for _, c := range distanceCases {
		pairs = append(pairs, [4]float64{c.lon1, c.lat1, c.lon2, c.lat2})
	}
	r := rand.New(rand.NewPCG(3, 4))
	for range 50 {
		pairs = append(pairs, [4]float64{r.Float64()*360 - 180, r.Float64()*180 - 90, r.Float64()*360 - 180, r.Float64()*180 - 90})
	}
	in, _ := json.Marshal(pairs)
	script := `
import json, sys
from pyproj import Geod
g = Geod(a=6371008.8, b=6371008.8)
for lon1, lat1, lon2, lat2 in json.load(sys.stdin):
    print(repr(g.inv(lon1, lat1, lon2, lat2)[2] / 1000.0))
`
	out := strings.Fields(string(reftest.RunPython(t, py, "-c", in, script)))
	if len(out) != len(pairs) {
		t.Fatalf("pyproj gave %d values for %d pairs", len(out), len(pairs))
	}
	for i, s := range out {
		want, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatal(err)
		}
		p := pairs[i]
		got := DistanceKm(p[0], p[1], p[2], p[3])
		// GeographicLib is accurate to about 15 nm; allow 1e-9 relative + 1e-9 m.
		if math.Abs(got-want) > 1e-9*want+1e-12 {
			t.Errorf("pair %v: DistanceKm %.15g km, pyproj %.15g km", p, got, want)
		}
	}
}

// TestChordDistanceMatchesHaversine: the interpolator measures through unit
// vectors (chord, then the arcsine series or the exact chord angle); it must
// agree with DistanceKm on random pairs at every scale.
func TestChordDistanceMatchesHaversine(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	ip := &Interpolator{x: make([]float64, 1), y: make([]float64, 1), z: make([]float64, 1)}
	for i := range 20000 {
		lon1, lat1 := r.Float64()*360-180, math.Asin(2*r.Float64()-1)*180/math.Pi
		scale := math.Pow(10, -6+8*r.Float64()) // 1 mm to 100,000 deg-ish offsets, folded below
		lon2, lat2 := lon1+scale*(r.Float64()-0.5), math.Max(-90, math.Min(90, lat1+scale*(r.Float64()-0.5)))
		if i%4 == 0 { // near antipodal
			lon2, lat2 = lon1+180+scale*1e-3*(r.Float64()-0.5), -lat1
		}
		cx, cy, cz := unitVector(lon1, lat1)
		ip.x[0], ip.y[0], ip.z[0] = unitVector(lon2, lat2)
		dx, dy, dz := cx-ip.x[0], cy-ip.y[0], cz-ip.z[0]
		c2 := dx*dx + dy*dy + dz*dz
		got := ip.distKm(c2, 0, cx, cy, cz)
		want := DistanceKm(lon1, lat1, lon2, lat2)
		// Unit vectors carry about 2e-16 absolute error: 1.3e-9 km.
		if math.Abs(got-want) > 1e-12*want+5e-9 {
			t.Fatalf("(%g,%g)-(%g,%g): chord %.15g km, haversine %.15g km", lon1, lat1, lon2, lat2, got, want)
		}
		if c2 <= 0.01 {
			a := math.Sqrt(ip.angleSq(c2, 0, cx, cy, cz))
			if e := 2 * math.Asin(math.Sqrt(c2)/2); math.Abs(a-e) > 1e-15*e {
				t.Fatalf("c2 %g: series angle %.17g, math.Asin %.17g", c2, a, e)
			}
			if c2/4 <= shortSeriesMaxT {
				if s4, s := asinSqSeries4(c2/4), asinSqSeries(c2/4); math.Abs(s4-s) > 4.5e-16 { // two units in the last place
					t.Fatalf("c2 %g: short series %.17g, long %.17g", c2, s4, s)
				}
			}
		}
	}
}
