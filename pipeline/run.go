package pipeline

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"maps"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"time"
	"unicode/utf8"

	"drygrid/bands"
	"drygrid/grid"
	"drygrid/history"
	"drygrid/interp"
	"drygrid/manifest"
	"drygrid/publish"
	"drygrid/region"
	"drygrid/station"
)

// Result is what a run made.
type Result struct {
	Values *station.Values // the stations read
	Spec   grid.Spec
	Scheme *bands.Scheme
	// Index and Bands are the whole rasters, made by Compute; Run streams
	// them block by block into the layers and leaves them nil.
	Index *grid.Float32
	Bands *grid.Uint8
	// Regions are the area-in-band statistics per region (with Job.Regions).
	Regions []region.ZonalStats
	// IndexStep is the index step's result (with Job.Index).
	IndexStep *station.IndexResult

	// CoveredCells are the cells with a value; CoveredPct is their share
	// of the grid's area, BandPct each band's share of the covered area
	// (by band code) and InDroughtPct that of the drought bands, all in
	// percent, cells weighted by their area on the ellipsoid.
	//
	// With Job.Mask the area is the mask's within the grid: CoveredPct is
	// of that area, and every share counts each cell by its share inside
	// the mask; MaskCells are the cells with a share inside (cells outside
	// are no data) and MaskKm2 the mask's area within the grid.
	CoveredCells int
	CoveredPct   float64
	MaskCells    int
	MaskKm2      float64
	BandPct      map[uint8]float64
	InDroughtPct float64

	// CrossVal holds the leave-one-out figures (with Job.CrossVal).
	CrossVal *interp.CrossValResult
	// Files are the files published (manifest.json last); Elapsed the
	// run's time.
	Files   []string
	Elapsed time.Duration
	// History is what was added to the history file (with Job.History).
	History *HistoryRows
	// Timings are the seconds of each step, as in the manifest.
	Timings map[string]float64

	rows  func(row0, n int, dst []float32) error // the interpolated rows, for the pass
	tally *bands.Tally
	ip    *interp.Interpolator // for SupportRows
	mask  *cellMask            // with Job.Mask
}

// SupportRows fills rows row0 .. row0+n-1 of the run's grid (Spec) with
// the distance in km to the nearest station within the search radius
// (grid.NoDataIndex where none) and the number of stations the weighting
// uses (0 where none), as interp.Support documents; either slice may be
// nil. It holds no raster: a picture or page may hatch the cells whose
// nearest station is farther than a chosen distance, block by block. The
// support layer (support.tif, support_count.tif) is written from it.
func (r *Result) SupportRows(row0, n int, dist []float32, count []uint16) error {
	if r.ip == nil {
		return errors.New("pipeline: the result has no interpolator (not made by Run or Compute)")
	}
	return r.ip.Support(r.Spec, row0, n, dist, count)
}

// HistoryRows are the rows a run added to a history file.
type HistoryRows struct {
	Path, Date string
	Rows       int
}

// inputs are the files a run reads besides the stations.
type inputs struct {
	scheme  *bands.Scheme
	regions []region.Region
	mask    []region.Region // the mask's polygons (Job.Mask)
}

// Run runs the job: the index step (with Job.Index), reading the
// stations, interpolating, classifying, tallying the bands, the layers and
// the manifest written into a staging directory beside Job.Out, which is
// published in place of Job.Out only when every file is complete (package
// publish), so a failed run leaves earlier outputs untouched; then the
// history rows (with Job.History). The output directory is locked, checked
// for writing and recovered from an earlier crash (publish.Begin) before
// any input is read, and stays locked until the history is written. The
// context is checked between row blocks.
func Run(ctx context.Context, job Job) (*Result, error) {
	if err := job.Validate(); err != nil {
		return nil, err
	}
	stage, err := publish.Begin(job.Out, publish.Options{})
	if err != nil {
		return nil, err
	}
	defer stage.Close()
	res, in, start, err := compute(ctx, &job)
	if err != nil {
		return nil, err
	}
	if err := writeLayers(ctx, &job, res, in.regions, start, stage); err != nil {
		return nil, err
	}
	res.Elapsed = job.now().Sub(start)
	if job.History != "" {
		date := job.Date
		if date == "" {
			date = time.Now().UTC().Format("2006-01-02")
		}
		if err := history.Append(job.History, date, res.Regions, res.Scheme); err != nil {
			return res, fmt.Errorf("layers published in %s, but the history was not updated: %w", job.Out, err)
		}
		res.History = &HistoryRows{Path: job.History, Date: date, Rows: len(res.Regions)}
	}
	return res, nil
}

// Compute runs the job in memory and writes nothing: the index step, the
// stations, the index and band rasters, the band shares and the statistics
// of the regions. Job.Out and Job.Layers are not used.
func Compute(ctx context.Context, job Job) (*Result, error) {
	if job.Out == "" {
		job.Out = "."
	}
	if len(job.Layers) == 0 {
		job.Layers = LayerSet{"index": true}
	}
	res, in, _, err := compute(ctx, &job)
	if err != nil {
		return nil, err
	}
	gridStart := job.now()
	p := newPass(&job, res)
	p.sinks = append(p.sinks, collect(res))
	p.addZonal(in.regions)
	if err := p.run(ctx); err != nil {
		return nil, err
	}
	if err := p.finish(res); err != nil {
		return nil, err
	}
	if err := checkCovered(&job, res); err != nil {
		return nil, err
	}
	res.Timings["grid_s"] = seconds(job.now().Sub(gridStart))
	return res, nil
}

