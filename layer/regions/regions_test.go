package regions

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"math"
	"strings"
	"testing"

	"drygrid/bands"
	"drygrid/grid"
	"drygrid/region"

	"github.com/paulmach/orb"
)

// regFixture: four equal cells in one row (same latitude, so equal areas on
// the ellipsoid), coded parched, parched, dry and no data, with z -2.5,
// -2.1, -1.2 and none; one region over all four, one over half of the first.
func regFixture(t *testing.T) ([]region.ZonalStats, float64) {
	t.Helper()
	s, err := grid.NewSpec(0, 10, 4, 11, 1)
	if err != nil {
		t.Fatal(err)
	}
	b := grid.NewUint8(s, 0)
	z := grid.NewFloat32(s, grid.NoDataIndex)
	copy(b.Data, []uint8{1, 1, 3, 0})
	copy(z.Data, []float32{-2.5, -2.1, -1.2, grid.NoDataIndex})
	rs := []region.Region{
		{Key: "all, four", Geom: orb.MultiPolygon{{{{0, 10}, {4, 10}, {4, 11}, {0, 11}, {0, 10}}}}},
		{Key: "half", Geom: orb.MultiPolygon{{{{0, 10}, {0.5, 10}, {0.5, 11}, {0, 11}, {0, 10}}}}},
		{Key: "outside", Geom: orb.MultiPolygon{{{{50, 10}, {51, 10}, {51, 11}, {50, 11}, {50, 10}}}}},
	}
	return region.Zonal(b, z, rs), s.CellAreaKm2(0)
}

// TestWriteRegionsCSV: the header of docs/design.md, "Formats written", and
// shares worked by hand: 3 of 4 equal cells covered (75 %), two parched and one dry
// (66.667 % and 33.333 % of the covered area, all of it in drought), mean z
// (-2.5 - 2.1 - 1.2) / 3 = -1.933.
func TestWriteRegionsCSV(t *testing.T) {
	st, a := regFixture(t)
	var buf bytes.Buffer
	if err := WriteCSV(&buf, st, bands.Default()); err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	wantHead := "region,area_km2,covered_km2,covered_pct,parched_pct,very-dry_pct,dry_pct,slightly-dry_pct,normal_pct,slightly-wet_pct,wet_pct,very-wet_pct,soaked_pct,in_drought_pct,mean_z"
	if h := strings.Join(recs[0], ","); h != wantHead {
		t.Fatalf("header\n got %s\nwant %s", h, wantHead)
	}
	f3 := regFmt
	want := [][]string{
		{"all, four", f3(4 * a), f3(3 * a), "75.000", "66.667", "0.000", "33.333", "0.000", "0.000", "0.000", "0.000", "0.000", "0.000", "100.000", "-1.933"},
		{"half", f3(a / 2), f3(a / 2), "100.000", "100.000", "0.000", "0.000", "0.000", "0.000", "0.000", "0.000", "0.000", "0.000", "100.000", "-2.500"},
		{"outside", "0.000", "0.000", "", "", "", "", "", "", "", "", "", "", "", ""},
	}
	for i, w := range want {
		if g := strings.Join(recs[i+1], "|"); g != strings.Join(w, "|") {
			t.Errorf("row %d\n got %s\nwant %s", i+1, g, strings.Join(w, "|"))
		}
	}
}

// TestWriteRegionsJSON: the same figures plus the scheme and the caution;
// read back with encoding/json.
func TestWriteRegionsJSON(t *testing.T) {
	st, a := regFixture(t)
	var buf bytes.Buffer
	if err := WriteJSON(&buf, st, bands.Default(), Meta{Date: "2026-05-01", Source: "bands.tif"}); err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Caution string
		Date    string
		Scheme  struct {
			Bands []struct {
				Code    int
				Key     string
				Color   string
				Drought bool
				Range   string
			}
		}
		Regions []struct {
			Region       string
			AreaKm2      float64  `json:"area_km2"`
			CoveredPct   *float64 `json:"covered_pct"`
			InDroughtPct *float64 `json:"in_drought_pct"`
			MeanZ        *float64 `json:"mean_z"`
			Bands        []struct {
				Key string
				Km2 float64
				Pct *float64
			}
		}
	}
	if err := json.Unmarshal(buf.Bytes(), &doc); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(doc.Caution, "not official drought declarations") || doc.Date != "2026-05-01" {
		t.Errorf("caution %q date %q", doc.Caution, doc.Date)
	}
	if len(doc.Scheme.Bands) != 9 || doc.Scheme.Bands[2].Key != "dry" || doc.Scheme.Bands[2].Range != "-1.5 < z <= -1.0" || !doc.Scheme.Bands[2].Drought || doc.Scheme.Bands[3].Drought {
		t.Errorf("scheme %+v", doc.Scheme.Bands)
	}
	r := doc.Regions[0]
	if math.Abs(r.AreaKm2-4*a) > 1e-3 || *r.CoveredPct != 75 || *r.InDroughtPct != 100 || *r.MeanZ != -1.933 ||
		r.Bands[0].Key != "parched" || *r.Bands[0].Pct != 66.667 || math.Abs(r.Bands[0].Km2-2*a) > 1e-3 {
		t.Errorf("region %+v", r)
	}
	if o := doc.Regions[2]; o.CoveredPct != nil || o.MeanZ != nil || o.Bands[0].Pct != nil {
		t.Errorf("region outside the grid should have null shares: %+v", o)
	}
}
