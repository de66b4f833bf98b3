package pipeline

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"time"
	"unicode/utf8"

	"github.com/BurntSushi/toml"

	"drygrid/internal/tomlpos"
	"drygrid/interp"
	"drygrid/station"
)

// jobMaxBytes bounds a job file; real ones are a page.
const jobMaxBytes = 1 << 20

// jobFile is the TOML layout of a job file (see JobExample).
type jobFile struct {
	Window   string `toml:"window"`
	Date     string `toml:"date"`
	Timezone string `toml:"timezone"`
	Archive  bool   `toml:"archive"`
	Year     int    `toml:"year"`
	Title    string `toml:"title"`
	Source   string `toml:"source"`
	Inputs   struct {
		Stations     string   `toml:"stations"`
		Totals       string   `toml:"totals"`
		Daily        string   `toml:"daily"`
		Windows      []int    `toml:"windows"`
		Units        string   `toml:"units"`
		ExcludeFlags []string `toml:"exclude_flags"`
		MinShare     float64  `toml:"min_share"`
		Kind         string   `toml:"kind"`
		ValueColumn  string   `toml:"value_column"`
		IDColumn     string   `toml:"id_column"`
		LatColumn    string   `toml:"lat_column"`
		LonColumn    string   `toml:"lon_column"`
		TotalColumn  string   `toml:"total_column"`
	} `toml:"inputs"`
	Index struct {
		RefStart     int    `toml:"ref_start"`
		RefEnd       int    `toml:"ref_end"`
		MinYears     int    `toml:"min_years"`
		Distribution string `toml:"distribution"`
		PoorFit      string `toml:"poor_fit"`
	} `toml:"index"`
	Grid struct {
		Res        float64   `toml:"res"`
		BBox       []float64 `toml:"bbox"`
		AllowEmpty bool      `toml:"allow_empty"`
		Mask       string    `toml:"mask"`
	} `toml:"grid"`
	Interp struct {
		Power       float64 `toml:"power"`
		Neighbors   int     `toml:"neighbors"`
		RadiusKm    float64 `toml:"radius_km"`
		MinStations int     `toml:"min_stations"`
		Sectors     int     `toml:"sectors"`
		CrossVal    bool    `toml:"crossval"`
	} `toml:"interpolation"`
	Bands struct {
		Scheme string `toml:"scheme"`
	} `toml:"bands"`
	Regions struct {
		File string `toml:"file"`
		Key  string `toml:"key"`
	} `toml:"regions"`
	Output struct {
		Dir           string   `toml:"dir"`
		Layers        []string `toml:"layers"`
		SimplifyKm    float64  `toml:"simplify_km"`
		StationsOnMap string   `toml:"stations_on_map"`
		HatchBeyondKm float64  `toml:"hatch_beyond_km"`
	} `toml:"output"`
	History struct {
		File string `toml:"file"`
	} `toml:"history"`
}

// jobKnownKeys lists the keys of each table, for the unknown-key message.
var jobKnownKeys = map[string][]string{
	"":              {"window", "date", "timezone", "archive", "year", "title", "source", "inputs", "index", "grid", "interpolation", "bands", "regions", "output", "history"},
	"inputs":        {"stations", "totals", "daily", "windows", "units", "exclude_flags", "min_share", "kind", "value_column", "id_column", "lat_column", "lon_column", "total_column"},
	"index":         {"ref_start", "ref_end", "min_years", "distribution", "poor_fit"},
	"grid":          {"res", "bbox", "allow_empty", "mask"},
	"interpolation": {"power", "neighbors", "radius_km", "min_stations", "sectors", "crossval"},
	"bands":         {"scheme"},
	"regions":       {"file", "key"},
	"output":        {"dir", "layers", "simplify_km", "stations_on_map", "hatch_beyond_km"},
	"history":       {"file"},
}

type jobParser struct {
	name  string
	data  []byte
	text  string                 // data without a byte-order mark, as decoded
	first map[string]tomlpos.Key // "grid.res" -> where its value sits
}

