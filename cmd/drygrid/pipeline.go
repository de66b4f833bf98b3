package main

import (
	"bufio"
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"time"
	"unicode/utf8"

	"drygrid/bands"
	"drygrid/grid"
	"drygrid/interp"
	"drygrid/manifest"
	"drygrid/publish"
	"drygrid/region"
	"drygrid/station"
)

// maxCells bounds the grid a run will allocate (4 + 1 bytes a cell in memory).
const maxCells = 400_000_000

// gridJob is one run of the grid step, from the command line or the demo.
type gridJob struct {
	Stations   string
	Values     station.ValueOptions
	Res        float64
	BBox       *[4]float64 // W,S,E,N; nil = stations' extent widened by the radius
	Params     interp.Params
	Scheme     string // "" = default bands
	Regions    string
	RegionKey  string
	Layers     layerSet
	SimplifyKm float64
	Title      string
	Subtitle   string
	Out        string

	// Command names the command in the manifest ("grid", "demo", "run").
	Command string
	// CrossVal adds leave-one-out cross-validation figures to the manifest
	// (and to the result, for the summary).
	CrossVal bool
	// StationsData, when not nil, is the stations table itself (the index
	// step's output, made in memory); Stations then only names it.
	StationsData []byte
	// Extra are more files to publish with the layers (name -> content).
	Extra map[string][]byte
	// ExtraInputs, ExtraParams, ExtraCounts and ExtraTimings go into the
	// manifest beside the grid step's own.
	ExtraInputs  []manifest.File
	ExtraParams  map[string]any
	ExtraCounts  map[string]any
	ExtraTimings map[string]float64
}

// gridResult is what a run made, for the summary and the demo.
type gridResult struct {
	Values  *station.Values
	Spec    grid.Spec
	Scheme  *bands.Scheme
	Index   *grid.Float32
	Bands   *grid.Uint8
	Regions []region.ZonalStats
	Files   []string
	Elapsed time.Duration
	// Rows, when not nil, streams the index rows into the GeoTIFF writers
	// (Index and Bands are then nil). Tally holds the band areas either way.
	Rows  func(row0, n int, dst []float32) error
	Tally *bands.Tally

	timings  map[string]float64     // seconds by step, for the manifest
	crossval *interp.CrossValResult // with job.CrossVal
}

// runGrid reads the stations, interpolates, classifies and writes the
// layers and the manifest. All files are written into a temporary directory
// beside Out, which replaces Out only when every layer is complete
// (publish.go), so a failed run leaves earlier outputs untouched.
func runGrid(job gridJob, stderr io.Writer) (*gridResult, error) {
	start := manifestNow()
	scheme, err := loadScheme(job.Scheme)
	if err != nil {
		return nil, err
	}
	var regions []region.Region
	if job.Regions != "" {
		r, err := region.ReadRegions(job.Regions, job.RegionKey)
		if err != nil {
			return nil, regionsErrPos(job.Regions, err)
		}
		regions = r
	}
	var vals *station.Values
	if job.StationsData != nil {
		vals, err = station.ParseValues(job.Stations, bytes.NewReader(job.StationsData), job.Values)
	} else {
		vals, err = station.ReadValues(job.Stations, job.Values)
	}
	if err != nil {
		return nil, err
	}
	for _, w := range vals.Warnings {
		fmt.Fprintf(stderr, "warning: %s\n", w)
	}
	if vals.Read == 0 {
		return nil, fmt.Errorf("stations %s: the header has no data rows below it", job.Stations)
	}
	if len(vals.Stations) == 0 {
		return nil, fmt.Errorf("stations %s: no station with a usable %s value (%d rows read)", job.Stations, vals.Column, vals.Read)
	}
	pts := points(vals)
	spec, err := gridSpec(job, pts)
	if err != nil {
		return nil, err
	}
	if spec.Len() > maxCells {
		return nil, usagef("grid of %s is %d cells, over the limit of %d: use a coarser --res or a smaller --bbox", spec, spec.Len(), maxCells)
	}
	ip, err := interp.New(pts, job.Params)
	if err != nil {
		return nil, err
	}
	read := manifestNow()
	bar := newProgress(stderr, spec.Rows, "gridding")
	res := &gridResult{Values: vals, Spec: spec, Scheme: scheme}
	if streamable(job) {
		// Only the rasters: rows go from the interpolator straight into
		// the GeoTIFF writers (the same bytes, bounded memory).
		res.Rows = func(row0, n int, dst []float32) error {
			if err := ip.Rows(spec, row0, n, dst); err != nil {
				return err
			}
			bar.set(row0+n, spec.Rows)
			return nil
		}
	} else {
		index := ip.Grid(spec, bar.set)
		bar.done()
		res.Index, res.Bands = index, bands.NewClassifier(scheme).Raster(index)
		res.Tally = bands.NewTally(spec)
		res.Tally.Add(0, spec.Rows, res.Bands.Data)
		if len(regions) > 0 {
			res.Regions = region.Zonal(res.Bands, index, regions)
		}
	}
	gridded := manifestNow()
	res.timings = map[string]float64{
		"read_s": manifestSeconds(read.Sub(start)), "grid_s": manifestSeconds(gridded.Sub(read)),
	}
	if err := writeLayers(job, res, regions, start); err != nil {
		return nil, err
	}
	res.Elapsed = manifestNow().Sub(start)
	printSummary(stderr, job, res)
	return res, nil
}

