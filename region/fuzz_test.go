package region

import (
	"bytes"
	"encoding/json"
	"math"
	"strconv"
	"testing"

	"drygrid/grid"

	"github.com/paulmach/orb"
)

// fuzzRings reads the rings of each feature of a GeoJSON document on its
// own, with encoding/json into generic values: the reference for what
// ParseRegions should have read. bad reports a position that is not two or
// three finite numbers.
func fuzzRings(data []byte) (rings [][]orb.Ring, bad bool) {
	data = bytes.TrimPrefix(data, []byte("\ufeff"))
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.UseNumber()
	var v any
	if dec.Decode(&v) != nil {
		return nil, true
	}
	top, _ := v.(map[string]any)
	var geoms []any
	switch top["type"] {
	case "FeatureCollection":
		fs, _ := top["features"].([]any)
		for _, f := range fs {
			fm, _ := f.(map[string]any)
			geoms = append(geoms, fm["geometry"])
		}
	case "Feature":
		geoms = append(geoms, top["geometry"])
	default:
		geoms = append(geoms, top)
	}
	for _, g := range geoms {
		gm, _ := g.(map[string]any)
		var polys []any
		if gm["type"] == "Polygon" {
			polys = []any{gm["coordinates"]}
		} else {
			polys, _ = gm["coordinates"].([]any)
		}
		var rs []orb.Ring
		for _, p := range polys {
			pa, _ := p.([]any)
			for _, r := range pa {
				ra, _ := r.([]any)
				var ring orb.Ring
				for _, q := range ra {
					qa, _ := q.([]any)
					if len(qa) < 2 || len(qa) > 3 {
						bad = true
						continue
					}
					var pt orb.Point
					for c, x := range qa {
						n, ok := x.(json.Number)
						f, err := strconv.ParseFloat(string(n), 64)
						if !ok || err != nil || math.IsInf(f, 0) {
							bad = true
						} else if c < 2 {
							pt[c] = f
						}
					}
					ring = append(ring, pt)
				}
				rs = append(rs, ring)
			}
		}
		rings = append(rings, rs)
	}
	return rings, bad
}

// kmPerDeg2 is the area of one square degree of longitude-latitude on the
// WGS84 ellipsoid at latitude lat, in km^2: M N cos(lat) (pi/180)^2 with M
// and N the meridian and normal radii of curvature, M N = a^2 (1-e^2) /
// (1 - e^2 sin^2 lat)^2 (e.g. Snyder 1987, eqs. 4-18 and 4-20).
func kmPerDeg2(lat float64) float64 {
	const f = 1 / grid.WGS84InvF
	e2 := f * (2 - f)
	a := grid.WGS84A / 1000
	s := math.Sin(lat * math.Pi / 180)
	d := 1 - e2*s*s
	return a * a * (1 - e2) * math.Cos(lat*math.Pi/180) / (d * d) * (math.Pi / 180) * (math.Pi / 180)
}