func (p *jobParser) errAt(key string, format string, args ...any) error {
	msg := fmt.Sprintf(format, args...)
	if at, ok := p.first[key]; ok {
		return fmt.Errorf("job %s line %d column %d: %s: %s", p.name, at.Line, at.Col, key, msg)
	}
	return fmt.Errorf("job %s: %s: %s", p.name, key, msg)
}

// usageAt is errAt as a usage error (the command line's exit code 2): a
// setting of the job's date, time zone or daily records that cannot be.
func (p *jobParser) usageAt(key string, format string, args ...any) error {
	return &UsageError{Msg: p.errAt(key, format, args...).Error()}
}

// dailyUsage turns a usage error of the daily checks into the job file's
// message at its key, as a usage error.
func (p *jobParser) dailyUsage(err error) error {
	var ue *UsageError
	if errors.As(err, &ue) && ue.Key != "" {
		key := ue.Key
		if key == "windows" {
			key = "inputs.windows"
		}
		return p.usageAt(key, "%s", ue.Detail)
	}
	return err
}

// jobTOMLLine matches the plain decode errors of BurntSushi/toml:
// "toml: line L (last key "K"): message".
var jobTOMLLine = regexp.MustCompile(`^toml: line (\d+) \(last key "([^"]*)"\): (.*)$`)

// jobTOMLError turns a TOML error into "job F line L column C: ...".
func (p *jobParser) jobTOMLError(err error) error {
	var pe toml.ParseError
	if errors.As(err, &pe) {
		msg := pe.Message
		if pe.LastKey != "" {
			msg = fmt.Sprintf("after key %q: %s", pe.LastKey, msg)
		}
		if st := pe.Position.Start; st >= 0 && st <= len(p.text) && pe.Position.Line > 0 {
			// The byte offset is exact where the lexer's line may already
			// have moved past a newline.
			before := p.text[:st]
			line := strings.Count(before, "\n") + 1
			col := utf8.RuneCountInString(before[strings.LastIndexByte(before, '\n')+1:]) + 1
			return fmt.Errorf("job %s line %d column %d: %s", p.name, line, col, msg)
		}
		if pe.Position.Line > 0 && pe.Position.Col > 0 {
			return fmt.Errorf("job %s line %d column %d: %s", p.name, pe.Position.Line, pe.Position.Col, msg)
		}
		if pe.Position.Line > 0 {
			return fmt.Errorf("job %s line %d: %s", p.name, pe.Position.Line, msg)
		}
		return fmt.Errorf("job %s: %s", p.name, msg)
	}
	if m := jobTOMLLine.FindStringSubmatch(err.Error()); m != nil {
		if at, ok := p.first[m[2]]; ok {
			return fmt.Errorf("job %s line %d column %d: %s: %s", p.name, at.Line, at.Col, m[2], m[3])
		}
		return fmt.Errorf("job %s line %s: %s: %s", p.name, m[1], m[2], m[3])
	}
	return fmt.Errorf("job %s: %w", p.name, err)
}

// ReadJobFile reads and parses the job file at path.
func ReadJobFile(path string) (*Job, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("job %s: %w", path, err)
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, jobMaxBytes+1))
	if err != nil {
		return nil, fmt.Errorf("job %s: %w", path, err)
	}
	return ParseJobFile(path, data)
}

// ParseJobFile reads a job file (TOML, see JobExample) into a validated
// Job; name is its path, used in messages and to resolve relative paths
// (against the file's directory). It reads no other file. Errors name the
// file, and the line and column of the key at fault.
func ParseJobFile(name string, data []byte) (*Job, error) {
	p := &jobParser{name: name, data: data}
	if len(data) > jobMaxBytes {
		return nil, fmt.Errorf("job %s: larger than %d bytes; a job file is a page", name, jobMaxBytes)
	}
	if len(strings.TrimSpace(strings.TrimPrefix(string(data), "\ufeff"))) == 0 {
		return nil, fmt.Errorf("job %s line 1: empty job file (see 'drygrid run --example')", name)
	}
	if !utf8.Valid(data) {
		line := strings.Count(string(data[:jobFirstInvalid(data)]), "\n") + 1
		return nil, fmt.Errorf("job %s line %d: not valid UTF-8; save the file as UTF-8", name, line)
	}
	p.first = tomlpos.First(tomlpos.Index(data))
	p.text = strings.TrimPrefix(string(data), "\ufeff")
	var f jobFile
	md, err := toml.Decode(p.text, &f)
	if err != nil {
		return nil, p.jobTOMLError(err)
	}
	if und := md.Undecoded(); len(und) > 0 {
		return nil, p.unknownKey(und)
	}
	return p.build(&f, &md)
}