// streamable reports whether the run writes only the rasters (index,
// bands) and no regions, so the grid can be streamed row block by row block.
func streamable(job gridJob) bool {
	if job.Regions != "" {
		return false
	}
	for name, on := range job.Layers {
		if on && name != "index" && name != "bands" {
			return false
		}
	}
	return true
}

// gridSpec is the grid of the run: --bbox, or the stations' extent widened by
// the search radius, snapped outward to the resolution.
func gridSpec(job gridJob, pts []interp.Point) (grid.Spec, error) {
	if job.BBox != nil {
		b := *job.BBox
		s, err := grid.NewSpec(b[0], b[1], b[2], b[3], job.Res)
		if err != nil {
			return s, usagef("--bbox: %v", err)
		}
		return s, nil
	}
	w, s, e, n := interp.Extent(pts, job.Params.RadiusKm, job.Res)
	return grid.NewSpec(w, s, e, n, job.Res)
}

// writeIndexTable writes the index step's table to path atomically.
func writeIndexTable(path string, res *station.IndexResult) error {
	return writeStream(path, func(w io.Writer) error { return station.WriteIndexCSV(w, res) })
}

// loadScheme reads a band scheme file, or gives the default bands for "".
func loadScheme(path string) (*bands.Scheme, error) {
	if path == "" {
		return bands.Default(), nil
	}
	return bands.LoadScheme(path)
}

// points are the stations as the interpolator takes them.
func points(v *station.Values) []interp.Point {
	pts := make([]interp.Point, len(v.Stations))
	for i, s := range v.Stations {
		pts[i] = interp.Point{Lon: s.Lon, Lat: s.Lat, Z: s.Z}
	}
	return pts
}

// writeLayers writes the chosen layers, the extra files and the manifest
// into a temporary directory beside job.Out and publishes it in place of
// job.Out once all are written (publish.go).
func writeLayers(job gridJob, res *gridResult, regions []region.Region, start time.Time) error {
	owned := map[string]bool{manifest.Name: true}
	for _, files := range layerFiles {
		for _, f := range files {
			owned[f] = true
		}
	}
	for name := range job.Extra {
		owned[name] = true
	}
	inputs := []string{job.Scheme, job.Regions}
	if job.StationsData == nil {
		inputs = append(inputs, job.Stations)
	}
	for _, in := range job.ExtraInputs {
		inputs = append(inputs, in.Path)
	}
	return publishDir(publishPlan{Out: job.Out, Owned: owned, Inputs: inputs, Write: func(dir string) error {
		writeStart := manifestNow()
		w := &layerWriter{job: job, res: res, regions: regions, dir: dir}
		for _, name := range allLayers {
			if !job.Layers[name] {
				continue
			}
			if err := w.write(name); err != nil {
				return fmt.Errorf("layer %s: %w", name, err)
			}
		}
		for _, name := range sortedKeys(job.Extra) {
			if err := writeBytes(filepath.Join(dir, name), job.Extra[name]); err != nil {
				return err
			}
		}
		res.timings["write_s"] = manifestSeconds(manifestNow().Sub(writeStart))
		m, err := buildManifest(job, res, dir, start)
		if err != nil {
			return err
		}
		if err := manifest.Write(dir, m); err != nil {
			return err
		}
		res.Files = res.Files[:0]
		for _, f := range m.Outputs {
			res.Files = append(res.Files, f.Path)
		}
		res.Files = append(res.Files, manifest.Name)
		return nil
	}})
}

// writeStream writes one file of a layer through a streaming encoder.
func writeStream(path string, enc func(w io.Writer) error) error {
	return publish.WriteFile(path, func(w *bufio.Writer) error { return enc(w) })
}

// regionsErrPos adds the line and column to a JSON syntax error in the
// regions file (the decoder reports a byte offset).
func regionsErrPos(path string, err error) error {
	var se *json.SyntaxError
	if !errors.As(err, &se) {
		return err
	}
	data, rerr := os.ReadFile(path)
	if rerr != nil {
		return err
	}
	off := int(se.Offset) - 1 // Offset is just past the offending byte
	if off < 0 {
		off = 0
	}
	if off > len(data) {
		off = len(data)
	}
	before := data[:off]
	line := bytes.Count(before, []byte{'\n'}) + 1
	col := utf8.RuneCount(before[bytes.LastIndexByte(before, '\n')+1:]) + 1
	msg := strings.TrimPrefix(err.Error(), "regions "+path+": ")
	return fmt.Errorf("regions %s line %d column %d: %s", path, line, col, msg)
}
