package pipeline

import (
	"errors"
	"path/filepath"
	"strings"
	"testing"
)

// TestParseJobPaths: relative paths resolve against the job file's
// directory, absolute ones stay; defaults fill what the file leaves out.
func TestParseJobPaths(t *testing.T) {
	src := `
window = "90 days"
year = 2024
source = " Invented Met Service "
[inputs]
stations = "values/spi.csv"
[grid]
bbox = [170, -50, -170, -30]
[regions]
file = "/srv/districts.geojson"
key = "code"
[output]
dir = "../out"
layers = ["index", "bands", "regions"]
stations_on_map = "none"
hatch_beyond_km = 150
`
	j, err := ParseJobFile(filepath.Join("jobs", "daily", "job.toml"), []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	if want := filepath.Join("jobs", "daily", "values", "spi.csv"); j.Stations != want {
		t.Errorf("stations %s, want %s", j.Stations, want)
	}
	if want := filepath.Join("jobs", "out"); j.Out != want {
		t.Errorf("out %s, want %s", j.Out, want)
	}
	if j.Regions != "/srv/districts.geojson" || j.RegionKey != "code" {
		t.Errorf("regions %s key %s", j.Regions, j.RegionKey)
	}
	// Defaults of `drygrid grid` (docs/design.md, "Command line").
	p := j.Params
	if j.Res != 0.1 || p.Power != 2 || p.Neighbors != 12 || p.RadiusKm != 300 || p.MinStations != 3 {
		t.Errorf("defaults res %g params %+v", j.Res, p)
	}
	if j.HatchBeyondKm != 150 {
		t.Errorf("hatch beyond %g km, want 150", j.HatchBeyondKm)
	}
	if _, err := ParseJobFile("job.toml", []byte("[inputs]\nstations = \"s.csv\"\n[output]\ndir = \"o\"\nhatch_beyond_km = -5\n")); err == nil ||
		!strings.Contains(err.Error(), "hatch_beyond_km") {
		t.Errorf("hatch_beyond_km = -5: %v, want an error naming the key", err)
	}
	if j.Source != "Invented Met Service" || j.StationsOnMap != "none" {
		t.Errorf("source %q, stations on map %q", j.Source, j.StationsOnMap)
	}
	if b := *j.BBox; b != [4]float64{170, -50, -170, -30} {
		t.Errorf("bbox %v", b)
	}
	if j.Layers.String() != "index,bands,regions" || j.Index != nil || j.ExtraParams["year"] != 2024 {
		t.Errorf("layers %s index %v year %v", j.Layers, j.Index, j.ExtraParams["year"])
	}
}

// TestParseJobErrors: each mistake is reported with the line and column of
// the key (columns count from 1, as editors do).
func TestParseJobErrors(t *testing.T) {
	base := "[inputs]\nstations = \"s.csv\"\n[output]\ndir = \"out\"\n"
	cases := []struct{ name, src, want string }{
		{"unknown top key", "windw = \"x\"\n" + base, `job j.toml line 1 column 9: unknown key "windw" at the top level`},
		{"unknown table key", base + "[grid]\nres = 0.1\nresolution = 0.1\n", `line 7 column 14: unknown key "resolution" in [grid]`},
		{"unknown table", base + "[grdi]\nres = 0.1\n", `line 5 column 2: unknown key "grdi" at the top level`},
		{"dotted unknown", "grid.rez = 1\n" + base, `line 1 column 12: unknown key "rez" in [grid]`},
		{"bad res", base + "[grid]\n  res = -1\n", "line 6 column 9: grid.res: -1: must be in (0, 10] degrees"},
		{"wrong type", base + "[grid]\nres = \"fine\"\n", "line 6 column 7: grid.res"},
		{"bbox len", base + "[grid]\nbbox = [1, 2, 3]\n", "line 6 column 8: grid.bbox: want [W, S, E, N]"},
		{"bbox lat", base + "[grid]\nbbox = [1, 2, 3, 95]\n", "line 6 column 8: grid.bbox"},
		{"bad date", "date = \"2025-02-30\"\n" + base, `line 1 column 8: date: "2025-02-30" is not a calendar date`},
		{"bad kind", "[inputs]\nstations = \"s.csv\"\nkind = \"rain\"\n[output]\ndir = \"o\"\n", "line 3 column 8: inputs.kind"},
		{"min stations", base + "[interpolation]\nneighbors = 4\nmin_stations = 5\n", "line 7 column 16: interpolation.min_stations"},
		{"sectors", base + "[interpolation]\nsectors = 3\n", "line 6 column 11: interpolation.sectors"},
		{"stations on map", base + "stations_on_map = \"some\"\n", `line 5 column 19: output.stations_on_map: "some": must be auto, all or none`},
		{"key in wrong table", "[inputs]\nstations = \"s.csv\"\nlayers = [\"index\"]\n[output]\ndir = \"o\"\n", `line 3 column 10: unknown key "layers" in [inputs]`},
		{"bad layer", "[inputs]\nstations = \"s.csv\"\n[output]\ndir = \"o\"\nlayers = [\"maps\"]\n", `line 5 column 10: output.layers: unknown layer "maps"`},
		{"history without date", base + "[regions]\nfile = \"r.geojson\"\n[history]\nfile = \"h.csv\"\n", "line 8 column 8: history.file: a history needs the job's date"},
		{"index without totals", base + "[index]\nmin_years = 10\n", "line 5 column 2: index: applies only with [inputs] totals"},
		{"no stations", "[output]\ndir = \"o\"\n", "[inputs] stations is required"},
		{"no out", "[inputs]\nstations = \"s.csv\"\n", "[output] dir is required"},
		{"syntax", base + "[grid\n", "job j.toml line 5 column 6: "},
		{"duplicate key", base + "[grid]\nres = 1\nres = 2\n", "line 7"},
		{"empty", "  \n", "line 1: empty job file"},
		{"not utf-8", "window = \"a\xffb\"\n" + base, "line 1: not valid UTF-8"},
		{"empty path", "[inputs]\nstations = \"\"\n[output]\ndir = \"o\"\n", "line 2 column 12: inputs.stations: empty path"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ParseJobFile("j.toml", []byte(c.src))
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %v\nwant it to contain %q", err, c.want)
			}
		})
	}
}

