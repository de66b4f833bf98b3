package main

import (
	"bytes"
	"fmt"
	"io"
	"path/filepath"

	"drygrid/export"
	"drygrid/grid"
)

// layerWriter writes one run's layers into dir.
type layerWriter struct {
	job     gridJob
	res     *gridResult
	regions []grid.Region
	dir     string

	bandsGJ, stationsGJ []byte // encoded once, for the files and the page
}

func (w *layerWriter) path(name string) string { return filepath.Join(w.dir, name) }

// params lists the run's parameters for the foreign members and the page.
func (w *layerWriter) params() map[string]any {
	p := w.job.Params
	return map[string]any{
		"kind": string(w.job.Values.Kind), "res_deg": w.res.Spec.Res,
		"power": p.Power, "neighbors": p.Neighbors, "radius_km": p.RadiusKm, "min_stations": p.MinStations,
		"scheme": w.res.Scheme.Name, "stations": len(w.res.Values.Stations),
	}
}

func (w *layerWriter) write(name string) error {
	opt := export.DefaultTIFFOptions()
	opt.Software = "drygrid " + version
	switch name {
	case "index":
		return export.WriteIndexTIFF(w.path("index.tif"), w.res.Index, opt)
	case "bands":
		return export.WriteBandsTIFF(w.path("bands.tif"), w.res.Bands, w.res.Scheme, opt)
	case "geojson":
		b, err := w.bandsGeoJSON()
		if err != nil {
			return err
		}
		return writeBytes(w.path("bands.geojson"), b)
	case "stations":
		b, err := w.stationsGeoJSON()
		if err != nil {
			return err
		}
		return writeBytes(w.path("stations.geojson"), b)
	case "regions":
		return w.writeRegions()
	case "map":
		return w.writePicture()
	case "page":
		return w.writePage()
	}
	return fmt.Errorf("unknown layer %q", name)
}

// stationPoints are the stations as the GeoJSON writer takes them.
func (w *layerWriter) stationPoints() []export.StationPoint {
	spec, scheme := w.res.Spec, w.res.Scheme
	pts := make([]export.StationPoint, 0, len(w.res.Values.Stations))
	for _, s := range w.res.Values.Stations {
		_, _, in := spec.Cell(s.Lon, s.Lat)
		pts = append(pts, export.StationPoint{ID: s.ID, Lon: s.Lon, Lat: s.Lat, Value: s.Value,
			Z: s.Z, HasZ: true, Code: scheme.Classify(s.Z), InGrid: in})
	}
	return pts
}

// bandsGeoJSON encodes the band polygons once.
func (w *layerWriter) bandsGeoJSON() ([]byte, error) {
	if w.bandsGJ == nil {
		var buf bytes.Buffer
		opt := export.GeoJSONOptions{SimplifyKm: w.job.SimplifyKm, Caution: export.MapCaution, Params: w.params()}
		if err := export.WriteBandsGeoJSON(&buf, w.res.Bands, w.res.Scheme, opt); err != nil {
			return nil, err
		}
		w.bandsGJ = buf.Bytes()
	}
	return w.bandsGJ, nil
}

// stationsGeoJSON encodes the station points once.
func (w *layerWriter) stationsGeoJSON() ([]byte, error) {
	if w.stationsGJ == nil {
		var buf bytes.Buffer
		opt := export.GeoJSONOptions{Caution: export.MapCaution, Params: w.params()}
		if err := export.WriteStationsGeoJSON(&buf, w.stationPoints(), w.res.Scheme, opt); err != nil {
			return nil, err
		}
		w.stationsGJ = buf.Bytes()
	}
	return w.stationsGJ, nil
}

// writeBytes writes a finished document.
func writeBytes(path string, b []byte) error {
	return writeStream(path, func(out io.Writer) error {
		_, err := out.Write(b)
		return err
	})
}
