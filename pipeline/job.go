package pipeline

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"

	"drygrid/grid"
	"drygrid/interp"
	"drygrid/layer/picture"
	"drygrid/manifest"
	"drygrid/station"
)

// Job is everything one run needs: its inputs, the grid, the interpolation,
// the bands, the regions, the layers and the output directory. The command
// line's flags, job files (ParseJobFile) and the demo (DemoJob) all build
// one; Validate checks it, and Run checks it again before it starts.
type Job struct {
	// Stations is the station value table (CSV or TSV, optionally gzip).
	Stations string
	// StationsData, when not nil, is the table itself (made in memory);
	// Stations then only names it in messages, and it is no input of the
	// manifest.
	StationsData []byte
	// Values say which columns of the table hold what.
	Values station.ValueOptions
	// Index, when not nil, runs the index step first: the percentile and
	// SPI of each station, made from window totals, become the table the
	// grid reads (StationsData) and index.csv among the outputs.
	Index *IndexStep

	Res    float64     // cell size in degrees, in (0, 10]
	BBox   *[4]float64 // W, S, E, N; nil = the stations' extent widened by the radius
	Params interp.Params

	Scheme    string // band scheme file; "" = the default bands
	Regions   string // regions GeoJSON, for area in drought per region
	RegionKey string // the feature property naming a region ("" = id, then name)
	// Mask, when set, is a GeoJSON file of polygons (land, a country, the
	// districts) outside which cells are no data, or MaskRegions for the
	// union of the regions. A cell is inside when any part of it is (its
	// share inside above 0); cells on the mask's edge keep their value,
	// and their areas count by their exact share inside in the band shares,
	// the summary and the manifest.
	Mask string

	Layers     LayerSet // the layers written (see AllLayers)
	SimplifyKm float64  // band polygons simplified to this tolerance (0 = exact cell edges)
	Title      string   // picture and page title ("" = from the kind)
	Subtitle   string   // picture and page subtitle ("" = from the parameters)
	// Source names the data's source in the production line of the picture
	// and the page ("made ... UTC · SPI, 30 days ending ... · data:
	// <Source>"); "" leaves it out.
	Source string
	// StationsOnMap says which station markers map.png draws: "auto" (""
	// too: thinned and shrunk on a dense network), "all" or "none".
	StationsOnMap string
	// HatchBeyondKm, when above 0, hatches on map.png and map.html the
	// cells that hold a value but whose nearest station is farther than
	// this many km (Result.SupportRows), with a legend entry; 0 leaves
	// the maps as they were.
	HatchBeyondKm float64
	Out           string // output directory, replaced atomically
	// AllowEmpty publishes a map all the same when no station lies inside
	// the grid or no cell has a value (otherwise an error: an empty map
	// would read "0.0 % in drought").
	AllowEmpty bool

	// History, when set, is the history CSV the day's region rows are added
	// to once the layers are published, dated Date (YYYY-MM-DD; "" = today,
	// UTC).
	History string
	Date    string
	// Timezone is the IANA time zone of a Date of "today" or "yesterday"
	// ("" = UTC).
	Timezone string
	// WindowDays is the window of the totals behind the values, in days
	// (0 = unknown), and WindowLabel a free label of it ("30 days ending
	// 30 November"); with Date they go into the titles and the metadata of
	// every layer.
	WindowDays  int
	WindowLabel string
	// Archive publishes into Out/DATE/ (one directory per day) and points
	// the symbolic link Out/latest at the newest complete day (RunJob).
	Archive bool

	// Command names the command in the manifest ("grid", "demo", "run").
	Command string
	// Version is the software version in the manifest and the GeoTIFF tags.
	Version string
	// JobFile, when set, is the job file the job was read from: an input of
	// the manifest.
	JobFile string
	// CrossVal adds leave-one-out cross-validation figures to the manifest
	// and to the Result.
	CrossVal bool
	// Extra are more files to publish with the layers (name -> content).
	Extra map[string][]byte
	// ExtraParams and ExtraCounts go into the manifest beside the run's own.
	ExtraParams map[string]any
	ExtraCounts map[string]any

	// Progress, when not nil, is called as the grid's rows are done
	// (stage "grid", rows done, rows), from one goroutine at a time.
	Progress func(stage string, done, total int)
	// Warn, when not nil, receives the warnings of the inputs (a station
	// row skipped...).
	Warn func(msg string)
	// Note, when not nil, receives one line on each step before the grid
	// (the index step's figures).
	Note func(msg string)
	// Clock, when not nil, is the clock of the manifest's timings and of
	// the time made on the picture and the page.
	Clock func() time.Time
	// Made, when not zero, is the time written as made on the picture and
	// the page instead of the run's start: a fixed time makes those files
	// reproducible byte for byte (the command line takes it from
	// SOURCE_DATE_EPOCH, the reproducible-builds convention).
	Made time.Time

	// set by the index step
	extraInputs  []manifest.File
	extraTimings map[string]float64
}

