package pipeline

import (
	"bufio"
	"bytes"
	"drygrid/geotiff"
	"drygrid/grid"
	"drygrid/layer"
	"drygrid/layer/geojson"
	"drygrid/publish"
	"fmt"
	"io"
	"path/filepath"
	"sort"
	"time"

	"drygrid/region"
)

// layerWriter writes one run's layers into dir.
type layerWriter struct {
	job     *Job
	res     *Result
	regions []region.Region
	dir     string
	made    time.Time // the run's start: the time made on the picture and the page

	bandsGJ, stationsGJ []byte // encoded once, for the files and the page

	preview *preview    // the band raster of the picture and the page
	far     *grid.Uint8 // the preview's cells hatched on the picture and the page (Job.HatchBeyondKm), computed once
	farDone bool
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
	case "support":
		return w.writeSupport(w.tiffOptions())
	}
	return fmt.Errorf("unknown layer %q", name)
}

// bandsGeoJSON encodes the band polygons once.
func (w *layerWriter) bandsGeoJSON() ([]byte, error) {
	if w.bandsGJ == nil {
		var buf bytes.Buffer
		opt := w.geojsonOptions()
		opt.SimplifyKm = w.job.SimplifyKm
		if err := geojson.EncodeBands(&buf, w.res.Bands, w.res.Scheme, opt); err != nil {
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
		opt := w.geojsonOptions()
		if err := geojson.EncodeStations(&buf, stationPoints(w.res.Values, w.res.Spec, w.res.Scheme), w.res.Scheme, opt); err != nil {
			return nil, err
		}
		w.stationsGJ = buf.Bytes()
	}
	return w.stationsGJ, nil
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

// sortedKeys lists a map's keys in order.
func sortedKeys[V any](m map[string]V) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}
