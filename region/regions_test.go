package region

import (
	"drygrid/grid"
	"encoding/json"
	"errors"
	"strings"
	"testing"
)

const sqCCW = `[[0,0],[2,0],[2,1],[0,1],[0,0]]`
const sqCW = `[[0,0],[0,1],[2,1],[2,0],[0,0]]`

func fc(features ...string) string {
	return `{"type":"FeatureCollection","features":[` + strings.Join(features, ",") + `]}`
}

func feat(idMember, props, geom string) string {
	s := `{"type":"Feature",`
	if idMember != "" {
		s += `"id":` + idMember + `,`
	}
	return s + `"properties":` + props + `,"geometry":` + geom + `}`
}

func poly(rings ...string) string {
	return `{"type":"Polygon","coordinates":[` + strings.Join(rings, ",") + `]}`
}

// TestParseRegionsErrors: every bad input is refused with a message naming
// the file, the feature's index and key (errors carry their context).
func TestParseRegionsErrors(t *testing.T) {
	ok := feat(`"a"`, `{}`, poly(sqCCW))
	cases := []struct{ name, in, want string }{
		{"not json", `{`, `regions f.geojson: not GeoJSON: unexpected end of JSON input`},
		{"no type", `{}`, `regions f.geojson: no GeoJSON "type" member`},
		{"point type", `{"type":"Point","coordinates":[0,0]}`, `regions f.geojson: GeoJSON type "Point" is not a FeatureCollection, Feature, Polygon or MultiPolygon`},
		{"empty", fc(), `regions f.geojson: the FeatureCollection has no features`},
		{"no geometry", fc(ok, feat(`"b"`, `{}`, `null`)), `regions f.geojson feature 1 (key "b"): no geometry`},
		{"line", fc(feat(`"b"`, `{}`, `{"type":"LineString","coordinates":[[0,0],[1,1]]}`)), `regions f.geojson feature 0 (key "b"): geometry is a LineString, not a Polygon or MultiPolygon`},
		{"unclosed ring", fc(ok, feat(``, `{"id":"south"}`, poly(sqCCW)), feat(``, `{"name":"north"}`, poly(`[[0,0],[1,0],[1,1],[0,1],[0,0.5]]`))), `regions f.geojson feature 2 (key "north"): ring 0 is not closed`},
		{"hole unclosed", fc(feat(`7`, `{}`, poly(sqCCW, `[[0.5,0.2],[0.5,0.8],[0.8,0.8],[0.5,0.2],[0.6,0.2]]`))), `regions f.geojson feature 0 (key "7"): ring 1 is not closed`},
		{"hole outside", fc(feat(`"h"`, `{}`, poly(sqCCW, `[[0.5,0.2],[2.5,0.2],[0.5,0.8],[0.5,0.2]]`))), `regions f.geojson feature 0 (key "h"): ring 1 (a hole) has position 1 outside the exterior ring`},
		{"bowtie", fc(feat(`"x"`, `{}`, poly(`[[0,0],[1,1],[1,0],[0,1],[0,0]]`))), `regions f.geojson feature 0 (key "x"): ring 0 intersects itself (edges 0 and 2)`},
		{"touching", fc(feat(`"x"`, `{}`, poly(`[[0,0],[2,0],[1,1],[2,2],[0,2],[1,1],[0,0]]`))), `regions f.geojson feature 0 (key "x"): ring 0 intersects itself (edges 1 and 4)`},
		{"spike", fc(feat(`"x"`, `{}`, poly(`[[0,0],[2,0],[2,1],[2,0.5],[0,1],[0,0]]`))), `regions f.geojson feature 0 (key "x"): ring 0 intersects itself (edges 1 and 3)`},
		{"short", fc(feat(`"x"`, `{}`, poly(`[[0,0],[1,0],[0,0]]`))), `regions f.geojson feature 0 (key "x"): ring 0 has 3 positions; a ring needs at least 4 (3 corners and the closing position)`},
		{"flat", fc(feat(`"x"`, `{}`, poly(`[[0,0],[1,0],[2,0],[0,0]]`))), `regions f.geojson feature 0 (key "x"): ring 0 intersects itself (edges 0 and 2)`},
		{"lat", fc(feat(`"x"`, `{}`, poly(`[[0,0],[1,0],[1,91],[0,0]]`))), `regions f.geojson feature 0 (key "x"): ring 0 position 2 has latitude 91 outside [-90, 90]`},
		{"lon", fc(feat(`"x"`, `{}`, poly(`[[0,0],[400,0],[1,1],[0,0]]`))), `regions f.geojson feature 0 (key "x"): ring 0 position 1 has longitude 400 outside [-360, 360]`},
		{"multi", fc(feat(`"m"`, `{}`, `{"type":"MultiPolygon","coordinates":[[`+sqCCW+`],[[[5,5],[6,5],[6,6],[5,6]]]]}`)), `regions f.geojson feature 0 (key "m"): polygon 1 ring 0 is not closed`},
		{"no key", fc(feat(``, `{"label":"a"}`, poly(sqCCW))), `regions f.geojson feature 0: no "id" member or property and no "name" property to name the region (set --region-key)`},
		{"no custom key", fc(feat(`"a"`, `{"name":"a"}`, poly(sqCCW))), "regions f.geojson feature 0: no \"district\" member or property to name the region"},
		{"bad key type", fc(feat(`"a"`, `{"district":true}`, poly(sqCCW))), `regions f.geojson feature 0: property "district" is a boolean (true), not a name (a string or number); name the property that holds the region's name with --region-key`},
		{"dup", fc(feat(`"a"`, `{}`, poly(sqCCW)), feat(``, `{"id":"a"}`, poly(sqCW))), `regions f.geojson feature 1 (key "a"): the key is also used by feature 0`},
		{"not feature", fc(`{"type":"Polygon","coordinates":[]}`), `regions f.geojson feature 0 is a "Polygon", not a "Feature" (the members of "features" are {"type":"Feature","properties":{...},"geometry":{...}})`},
		// Positions: each is two numbers (a third, the elevation, ignored);
		// nothing else may stand for one, where a decoder into [2]float64
		// would read 0, 0.
		{"null position", fc(feat(`"a"`, `{}`, poly(`[[0,0],[2,0],[null,null],[0,1],[0,0]]`))), `regions f.geojson feature 0 (key "a"): ring 0 position 2 is [null,null]: coordinate 0 is null, not a number; ` + regPosHint},
		{"empty position", fc(feat(`"a"`, `{}`, poly(sqCCW, `[[0.5,0.2],[ ],[0.8,0.8],[0.5,0.2]]`))), `regions f.geojson feature 0 (key "a"): ring 1 position 1 is [], with no numbers: ` + regPosHint},
		{"one number", fc(feat(`"a"`, `{}`, poly(`[[0,0],[2],[2,1],[0,1],[0,0]]`))), `regions f.geojson feature 0 (key "a"): ring 0 position 1 is [2], with one number: ` + regPosHint},
		{"four numbers", fc(feat(`"a"`, `{}`, poly(`[[0,0,1,2],[2,0],[2,1],[0,1],[0,0]]`))), `regions f.geojson feature 0 (key "a"): ring 0 position 0 is [0,0,1,2], with 4 numbers: ` + regPosHint},
		{"string coordinate", fc(feat(`"a"`, `{}`, poly(`[[0,0],[2,0],[2,"1"],[0,1],[0,0]]`))), `regions f.geojson feature 0 (key "a"): ring 0 position 2 is [2,"1"]: coordinate 1 is a string, not a number; ` + regPosHint},
		{"huge coordinate", fc(feat(`"a"`, `{}`, poly(`[[0,0],[2,0],[2,1e400],[0,1],[0,0]]`))), `regions f.geojson feature 0 (key "a"): ring 0 position 2 is [2,1e400]: coordinate 1 is not a finite number`},
		{"flat ring", fc(feat(`"a"`, `{}`, `{"type":"Polygon","coordinates":[[0,0,2,0,2,1,0,0]]}`)), `regions f.geojson feature 0 (key "a"): ring 0 position 0 is a number, not a position: ` + regPosHint + ` (a Polygon's coordinates are an array of rings, each an array of positions)`},
		{"ring not array", fc(feat(`"a"`, `{}`, `{"type":"MultiPolygon","coordinates":[[`+sqCCW+`],[{"x":1}]]}`)), `regions f.geojson feature 0 (key "a"): polygon 1 ring 0 is an object, not an array of positions`},
		{"coordinates not array", fc(feat(`"a"`, `{}`, `{"type":"Polygon","coordinates":"0 0 1 1"}`)), `regions f.geojson feature 0 (key "a"): "coordinates" is a string, not an array of rings`},
		{"no coordinates", fc(feat(`"a"`, `{}`, `{"type":"Polygon"}`)), `regions f.geojson feature 0 (key "a"): the Polygon has no "coordinates" member`},
		{"long position", fc(feat(`"a"`, `{}`, poly(`[[0,0],["`+strings.Repeat("x", 5000)+`"],[2,1],[0,1],[0,0]]`))), `regions f.geojson feature 0 (key "a"): ring 0 position 1 is ["xxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxx..., with one number: ` + regPosHint},
		// An edge over 180 degrees of longitude is refused (RFC 7946
		// section 3.1.9 asks for a split at the antimeridian instead).
		{"antimeridian jump", fc(feat(`"fiji"`, `{}`, poly(`[[179.5,-17],[-179.5,-17],[-179.5,-16],[179.5,-16],[179.5,-17]]`))), `regions f.geojson feature 0 (key "fiji"): ring 0 jumps across the antimeridian from position 0 (179.5, -17) to position 1 (-179.5, -17): an edge spanning more than 180 degrees of longitude would be taken the long way round the Earth; split the ring at 180 degrees into two polygons (RFC 7946 section 3.1.9), or let longitudes run past 180 (e.g. 180.5)`},
		{"wide edge", fc(feat(`"w"`, `{}`, poly(`[[-100,0],[100,0],[100,1],[-100,1],[-100,0]]`))), `regions f.geojson feature 0 (key "w"): ring 0 jumps across the antimeridian from position 0 (-100, 0) to position 1 (100, 0): an edge spanning more than 180 degrees of longitude would be taken the long way round the Earth; split the ring at 180 degrees into two polygons (RFC 7946 section 3.1.9), or let longitudes run past 180 (e.g. -260)`},
		{"wider than the Earth", fc(feat(`"w"`, `{}`, poly(`[[-300,0],[-150,0],[0,0],[150,0],[300,0],[300,1],[150,1],[0,1],[-150,1],[-300,1],[-300,0]]`))), `regions f.geojson feature 0 (key "w"): ring 0 spans 600 degrees of longitude (-300 to 300), more than once round the Earth`},
		// Clear words for JSON of the wrong shape, and no Go type names.
		{"top-level array", `[` + feat(`"a"`, `{}`, poly(sqCCW)) + `]`, `regions f.geojson: the file holds an array, not a GeoJSON object (a FeatureCollection, Feature, Polygon or MultiPolygon); to give several regions, wrap the features as {"type":"FeatureCollection","features":[...]}`},
		{"top-level number", `42`, `regions f.geojson: the file holds a number, not a GeoJSON object (a FeatureCollection, Feature, Polygon or MultiPolygon)`},
		{"type not string", `{"type":7}`, `regions f.geojson: "type" is a number, not a string`},
		{"features object", `{"type":"FeatureCollection","features":{"a":1}}`, `regions f.geojson: "features" is an object, not an array of Features`},
		{"feature string", fc(`"a"`), `regions f.geojson feature 0 is a string, not a Feature object`},
		{"null feature", fc(ok, `null`), `regions f.geojson feature 1 is null, not a Feature object`},
		{"feature no type", fc(`{"geometry":null}`), `regions f.geojson feature 0: no "type" member (want "Feature")`},
		{"properties array", fc(feat(`"a"`, `[1]`, poly(sqCCW))), `regions f.geojson feature 0: "properties" is an array, not an object`},
		{"geometry string", fc(feat(`"a"`, `{}`, `"POLYGON((0 0,1 0,1 1,0 0))"`)), `regions f.geojson feature 0 (key "a"): the geometry is a string, not a GeoJSON geometry object`},
		{"unknown geometry", fc(feat(`"a"`, `{}`, `{"type":"Circle","coordinates":[0,0]}`)), `regions f.geojson feature 0 (key "a"): geometry type "Circle" is not a Polygon or MultiPolygon`},
		{"object key", fc(feat(``, `{"name":{"en":"North","fr":"Nord"}}`, poly(sqCCW))), `regions f.geojson feature 0: property "name" is an object, not a name (a string or number); name the property that holds the region's name with --region-key`},
		{"array id", fc(feat(`["a"]`, `{}`, poly(sqCCW))), `regions f.geojson feature 0: the "id" member is an array, not a name (a string or number); name the property that holds the region's name with --region-key`},
	}
	for _, c := range cases {
		key := ""
		if strings.Contains(c.name, "custom key") || strings.Contains(c.name, "key type") {
			key = "district"
		}
		_, err := ParseRegions("f.geojson", []byte(c.in), key)
		if err == nil || err.Error() != c.want {
			t.Errorf("%s: error\n got %v\nwant %s", c.name, err, c.want)
		}
		for _, goName := range []string{"interface {", "float64", "map[", "Go value", " geojson:", "orb."} {
			if err != nil && strings.Contains(err.Error(), goName) {
				t.Errorf("%s: the message shows a Go name (%s): %v", c.name, goName, err)
			}
		}
	}
}

