package page

import (
	"bytes"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"

	"drygrid/bands"
	"drygrid/internal/layertest"
	"drygrid/layer"
	"drygrid/layer/geojson"
)

// pageRandomStations invents n stations over the fixture's grid and a
// little around it (a fixed seed; a quarter in a tight cluster, a few at
// the same spot), as a run gives them to geojson.EncodeStations. On a grid
// crossing the antimeridian half the longitudes east of it are given past
// 180 and half brought into [-180, 180], as station tables hold either.
func pageRandomStations(f *layertest.Fixture, n int, seed uint64) []geojson.Station {
	rng := rand.New(rand.NewPCG(seed, 21))
	s, scheme := f.Spec, bands.Default()
	w, e := s.West-1, s.West+float64(s.Cols)*s.Res+1
	pts := make([]geojson.Station, n)
	for i := range pts {
		lon, lat := w+rng.Float64()*(e-w), s.North+1-rng.Float64()*(float64(s.Rows)*s.Res+2)
		switch {
		case i%4 == 0:
			lon, lat = s.West+1+rng.NormFloat64()*0.1, s.North-2+rng.NormFloat64()*0.1
		case i%97 == 0:
			lon, lat = s.West+2, s.North-3 // ties: the first is kept
		}
		if lon > 180 && rng.IntN(2) == 0 {
			lon -= 360
		}
		z := rng.NormFloat64()
		pts[i] = geojson.Station{ID: "ST<" + strconv.Itoa(i) + ">", Lon: lon, Lat: math.Max(-90, math.Min(90, lat)),
			Value: 80 + 30*z, Z: z, HasZ: i%5 != 0, Code: scheme.Classify(z), InGrid: rng.IntN(6) != 0}
	}
	return pts
}

// TestChooseStationsSamePage: a page given the subset ChooseStations picks
// (written by geojson.EncodeStationsSubset, with StationsTotal) is byte for
// byte the page given the whole layer, which thins it itself: the same
// stations, the same "N of M stations shown" and link. At 5,000 stations
// on a grid crossing the antimeridian and on one that does not, with the
// default limit and a limit of 500; and at 1,500 stations (under the
// limit: every station kept, no note).
func TestChooseStationsSamePage(t *testing.T) {
	for _, c := range []struct {
		name                     string
		w, s, e, n, res          float64
		stations, limit, wantMax int
	}{
		{"crossing", 170, -25, -165, -10, 0.5, 5000, 0, DefaultMaxStations},
		{"crossing, limit 500", 170, -25, -165, -10, 0.5, 5000, 500, 500},
		{"plain", 164, -48, 178, -34, 0.1, 5000, 0, DefaultMaxStations},
		{"plain, few", 164, -48, 178, -34, 0.1, 1500, 0, 1500},
	} {
		t.Run(c.name, func(t *testing.T) {
			f := layertest.NewFixture(t, c.w, c.s, c.e, c.n, c.res)
			in := pageFixtureInput(t, f)
			in.StationsHref, in.MaxStations = "stations.geojson", c.limit
			pts := pageRandomStations(f, c.stations, uint64(c.stations+c.limit))
			opt := geojson.Options{Params: map[string]any{"power": 2}, Date: "2026-11-30", Kind: "spi"}
			var whole bytes.Buffer
			if err := geojson.EncodeStations(&whole, pts, in.Scheme, opt); err != nil {
				t.Fatal(err)
			}
			in.StationsGeoJSON = whole.Bytes()
			want := pageEncodeT(t, in)

			lons, lats := make([]float64, len(pts)), make([]float64, len(pts))
			for i, p := range pts {
				lons[i], lats[i] = p.Lon, p.Lat
			}
			keep := ChooseStations(lons, lats, c.limit, in.BBox)
			shown := 0
			for _, k := range keep {
				if k {
					shown++
				}
			}
			var sub bytes.Buffer
			if err := geojson.EncodeStationsSubset(&sub, pts, keep, in.Scheme, opt); err != nil {
				t.Fatal(err)
			}
			in.StationsGeoJSON, in.StationsTotal = sub.Bytes(), len(pts)
			got := pageEncodeT(t, in)
			if got != want {
				i := 0
				for i < len(got) && i < len(want) && got[i] == want[i] {
					i++
				}
				t.Fatalf("pages differ at byte %d of %d/%d:\n got %q\nwant %q", i, len(got), len(want),
					got[max(0, i-100):min(len(got), i+100)], want[max(0, i-100):min(len(want), i+100)])
			}
			if n := strings.Count(got, `"type":"Point"`); n != shown || shown > c.wantMax || shown < c.wantMax/4 {
				t.Errorf("%d stations embedded, %d chosen, want %d..%d", n, shown, c.wantMax/4, c.wantMax)
			}
			note := layer.GroupThousands(strconv.Itoa(shown)) + " of " + layer.GroupThousands(strconv.Itoa(len(pts))) + " stations shown"
			if thinned := shown < len(pts); strings.Contains(got, note) != thinned || strings.Contains(got, `href="stations.geojson"`) != thinned {
				t.Errorf("thinned %v, but the note %q / link present: %v / %v", thinned, note,
					strings.Contains(got, note), strings.Contains(got, `href="stations.geojson"`))
			}
			if sub.Len() > whole.Len()/2 && shown < len(pts) {
				t.Errorf("the subset is %d bytes of the whole layer's %d", sub.Len(), whole.Len())
			}
		})
	}
}