// NewJob is the job of the command line's defaults: SPI values from the
// stations table, a 0.1 deg grid over the stations' extent widened by the
// radius, the default interpolation and bands, every layer but regions,
// written into out.
func NewJob(stations, out string) Job {
	layers, _ := ParseLayers("all")
	delete(layers, "regions")
	return Job{Stations: stations, Values: station.ValueOptions{Kind: station.KindSPI}, Res: 0.1,
		Params: interp.DefaultParams(), Layers: layers, Out: out, Command: "grid"}
}

// IndexStep is the index step of a job: the window totals per station and
// year, and the station list (id, latitude, longitude).
type IndexStep struct {
	Totals      string
	StationList string
	Options     station.IndexOptions
	// Daily, instead of Totals, is a table of daily records: the totals of
	// the window of Window days ending on the job's Date are computed from
	// it in memory. DailyOptions say how to read it; their Windows are all
	// the windows of the job (RunJob reads the file once for all), their
	// Target is set from the job's Date.
	Daily        string
	DailyOptions station.DailyOptions
	Window       int

	daily *station.WindowTotals // the daily records read, shared by the windows' jobs
}

// ErrUsage marks an error in how the job was asked for: a setting out of
// range or missing (the command line's exit code 2). Test it with
// errors.Is.
var ErrUsage = errors.New("usage")

// UsageError is a setting of a job that is out of range or missing.
type UsageError struct {
	// Msg is the message as the command line says it ("--res 0: must be
	// in (0, 10] degrees").
	Msg string
	// Key is the job file's key of the setting ("grid.res"), "" if none,
	// and Detail the message without the flag's name, for job files.
	Key, Detail string
	// Err is the error behind, if any.
	Err error
}

func (e *UsageError) Error() string { return e.Msg }

// Unwrap gives the error behind.
func (e *UsageError) Unwrap() error { return e.Err }

// Is makes errors.Is(err, ErrUsage) true.
func (e *UsageError) Is(target error) bool { return target == ErrUsage }

// Usagef is a usage error without a job-file key.
func Usagef(format string, a ...any) error {
	return &UsageError{Msg: fmt.Sprintf(format, a...)}
}

// usageAt is a usage error of one setting: flag+detail on the command line,
// key: detail in a job file.
func usageAt(flag, key, detail string) error {
	return &UsageError{Msg: flag + detail, Key: key, Detail: detail}
}

// Validate checks the job: the one check of every setting, whichever way
// the job was made. Its errors are *UsageError.
func (j *Job) Validate() error {
	if j.Stations == "" {
		return Usagef("--stations FILE is required")
	}
	if k := j.Values.Kind; k != station.KindSPI && k != station.KindPercentile && k != station.KindPctOfNormal {
		return usageAt("--kind ", "inputs.kind", fmt.Sprintf("must be %s, not %q", station.Kinds, string(k)))
	}
	if j.Out == "" {
		return Usagef("--out DIR is required")
	}
	for _, check := range []func() error{j.checkRes, j.checkSimplify, j.checkParams, j.checkLayerNames,
		j.checkHistory, j.checkDate, j.checkRegionsLayer, j.checkBBox, j.checkStationsOnMap, j.checkHatch, j.checkMask} {
		if err := check(); err != nil {
			return err
		}
	}
	if j.Index != nil {
		if (j.Index.Totals == "" && j.Index.Daily == "") || j.Index.StationList == "" {
			return Usagef("the index step needs the totals (or daily records) and the station list")
		}
		if j.Index.Daily != "" {
			if err := CheckWindows(j.Index.DailyOptions.Windows); err != nil {
				return err
			}
			if err := CheckDailyOptions(j.Index.DailyOptions); err != nil {
				return err
			}
			if j.Date == "" {
				return &UsageError{Msg: "daily records need the target date (--date)", Key: "date", Detail: "daily records need the target date (date = \"YYYY-MM-DD\", \"today\" or \"yesterday\")"}
			}
		}
		if err := j.Index.Options.Validate(); err != nil {
			return &UsageError{Msg: err.Error(), Key: "index", Detail: err.Error(), Err: err}
		}
	}
	return nil
}

// The checks of Validate, one setting each; the job-file parser calls them
// in the order of the file's tables, so that the first mistake is named.

func (j *Job) checkRes() error {
	if !(j.Res > 0 && j.Res <= grid.MaxRes) {
		return usageAt("--res ", "grid.res", fmt.Sprintf("%g: must be in (0, %d] degrees", j.Res, grid.MaxRes))
	}
	return nil
}

func (j *Job) checkStationsOnMap() error {
	if _, err := picture.ParseStationMarks(j.StationsOnMap); err != nil {
		return usageAt("--stations-on-map ", "output.stations_on_map", fmt.Sprintf("%q: must be auto, all or none", j.StationsOnMap))
	}
	return nil
}

func (j *Job) checkHatch() error {
	if j.HatchBeyondKm < 0 || math.IsNaN(j.HatchBeyondKm) || math.IsInf(j.HatchBeyondKm, 0) {
		return usageAt("--hatch-beyond-km ", "output.hatch_beyond_km", fmt.Sprintf("%g: must be 0 (off) or more", j.HatchBeyondKm))
	}
	return nil
}