// TestParseRegionsForms: RFC 7946 allows a FeatureCollection, a Feature or a
// bare geometry; the key comes from the id member, the id property or name.
func TestParseRegionsForms(t *testing.T) {
	in := fc(
		feat(`"east"`, `{"name":"ignored"}`, poly(sqCCW)),
		feat(`12`, `{}`, poly(sqCW)),
		feat(``, `{"id":"p-id"}`, poly(sqCCW)),
		feat(``, `{"name":"by name"}`, `{"type":"MultiPolygon","coordinates":[[`+sqCW+`]]}`),
	)
	rs, err := ParseRegions("f", []byte(in), "")
	if err != nil {
		t.Fatal(err)
	}
	want := []string{"east", "12", "p-id", "by name"}
	for i, r := range rs {
		if r.Key != want[i] || r.Index != i {
			t.Errorf("feature %d: key %q index %d, want %q %d", i, r.Key, r.Index, want[i], i)
		}
		// Either input winding ends as a CCW exterior (shoelace area > 0).
		if a := regSignedArea(r.Geom[0][0]); a != 2 {
			t.Errorf("feature %d: exterior signed area %g, want +2 (CCW)", i, a)
		}
	}
	rs, err = ParseRegions("f", []byte(fc(feat(`"east"`, `{"name":"ignored"}`, poly(sqCCW)))), "name")
	if err != nil || rs[0].Key != "ignored" {
		t.Fatalf("--region-key name: %v %v", rs, err)
	}
	one, err := ParseRegions("f", []byte(feat(`"solo"`, `{}`, poly(sqCW, `[[0.5,0.2],[1.5,0.2],[1.5,0.8],[0.5,0.8],[0.5,0.2]]`))), "")
	if err != nil || len(one) != 1 || one[0].Key != "solo" {
		t.Fatalf("single feature: %v %v", one, err)
	}
	if a := regSignedArea(one[0].Geom[0][1]); a >= 0 {
		t.Errorf("hole signed area %g, want negative (CW)", a)
	}
	bare, err := ParseRegions("f", []byte(poly(sqCCW)), "")
	if err != nil || len(bare) != 1 || bare[0].Key != "region" {
		t.Fatalf("bare geometry: %v %v", bare, err)
	}
}

