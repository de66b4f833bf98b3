package geojson

import (
	"bytes"
	"encoding/json"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"drygrid/bands"
)

// gjAwkwardIDs are station ids that exercise encoding/json's escaping:
// quotes and backslashes, every kind of control character, HTML's <, >
// and &, U+2028 and U+2029, invalid UTF-8, multi-byte text and DEL.
var gjAwkwardIDs = []string{
	"", "S-001", `say "hi"`, `back\slash`, "tab\there", "nl\nx\r\b\f", "\x00\x01\x1f\x7f",
	"<script>&amp;</script>", "Zürich", "東京", "emoji 🌵", "line\u2028para\u2029",
	"bad \xff\xfe utf8", "cut \xe6\x9d", "\xc0\xaf", "\ufffd", "a\u0085b", strings.Repeat("é", 40),
}

// gjRandomValue is a float64 of a kind that matters to encoding/json's
// formatting: ordinary, tiny and huge ('e' form), the cut-offs, zeros of
// either sign, integers, NaN and infinities.
func gjRandomValue(rng *rand.Rand) float64 {
	switch rng.IntN(14) {
	case 0:
		return math.NaN()
	case 1:
		return math.Inf(1 - 2*rng.IntN(2))
	case 2:
		return math.Copysign(0, -1)
	case 3:
		return 0
	case 4:
		return (rng.Float64() - 0.5) * 1e-6 // below the 'e' cut-off
	case 5:
		return []float64{1e-6, -1e-6, 1e21, -1e21, 9.999999999999999e20, 5e-324, math.MaxFloat64, 1e-7, 1.5e-10}[rng.IntN(9)]
	case 6:
		return float64(rng.IntN(2000) - 1000)
	case 7:
		return math.Float64frombits(rng.Uint64()) // any bit pattern
	default:
		return rng.NormFloat64() * math.Pow(10, float64(rng.IntN(7)-3))
	}
}

// gjRandomStations invents n stations with awkward ids, values and
// positions: longitudes past ±180 (and exactly ±180, ±540), negative
// zeros, NaN values, HasZ false, code 0 and codes the scheme lacks.
func gjRandomStations(rng *rand.Rand, n int) []Station {
	pts := make([]Station, n)
	for i := range pts {
		p := Station{ID: gjAwkwardIDs[rng.IntN(len(gjAwkwardIDs))], HasZ: rng.IntN(3) != 0, InGrid: rng.IntN(2) == 0}
		if rng.IntN(4) == 0 {
			p.ID = string(rune(rng.IntN(0x11000))) + p.ID + string([]byte{byte(rng.IntN(256))})
		}
		switch rng.IntN(6) {
		case 0:
			p.Lon = []float64{180, -180, 540, -540, 360, 180.5, -180.25, 719.9, math.Copysign(0, -1), 1e-9}[rng.IntN(10)]
		case 1:
			p.Lon = rng.Float64()*1440 - 720
		default:
			p.Lon = rng.Float64()*360 - 180
		}
		switch rng.IntN(5) {
		case 0:
			p.Lat = []float64{90, -90, 0, math.Copysign(0, -1), 1e-7}[rng.IntN(5)]
		default:
			p.Lat = rng.Float64()*180 - 90
		}
		p.Value, p.Z = gjRandomValue(rng), gjRandomValue(rng)
		switch rng.IntN(4) {
		case 0:
			p.Code = 0
		case 1:
			p.Code = uint8(rng.IntN(256)) // often one the scheme lacks
		default:
			p.Code = uint8(1 + rng.IntN(9))
		}
		pts[i] = p
	}
	return pts
}

