package geojson

import (
	"bufio"
	"encoding/json"
	"fmt"
	"io"
	"math"

	"drygrid/bands"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
)

// Station is one station of the station layer.
type Station struct {
	ID       string
	Lon, Lat float64 // degrees; longitudes are written in [-180, 180]
	Value    float64 // the input value (SPI or percentile); NaN is written as null
	Z        float64 // the z (SPI units) interpolated from it
	HasZ     bool    // false writes z as null
	Code     uint8   // band code of z, 0 = none (written as null, with key)
	InGrid   bool    // whether the station lies inside the grid
}

// EncodeStations writes the station layer (RFC 7946): one Point Feature
// per station, in the order given, with properties id, value, z (null when
// !HasZ), code and key (null when Code is 0) and in_grid, plus a bbox and the
// foreign member "drygrid": {caution, generated_by, params}. Each Feature is
// encoded by paulmach/orb/geojson (encoding/json: sorted property keys,
// shortest round-trip numbers, so deterministic) and streamed to w.
func EncodeStations(w io.Writer, pts []Station, s *bands.Scheme, opt Options) error {
	meta, err := gjMeta(opt)
	if err != nil {
		return fmt.Errorf("stations geojson: %w", err)
	}
	bw := bufio.NewWriterSize(w, 1<<16)
	fmt.Fprintf(bw, `{"type":"FeatureCollection","drygrid":%s`, meta)
	var bound orb.Bound
	for k, p := range pts {
		if !gjFinite(p.Lon) || !gjFinite(p.Lat) || p.Lat < -90 || p.Lat > 90 {
			return fmt.Errorf("stations geojson: station %d (%q): position %g, %g is not a valid longitude, latitude", k+1, p.ID, p.Lon, p.Lat)
		}
		pt := orb.Point{gjLon(p.Lon), p.Lat}
		if k == 0 {
			bound = pt.Bound()
		} else {
			bound = bound.Extend(pt)
		}
	}
	if len(pts) > 0 {
		b, _ := json.Marshal([]float64{bound.Min[0], bound.Min[1], bound.Max[0], bound.Max[1]})
		fmt.Fprintf(bw, `,"bbox":%s`, b)
	}
	bw.WriteString(`,"features":[`)
	for k, p := range pts {
		f := geojson.NewFeature(orb.Point{gjLon(p.Lon), p.Lat})
		f.Properties["id"] = p.ID
		f.Properties["value"] = gjNullable(p.Value, true)
		f.Properties["z"] = gjNullable(p.Z, p.HasZ)
		f.Properties["code"], f.Properties["key"] = nil, nil
		if p.Code != 0 {
			f.Properties["code"] = int(p.Code)
			if s != nil {
				if b, ok := s.Band(p.Code); ok {
					f.Properties["key"] = b.Key
				}
			}
		}
		f.Properties["in_grid"] = p.InGrid
		b, err := json.Marshal(f)
		if err != nil {
			return fmt.Errorf("stations geojson: station %d (%q): %w", k+1, p.ID, err)
		}
		if k > 0 {
			bw.WriteByte(',')
		}
		bw.WriteByte('\n')
		bw.Write(b)
	}
	bw.WriteString("\n]}\n")
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("stations geojson: write: %w", err)
	}
	return nil
}

func gjFinite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// gjLon brings a longitude into [-180, 180] (RFC 7946 section 3.1.9 wants
// positions inside the usual range; 180 stays 180).
func gjLon(lon float64) float64 {
	if lon > 180 || lon < -180 {
		lon = math.Mod(lon+180, 360)
		if lon < 0 {
			lon += 360
		}
		lon -= 180
	}
	return lon
}

// gjNullable is v, or nil (JSON null) when !ok or v is not finite.
func gjNullable(v float64, ok bool) any {
	if !ok || !gjFinite(v) {
		return nil
	}
	return v
}