// TestParseRegionsBOM: a UTF-8 byte-order mark before the JSON is skipped
// (RFC 8259 section 8.1 lets parsers ignore it), and a syntax error after it
// keeps its byte offset in the file as written.
func TestParseRegionsBOM(t *testing.T) {
	in := fc(feat(`"a"`, `{}`, poly(sqCCW)), feat(`"b"`, `{}`, poly(sqCW)))
	plain, err := ParseRegions("f", []byte(in), "")
	if err != nil {
		t.Fatal(err)
	}
	bom, err := ParseRegions("f", []byte("\ufeff"+in), "")
	if err != nil {
		t.Fatalf("with a byte-order mark: %v", err)
	}
	if len(bom) != 2 || bom[0].Key != plain[0].Key || bom[1].Key != plain[1].Key || !bom[1].Geom.Equal(plain[1].Geom) {
		t.Errorf("with a byte-order mark: %+v, without: %+v", bom, plain)
	}
	bad := "\ufeff" + `{"type":x}`
	_, err = ParseRegions("f", []byte(bad), "")
	var se *json.SyntaxError
	if !errors.As(err, &se) || se.Offset != int64(strings.Index(bad, "x")+1) {
		t.Errorf("syntax error after the mark: %v, want a json.SyntaxError at byte %d", err, strings.Index(bad, "x")+1)
	}
}

