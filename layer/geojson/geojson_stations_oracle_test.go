package geojson

import (
	"bufio"
	"encoding/json"
	"fmt"
	"io"

	"drygrid/bands"
	"drygrid/grid"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
)

// gjOracleEncodeStations is the station layer's first encoder, kept as the
// test oracle: each Feature built by paulmach/orb/geojson and encoded by
// encoding/json. EncodeStations must write the same bytes.
func gjOracleEncodeStations(w io.Writer, pts []Station, s *bands.Scheme, opt Options) error {
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
		pt := orb.Point{grid.WrapLon(p.Lon), p.Lat}
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
		f := geojson.NewFeature(orb.Point{grid.WrapLon(p.Lon), p.Lat})
		f.Properties["id"] = p.ID
		f.Properties["value"] = gjOracleNullable(p.Value, true)
		f.Properties["z"] = gjOracleNullable(p.Z, p.HasZ)
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

// gjOracleNullable is v, or nil (JSON null) when !ok or v is not finite.
func gjOracleNullable(v float64, ok bool) any {
	if !ok || !gjFinite(v) {
		return nil
	}
	return v
}
