package region

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"sort"
	"strconv"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
)

// Region is one named area read from GeoJSON: a district, basin or county.
//
// Geom is normalised for area work: every exterior ring runs
// counter-clockwise and every hole clockwise, whatever the input winding
// (RFC 7946 asks for that order but readers must accept either). Rings keep
// their closing position.
type Region struct {
	Key   string           // the region's name, from the key member or property
	Index int              // 0-based position of the feature in the file
	Geom  orb.MultiPolygon // the geometry, exteriors CCW, holes CW
	Props map[string]any   // the feature's properties (nil for a bare geometry)
}

// regionMaxPositions bounds the size of one ring so that validation (a sweep
// over edge pairs) stays affordable on hostile input.
const regionMaxPositions = 1 << 22

// ReadRegions reads the regions of a GeoJSON file; see ParseRegions.
func ReadRegions(path, key string) ([]Region, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("regions %s: %w", path, err)
	}
	return ParseRegions(path, data, key)
}

// ParseRegions reads regions from GeoJSON: a FeatureCollection, a single
// Feature or a bare Polygon/MultiPolygon geometry. name is used in errors.
//
// The region's name comes from key: the feature's "id" member when key is
// "id" and the member is present, otherwise the property named key. An empty
// key means "id" and then the "name" property. A bare geometry is named
// "region". Numbers are written in their shortest form (7, 2.5).
//
// Each feature must hold a Polygon or MultiPolygon with closed rings of at
// least four positions, no ring may cross or touch itself, latitudes must lie
// in [-90, 90] and longitudes in [-360, 360]; keys must be unique. Errors name
// the feature by its 0-based index and key, e.g.
// `regions FILE feature 3 (key "north"): polygon 0 ring 1 is not closed`.
//
// Longitudes beyond 180 (a region drawn across the antimeridian as one
// piece, e.g. 170 to 190) and features split at the antimeridian are both
// accepted; Coverage maps each onto the grid (see there).
func ParseRegions(name string, data []byte, key string) ([]Region, error) {
	var head struct {
		Type     string            `json:"type"`
		Features []json.RawMessage `json:"features"`
	}
	if err := json.Unmarshal(data, &head); err != nil {
		return nil, fmt.Errorf("regions %s: not GeoJSON: %w", name, err)
	}
	var out []Region
	switch head.Type {
	case "FeatureCollection":
		if len(head.Features) == 0 {
			return nil, fmt.Errorf("regions %s: the FeatureCollection has no features", name)
		}
		for i, raw := range head.Features {
			r, err := regParseFeature(name, i, raw, key)
			if err != nil {
				return nil, err
			}
			out = append(out, r)
		}
	case "Feature":
		r, err := regParseFeature(name, 0, data, key)
		if err != nil {
			return nil, err
		}
		out = append(out, r)
	case "Polygon", "MultiPolygon":
		g, err := geojson.UnmarshalGeometry(data)
		if err != nil {
			return nil, fmt.Errorf("regions %s: %w", name, err)
		}
		r := Region{Key: "region", Index: 0}
		if r.Geom, err = regNormalise(g.Geometry()); err != nil {
			return nil, fmt.Errorf("regions %s geometry: %w", name, err)
		}
		out = append(out, r)
	case "":
		return nil, fmt.Errorf("regions %s: no GeoJSON \"type\" member", name)
	default:
		return nil, fmt.Errorf("regions %s: GeoJSON type %q is not a FeatureCollection, Feature, Polygon or MultiPolygon", name, head.Type)
	}
	seen := make(map[string]int, len(out))
	for _, r := range out {
		if j, dup := seen[r.Key]; dup {
			return nil, fmt.Errorf("regions %s feature %d (key %q): the key is also used by feature %d", name, r.Index, r.Key, j)
		}
		seen[r.Key] = r.Index
	}
	return out, nil
}

func regParseFeature(name string, i int, raw []byte, key string) (Region, error) {
	f, err := geojson.UnmarshalFeature(raw)
	if err != nil {
		return Region{}, fmt.Errorf("regions %s feature %d: %w", name, i, err)
	}
	if f == nil {
		return Region{}, fmt.Errorf("regions %s feature %d: null feature", name, i)
	}
	k, err := regKey(f, key)
	if err != nil {
		return Region{}, fmt.Errorf("regions %s feature %d: %w", name, i, err)
	}
	r := Region{Key: k, Index: i, Props: map[string]any(f.Properties)}
	if f.Geometry == nil {
		return Region{}, fmt.Errorf("regions %s feature %d (key %q): no geometry", name, i, k)
	}
	if r.Geom, err = regNormalise(f.Geometry); err != nil {
		return Region{}, fmt.Errorf("regions %s feature %d (key %q): %w", name, i, k, err)
	}
	return r, nil
}

