package pipeline

import (
	"drygrid/bands"
	"drygrid/grid"
	"drygrid/interp"
	"drygrid/layer/geojson"
	"drygrid/layer/picture"
	"drygrid/station"
)

// The one place where a station read (station.Station) becomes the point
// each consumer takes: the interpolator (interp.Point), the station layer
// (geojson.Station) and the picture (picture.Point).

// Points are the stations as the interpolator takes them (z, SPI units).
func Points(v *station.Values) []interp.Point {
	pts := make([]interp.Point, len(v.Stations))
	for i, s := range v.Stations {
		pts[i] = interp.Point{Lon: s.Lon, Lat: s.Lat, Z: s.Z}
	}
	return pts
}

// stationPoints are the stations as the GeoJSON writer takes them: with
// their band and whether they lie in the grid.
func stationPoints(v *station.Values, spec grid.Spec, scheme *bands.Scheme) []geojson.Station {
	pts := make([]geojson.Station, 0, len(v.Stations))
	for _, s := range v.Stations {
		_, _, in := spec.Cell(s.Lon, s.Lat)
		// Percent of normal has no z: its z is null, its band that of
		// the value (which is what it interpolates, Station.Z).
		pts = append(pts, geojson.Station{ID: s.ID, Lon: s.Lon, Lat: s.Lat, Value: s.Value,
			Z: s.Z, HasZ: v.Kind != station.KindPctOfNormal, Code: scheme.Classify(s.Z), InGrid: in})
	}
	return pts
}

// picturePoints are the stations as the picture draws them.
func picturePoints(v *station.Values) []picture.Point {
	pts := make([]picture.Point, 0, len(v.Stations))
	for _, s := range v.Stations {
		pts = append(pts, picture.Point{Lon: s.Lon, Lat: s.Lat})
	}
	return pts
}
