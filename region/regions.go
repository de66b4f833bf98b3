package region

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"sort"
	"strconv"
	"strings"

	"github.com/paulmach/orb"
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
// A UTF-8 byte-order mark at the start is skipped (RFC 8259 section 8.1
// lets parsers ignore it); a JSON syntax error is returned wrapping the
// *json.SyntaxError, whose offset counts from the start of data.
//
// The region's name comes from key: the feature's "id" member when key is
// "id" and the member is present, otherwise the property named key. An empty
// key means "id" and then the "name" property. A bare geometry is named
// "region". Numbers are written in their shortest form (7, 2.5).
//
// Each feature must hold a Polygon or MultiPolygon with closed rings of at
// least four positions, each position two numbers, longitude and latitude
// (a third, the elevation, is ignored); no ring may cross or touch itself,
// latitudes must lie in [-90, 90] and longitudes in [-360, 360], and no
// edge may span more than 180 degrees of longitude; keys must be unique.
// Errors name the feature by its 0-based index and key, e.g.
// `regions FILE feature 3 (key "north"): polygon 0 ring 1 is not closed`.
//
// Longitudes beyond 180 (a region drawn across the antimeridian as one
// piece, e.g. 170 to 190) and features split at the antimeridian are both
// accepted; Coverage maps each onto the grid (see there). A ring that jumps
// from 179.5 to -179.5 is refused: read literally its edge runs the long way
// round the Earth, which nobody means.
func ParseRegions(name string, data []byte, key string) ([]Region, error) {
	return parseRegions(name, data, key, false)
}