func (j *Job) checkSimplify() error {
	if j.SimplifyKm < 0 || math.IsNaN(j.SimplifyKm) || math.IsInf(j.SimplifyKm, 0) {
		return usageAt("--simplify-km ", "output.simplify_km", fmt.Sprintf("%g: must be 0 or more", j.SimplifyKm))
	}
	return nil
}

func (j *Job) checkParams() error {
	err := j.Params.Validate()
	if err == nil {
		return nil
	}
	key := "interpolation"
	for _, k := range []string{"power", "neighbors", "radius-km", "min-stations", "sectors"} {
		if strings.Contains(err.Error(), "interp: "+k) {
			key = "interpolation." + strings.ReplaceAll(k, "-", "_")
			break
		}
	}
	return &UsageError{Msg: err.Error(), Key: key, Detail: strings.TrimPrefix(err.Error(), "interp: "), Err: err}
}

func (j *Job) checkLayerNames() error {
	if len(j.Layers) == 0 {
		return usageAt("--layers: ", "output.layers", fmt.Sprintf("no layer named (choose from %s)", strings.Join(LayerNames(), ",")))
	}
	for name, on := range j.Layers {
		if _, ok := layerFiles[name]; on && !ok {
			return usageAt("--layers: ", "output.layers", fmt.Sprintf("unknown layer %q (choose from %s)", name, strings.Join(LayerNames(), ",")))
		}
	}
	return nil
}

func (j *Job) checkHistory() error {
	if j.History != "" && j.Regions == "" {
		return &UsageError{Msg: "--history needs --regions FILE.geojson", Key: "history.file", Detail: "a history of area in drought needs [regions] file"}
	}
	return nil
}

func (j *Job) checkDate() error {
	if IsRelativeDate(j.Date) {
		_, err := LoadZone(j.Timezone)
		return err
	}
	if j.Date != "" {
		return CheckDate(j.Date)
	}
	return nil
}

func (j *Job) checkRegionsLayer() error {
	if j.Layers["regions"] && j.Regions == "" {
		return &UsageError{Msg: "--layers regions needs --regions FILE.geojson", Key: "output.layers", Detail: "layer regions needs [regions] file"}
	}
	return nil
}

// MaskRegions as Job.Mask masks the grid to the union of the regions.
const MaskRegions = "regions"

func (j *Job) checkMask() error {
	if j.Mask == MaskRegions && j.Regions == "" {
		return &UsageError{Msg: "--mask regions needs --regions FILE.geojson (or give --mask the file of the mask's polygons)",
			Key: "grid.mask", Detail: "\"regions\" needs [regions] file (or give the file of the mask's polygons)"}
	}
	return nil
}

func (j *Job) checkBBox() error {
	if j.BBox == nil {
		return nil
	}
	parts := make([]string, 4)
	for i, v := range j.BBox {
		parts[i] = strconv.FormatFloat(v, 'g', -1, 64)
	}
	return checkBBox(strings.Join(parts, ","), *j.BBox)
}

// CheckDate checks a date written YYYY-MM-DD.
func CheckDate(d string) error {
	if _, err := time.Parse("2006-01-02", d); err != nil || len(d) != 10 {
		return usageAt("--date ", "date", fmt.Sprintf("%q is not a calendar date YYYY-MM-DD", d))
	}
	return nil
}

// ParseBBox reads "W,S,E,N" in degrees (W > E crosses the antimeridian).
func ParseBBox(s string) ([4]float64, error) {
	var b [4]float64
	parts := strings.Split(s, ",")
	if len(parts) != 4 {
		return b, usageAt("--bbox ", "grid.bbox", fmt.Sprintf("%q: want W,S,E,N (four numbers in degrees)", s))
	}
	for i, p := range parts {
		v, err := strconv.ParseFloat(strings.TrimSpace(p), 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return b, usageAt("--bbox ", "grid.bbox", fmt.Sprintf("%q: %q is not a number", s, p))
		}
		b[i] = v
	}
	return b, checkBBox(s, b)
}

// checkBBox checks the bbox b, written s.
func checkBBox(s string, b [4]float64) error {
	bad := func(format string, a ...any) error {
		return usageAt("--bbox ", "grid.bbox", fmt.Sprintf("%q: ", s)+fmt.Sprintf(format, a...))
	}
	for i, v := range b {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			parts := append(strings.Split(s, ","), "", "", "", "")
			return bad("%q is not a number", parts[i])
		}
	}
	if b[1] >= b[3] {
		return bad("south %g must be below north %g", b[1], b[3])
	}
	if b[1] < -90 || b[3] > 90 {
		return bad("latitudes must lie in [-90, 90]")
	}
	if b[0] < -180 || b[0] > 360 || b[2] < -180 || b[2] > 360 {
		return bad("longitudes must lie in [-180, 360]")
	}
	if b[0] == b[2] {
		return bad("west equals east")
	}
	return nil
}