// FuzzRegionsArea feeds arbitrary GeoJSON to the regions reader. For what
// it accepts: every position read must be one written in the input, read
// on its own by encoding/json (no position silently becomes 0, 0 or loses a
// number), and the area Coverage gives each ring on a global grid must lie
// between the ring's shoelace area in square degrees times the smallest and
// the largest area of a square degree over the ring's latitudes, the
// shoelace area taken with every edge the short way round (no ring silently
// wraps the long way round or loses area).
func FuzzRegionsArea(f *testing.F) {
	f.Add([]byte(fc(feat(`"a"`, `{}`, poly(sqCCW)))))
	f.Add([]byte(fc(feat(``, `{"name":"b"}`, poly(sqCW, `[[0.5,0.2],[0.5,0.8],[0.8,0.8],[0.5,0.2]]`)))))
	f.Add([]byte(`{"type":"MultiPolygon","coordinates":[[[[170,0],[190,0],[190,5],[170,0]]],[[[-10,80],[10,80],[0,89.9],[-10,80]]]]}`))
	f.Add([]byte(feat(`"aq"`, `{}`, poly(`[[-180,-90],[-180,-70],[0,-65],[180,-70],[180,-90],[-180,-90]]`))))
	f.Add([]byte(fc(feat(`"n"`, `{}`, poly(`[[0,0],[2,0],[null,null],[0,1],[0,0]]`)))))
	f.Add([]byte(fc(feat(`"e"`, `{}`, poly(`[[0,0],[2,0],[],[0,1],[0,0]]`)))))
	f.Add([]byte(fc(feat(`"o"`, `{}`, poly(`[[0,0],[2,0],[2],[0,1],[0,0]]`)))))
	f.Add([]byte(fc(feat(`"j"`, `{}`, poly(`[[179.5,-17],[-179.5,-17],[-179.5,-16],[179.5,-16],[179.5,-17]]`)))))
	f.Add([]byte("\ufeff" + poly(`[[0,0,5],[1e-9,0,5],[0,1e-9,5],[0,0,5]]`)))
	s, _ := grid.Global(1)
	f.Fuzz(func(t *testing.T, data []byte) {
		rs, err := ParseRegions("fuzz", data, "")
		if err != nil {
			return
		}
		ref, bad := fuzzRings(data)
		if bad {
			t.Fatalf("accepted a position that is not two or three finite numbers")
		}
		if len(ref) != len(rs) {
			t.Fatalf("%d regions read, %d geometries in the input", len(rs), len(ref))
		}
		for i, r := range rs {
			k := 0
			for _, p := range r.Geom {
				for _, ring := range p {
					if k >= len(ref[i]) {
						t.Fatalf("region %d: more rings read than written", i)
					}
					want := regDedup(ref[i][k])
					if !ring.Equal(want) && !ring.Equal(regReversed(want)) {
						t.Fatalf("region %d ring %d: read %v, written %v", i, k, ring, ref[i][k])
					}
					k++
				}
			}
			if k != len(ref[i]) {
				t.Fatalf("region %d: %d rings read, %d written", i, k, len(ref[i]))
			}
			for _, p := range r.Geom {
				for _, ring := range p {
					fuzzCheckRingArea(t, s, ring)
				}
			}
		}
	})
}

func fuzzCheckRingArea(t *testing.T, s grid.Spec, ring orb.Ring) {
	t.Helper()
	if regSignedArea(ring) < 0 {
		ring = regReversed(ring)
	}
	// The reference reading takes every edge the short way round (an edge
	// along a pole, having no length, as written).
	short := orb.Ring{ring[0]}
	off := 0.0 // the multiple of 360 added to the longitudes written
	for i := 0; i+1 < len(ring); i++ {
		a, b := ring[i], ring[i+1]
		if !(a[1] == b[1] && math.Abs(a[1]) == 90) {
			for b[0]+off-short[i][0] > 180 {
				off -= 360
			}
			for b[0]+off-short[i][0] < -180 {
				off += 360
			}
		}
		short = append(short, orb.Point{b[0] + off, b[1]})
	}
	if off != 0 {
		t.Fatalf("ring %v: taken the short way round it does not close (%v)", ring, short)
	}
	deg2 := math.Abs(regSignedArea(short))
	b := ring.Bound()
	lo, hi := math.Abs(b.Min[1]), math.Abs(b.Max[1])
	if b.Min[1] <= 0 && b.Max[1] >= 0 {
		lo, hi = 0, max(lo, hi)
	} else if lo > hi {
		lo, hi = hi, lo
	}
	var perim float64
	for i := 0; i+1 < len(ring); i++ {
		perim += math.Hypot(ring[i+1][0]-ring[i][0], ring[i+1][1]-ring[i][1])
	}
	ws := Coverage(s, orb.MultiPolygon{{ring}})
	var km2 float64
	for _, w := range ws {
		km2 += w.Frac * s.CellAreaKm2(w.Cell/s.Cols)
	}
	// Slack: float noise, coordinates snapped to cell edges within 1e-7
	// cells, and shares under 1e-12 of a cell dropped.
	slack := 1e-9*deg2*kmPerDeg2(lo) + (2e-7*perim+1e-11*float64(len(ws)+4))*kmPerDeg2(lo)
	min, max := deg2*kmPerDeg2(hi)-slack, deg2*kmPerDeg2(lo)+slack
	if km2 < min || km2 > max {
		t.Fatalf("ring %v: area %.9g km2, want %.9g to %.9g (shoelace %.9g square degrees between latitudes %g and %g)", ring, km2, min, max, deg2, b.Min[1], b.Max[1])
	}
}
