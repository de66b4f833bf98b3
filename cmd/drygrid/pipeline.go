package main

import (
	"bufio"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"time"

	"drygrid/classes"
	"drygrid/export"
	"drygrid/grid"
	"drygrid/interp"
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
}

// gridResult is what a run made, for the summary and the demo.
type gridResult struct {
	Values  *station.Values
	Spec    grid.Spec
	Scheme  *classes.Scheme
	Index   *grid.Float32
	Bands   *grid.Uint8
	Regions []grid.ZonalStats
	Files   []string
	Elapsed time.Duration
}

// runGrid reads the stations, interpolates, classifies and writes the
// layers. All files are written into a staging directory inside Out and
// moved into place only when every layer is complete, so a failed run leaves
// earlier outputs untouched.
func runGrid(job gridJob, stderr io.Writer) (*gridResult, error) {
	start := time.Now()
	scheme := classes.Default()
	if job.Scheme != "" {
		s, err := classes.LoadScheme(job.Scheme)
		if err != nil {
			return nil, err
		}
		scheme = s
	}
	var regions []grid.Region
	if job.Regions != "" {
		r, err := grid.ReadRegions(job.Regions, job.RegionKey)
		if err != nil {
			return nil, err
		}
		regions = r
	}
	vals, err := station.ReadValues(job.Stations, job.Values)
	if err != nil {
		return nil, err
	}
	for _, w := range vals.Warnings {
		fmt.Fprintf(stderr, "warning: %s\n", w)
	}
	if len(vals.Stations) == 0 {
		return nil, fmt.Errorf("stations %s: no station with a usable %s value (%d rows read)", job.Stations, vals.Column, vals.Read)
	}
	pts := make([]interp.Point, len(vals.Stations))
	for i, s := range vals.Stations {
		pts[i] = interp.Point{Lon: s.Lon, Lat: s.Lat, Z: s.Z}
	}
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
	bar := newProgress(stderr, spec.Rows, "gridding")
	index := ip.Grid(spec, bar.set)
	bar.done()
	bands := classify(index, scheme)

	res := &gridResult{Values: vals, Spec: spec, Scheme: scheme, Index: index, Bands: bands}
	if len(regions) > 0 {
		res.Regions = grid.Zonal(bands, index, regions)
	}
	if err := writeLayers(job, res, regions); err != nil {
		return nil, err
	}
	res.Elapsed = time.Since(start)
	printSummary(stderr, job, res)
	return res, nil
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

// classify turns the index raster into band codes (0 = no data).
func classify(index *grid.Float32, scheme *classes.Scheme) *grid.Uint8 {
	bands := grid.NewUint8(index.Spec, 0)
	for i, v := range index.Data {
		if v != index.NoData {
			bands.Data[i] = scheme.Classify(float64(v))
		}
	}
	return bands
}

// writeLayers writes the chosen layers into a staging directory and moves
// them into job.Out once all are written.
func writeLayers(job gridJob, res *gridResult, regions []grid.Region) error {
	if err := os.MkdirAll(job.Out, 0o755); err != nil {
		return fmt.Errorf("output directory: %w", err)
	}
	stage, err := os.MkdirTemp(job.Out, ".drygrid-staging-")
	if err != nil {
		return fmt.Errorf("output directory %s: %w", job.Out, err)
	}
	defer os.RemoveAll(stage)
	w := &layerWriter{job: job, res: res, regions: regions, dir: stage}
	for _, name := range allLayers {
		if !job.Layers[name] {
			continue
		}
		if err := w.write(name); err != nil {
			return fmt.Errorf("layer %s: %w", name, err)
		}
	}
	entries, err := os.ReadDir(stage)
	if err != nil {
		return err
	}
	for _, e := range entries {
		if err := os.Rename(filepath.Join(stage, e.Name()), filepath.Join(job.Out, e.Name())); err != nil {
			return fmt.Errorf("publish %s: %w", e.Name(), err)
		}
		res.Files = append(res.Files, e.Name())
	}
	return nil
}

// writeStream writes one file of a layer through a streaming encoder.
func writeStream(path string, enc func(w io.Writer) error) error {
	return export.WriteFileAtomic(path, func(w *bufio.Writer) error { return enc(w) })
}
