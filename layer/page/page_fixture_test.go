package page

import (
	"fmt"
	"math"
	"testing"

	"drygrid/bands"
	"drygrid/internal/layertest"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
)

// pageFixtureInput turns a picture fixture into the page's input: band
// features as unions of cell squares (undissolved, which the page draws the
// same way), stations with invented ids and values, and regions with
// shares counted from the cells. The numbers are display data for the page,
// not a reference for anything.
func pageFixtureInput(t testing.TB, f *layertest.Fixture) Input {
	t.Helper()
	s := bands.Default()
	spec := f.Spec
	byCode := map[uint8]orb.MultiPolygon{}
	for r := 0; r < spec.Rows; r++ {
		for c := 0; c < spec.Cols; c++ {
			code := f.Bands.Data[spec.Index(c, r)]
			if code == 0 {
				continue
			}
			w := spec.West + float64(c)*spec.Res
			if w >= 180-1e-9 {
				w -= 360 // RFC 7946 section 3.1.9: split at the antimeridian
			}
			n, so := spec.RowLats(r)
			e := w + spec.Res
			byCode[code] = append(byCode[code], orb.Polygon{orb.Ring{{w, so}, {e, so}, {e, n}, {w, n}, {w, so}}})
		}
	}
	bands := geojson.NewFeatureCollection()
	for _, b := range s.Bands {
		mp, ok := byCode[b.Code]
		if !ok {
			continue
		}
		ft := geojson.NewFeature(mp)
		ft.Properties = geojson.Properties{"code": b.Code, "key": b.Key, "label": b.Label, "color": b.Color, "drought": b.Drought, "area_km2": 1000.0 * float64(len(mp))}
		bands.Append(ft)
	}
	stations := geojson.NewFeatureCollection()
	for i, p := range f.Stations {
		z := f.Z(p.Lon, p.Lat)
		b, _ := s.Band(s.Classify(z))
		ft := geojson.NewFeature(orb.Point{p.Lon, p.Lat})
		ft.Properties = geojson.Properties{"id": fmt.Sprintf("KV%03d", i+1), "value": math.Round(80 + 30*z), "z": z, "code": b.Code, "key": b.Key, "in_grid": true}
		stations.Append(ft)
	}
	regions := geojson.NewFeatureCollection()
	var rows []RegionRow
	for _, reg := range f.Regions {
		ft := geojson.NewFeature(reg.Geom)
		ft.Properties = geojson.Properties{"name": reg.Name}
		regions.Append(ft)
		b := reg.Geom.Bound()
		row := RegionRow{Name: reg.Name, SharePct: map[string]float64{}}
		var all, cov, dry, sumZ float64
		for r := 0; r < spec.Rows; r++ {
			for c := 0; c < spec.Cols; c++ {
				lon, lat := spec.Center(c, r) // regions are in the grid's longitudes
				if lon < b.Min[0] || lon > b.Max[0] || lat < b.Min[1] || lat > b.Max[1] {
					continue
				}
				all++
				code := f.Bands.Data[spec.Index(c, r)]
				if code == 0 {
					continue
				}
				cov++
				bd, _ := s.Band(code)
				row.SharePct[bd.Key]++
				if bd.Drought {
					dry++
				}
				sumZ += f.Z(spec.Center(c, r))
			}
		}
		for k, v := range row.SharePct {
			row.SharePct[k] = 100 * v / cov
		}
		row.AreaKm2 = all * 500
		row.CoveredPct = 100 * cov / all
		row.InDroughtPct = 100 * dry / cov
		row.MeanZ = sumZ / cov
		rows = append(rows, row)
	}
	enc := func(fc *geojson.FeatureCollection) []byte {
		b, err := fc.MarshalJSON()
		if err != nil {
			t.Fatal(err)
		}
		return b
	}
	return Input{
		Title:    "Kelverin Islands (fictitious) - SPI, 30 days ending 30 November 2025",
		Subtitle: "IDW power 2, 12 neighbours, 300 km; 214 stations",
		Scheme:   s, BandsGeoJSON: enc(bands), StationsGeoJSON: enc(stations), RegionsGeoJSON: enc(regions),
		Regions: rows,
		BBox:    [4]float64{spec.West, spec.South(), spec.East(), spec.North},
	}
}