func regKey(f *geojson.Feature, key string) (string, error) {
	try := []string{key}
	if key == "" {
		try = []string{"id", "name"}
	}
	for _, k := range try {
		var v any
		if k == "id" && f.ID != nil {
			v = f.ID
		} else if p, ok := f.Properties[k]; ok && p != nil {
			v = p
		} else {
			continue
		}
		s, ok := regKeyString(v)
		if !ok {
			return "", fmt.Errorf("key %q is a %T, not a string or number", k, v)
		}
		if s == "" {
			return "", fmt.Errorf("key %q is empty", k)
		}
		return s, nil
	}
	if key == "" {
		return "", errors.New(`no "id" member or property and no "name" property to name the region (set --region-key)`)
	}
	return "", fmt.Errorf("no %q member or property to name the region", key)
}

func regKeyString(v any) (string, bool) {
	switch x := v.(type) {
	case string:
		return x, true
	case float64:
		return strconv.FormatFloat(x, 'f', -1, 64), true
	case json.Number:
		return x.String(), true
	}
	return "", false
}

// regNormalise checks a Polygon or MultiPolygon and orients its rings.
func regNormalise(g orb.Geometry) (orb.MultiPolygon, error) {
	var mp orb.MultiPolygon
	switch x := g.(type) {
	case orb.Polygon:
		mp = orb.MultiPolygon{x}
	case orb.MultiPolygon:
		mp = x
	case nil:
		return nil, errors.New("no geometry")
	default:
		return nil, fmt.Errorf("geometry is a %s, not a Polygon or MultiPolygon", g.GeoJSONType())
	}
	if len(mp) == 0 {
		return nil, errors.New("the geometry has no polygons")
	}
	out := make(orb.MultiPolygon, 0, len(mp))
	for pi, p := range mp {
		if len(p) == 0 {
			return nil, fmt.Errorf("polygon %d has no rings", pi)
		}
		np := make(orb.Polygon, 0, len(p))
		for ri, ring := range p {
			if err := regCheckRing(ring); err != nil {
				if len(mp) == 1 {
					return nil, fmt.Errorf("ring %d %w", ri, err)
				}
				return nil, fmt.Errorf("polygon %d ring %d %w", pi, ri, err)
			}
			ring = regDedup(ring)
			if ri > 0 {
				if k, ok := regOutside(ring, np[0]); ok {
					where := fmt.Sprintf("ring %d", ri)
					if len(mp) > 1 {
						where = fmt.Sprintf("polygon %d ring %d", pi, ri)
					}
					return nil, fmt.Errorf("%s (a hole) has position %d outside the exterior ring", where, k)
				}
			}
			a := regSignedArea(ring)
			if (ri == 0) != (a > 0) { // exterior CCW, holes CW
				ring = regReversed(ring)
			}
			np = append(np, ring)
		}
		out = append(out, np)
	}
	return out, nil
}

// regCheckRing returns an error phrase completing "ring N ...".
func regCheckRing(r orb.Ring) error {
	if len(r) > regionMaxPositions {
		return fmt.Errorf("has %d positions, more than %d", len(r), regionMaxPositions)
	}
	for i, p := range r {
		if math.IsNaN(p[0]) || math.IsNaN(p[1]) || math.IsInf(p[0], 0) || math.IsInf(p[1], 0) {
			return fmt.Errorf("position %d is not a finite number", i)
		}
		if p[1] < -90 || p[1] > 90 {
			return fmt.Errorf("position %d has latitude %g outside [-90, 90]", i, p[1])
		}
		if p[0] < -360 || p[0] > 360 {
			return fmt.Errorf("position %d has longitude %g outside [-360, 360]", i, p[0])
		}
	}
	if len(r) < 4 {
		return fmt.Errorf("has %d positions; a ring needs at least 4 (3 corners and the closing position)", len(r))
	}
	if r[0] != r[len(r)-1] {
		return errors.New("is not closed")
	}
	d := regDedup(r)
	if len(d) < 4 {
		return errors.New("has fewer than 3 distinct corners")
	}
	if i, j, ok := regSelfIntersection(d); ok {
		return fmt.Errorf("intersects itself (edges %d and %d)", i, j)
	}
	if regSignedArea(d) == 0 {
		return errors.New("encloses no area")
	}
	return nil
}

// regDedup drops consecutive repeated positions (keeping the ring closed).
func regDedup(r orb.Ring) orb.Ring {
	out := make(orb.Ring, 0, len(r))
	for i, p := range r {
		if i > 0 && p == out[len(out)-1] {
			continue
		}
		out = append(out, p)
	}
	return out
}

func regReversed(r orb.Ring) orb.Ring {
	out := make(orb.Ring, len(r))
	for i, p := range r {
		out[len(r)-1-i] = p
	}
	return out
}

