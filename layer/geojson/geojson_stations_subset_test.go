package geojson

import (
	"bytes"
	"encoding/json"
	"math/rand/v2"
	"testing"

	"drygrid/bands"
)

// TestEncodeStationsSubset: a subset marking every station (or nil) is
// EncodeStations' output; a partial one is valid JSON holding exactly the
// marked Features, byte for byte as the whole layer writes them and in
// their order, with the whole layer's bbox and foreign members; flags of
// the wrong length are an error.
func TestEncodeStationsSubset(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 4))
	pts := gjRandomStations(rng, 400)
	s, opt := bands.Default(), Options{Date: "2026-11-30", Kind: "spi"}
	var whole bytes.Buffer
	if err := EncodeStations(&whole, pts, s, opt); err != nil {
		t.Fatal(err)
	}
	all := make([]bool, len(pts))
	for i := range all {
		all[i] = true
	}
	for _, keep := range [][]bool{nil, all} {
		var b bytes.Buffer
		if err := EncodeStationsSubset(&b, pts, keep, s, opt); err != nil || !bytes.Equal(b.Bytes(), whole.Bytes()) {
			t.Errorf("every station kept (nil %v): err %v, same bytes %v", keep == nil, err, bytes.Equal(b.Bytes(), whole.Bytes()))
		}
	}
	type doc struct {
		BBox     []float64         `json:"bbox"`
		Date     string            `json:"date"`
		Drygrid  json.RawMessage   `json:"drygrid"`
		Features []json.RawMessage `json:"features"`
	}
	var w doc
	if err := json.Unmarshal(whole.Bytes(), &w); err != nil {
		t.Fatal(err)
	}
	keep := make([]bool, len(pts))
	var want []string
	for i := range keep {
		if keep[i] = rng.IntN(3) == 0; keep[i] {
			want = append(want, string(w.Features[i]))
		}
	}
	var b bytes.Buffer
	if err := EncodeStationsSubset(&b, pts, keep, s, opt); err != nil {
		t.Fatal(err)
	}
	var d doc
	if err := json.Unmarshal(b.Bytes(), &d); err != nil {
		t.Fatalf("subset not JSON: %v", err)
	}
	if len(d.Features) != len(want) || !equalFloats(d.BBox, w.BBox) || d.Date != "2026-11-30" || !bytes.Equal(d.Drygrid, w.Drygrid) {
		t.Fatalf("subset: %d features (want %d), bbox %v (want %v), date %q", len(d.Features), len(want), d.BBox, w.BBox, d.Date)
	}
	for i, f := range d.Features {
		if string(f) != want[i] {
			t.Errorf("feature %d: %s, want %s", i, f, want[i])
		}
	}
	if err := EncodeStationsSubset(&bytes.Buffer{}, pts, keep[1:], s, opt); err == nil {
		t.Error("399 flags for 400 stations: no error")
	}
}