// TestEncodeStationsSameBytes: the streaming encoder writes byte for byte
// what the orb Feature encoder wrote (gjOracleEncodeStations), on random
// stations with awkward ids and values, with the default scheme and none,
// with and without the optional foreign members, for no station, one
// station and many; a collection whose only points are negative zeros
// keeps the bbox's signs as orb.Bound had them.
func TestEncodeStationsSameBytes(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	opts := []Options{{}, {Params: map[string]any{"kind": "spi", "power": 2.0}, Date: "2026-11-30", WindowDays: 30, Kind: "spi", Caution: "<b>&</b>"}}
	cases := [][]Station{nil, {{ID: "one", Lon: 190, Lat: -10, Value: 35}},
		{{Lon: math.Copysign(0, -1), Lat: math.Copysign(0, -1)}, {Lon: 0, Lat: 0}, {Lon: math.Copysign(0, -1), Lat: 1}},
		{{Lon: 0, Lat: 0}, {Lon: math.Copysign(0, -1), Lat: math.Copysign(0, -1)}, {Lon: -1, Lat: 0}},
	}
	for range 40 {
		cases = append(cases, gjRandomStations(rng, 1+rng.IntN(300)))
	}
	for ci, pts := range cases {
		for oi, opt := range opts {
			for _, s := range []*bands.Scheme{bands.Default(), nil} {
				var got, want bytes.Buffer
				errGot := EncodeStations(&got, pts, s, opt)
				errWant := gjOracleEncodeStations(&want, pts, s, opt)
				if errGot != nil || errWant != nil {
					t.Fatalf("case %d, options %d: errors %v, %v", ci, oi, errGot, errWant)
				}
				if !bytes.Equal(got.Bytes(), want.Bytes()) {
					g, w := got.Bytes(), want.Bytes()
					i := 0
					for i < len(g) && i < len(w) && g[i] == w[i] {
						i++
					}
					t.Fatalf("case %d, options %d, scheme %v: bytes differ at %d:\n got %q\nwant %q", ci, oi, s != nil,
						i, g[max(0, i-80):min(len(g), i+80)], w[max(0, i-80):min(len(w), i+80)])
				}
				if len(pts) > 0 && !json.Valid(got.Bytes()) {
					t.Fatalf("case %d: not JSON", ci)
				}
			}
		}
	}
}

// TestEncodeStationsBadPositionWritesNothing: a station at a position that
// is no longitude, latitude fails with its number and id, as before, and
// nothing reaches w.
func TestEncodeStationsBadPositionWritesNothing(t *testing.T) {
	for _, p := range []Station{{ID: "A", Lon: math.NaN()}, {ID: "B", Lon: math.Inf(1)}, {ID: "C", Lat: 90.5}, {ID: "D", Lat: math.NaN()}} {
		var b bytes.Buffer
		pts := []Station{{ID: "ok", Lon: 1, Lat: 2}, p}
		err := EncodeStations(&b, pts, bands.Default(), Options{})
		want := gjOracleEncodeStations(&bytes.Buffer{}, pts, bands.Default(), Options{})
		if err == nil || want == nil || err.Error() != want.Error() || !strings.Contains(err.Error(), `station 2 ("`+p.ID+`")`) {
			t.Errorf("%s: err %v, want %v", p.ID, err, want)
		}
		if b.Len() != 0 {
			t.Errorf("%s: %d bytes written", p.ID, b.Len())
		}
	}
}

// TestGJAppendStringAsJSON: gjAppendString quotes as json.Marshal does,
// for every single byte, every awkward id, and random byte strings (most
// of them invalid UTF-8).
func TestGJAppendStringAsJSON(t *testing.T) {
	var in []string
	for c := range 256 {
		in = append(in, string([]byte{byte(c)}), "a"+string([]byte{byte(c)})+"z")
	}
	in = append(in, gjAwkwardIDs...)
	rng := rand.New(rand.NewPCG(9, 1))
	for range 5000 {
		b := make([]byte, rng.IntN(12))
		for i := range b {
			b[i] = byte(rng.IntN(256))
		}
		in = append(in, string(b))
	}
	for r := rune(0); r < 0x11000; r += 7 {
		in = append(in, string(r))
	}
	for _, s := range in {
		want, _ := json.Marshal(s)
		if got := gjAppendString(nil, s); !bytes.Equal(got, want) {
			t.Errorf("%q: got %s, want %s", s, got, want)
		}
	}
}

// TestGJAppendFloatAsJSON: gjAppendFloat formats as json.Marshal does a
// float64, around the 'e' cut-offs, for zeros of both signs, subnormals
// and random bit patterns.
func TestGJAppendFloatAsJSON(t *testing.T) {
	in := []float64{0, math.Copysign(0, -1), 1, -1, 1e-6, math.Nextafter(1e-6, 0), 1e21, math.Nextafter(1e21, 0),
		-1e21, 1e-7, 1e-10, 1.5e-100, 5e-324, math.MaxFloat64, -math.SmallestNonzeroFloat64, 123456789012345678, 0.1, 1e20, 1e300}
	rng := rand.New(rand.NewPCG(2, 8))
	for len(in) < 20000 {
		if v := math.Float64frombits(rng.Uint64()); gjFinite(v) {
			in = append(in, v)
		}
		in = append(in, rng.NormFloat64()*math.Pow(10, float64(rng.IntN(50)-25)))
	}
	for _, v := range in {
		want, _ := json.Marshal(v)
		if got := gjAppendFloat(nil, v); !bytes.Equal(got, want) {
			t.Errorf("%v: got %s, want %s", v, got, want)
		}
	}
}