// jobFirstInvalid is the offset of the first byte that is not UTF-8.
func jobFirstInvalid(data []byte) int {
	for i := 0; i < len(data); {
		r, n := utf8.DecodeRune(data[i:])
		if r == utf8.RuneError && n <= 1 {
			return i
		}
		i += n
	}
	return len(data)
}

// unknownKey reports the first (by line) key the format does not know.
func (p *jobParser) unknownKey(keys []toml.Key) error {
	paths := make([]string, len(keys))
	for i, k := range keys {
		paths[i] = strings.Join(k, ".")
	}
	at, msg := tomlpos.Unknown(paths, p.first, jobKnownKeys)
	if at.Line > 0 {
		return fmt.Errorf("job %s line %d column %d: %s", p.name, at.Line, at.Col, msg)
	}
	return fmt.Errorf("job %s: %s", p.name, msg)
}

// path resolves a path of the job file against its directory; "" stays "".
func (p *jobParser) path(key, v string, md *toml.MetaData) (string, error) {
	if v == "" {
		if md.IsDefined(strings.Split(key, ".")...) {
			return "", p.errAt(key, "empty path")
		}
		return "", nil
	}
	if strings.ContainsRune(v, 0) {
		return "", p.errAt(key, "path holds a NUL byte")
	}
	if filepath.IsAbs(v) {
		return filepath.Clean(v), nil
	}
	return filepath.Join(filepath.Dir(p.name), v), nil
}

// usage turns a usage error of Validate into the job file's message at its key.
func (p *jobParser) usage(err error) error {
	var ue *UsageError
	if errors.As(err, &ue) && ue.Key != "" {
		return p.errAt(ue.Key, "%s", ue.Detail)
	}
	return fmt.Errorf("job %s: %v", p.name, err)
}

