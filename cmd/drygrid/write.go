package main

import (
	"bytes"
	"drygrid/geotiff"
	"drygrid/layer"
	"drygrid/layer/geojson"
	"drygrid/manifest"
	"fmt"
	"io"
	"path/filepath"
	"sort"
	"strings"
	"time"

	"drygrid/region"
)

// layerWriter writes one run's layers into dir.
type layerWriter struct {
	job     gridJob
	res     *gridResult
	regions []region.Region
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
		"sectors": p.Sectors, "scheme": w.res.Scheme.Name, "stations": len(w.res.Values.Stations),
	}
}

func (w *layerWriter) write(name string) error {
	opt := geotiff.DefaultOptions()
	opt.Software = "drygrid " + version
	if w.res.Rows != nil && (name == "index" || name == "bands") {
		return w.writeStreamed(name, opt)
	}
	switch name {
	case "index":
		return geotiff.WriteIndex(w.path("index.tif"), w.res.Index, opt)
	case "bands":
		return geotiff.WriteBands(w.path("bands.tif"), w.res.Bands, w.res.Scheme, opt)
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
func (w *layerWriter) stationPoints() []geojson.Station {
	spec, scheme := w.res.Spec, w.res.Scheme
	pts := make([]geojson.Station, 0, len(w.res.Values.Stations))
	for _, s := range w.res.Values.Stations {
		_, _, in := spec.Cell(s.Lon, s.Lat)
		pts = append(pts, geojson.Station{ID: s.ID, Lon: s.Lon, Lat: s.Lat, Value: s.Value,
			Z: s.Z, HasZ: true, Code: scheme.Classify(s.Z), InGrid: in})
	}
	return pts
}

// bandsGeoJSON encodes the band polygons once.
func (w *layerWriter) bandsGeoJSON() ([]byte, error) {
	if w.bandsGJ == nil {
		var buf bytes.Buffer
		opt := geojson.Options{SimplifyKm: w.job.SimplifyKm, Caution: layer.Caution, Params: w.params()}
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
		opt := geojson.Options{Caution: layer.Caution, Params: w.params()}
		if err := geojson.EncodeStations(&buf, w.stationPoints(), w.res.Scheme, opt); err != nil {
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

// manifestNow is the clock of the manifest's timings (a variable so that
// tests can stop it; timings are the one member allowed to differ between
// runs).
var manifestNow = time.Now

// manifestSeconds rounds a duration to milliseconds, in seconds.
func manifestSeconds(d time.Duration) float64 { return float64(d.Milliseconds()) / 1000 }

// sortedKeys lists a map's keys in order.
func sortedKeys[V any](m map[string]V) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}

// buildManifest describes the run whose files are in dir.
func buildManifest(job gridJob, res *gridResult, dir string, start time.Time) (*manifest.Manifest, error) {
	var inputs []manifest.File
	// A stations table made in memory by the index step is an output
	// (job.Extra), not an input.
	if job.StationsData == nil {
		f, err := manifest.Input(job.Stations, "stations")
		if err != nil {
			return nil, err
		}
		inputs = append(inputs, f)
	}
	for _, in := range [][2]string{{job.Scheme, "scheme"}, {job.Regions, "regions"}} {
		if in[0] == "" {
			continue
		}
		f, err := manifest.Input(in[0], in[1])
		if err != nil {
			return nil, err
		}
		inputs = append(inputs, f)
	}
	inputs = append(inputs, job.ExtraInputs...)
	outputs, err := manifest.Outputs(dir, nil)
	if err != nil {
		return nil, err
	}
	p := job.Params
	var bbox any
	if job.BBox != nil {
		bbox = job.BBox[:]
	}
	params := map[string]any{
		"kind": string(job.Values.Kind), "value_column": res.Values.Column,
		"res_deg": job.Res, "bbox": bbox,
		"power": p.Power, "neighbors": p.Neighbors, "radius_km": p.RadiusKm, "min_stations": p.MinStations,
		"sectors": p.Sectors, "scheme": res.Scheme.Name, "region_key": job.RegionKey,
		"layers": strings.Split(job.Layers.String(), ","), "simplify_km": job.SimplifyKm,
	}
	for k, v := range job.ExtraParams {
		params[k] = v
	}
	rejected := map[string]int{}
	for reason, n := range res.Values.RejectedByReason() {
		rejected[reason] = n
	}
	covered := res.Tally.Cells
	counts := map[string]any{
		"stations_read": res.Values.Read, "stations_used": len(res.Values.Stations),
		"stations_rejected": rejected, "station_warnings": len(res.Values.Warnings),
		"cells": res.Spec.Len(), "cells_covered": covered, "regions": len(res.Regions),
	}
	for k, v := range job.ExtraCounts {
		counts[k] = v
	}
	if job.CrossVal {
		cv, err := crossvalGrid(res, job.Params)
		if err != nil {
			return nil, err
		}
		res.crossval = &cv
		counts["crossval"] = crossvalFigures(cv)
	}
	s := res.Spec
	gridInfo := map[string]any{
		"crs": "EPSG:4326", "west": s.West, "north": s.North, "east": s.East(), "south": s.South(),
		"res_deg": s.Res, "cols": s.Cols, "rows": s.Rows, "crosses_antimeridian": s.CrossesAntimeridian(),
		"geotransform": s.GeoTransform(),
	}
	timings := map[string]float64{}
	for k, v := range res.timings {
		timings[k] = v
	}
	for k, v := range job.ExtraTimings {
		timings[k] = v
	}
	timings["total_s"] = manifestSeconds(manifestNow().Sub(start))
	command := job.Command
	if command == "" {
		command = "grid"
	}
	return &manifest.Manifest{
		Software: "drygrid", Version: version, Command: command, Caution: layer.Caution,
		Parameters: params, Inputs: inputs, Outputs: outputs, Counts: counts, Grid: gridInfo, Timings: timings,
	}, nil
}