// TestParseJobBOM: a UTF-8 byte-order mark alone is fine, and lines are still
// counted from the first line of the file.
func TestParseJobBOM(t *testing.T) {
	src := "\ufeff[inputs]\nstations = \"s.csv\"\n[output]\ndir = \"o\"\n"
	if _, err := ParseJobFile("j.toml", []byte(src)); err != nil {
		t.Fatalf("BOM: %v", err)
	}
	_, err := ParseJobFile("j.toml", []byte(src+"bogus = 1\n"))
	if err == nil || !strings.Contains(err.Error(), "line 5 column 9") {
		t.Errorf("BOM + unknown key: %v", err)
	}
}

// FuzzParseJob: no job file panics the parser, and whatever it accepts has
// the stations and the output directory a run needs.
func FuzzParseJob(f *testing.F) {
	f.Add([]byte(JobExample))
	f.Add([]byte("[inputs]\nstations = \"s.csv\"\n[output]\ndir = \"o\"\n"))
	f.Add([]byte("[grid]\nbbox = [1e999, 2, 3, 4]\nres = nan\n"))
	f.Add([]byte("date = \"yesterday\"\ntimezone = \"Pacific/Auckland\"\narchive = true\n[inputs]\nstations = \"s.csv\"\ndaily = \"d.csv.gz\"\nwindows = [30, 90]\nunits = \"inch\"\nexclude_flags = [\"X\"]\nmin_share = 0.8\n[output]\ndir = \"o\"\n"))
	f.Add([]byte("a = '''\nx\n'''\n[[b]]\nc.d = 1\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		j, err := ParseJobFile("fuzz.toml", data)
		if err != nil {
			if !strings.HasPrefix(err.Error(), "job fuzz.toml") {
				t.Fatalf("error without the file name: %v", err)
			}
			return
		}
		if j.Stations == "" || j.Out == "" || len(j.Layers) == 0 {
			t.Fatalf("accepted a job without stations, output or layers: %+v", j)
		}
		if err := j.Params.Validate(); err != nil {
			t.Fatalf("accepted invalid interpolation: %v", err)
		}
	})
}