// compute validates the job and runs it up to the pass over the rows:
// the index step, the inputs, the stations, the grid, the mask and the
// interpolator.
func compute(ctx context.Context, job *Job) (*Result, *inputs, time.Time, error) {
	start := job.now()
	if err := job.resolve(); err != nil {
		return nil, nil, start, err
	}
	if err := job.Validate(); err != nil {
		return nil, nil, start, err
	}
	var res Result
	if job.Index != nil && job.StationsData == nil {
		r, err := runIndex(job, start)
		if err != nil {
			return nil, nil, start, err
		}
		res.IndexStep = r
	}
	in, err := readInputs(job)
	if err != nil {
		return nil, nil, start, err
	}
	vals, err := ReadValues(job.Stations, job.StationsData, job.Values, job.Warn)
	if err != nil {
		return nil, nil, start, err
	}
	pts := Points(vals)
	spec, err := gridSpec(job, pts)
	if err != nil {
		return nil, nil, start, err
	}
	if err := checkInside(job, vals, spec, pts); err != nil {
		return nil, nil, start, err
	}
	mask, err := newCellMask(job, in, spec)
	if err != nil {
		return nil, nil, start, err
	}
	res.mask = mask
	ip, err := interp.New(pts, job.Params)
	if err != nil {
		return nil, nil, start, err
	}
	read := job.now()
	res.Values, res.Spec, res.Scheme, res.ip = vals, spec, in.scheme, ip
	// Rows go from the interpolator into the pass (pass.go), block by
	// block; the rasters are never held whole unless Compute asks.
	res.rows = func(row0, n int, dst []float32) error {
		if err := ctx.Err(); err != nil {
			return err
		}
		if err := ip.Rows(spec, row0, n, dst); err != nil {
			return err
		}
		if job.Progress != nil {
			job.Progress("grid", row0+n, spec.Rows)
		}
		return nil
	}
	res.Timings = map[string]float64{"read_s": seconds(read.Sub(start))}
	return &res, in, start, nil
}

// rowBlock is the number of rows interpolated between two looks at the
// context (and two progress reports).
const rowBlock = 256

// shares fills the band shares from the tally.
func (r *Result) shares() {
	t := r.tally
	r.CoveredCells = t.Cells
	r.CoveredPct = t.CoveredPct()
	r.BandPct = map[uint8]float64{}
	for _, b := range r.Scheme.Bands {
		r.BandPct[b.Code], _ = t.BandPct(b.Code)
	}
	r.InDroughtPct, _ = t.InDroughtPct(r.Scheme)
	if r.mask != nil {
		r.MaskCells, r.MaskKm2 = t.Inside, t.AreaKm2
	}
}

// now is the job's clock.
func (j *Job) now() time.Time {
	if j.Clock != nil {
		return j.Clock()
	}
	return time.Now()
}

// seconds rounds a duration to milliseconds, in seconds.
func seconds(d time.Duration) float64 { return float64(d.Milliseconds()) / 1000 }

// readInputs reads the band scheme and the regions.
func readInputs(job *Job) (*inputs, error) {
	scheme, err := SchemeFor(job.Scheme, job.Values.Kind)
	if err != nil {
		return nil, err
	}
	in := &inputs{scheme: scheme}
	if job.Regions != "" {
		r, err := region.ReadRegions(job.Regions, job.RegionKey)
		if err != nil {
			return nil, regionsErrPos(job.Regions, err)
		}
		in.regions = r
	}
	if err := readMask(job, in); err != nil {
		return nil, err
	}
	return in, nil
}

// ReadValues reads a station value table (from data when not nil, name
// then only naming it), passes its warnings to warn and refuses a table
// without a usable station.
func ReadValues(name string, data []byte, opt station.ValueOptions, warn func(string)) (*station.Values, error) {
	var vals *station.Values
	var err error
	if data != nil {
		vals, err = station.ParseValues(name, bytes.NewReader(data), opt)
	} else {
		vals, err = station.ReadValues(name, opt)
	}
	if err != nil {
		return nil, err
	}
	if warn != nil {
		for _, w := range vals.Warnings {
			warn(w)
		}
	}
	if vals.Read == 0 {
		return nil, fmt.Errorf("stations %s: the header has no data rows below it", name)
	}
	if len(vals.Stations) == 0 {
		return nil, fmt.Errorf("stations %s: no station with a usable %s value (%d rows read)", name, vals.Column, vals.Read)
	}
	return vals, nil
}

