package pipeline

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"time"

	"drygrid/geotiff"
	"drygrid/grid"
	"drygrid/layer"
	"drygrid/layer/geojson"
	"drygrid/layer/page"
	"drygrid/publish"
	"drygrid/region"
)

// layerWriter writes one run's layers into dir.
type layerWriter struct {
	job     *Job
	res     *Result
	regions []region.Region
	dir     string
	made    time.Time // the run's start: the time made on the picture and the page

	bandsGJ []byte            // bands.geojson, encoded once for the file and the page
	pts     []geojson.Station // the station layer's points, made once

	preview *preview    // the band raster of the picture and the page
	traced  *traceSink  // the band polygons and areas of bands.geojson
	far     *grid.Uint8 // the preview's cells hatched on the picture and the page (Job.HatchBeyondKm), computed once
}

func (w *layerWriter) path(name string) string { return filepath.Join(w.dir, name) }

// params lists the run's parameters for the foreign members and the page.
func (w *layerWriter) params() map[string]any {
	p := w.job.Params
	return map[string]any{
		"kind": string(w.job.Values.Kind), "res_deg": w.res.Spec.Res,
		"power": p.Power, "neighbors": p.Neighbors, "radius_km": p.RadiusKm, "min_stations": p.MinStations,
		"sectors": p.Sectors, "scheme": w.res.Scheme.Name, "stations": len(w.res.Values.Stations),
	}
}

// geojsonOptions are the GeoJSON layers' options: the caution, the
// parameters, and what the layer shows (date, window, kind).
func (w *layerWriter) geojsonOptions() geojson.Options {
	return geojson.Options{Caution: layer.Caution, Params: w.params(),
		Date: w.job.Date, WindowDays: w.job.WindowDays, Kind: string(w.job.Values.Kind)}
}

// tiffOptions are the GeoTIFF options: the software, and what the band
// shows (TIFFTAG_DATETIME the job's date, the band's description and
// units).
func (w *layerWriter) tiffOptions() geotiff.Options {
	opt := geotiff.DefaultOptions()
	opt.Software = "drygrid " + w.job.version()
	if t, err := time.Parse("2006-01-02", w.job.Date); err == nil {
		opt.DateTime = t
	}
	opt.Description = w.job.Describe()
	opt.Units = w.job.units()
	opt.BandsDescription = "drought bands of " + w.job.Describe()
	return opt
}

func (w *layerWriter) write(name string) error {
	switch name {
	case "index", "bands":
		return nil // written by the pass (runPass)
	case "geojson":
		// Once encoded the polygons are not needed again; nor is the text
		// when the page does not carry it: then it goes straight to the file.
		defer func() { w.traced.polys = nil }()
		if !w.job.Layers["page"] || w.preview.f > 1 {
			return writeStream(w.path("bands.geojson"), w.encodeBands)
		}
		b, err := w.bandsGeoJSON()
		if err != nil {
			return err
		}
		return writeBytes(w.path("bands.geojson"), b)
	case "stations":
		return writeStream(w.path("stations.geojson"), func(out io.Writer) error {
			return geojson.EncodeStations(out, w.stationPoints(), w.res.Scheme, w.geojsonOptions())
		})
	case "regions":
		return w.writeRegions()
	case "map":
		return w.writePicture()
	case "page":
		return w.writePage()
	case "support":
		return w.writeSupport(w.tiffOptions())
	}
	return fmt.Errorf("unknown layer %q", name)
}

// bandsGeoJSON encodes the band polygons traced by the pass once, for
// bands.geojson and the page (which carries them when the grid is its own
// preview, a grid of at most previewMaxCells cells).
func (w *layerWriter) bandsGeoJSON() ([]byte, error) {
	if w.bandsGJ == nil {
		var buf bytes.Buffer
		if err := w.encodeBands(&buf); err != nil {
			return nil, err
		}
		w.bandsGJ = buf.Bytes()
	}
	return w.bandsGJ, nil
}

// encodeBands writes the band layer from the pass's polygons and areas.
func (w *layerWriter) encodeBands(out io.Writer) error {
	t := w.traced
	if t == nil || t.polys == nil {
		return errors.New("bands geojson: the pass traced no polygons")
	}
	return geojson.EncodeBandPolygons(out, w.res.Spec, t.polys, t.areas, w.res.Scheme, w.geojsonOptions())
}

// stationPoints are the station layer's points, made once.
func (w *layerWriter) stationPoints() []geojson.Station {
	if w.pts == nil {
		w.pts = stationPoints(w.res.Values, w.res.Spec, w.res.Scheme)
	}
	return w.pts
}

// pageStations is the station layer the page carries: at most
// page.DefaultMaxStations of the stations (page.ChooseStations), with the
// whole layer's bbox and members; the page links stations.geojson for the
// rest.
func (w *layerWriter) pageStations() ([]byte, int, error) {
	pts := w.stationPoints()
	lons, lats := make([]float64, len(pts)), make([]float64, len(pts))
	for i, p := range pts {
		lons[i], lats[i] = p.Lon, p.Lat
	}
	spec := w.res.Spec
	keep := page.ChooseStations(lons, lats, 0, [4]float64{spec.West, spec.South(), spec.East(), spec.North})
	var buf bytes.Buffer
	if err := geojson.EncodeStationsSubset(&buf, pts, keep, w.res.Scheme, w.geojsonOptions()); err != nil {
		return nil, 0, err
	}
	return buf.Bytes(), len(pts), nil
}

// writeStream writes one file of a layer through a streaming encoder.
func writeStream(path string, enc func(w io.Writer) error) error {
	return publish.WriteFile(path, func(w *bufio.Writer) error { return enc(w) })
}

// writeBytes writes a finished document.
func writeBytes(path string, b []byte) error {
	return writeStream(path, func(out io.Writer) error {
		_, err := out.Write(b)
		return err
	})
}