// TestParseRegionsPoleEdge: an edge along a pole (latitude -90 from 180 to
// -180, as Antarctica is drawn in Natural Earth) spans 360 degrees of
// longitude but has no length, and is accepted.
func TestParseRegionsPoleEdge(t *testing.T) {
	in := feat(`"aq"`, `{}`, poly(`[[-180,-90],[-180,-70],[0,-65],[180,-70],[180,-90],[-180,-90]]`))
	if _, err := ParseRegions("f", []byte(in), ""); err != nil {
		t.Errorf("polar cap: %v", err)
	}
}

func TestReadRegionsFile(t *testing.T) {
	rs, err := ReadRegions("../testdata/regions/districts.geojson", "")
	if err != nil {
		t.Fatal(err)
	}
	if len(rs) != 4 {
		t.Fatalf("%d regions, want 4", len(rs))
	}
	if _, err := ReadRegions("../testdata/regions/missing.geojson", ""); err == nil || !strings.HasPrefix(err.Error(), "regions ../testdata/regions/missing.geojson: open") {
		t.Errorf("missing file: %v", err)
	}
}

func FuzzParseRegions(f *testing.F) {
	f.Add([]byte(fc(feat(`"a"`, `{}`, poly(sqCCW)))), "")
	f.Add([]byte(fc(feat(``, `{"name":"b"}`, poly(sqCW, `[[0.5,0.2],[0.5,0.8],[0.8,0.8],[0.5,0.2]]`)))), "name")
	f.Add([]byte(poly(`[[0,0],[1,1],[1,0],[0,1],[0,0]]`)), "id")
	f.Add([]byte(`{"type":"MultiPolygon","coordinates":[[[[170,0],[190,0],[190,5],[170,0]]]]}`), "")
	f.Fuzz(func(t *testing.T, data []byte, key string) {
		rs, err := ParseRegions("fuzz", data, key)
		if err != nil {
			return
		}
		s, _ := grid.NewSpec(-180, -90, 180, 90, 5)
		for _, r := range rs {
			for _, p := range r.Geom {
				if regSignedArea(p[0]) <= 0 {
					t.Fatalf("exterior not CCW: %v", p[0])
				}
			}
			for _, w := range Coverage(s, r.Geom) {
				if w.Frac <= 0 || w.Frac > 1 || w.Cell < 0 || w.Cell >= s.Len() {
					t.Fatalf("bad weight %+v", w)
				}
			}
		}
	})
}