func (p *jobParser) build(f *jobFile, md *toml.MetaData) (*Job, error) {
	def := func(key string) bool { return md.IsDefined(strings.Split(key, ".")...) }
	j := &Job{JobFile: p.name, Date: f.Date, Command: "run", Timezone: f.Timezone, Archive: f.Archive}
	year := f.Year
	if IsRelativeDate(f.Date) {
		j.Date = strings.ToLower(f.Date)
	} else if def("date") {
		if err := CheckDate(f.Date); err != nil {
			return nil, p.usageAt("date", "%q is not a calendar date YYYY-MM-DD, nor today or yesterday", f.Date)
		}
		d, _ := time.Parse("2006-01-02", f.Date)
		if !def("year") {
			year = d.Year()
		}
	}
	if def("timezone") {
		if _, err := LoadZone(f.Timezone); err != nil {
			return nil, p.dailyUsage(err)
		}
	}
	if f.Archive && j.Date == "" {
		return nil, p.usageAt("archive", "a dated archive needs the job's date (date = \"YYYY-MM-DD\", \"today\" or \"yesterday\")")
	}
	if def("year") && (f.Year < station.MinTotalYear || f.Year > station.MaxTotalYear) {
		return nil, p.errAt("year", "%d is not from %d to %d", f.Year, station.MinTotalYear, station.MaxTotalYear)
	}
	if !utf8.ValidString(f.Window) || len(f.Window) > 200 {
		return nil, p.errAt("window", "must be a label of at most 200 bytes")
	}
	j.WindowLabel = f.Window
	j.ExtraParams = map[string]any{"window": f.Window, "date": j.Date, "year": year}
	var err error
	in := f.Inputs
	if in.Stations == "" {
		if def("inputs.stations") {
			return nil, p.errAt("inputs.stations", "empty path")
		}
		return nil, fmt.Errorf("job %s: [inputs] stations is required (the station values, or with totals the station list)", p.name)
	}
	kind := station.KindSPI
	if in.Kind != "" {
		if kind, err = station.ParseKind(in.Kind); err != nil {
			return nil, p.errAt("inputs.kind", "%v", err)
		}
	}
	j.Values = station.ValueOptions{Kind: kind, ValueColumn: in.ValueColumn,
		IDColumn: in.IDColumn, LatColumn: in.LatColumn, LonColumn: in.LonColumn}
	stations, err := p.path("inputs.stations", in.Stations, md)
	if err != nil {
		return nil, err
	}
	totals, err := p.path("inputs.totals", in.Totals, md)
	if err != nil {
		return nil, err
	}
	daily, err := p.path("inputs.daily", in.Daily, md)
	if err != nil {
		return nil, err
	}
	if daily != "" && totals != "" {
		return nil, p.usageAt("inputs.daily", "give daily records or window totals, not both")
	}
	if daily == "" {
		for _, k := range []string{"inputs.windows", "inputs.units", "inputs.exclude_flags", "inputs.min_share"} {
			if def(k) {
				return nil, p.usageAt(k, "applies only with [inputs] daily (daily records)")
			}
		}
	}
	if totals != "" || daily != "" {
		step := &IndexStep{Totals: totals, StationList: stations, Daily: daily}
		if daily != "" {
			step.DailyOptions = station.DailyOptions{Windows: in.Windows, Units: strings.ToLower(in.Units),
				ExcludeFlags: in.ExcludeFlags, MinShare: in.MinShare}
			if !def("inputs.windows") {
				step.DailyOptions.Windows = []int{30}
			}
			if err := CheckWindows(step.DailyOptions.Windows); err != nil {
				return nil, p.dailyUsage(err)
			}
			if err := CheckDailyOptions(step.DailyOptions); err != nil {
				return nil, p.dailyUsage(err)
			}
			if def("inputs.min_share") && in.MinShare == 0 {
				return nil, p.usageAt("inputs.min_share", "0: must be in (0, 1]")
			}
			if j.Date == "" {
				return nil, Usagef("job %s: daily records need the date their windows end on (date = \"YYYY-MM-DD\", \"today\" or \"yesterday\")", p.name)
			}
		}
		step.Options = station.IndexOptions{Year: f.Year, RefStart: f.Index.RefStart, RefEnd: f.Index.RefEnd,
			MinYears: f.Index.MinYears, Distribution: strings.ToLower(f.Index.Distribution), TotalColumn: in.TotalColumn,
			PoorFit: strings.ToLower(f.Index.PoorFit)}
		if def("index.min_years") && f.Index.MinYears < 1 {
			return nil, p.errAt("index.min_years", "%d: must be 1 or more", f.Index.MinYears)
		}
		if err := step.Options.Validate(); err != nil {
			key := "index"
			switch {
			case strings.Contains(err.Error(), "distribution"):
				key = "index.distribution"
			case strings.HasPrefix(err.Error(), "poor-fit"):
				key = "index.poor_fit"
			case strings.Contains(err.Error(), "reference"):
				key = "index.ref_start"
			case strings.HasPrefix(err.Error(), "year"):
				key = "year"
			}
			return nil, p.errAt(key, "%v", err)
		}
		if in.ValueColumn != "" || in.IDColumn != "" || in.LatColumn != "" || in.LonColumn != "" {
			return nil, p.errAt("inputs", "value_column, id_column, lat_column and lon_column apply to a values table, not to the index step (totals or daily)")
		}
		j.Index = step
		j.Stations = "index.csv"
	} else {
		for _, k := range []string{"index", "inputs.total_column"} {
			if def(k) {
				return nil, p.errAt(k, "applies only with [inputs] totals or daily (the index step)")
			}
		}
		j.Stations = stations
	}

	j.Res = 0.1
	if def("grid.res") {
		j.Res = f.Grid.Res
	}
	if err := j.checkRes(); err != nil {
		return nil, p.usage(err)
	}
	if def("grid.bbox") {
		if len(f.Grid.BBox) != 4 {
			return nil, p.errAt("grid.bbox", "want [W, S, E, N] (four numbers in degrees), got %d", len(f.Grid.BBox))
		}
		b := [4]float64(f.Grid.BBox)
		j.BBox = &b
		if err := j.checkBBox(); err != nil {
			return nil, p.usage(err)
		}
	}
	ip := interp.DefaultParams()
	if def("interpolation.power") {
		ip.Power = f.Interp.Power
	}
	if def("interpolation.neighbors") {
		ip.Neighbors = f.Interp.Neighbors
	}
	if def("interpolation.radius_km") {
		ip.RadiusKm = f.Interp.RadiusKm
	}
	if def("interpolation.min_stations") {
		ip.MinStations = f.Interp.MinStations
	}
	if def("interpolation.sectors") {
		ip.Sectors = f.Interp.Sectors
	}
	j.Params = ip
	if err := j.checkParams(); err != nil {
		return nil, p.usage(err)
	}
	j.CrossVal = f.Interp.CrossVal
	j.AllowEmpty = f.Grid.AllowEmpty
	if j.Scheme, err = p.path("bands.scheme", f.Bands.Scheme, md); err != nil {
		return nil, err
	}
	if j.Regions, err = p.path("regions.file", f.Regions.File, md); err != nil {
		return nil, err
	}
	j.RegionKey = f.Regions.Key
	if f.Regions.Key != "" && j.Regions == "" {
		return nil, p.errAt("regions.key", "needs [regions] file")
	}
	if f.Grid.Mask == MaskRegions {
		j.Mask = MaskRegions
	} else if j.Mask, err = p.path("grid.mask", f.Grid.Mask, md); err != nil {
		return nil, err
	}
	if err := j.checkMask(); err != nil {
		return nil, p.usage(err)
	}
	if f.Output.Dir == "" {
		if def("output.dir") {
			return nil, p.errAt("output.dir", "empty path")
		}
		return nil, fmt.Errorf("job %s: [output] dir is required", p.name)
	}
	if j.Out, err = p.path("output.dir", f.Output.Dir, md); err != nil {
		return nil, err
	}
	if def("output.layers") && strings.TrimSpace(strings.Join(f.Output.Layers, "")) == "" {
		return nil, p.errAt("output.layers", "the list names no layer; list the layers (%s) or write [\"all\"]", strings.Join(AllLayers, ", "))
	}
	layers, err := ParseLayers(strings.Join(f.Output.Layers, ","))
	if err != nil {
		return nil, p.usage(err)
	}
	if j.Regions == "" && !def("output.layers") {
		delete(layers, "regions")
	}
	j.Layers = layers
	if err := j.checkRegionsLayer(); err != nil {
		return nil, p.usage(err)
	}
	j.SimplifyKm = f.Output.SimplifyKm
	if err := j.checkSimplify(); err != nil {
		return nil, p.usage(err)
	}
	if j.History, err = p.path("history.file", f.History.File, md); err != nil {
		return nil, err
	}
	if err := j.checkHistory(); err != nil {
		return nil, p.usage(err)
	}
	if j.History != "" && j.Date == "" {
		return nil, p.errAt("history.file", "a history needs the job's date (date = \"YYYY-MM-DD\"), the key of each row")
	}
	j.Title = f.Title // "" = from the kind, window and date, at run time
	j.Source = strings.TrimSpace(f.Source)
	j.StationsOnMap = f.Output.StationsOnMap
	j.HatchBeyondKm = f.Output.HatchBeyondKm
	if err := j.Validate(); err != nil {
		return nil, p.usage(err)
	}
	return j, nil
}

