package interp

import (
	"math"
	"math/rand/v2"
	"testing"

	"drygrid/grid"
)

// destination is the point at distance km and bearing deg from lon, lat on
// the sphere: the direct great-circle formula (Williams, Aviation
// Formulary; common practice).
func destination(lon, lat, bearing, km float64) (float64, float64) {
	d := km / 6371.0088
	p, b := lat*math.Pi/180, bearing*math.Pi/180
	p2 := math.Asin(math.Sin(p)*math.Cos(d) + math.Cos(p)*math.Sin(d)*math.Cos(b))
	l2 := lon*math.Pi/180 + math.Atan2(math.Sin(b)*math.Sin(d)*math.Cos(p), math.Cos(d)-math.Sin(p)*math.Sin(p2))
	return l2 * 180 / math.Pi, p2 * 180 / math.Pi
}

// inLonRange reports whether lon lies in [west, east], read across the
// antimeridian when west > east.
func inLonRange(lon, west, east float64) bool {
	lon = normLon(lon)
	if west <= east {
		return lon >= west-1e-9 && lon <= east+1e-9
	}
	return lon >= west-1e-9 || lon <= east+1e-9
}

// TestExtentCoversEveryCircle: every point of every station's search circle
// (360 bearings, the direct formula) lies inside Extent, and inside the grid
// NewSpec makes from it; the sets include one across the antimeridian and
// one near a pole.
func TestExtentCoversEveryCircle(t *testing.T) {
	r := rand.New(rand.NewPCG(71, 72))
	sets := [][]Point{
		randomStations(r, 30, 5, -10, 25, 15),
		append(randomStations(r, 20, 172, -5, 180, 5), randomStations(r, 20, -180, -5, -172, 5)...),
		randomStations(r, 25, -20, 60, 40, 85),
		{{-120, -45, 0}},
	}
	for si, pts := range sets {
		for _, radius := range []float64{50, 300, 1000} {
			w, s, e, n := Extent(pts, radius, 0.1)
			spec, err := grid.NewSpec(w, s, e, n, 0.1)
			if err != nil {
				t.Fatalf("set %d radius %g: NewSpec(%g,%g,%g,%g): %v", si, radius, w, s, e, n, err)
			}
			for _, q := range pts {
				for b := 0.0; b < 360; b++ {
					lon, lat := destination(q.Lon, q.Lat, b, radius*(1-1e-9))
					if lat < s-1e-9 || lat > n+1e-9 || !inLonRange(lon, w, e) {
						t.Fatalf("set %d radius %g: (%g,%g) on the circle of (%g,%g) outside %g,%g,%g,%g", si, radius, lon, lat, q.Lon, q.Lat, w, s, e, n)
					}
					if _, _, ok := spec.Cell(lon, lat); !ok {
						t.Fatalf("set %d radius %g: (%g,%g) outside the grid %v", si, radius, lon, lat, spec)
					}
				}
			}
		}
	}
}

// TestExtentValues: tight bounds in simple cases. The easternmost point of
// a circle of angular radius d around latitude phi is at longitude offset
// asin(sin d / cos phi) and latitude asin(sin phi / cos d) (Matuschek,
// "Finding points within a distance of a latitude/longitude using bounding
// coordinates"); DistanceKm confirms that point is on the circle.
func TestExtentValues(t *testing.T) {
	deg := math.Pi * 6371.0088 / 180 // km in one degree of arc
	w, s, e, n := Extent([]Point{{10, 0, 0}, {20, 10, 0}}, deg, 0.1)
	d := math.Pi / 180
	wantE := 20 + math.Asin(math.Sin(d)/math.Cos(10*d))/d
	if math.Abs(w-9) > 1e-9 || math.Abs(s+1) > 1e-9 || math.Abs(n-11) > 1e-9 || math.Abs(e-wantE) > 1e-9 {
		t.Errorf("Extent = %g,%g,%g,%g; want 9,-1,%g,11", w, s, e, n, wantE)
	}
	tLat := math.Asin(math.Sin(10*d)/math.Cos(d)) / d
	if got := DistanceKm(20, 10, e, tLat); math.Abs(got-deg) > 1e-9 {
		t.Errorf("tangent point (%g,%g) is %g km from the station, want %g", e, tLat, got, deg)
	}
	// Across the antimeridian: west > east.
	w, _, e, _ = Extent([]Point{{175, 0, 0}, {-175, 0, 0}}, deg, 0.1)
	if math.Abs(w-174) > 1e-9 || math.Abs(e+174) > 1e-9 {
		t.Errorf("across 180: west %g east %g, want 174 and -174", w, e)
	}
	// A circle holding the North Pole covers every longitude.
	w, s, e, n = Extent([]Point{{30, 88, 0}}, 300, 0.1)
	if w != -180 || e != 180 || n != 90 || math.Abs(s-(88-300/deg)) > 1e-9 {
		t.Errorf("near the pole: %g,%g,%g,%g", w, s, e, n)
	}
	// Stations all round the equator: the whole circle.
	var ring []Point
	for lon := -180.0; lon < 180; lon += 3 {
		ring = append(ring, Point{lon, 0, 0})
	}
	if w, _, e, _ := Extent(ring, 200, 0.1); w != -180 || e != 180 {
		t.Errorf("ring: west %g east %g, want -180 and 180", w, e)
	}
	if w, s, e, n := Extent(nil, 300, 0.1); w != 0 || s != 0 || e != 0 || n != 0 {
		t.Errorf("no stations: %g,%g,%g,%g", w, s, e, n)
	}
}