// gridSpec is the grid of the run: the bbox, or the stations' extent
// widened by the search radius, snapped outward to the resolution.
func gridSpec(job *Job, pts []interp.Point) (grid.Spec, error) {
	var s grid.Spec
	var err error
	if job.BBox != nil {
		b := *job.BBox
		s, err = grid.NewSpec(b[0], b[1], b[2], b[3], job.Res)
		if err != nil && !errors.Is(err, grid.ErrTooLarge) {
			return s, &UsageError{Msg: "--bbox: " + err.Error(), Err: err}
		}
	} else {
		w, so, e, n := interp.Extent(pts, job.Params.RadiusKm, job.Res)
		s, err = grid.NewSpec(w, so, e, n, job.Res)
	}
	if errors.Is(err, grid.ErrTooLarge) {
		return s, &UsageError{Msg: err.Error() + ": use a coarser --res or a smaller --bbox", Err: err}
	}
	return s, err
}

// LoadScheme reads a band scheme file, or gives the default bands for "".
func LoadScheme(path string) (*bands.Scheme, error) {
	if path == "" {
		return bands.Default(), nil
	}
	return bands.LoadScheme(path)
}

// KindUnit is the unit of the values of a kind: z for SPI, percentile,
// percent of normal.
func KindUnit(k station.Kind) bands.Unit {
	switch k {
	case station.KindPercentile:
		return bands.UnitPercentile
	case station.KindPctOfNormal:
		return bands.UnitPctOfNormal
	}
	return bands.UnitZ
}

// SchemeFor is the band scheme of a run of values of kind k: the scheme
// file (or the kind's default bands, bands.DefaultFor, for ""), refused
// with a usage error when its cuts are in a unit the kind does not take
// (bands.Scheme.For), with its legends in the kind's unit.
func SchemeFor(path string, k station.Kind) (*bands.Scheme, error) {
	u := KindUnit(k)
	if path == "" {
		return bands.DefaultFor(u), nil
	}
	s, err := bands.LoadScheme(path)
	if err != nil {
		return nil, err
	}
	s, err = s.For(u)
	if err != nil {
		msg := fmt.Sprintf("scheme %s: %v (--kind %s)", path, err, k)
		return nil, &UsageError{Msg: msg, Key: "bands.scheme", Detail: msg, Err: err}
	}
	return s, nil
}

// owned are the top-level names a run writes in its output directory.
func owned(job *Job) []string {
	names := []string{manifest.Name}
	for _, files := range layerFiles {
		names = append(names, files...)
	}
	for name := range job.Extra {
		names = append(names, name)
	}
	return names
}

// previousOutputs lists the outputs the manifest in dir records.
func previousOutputs(dir string) []string {
	path := filepath.Join(dir, manifest.Name)
	b, err := os.ReadFile(path)
	if err != nil {
		return nil
	}
	names, err := manifest.ParseOutputs(path, b)
	if err != nil {
		return nil
	}
	return names
}

// writeLayers writes the chosen layers, the extra files and the manifest
// into the stage's directory beside job.Out and swaps it in place of
// job.Out once all are written (the stage stays locked until closed).
func writeLayers(ctx context.Context, job *Job, res *Result, regions []region.Region, start time.Time, stage *publish.Stage) error {
	inputs := []string{job.Scheme, job.Regions}
	if job.Mask != "" && job.Mask != MaskRegions {
		inputs = append(inputs, job.Mask)
	}
	if job.StationsData == nil {
		inputs = append(inputs, job.Stations)
	}
	if job.JobFile != "" {
		inputs = append(inputs, job.JobFile)
	}
	for _, in := range job.extraInputs {
		inputs = append(inputs, in.Path)
	}
	stage.SetOptions(publish.Options{Owned: owned(job), Inputs: inputs, Previous: previousOutputs})
	err := func(dir string) error {
		writeStart := job.now()
		made := start
		if !job.Made.IsZero() {
			made = job.Made
		}
		w := &layerWriter{job: job, res: res, regions: regions, dir: dir, made: made}
		if err := w.runPass(ctx); err != nil {
			return err
		}
		res.Timings["grid_s"] = seconds(job.now().Sub(writeStart))
		if err := checkCovered(job, res); err != nil {
			return err
		}
		writeStart = job.now()
		for _, name := range LayerNames() {
			if !job.Layers[name] {
				continue
			}
			if err := ctx.Err(); err != nil {
				return err
			}
			if err := w.write(name); err != nil {
				return fmt.Errorf("layer %s: %w", name, err)
			}
		}
		for _, name := range slices.Sorted(maps.Keys(job.Extra)) {
			if err := writeBytes(filepath.Join(dir, name), job.Extra[name]); err != nil {
				return err
			}
		}
		res.Timings["write_s"] = seconds(job.now().Sub(writeStart))
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
	}(stage.Dir())
	if err != nil {
		return err
	}
	return stage.Swap()
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
	lineStart := before[bytes.LastIndexByte(before, '\n')+1:]
	if line == 1 {
		// A byte-order mark (skipped by the reader) is no column.
		lineStart = bytes.TrimPrefix(lineStart, []byte("\uFEFF"))
	}
	col := utf8.RuneCount(lineStart) + 1
	msg := strings.TrimPrefix(err.Error(), "regions "+path+": ")
	return fmt.Errorf("regions %s line %d column %d: %s", path, line, col, msg)
}