// regSignedArea is the shoelace area in square degrees, positive for CCW.
func regSignedArea(r orb.Ring) float64 {
	if len(r) < 3 {
		return 0
	}
	x0, y0 := r[0][0], r[0][1]
	var s float64
	for i := 0; i+1 < len(r); i++ {
		s += (r[i][0]-x0)*(r[i+1][1]-y0) - (r[i+1][0]-x0)*(r[i][1]-y0)
	}
	return s / 2
}

// regSelfIntersection looks for two edges of a closed ring (no repeated
// consecutive positions) that cross, touch or overlap, other than
// neighbouring edges sharing their common corner. It sweeps edges sorted by
// their western end.
func regSelfIntersection(r orb.Ring) (int, int, bool) {
	n := len(r) - 1 // edges
	idx := make([]int, n)
	for i := range idx {
		idx[i] = i
	}
	minx := func(e int) float64 { return math.Min(r[e][0], r[e+1][0]) }
	maxx := func(e int) float64 { return math.Max(r[e][0], r[e+1][0]) }
	sort.Slice(idx, func(a, b int) bool { return minx(idx[a]) < minx(idx[b]) })
	for a := 0; a < n; a++ {
		e := idx[a]
		ex := maxx(e)
		eylo, eyhi := math.Min(r[e][1], r[e+1][1]), math.Max(r[e][1], r[e+1][1])
		for b := a + 1; b < n; b++ {
			f := idx[b]
			if minx(f) > ex {
				break
			}
			if math.Max(r[f][1], r[f+1][1]) < eylo || math.Min(r[f][1], r[f+1][1]) > eyhi {
				continue
			}
			i, j := min(e, f), max(e, f)
			adjacent := j == i+1 || (i == 0 && j == n-1)
			if regSegmentsMeet(r[i], r[i+1], r[j], r[j+1], adjacent, i == 0 && j == n-1) {
				return i, j, true
			}
		}
	}
	return 0, 0, false
}

// regOutside finds a position of ring strictly outside the exterior ring
// (positions on its boundary count as inside), by the crossing-number test.
func regOutside(ring, exterior orb.Ring) (int, bool) {
	for k, p := range ring {
		if !regInsideOrOn(p, exterior) {
			return k, true
		}
	}
	return 0, false
}

func regInsideOrOn(p orb.Point, r orb.Ring) bool {
	in := false
	for i := 0; i+1 < len(r); i++ {
		a, b := r[i], r[i+1]
		if regOrient(a, b, p) == 0 && regOnSegment(a, b, p) {
			return true
		}
		if (a[1] > p[1]) != (b[1] > p[1]) {
			x := a[0] + (p[1]-a[1])*(b[0]-a[0])/(b[1]-a[1])
			if p[0] < x {
				in = !in
			}
		}
	}
	return in
}

func regOrient(a, b, c orb.Point) float64 {
	return (b[0]-a[0])*(c[1]-a[1]) - (b[1]-a[1])*(c[0]-a[0])
}

func regOnSegment(a, b, p orb.Point) bool {
	return math.Min(a[0], b[0]) <= p[0] && p[0] <= math.Max(a[0], b[0]) &&
		math.Min(a[1], b[1]) <= p[1] && p[1] <= math.Max(a[1], b[1])
}

// regSegmentsMeet reports whether segments ab and cd share a point. For
// adjacent edges (b == c, or for the wrap-around pair d == a) sharing their
// corner is allowed; only a fold back along the other edge counts.
func regSegmentsMeet(a, b, c, d orb.Point, adjacent, wrap bool) bool {
	if adjacent {
		// The shared corner: b == c normally, a == d for the closing pair.
		var p, q, s orb.Point // s shared, p and q the far ends
		if wrap {
			s, p, q = a, b, c
		} else {
			s, p, q = b, a, d
		}
		if regOrient(s, p, q) != 0 {
			return false
		}
		// Collinear: they overlap when both run the same way from s.
		return (p[0]-s[0])*(q[0]-s[0])+(p[1]-s[1])*(q[1]-s[1]) > 0
	}
	o1, o2 := regOrient(a, b, c), regOrient(a, b, d)
	o3, o4 := regOrient(c, d, a), regOrient(c, d, b)
	if ((o1 > 0 && o2 < 0) || (o1 < 0 && o2 > 0)) && ((o3 > 0 && o4 < 0) || (o3 < 0 && o4 > 0)) {
		return true
	}
	return (o1 == 0 && regOnSegment(a, b, c)) || (o2 == 0 && regOnSegment(a, b, d)) ||
		(o3 == 0 && regOnSegment(c, d, a)) || (o4 == 0 && regOnSegment(c, d, b))
}

// Bound is the region's bounding box in degrees as written (longitudes may
// exceed 180).
func (r Region) Bound() orb.Bound { return r.Geom.Bound() }