// TestParseJobSectors: the interpolation table carries --sectors and
// --crossval into the run (direction sectors and cross-validation through the job file).
func TestParseJobSectors(t *testing.T) {
	src := "[inputs]\nstations = \"s.csv\"\n[interpolation]\nsectors = 8\nneighbors = 16\ncrossval = true\n[output]\ndir = \"o\"\n"
	j, err := ParseJobFile("j.toml", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	if j.Params.Sectors != 8 || j.Params.Neighbors != 16 || !j.CrossVal {
		t.Errorf("params %+v crossval %v", j.Params, j.CrossVal)
	}
}

// TestParseJobDaily: the daily keys reach the index step; mistakes name
// their key's line and column and are usage errors.
func TestParseJobDaily(t *testing.T) {
	src := "date = \"Yesterday\"\ntimezone = \"Pacific/Auckland\"\narchive = true\n[inputs]\nstations = \"s.csv\"\ndaily = \"d.csv.gz\"\nwindows = [30, 90]\nunits = \"inch\"\nexclude_flags = [\"X\"]\nmin_share = 0.8\n[output]\ndir = \"o\"\n"
	j, err := ParseJobFile(filepath.Join("jobs", "j.toml"), []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	ix := j.Index
	if ix == nil || ix.Daily != filepath.Join("jobs", "d.csv.gz") || ix.StationList != filepath.Join("jobs", "s.csv") ||
		len(ix.DailyOptions.Windows) != 2 || ix.DailyOptions.Units != "inch" || ix.DailyOptions.MinShare != 0.8 ||
		len(ix.DailyOptions.ExcludeFlags) != 1 || j.Date != "yesterday" || j.Timezone != "Pacific/Auckland" || !j.Archive {
		t.Errorf("job %+v index %+v", j, ix)
	}
	base := "[inputs]\nstations = \"s.csv\"\ndaily = \"d.csv\"\n"
	out := "[output]\ndir = \"o\"\n"
	for _, c := range []struct{ src, want string }{
		{"date = \"tomorrow\"\n" + base + out, `line 1 column 8: date: "tomorrow" is not a calendar date YYYY-MM-DD, nor today or yesterday`},
		{"date = \"today\"\ntimezone = \"Mars/Base\"\n" + base + out, `line 2 column 12: timezone: "Mars/Base" is not a time zone`},
		{"date = \"today\"\n" + base + "windows = []\n" + out, `line 5 column 11: inputs.windows: no window named`},
		{"date = \"today\"\n" + base + "windows = [30, 400]\n" + out, `inputs.windows: a window of 400 days is not from 1 to 366 days`},
		{"date = \"today\"\n" + base + "units = \"cm\"\n" + out, `line 5 column 9: inputs.units: "cm": must be mm, tenths-mm or inch`},
		{"date = \"today\"\n" + base + "min_share = 0\n" + out, `line 5 column 13: inputs.min_share: 0: must be in (0, 1]`},
		{"date = \"today\"\n" + base + "totals = \"t.csv\"\n" + out, `inputs.daily: give daily records or window totals, not both`},
		{base + out, `daily records need the date their windows end on`},
		{"date = \"today\"\n[inputs]\nstations = \"s.csv\"\nwindows = [30]\n" + out, `line 4 column 11: inputs.windows: applies only with [inputs] daily`},
		{"archive = true\n[inputs]\nstations = \"s.csv\"\n" + out, `line 1 column 11: archive: a dated archive needs the job's date`},
	} {
		_, err := ParseJobFile("j.toml", []byte(c.src))
		if err == nil || !strings.Contains(err.Error(), c.want) || !errors.Is(err, ErrUsage) {
			t.Errorf("%q: %v, want usage error %q", c.src, err, c.want)
		}
	}
}