// TestChooseStationsRules: ChooseStations keeps every station up to the
// limit (0 meaning DefaultMaxStations) and otherwise at most limit, never
// a station without a finite position; a longitude past 180 is chosen as
// the same longitude written in [-180, 180]; the choice is the same on
// every call.
func TestChooseStationsRules(t *testing.T) {
	bbox := [4]float64{170, -25, 195, -10}
	rng := rand.New(rand.NewPCG(1, 2))
	lons, lats := make([]float64, 3000), make([]float64, 3000)
	for i := range lons {
		lons[i], lats[i] = 170+rng.Float64()*25, -25+rng.Float64()*15
	}
	lons[7], lats[9], lons[11] = math.NaN(), math.Inf(1), math.Inf(-1)
	count := func(k []bool) (n int) {
		for _, v := range k {
			if v {
				n++
			}
		}
		return n
	}
	if k := ChooseStations(lons, lats, 3000, bbox); count(k) != 3000 {
		t.Errorf("limit 3000 keeps %d of 3000", count(k))
	}
	k := ChooseStations(lons, lats, 0, bbox)
	if n := count(k); n > DefaultMaxStations || n < DefaultMaxStations/4 || k[7] || k[9] || k[11] {
		t.Errorf("limit 0 keeps %d (want at most %d); the bad positions kept: %v %v %v", n, DefaultMaxStations, k[7], k[9], k[11])
	}
	wrapped := append([]float64(nil), lons...)
	for i := range wrapped {
		if wrapped[i] > 180 {
			wrapped[i] -= 360
		} else if i%3 == 0 {
			wrapped[i] += 720 // two turns east: the same place
		}
	}
	k2 := ChooseStations(wrapped, lats, 0, bbox)
	for i := range k {
		if k[i] != k2[i] {
			t.Fatalf("station %d at %g / %g: kept %v / %v", i, lons[i], wrapped[i], k[i], k2[i])
		}
	}
	if k := ChooseStations(lons[:10], lats[:10], 5, bbox); count(k) > 5 || count(k) == 0 {
		t.Errorf("limit 5 keeps %d", count(k))
	}
}

// TestPageStationsTotalChecked: a layer given with StationsTotal must be a
// subset the page carries as it is: more stations than MaxStations, or
// than StationsTotal, or a negative StationsTotal, is an error naming it.
func TestPageStationsTotalChecked(t *testing.T) {
	f := layertest.NewFixture(t, 164, -48, 178, -34, 0.5)
	in := pageFixtureInput(t, f)
	in.StationsGeoJSON = pageManyStations(f, 600)
	for _, c := range []struct{ max, total int }{{500, 10000}, {0, 599}, {0, -1}} {
		in.MaxStations, in.StationsTotal = c.max, c.total
		if err := Encode(&bytes.Buffer{}, in); err == nil || !strings.Contains(err.Error(), "StationsTotal") {
			t.Errorf("600 stations, MaxStations %d, StationsTotal %d: err %v", c.max, c.total, err)
		}
	}
	in.MaxStations, in.StationsTotal = 0, 600
	if page := pageEncodeT(t, in); strings.Contains(page, "stations shown") || strings.Count(page, `"type":"Point"`) < 600 {
		t.Error("a whole layer of 600 given with StationsTotal 600 must be embedded whole, with no note")
	}
}