// parseRegions is ParseRegions; a mask's features (ParseMask) need no name
// and may share one.
func parseRegions(name string, data []byte, key string, mask bool) ([]Region, error) {
	if bytes.HasPrefix(data, utf8BOM) {
		// Blanks in place of the mark keep syntax error offsets true to the
		// file.
		d := make([]byte, len(data))
		copy(d, data)
		copy(d, "   ")
		data = d
	}
	var top json.RawMessage
	if err := json.Unmarshal(data, &top); err != nil {
		return nil, fmt.Errorf("regions %s: not GeoJSON: %w", name, err)
	}
	obj, err := regObject(top)
	if err != nil {
		hint := ""
		if regKind(top) == "an array" {
			hint = `; to give several regions, wrap the features as {"type":"FeatureCollection","features":[...]}`
		}
		return nil, fmt.Errorf("regions %s: the file holds %s, not a GeoJSON object (a FeatureCollection, Feature, Polygon or MultiPolygon)%s", name, regKind(top), hint)
	}
	typ, err := regType(obj)
	if err != nil {
		if _, ok := obj["type"]; !ok {
			return nil, fmt.Errorf("regions %s: no GeoJSON \"type\" member", name)
		}
		return nil, fmt.Errorf("regions %s: %w", name, err)
	}
	var out []Region
	switch typ {
	case "FeatureCollection":
		feats, ok := obj["features"]
		if ok && regKind(feats) != "an array" && regKind(feats) != "null" {
			return nil, fmt.Errorf("regions %s: \"features\" is %s, not an array of Features", name, regKind(feats))
		}
		var list []json.RawMessage
		if ok {
			_ = json.Unmarshal(feats, &list) // an array or null: cannot fail
		}
		if len(list) == 0 {
			return nil, fmt.Errorf("regions %s: the FeatureCollection has no features", name)
		}
		for i, raw := range list {
			r, err := regParseFeature(name, i, raw, key, mask)
			if err != nil {
				return nil, err
			}
			out = append(out, r)
		}
	case "Feature":
		r, err := regParseFeature(name, 0, top, key, mask)
		if err != nil {
			return nil, err
		}
		out = append(out, r)
	case "Polygon", "MultiPolygon":
		r := Region{Key: "region", Index: 0}
		g, err := regGeometry(obj, typ)
		if err == nil {
			r.Geom, err = regNormalise(g)
		}
		if err != nil {
			return nil, fmt.Errorf("regions %s geometry: %w", name, err)
		}
		out = append(out, r)
	default:
		return nil, fmt.Errorf("regions %s: GeoJSON type %q is not a FeatureCollection, Feature, Polygon or MultiPolygon", name, typ)
	}
	if mask {
		return out, nil
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

var utf8BOM = []byte{0xEF, 0xBB, 0xBF}

// regKind names the kind of a valid JSON value, as errors say it.
func regKind(raw json.RawMessage) string {
	raw = bytes.TrimLeft(raw, " \t\r\n")
	if len(raw) == 0 {
		return "nothing"
	}
	switch raw[0] {
	case '{':
		return "an object"
	case '[':
		return "an array"
	case '"':
		return "a string"
	case 't', 'f':
		return "a boolean"
	case 'n':
		return "null"
	}
	return "a number"
}

// regObject decodes a JSON object into its members (nil and an error for
// any other kind of value).
func regObject(raw json.RawMessage) (map[string]json.RawMessage, error) {
	if regKind(raw) != "an object" {
		return nil, fmt.Errorf("%s, not an object", regKind(raw))
	}
	var m map[string]json.RawMessage
	if err := json.Unmarshal(raw, &m); err != nil {
		return nil, err // not reached: the document was checked as a whole
	}
	return m, nil
}

// regType is the object's "type" member, which must be a string.
func regType(obj map[string]json.RawMessage) (string, error) {
	raw, ok := obj["type"]
	if !ok {
		return "", errors.New(`no "type" member`)
	}
	if regKind(raw) != "a string" {
		return "", fmt.Errorf(`"type" is %s, not a string`, regKind(raw))
	}
	var s string
	_ = json.Unmarshal(raw, &s)
	return s, nil
}

func regParseFeature(name string, i int, raw json.RawMessage, key string, mask bool) (Region, error) {
	obj, err := regObject(raw)
	if err != nil {
		return Region{}, fmt.Errorf("regions %s feature %d is %s, not a Feature object", name, i, regKind(raw))
	}
	typ, err := regType(obj)
	if err != nil {
		return Region{}, fmt.Errorf("regions %s feature %d: %w (want \"Feature\")", name, i, err)
	}
	if typ != "Feature" {
		return Region{}, fmt.Errorf("regions %s feature %d is a %q, not a \"Feature\" (the members of \"features\" are {\"type\":\"Feature\",\"properties\":{...},\"geometry\":{...}})", name, i, typ)
	}
	var props map[string]any
	if p, ok := obj["properties"]; ok && regKind(p) != "null" {
		if regKind(p) != "an object" {
			return Region{}, fmt.Errorf("regions %s feature %d: \"properties\" is %s, not an object", name, i, regKind(p))
		}
		if props, err = regDecodeAny[map[string]any](p); err != nil {
			return Region{}, fmt.Errorf("regions %s feature %d: %w", name, i, err)
		}
	}
	k, err := regKey(obj["id"], props, key)
	if err != nil && mask {
		k, err = "#"+strconv.Itoa(i), nil // a mask's feature needs no name
	}
	if err != nil {
		return Region{}, fmt.Errorf("regions %s feature %d: %w", name, i, err)
	}
	r := Region{Key: k, Index: i, Props: props}
	g, ok := obj["geometry"]
	if !ok || regKind(g) == "null" {
		return Region{}, fmt.Errorf("regions %s feature %d (key %q): no geometry", name, i, k)
	}
	gobj, err := regObject(g)
	if err != nil {
		return Region{}, fmt.Errorf("regions %s feature %d (key %q): the geometry is %s, not a GeoJSON geometry object", name, i, k, regKind(g))
	}
	gtyp, err := regType(gobj)
	if err != nil {
		return Region{}, fmt.Errorf("regions %s feature %d (key %q): geometry: %w", name, i, k, err)
	}
	geom, err := regGeometry(gobj, gtyp)
	if err == nil {
		r.Geom, err = regNormalise(geom)
	}
	if err != nil {
		return Region{}, fmt.Errorf("regions %s feature %d (key %q): %w", name, i, k, err)
	}
	return r, nil
}

// regDecodeAny decodes JSON keeping numbers as json.Number, so that no
// number is out of range.
func regDecodeAny[T any](raw json.RawMessage) (T, error) {
	var v T
	dec := json.NewDecoder(bytes.NewReader(raw))
	dec.UseNumber()
	err := dec.Decode(&v)
	return v, err
}

func regKey(id json.RawMessage, props map[string]any, key string) (string, error) {
	try := []string{key}
	if key == "" {
		try = []string{"id", "name"}
	}
	for _, k := range try {
		var v any
		what := fmt.Sprintf("property %q", k)
		if k == "id" && id != nil && regKind(id) != "null" {
			var err error
			if v, err = regDecodeAny[any](id); err != nil {
				return "", err
			}
			what = `the "id" member`
		} else if p, ok := props[k]; ok && p != nil {
			v = p
		} else {
			continue
		}
		s, kind := regKeyString(v)
		if kind != "" {
			return "", fmt.Errorf("%s is %s, not a name (a string or number); name the property that holds the region's name with --region-key", what, kind)
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

// regKeyString writes a key value as a name, or says what kind of value it
// is when it cannot be one.
func regKeyString(v any) (string, string) {
	switch x := v.(type) {
	case string:
		return x, ""
	case json.Number:
		if f, err := strconv.ParseFloat(string(x), 64); err == nil {
			return strconv.FormatFloat(f, 'f', -1, 64), ""
		}
		return string(x), ""
	case float64:
		return strconv.FormatFloat(x, 'f', -1, 64), ""
	case bool:
		return "", fmt.Sprintf("a boolean (%t)", x)
	case map[string]any:
		return "", "an object"
	case []any:
		return "", "an array"
	}
	return "", "not a string or number"
}

// regGeometry decodes a Polygon or MultiPolygon geometry object, checking
// the nesting of its coordinates and every position.
func regGeometry(obj map[string]json.RawMessage, typ string) (orb.Geometry, error) {
	switch typ {
	case "Polygon", "MultiPolygon":
	case "Point", "MultiPoint", "LineString", "MultiLineString", "GeometryCollection":
		return nil, fmt.Errorf("geometry is a %s, not a Polygon or MultiPolygon", typ)
	default:
		return nil, fmt.Errorf("geometry type %q is not a Polygon or MultiPolygon", typ)
	}
	coords, ok := obj["coordinates"]
	if !ok {
		return nil, fmt.Errorf("the %s has no \"coordinates\" member", typ)
	}
	if typ == "Polygon" {
		rings, err := regArray(coords, `"coordinates"`, "an array of rings")
		if err != nil {
			return nil, err
		}
		p, err := regPolygon(rings, -1)
		return p, err
	}
	polys, err := regArray(coords, `"coordinates"`, "an array of polygons")
	if err != nil {
		return nil, err
	}
	mp := make(orb.MultiPolygon, 0, len(polys))
	for pi, raw := range polys {
		pn := pi
		if len(polys) == 1 {
			pn = -1
		}
		rings, err := regArray(raw, fmt.Sprintf("polygon %d", pi), "an array of rings")
		if err != nil {
			return nil, err
		}
		p, err := regPolygon(rings, pn)
		if err != nil {
			return nil, err
		}
		mp = append(mp, p)
	}
	return mp, nil
}

// regWhere names ring ri of polygon pi ("ring 1", or "polygon 2 ring 1" when
// pi >= 0, in a MultiPolygon of several polygons).
func regWhere(pi, ri int) string {
	if pi < 0 {
		return fmt.Sprintf("ring %d", ri)
	}
	return fmt.Sprintf("polygon %d ring %d", pi, ri)
}

func regArray(raw json.RawMessage, what, want string) ([]json.RawMessage, error) {
	if k := regKind(raw); k != "an array" {
		return nil, fmt.Errorf("%s is %s, not %s", what, k, want)
	}
	var a []json.RawMessage
	_ = json.Unmarshal(raw, &a) // an array: cannot fail
	return a, nil
}

const regPosHint = "a position is [longitude, latitude], two numbers (a third, the elevation, is ignored)"

func regPolygon(rings []json.RawMessage, pi int) (orb.Polygon, error) {
	p := make(orb.Polygon, 0, len(rings))
	for ri, raw := range rings {
		where := regWhere(pi, ri)
		pos, err := regArray(raw, where, "an array of positions")
		if err != nil {
			return nil, err
		}
		if len(pos) > regionMaxPositions {
			return nil, fmt.Errorf("%s has %d positions, more than %d", where, len(pos), regionMaxPositions)
		}
		ring := make(orb.Ring, 0, len(pos))
		for k, q := range pos {
			pt, err := regPosition(q)
			if err != nil {
				return nil, fmt.Errorf("%s position %d %s", where, k, err)
			}
			ring = append(ring, pt)
		}
		p = append(p, ring)
	}
	return p, nil
}

// regPosition decodes one position; its error completes "ring R position K".
func regPosition(raw json.RawMessage) (orb.Point, error) {
	if k := regKind(raw); k != "an array" {
		if k == "a number" {
			return orb.Point{}, fmt.Errorf("is a number, not a position: %s (a Polygon's coordinates are an array of rings, each an array of positions)", regPosHint)
		}
		return orb.Point{}, fmt.Errorf("is %s, not a position: %s", k, regPosHint)
	}
	var xs []json.RawMessage
	_ = json.Unmarshal(raw, &xs)
	show := regShow(raw)
	switch {
	case len(xs) == 0:
		return orb.Point{}, fmt.Errorf("is %s, with no numbers: %s", show, regPosHint)
	case len(xs) == 1:
		return orb.Point{}, fmt.Errorf("is %s, with one number: %s", show, regPosHint)
	case len(xs) > 3:
		return orb.Point{}, fmt.Errorf("is %s, with %d numbers: %s", show, len(xs), regPosHint)
	}
	var pt orb.Point
	for c, x := range xs {
		if k := regKind(x); k != "a number" {
			return orb.Point{}, fmt.Errorf("is %s: coordinate %d is %s, not a number; %s", show, c, k, regPosHint)
		}
		v, err := strconv.ParseFloat(string(bytes.TrimSpace(x)), 64)
		if err != nil || math.IsInf(v, 0) {
			return orb.Point{}, fmt.Errorf("is %s: coordinate %d is not a finite number", show, c)
		}
		if c < 2 {
			pt[c] = v
		}
	}
	return pt, nil
}

// regShow writes a JSON value compactly for an error, cut short if long.
func regShow(raw json.RawMessage) string {
	var b bytes.Buffer
	if len(raw) > 200 || json.Compact(&b, raw) != nil {
		b.Reset()
		b.Write(raw[:min(len(raw), 200)])
	}
	s := b.String()
	if len(s) > 40 {
		s = strings.ToValidUTF8(s[:40], "") + "..."
	}
	return s
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
	for i := 0; i+1 < len(r); i++ {
		a, b := r[i], r[i+1]
		if math.Abs(b[0]-a[0]) > 180 && !(a[1] == b[1] && math.Abs(a[1]) == 90) {
			return fmt.Errorf("jumps across the antimeridian from position %d (%g, %g) to position %d (%g, %g): "+
				"an edge spanning more than 180 degrees of longitude would be taken the long way round the Earth; "+
				"split the ring at 180 degrees into two polygons (RFC 7946 section 3.1.9), or let longitudes run past 180 (e.g. %g)",
				i, a[0], a[1], i+1, b[0], b[1], regPastAntimeridian(a[0], b[0]))
		}
	}
	if b := r.Bound(); b.Max[0]-b.Min[0] > 360 {
		return fmt.Errorf("spans %g degrees of longitude (%g to %g), more than once round the Earth", b.Max[0]-b.Min[0], b.Min[0], b.Max[0])
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

// regPastAntimeridian is b written on a's side of the antimeridian
// (b +- 360), for the hint of an edge that jumps across it.
func regPastAntimeridian(a, b float64) float64 {
	if b < a {
		return b + 360
	}
	return b - 360
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

// regInsideOrOn reports whether p lies inside ring r or on its boundary, by
// the crossing number of a ray running east from p. Each test is an exact
// orientation sign (regOrient), so a position a hair's breadth inside an
// edge is inside, however thin the margin.
func regInsideOrOn(p orb.Point, r orb.Ring) bool {
	in := false
	for i := 0; i+1 < len(r); i++ {
		a, b := r[i], r[i+1]
		o := regOrient(a, b, p)
		if o == 0 && regOnSegment(a, b, p) {
			return true
		}
		// An edge crossing the ray's latitude (half-open, so a corner at
		// p's latitude counts once) crosses east of p when p is left of
		// the edge running north, or right of it running south.
		if a[1] <= p[1] && b[1] > p[1] && o > 0 {
			in = !in
		} else if b[1] <= p[1] && a[1] > p[1] && o < 0 {
			in = !in
		}
	}
	return in
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
	if o1*o2 < 0 && o3*o4 < 0 {
		return true
	}
	return (o1 == 0 && regOnSegment(a, b, c)) || (o2 == 0 && regOnSegment(a, b, d)) ||
		(o3 == 0 && regOnSegment(c, d, a)) || (o4 == 0 && regOnSegment(c, d, b))
}

// Bound is the region's bounding box in degrees as written (longitudes may
// exceed 180).
func (r Region) Bound() orb.Bound { return r.Geom.Bound() }