// JobExample is the commented example printed by `drygrid run --example`. Its
// paths fit the directory `drygrid demo` writes: save it there as job.toml.
const JobExample = `# drygrid job file: the daily run in one file ('drygrid run job.toml').
# Relative paths are relative to this file's directory. An unknown key is an
# error. This example fits the directory 'drygrid demo' writes (invented data):
#   drygrid demo --out demo && drygrid run --example > demo/job.toml && drygrid run demo/job.toml
#
# The layers are interpolated estimates from a station network, not official
# drought declarations: consult the national meteorological or hydrological
# service and follow local rules.

window = "30 days ending 30 November"   # a label for the manifest (titles give the window in days)
date = "2025-11-30"                     # the run's date, the key of the history rows; "yesterday" or
                                        # "today" for a job that runs itself every day
# timezone = "Pacific/Auckland"         # the zone of today and yesterday (default: UTC)
# archive = true                        # publish into dir/YYYY-MM-DD/, dir/latest -> the newest day
# year = 2025                           # target year of the totals (default: the date's year)
# title = "..."                         # picture and page title (default: from kind, window, date)
# source = "..."                        # the data's source, in the line under the picture and the page

[inputs]
# With daily records or window totals the index step runs first (percentile and
# SPI per station for the target year) and stations is the station list (id,
# latitude, longitude). Without either: stations is a table of values, as for
# 'drygrid grid --stations'.
stations = "inputs/stations.csv"
daily = "inputs/daily.csv.gz"           # station, date, precipitation[, flag]; CSV/TSV, gzip or Parquet
windows = [30]                          # days ending on the date; several: one set of layers each, in dir/30d/ ...
exclude_flags = ["X"]                   # quality flags whose values are missing
# units = "mm"                          # mm, tenths-mm or inch
# min_share = 0.9                       # least share of a window's days reported for its total
# totals = "inputs/totals.csv"          # instead of daily: window totals per station and year
kind = "spi"                            # what is mapped: spi or percentile
# total_column = "total_mm"             # (totals) default: total|total_mm|precip|value
# value_column = "spi"                  # (values table) default: the column named like kind
# id_column = "station"
# lat_column = "lat"
# lon_column = "lon"

[index]                                 # only with daily or totals
min_years = 30                          # least number of reference totals
# ref_start = 1991                      # reference period (default: every year a station has)
# ref_end = 2020
distribution = "gamma"                  # gamma or empirical
# poor_fit = "empirical"                # a gamma fit Anderson-Darling rejects: empirical (Gringorten) SPI, keep, or drop

[grid]
res = 0.05                              # cell size in degrees
bbox = [-128.0, -45.0, -116.0, -38.0]   # W, S, E, N; W > E crosses the antimeridian
                                        # (default: the stations' extent widened by radius_km)
# allow_empty = false                   # true: publish a map with no station inside or no covered cell
mask = "inputs/coast.geojson"           # polygons (land, a country): cells wholly outside are no data, edge
                                        # cells count by their exact share inside; "regions": the regions' union

[interpolation]
power = 2.0                             # IDW weights distance^-power
neighbors = 12                          # nearest stations used per cell
radius_km = 150.0                       # search radius, great-circle km
min_stations = 3                        # fewer stations within the radius: no data
sectors = 0                             # 4 or 8: at most neighbors/sectors stations per direction
crossval = false                        # true: leave-one-out figures in the summary and manifest

[bands]
# scheme = "bands.toml"                 # a band scheme file ('drygrid scheme --example'); default: built-in

[regions]
file = "inputs/districts.geojson"       # Polygon/MultiPolygon features
key = "name"                            # the property naming each region

[output]
dir = "daily"                           # replaced atomically; files drygrid did not write are kept
layers = ["index", "bands", "geojson", "stations", "regions", "map", "page"]   # or ["all"]
# simplify_km = 0.0                     # simplify band polygons (0: exact cell edges)
# stations_on_map = "auto"              # station markers on map.png: auto (thinned when dense), all, none
# hatch_beyond_km = 0.0                 # hatch cells whose nearest station is farther (0: off)

[history]
file = "history.csv"                    # area in drought per region and date, appended (needs date and regions)
`
