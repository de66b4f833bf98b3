package scenario

import (
	"bytes"
	"encoding/json"
	"math"
	"testing"
)

// TestCoast: every island's coast encloses its ellipse (so every station
// stands inside it), keeps away from the other islands' coasts, turns
// counter-clockwise, and comes out the same on every call (properties of
// the construction; the file is read back by encoding/json).
func TestCoast(t *testing.T) {
	s := DemoScenario()
	for _, is := range s.Islands {
		c := is.Coast(coastPoints)
		area := 0.0
		for i, p := range c {
			q := c[(i+1)%len(c)]
			area += p[0]*q[1] - q[0]*p[1]
			if r := is.radius(p[0], p[1]); r < 1.03 || r > 1.37 {
				t.Errorf("%s: coast point %d at %.3f of the ellipse's radius", is.Name, i, r)
			}
			for _, o := range s.Islands {
				if o.Name != is.Name && o.radius(p[0], p[1]) < 1.5 {
					t.Errorf("%s: coast point %d near %s", is.Name, i, o.Name)
				}
			}
		}
		if area <= 0 {
			t.Errorf("%s: coast turns clockwise", is.Name)
		}
		if d := is.Coast(coastPoints); d[17] != c[17] {
			t.Errorf("%s: coast differs between calls", is.Name)
		}
	}
	for _, site := range s.Sites {
		for _, is := range s.Islands {
			if is.Name == site.Island && is.radius(site.Lon, site.Lat) >= 1 {
				t.Errorf("site %s outside its island's ellipse", site.ID)
			}
		}
	}
	var buf bytes.Buffer
	if err := s.WriteCoastGeoJSON(&buf); err != nil {
		t.Fatal(err)
	}
	var fc struct {
		Features []struct {
			Geometry struct{ Coordinates [][][2]float64 }
		}
	}
	if err := json.Unmarshal(buf.Bytes(), &fc); err != nil || len(fc.Features) != len(s.Islands) {
		t.Fatalf("coast GeoJSON: %v, %d features", err, len(fc.Features))
	}
	ring := fc.Features[0].Geometry.Coordinates[0]
	if len(ring) != coastPoints+1 || ring[0] != ring[len(ring)-1] || math.IsNaN(ring[5][0]) {
		t.Errorf("ring of %d positions, closed %v", len(ring), ring[0] == ring[len(ring)-1])
	}
}
