package main

import (
	"fmt"
	"io"
	"strings"

	"drygrid/pipeline"

	"github.com/spf13/cobra"
)

// gridFlags are the flags of `drygrid grid` that shape one run.
type gridFlags struct {
	inputFlags
	interpFlags
	res        float64
	bbox       string
	crossval   bool // --crossval: leave-one-out figures in the summary and manifest
	scheme     string
	regions    string
	regionKey  string
	mask       string
	layers     string
	simplifyKm float64
	title      string
	source     string
	stationsOn string
	hatchKm    float64
	history    string
	date       string
	out        string
	allowEmpty bool
}

func newGridCmd() *cobra.Command {
	var f gridFlags
	cmd := &cobra.Command{
		Use:   "grid --stations FILE --out DIR",
		Short: "Interpolate station SPI or percentiles onto a grid and write the map layers",
		Long: `grid reads one value per station (an SPI, or a percentile of the window's precipitation),
interpolates it by inverse-distance weighting on the sphere onto a lat-lon grid, masks cells
with fewer than --min-stations stations within --radius-km, classifies the cells into
severity bands and writes the layers into --out:

  index.tif         Float32 z (SPI units), no data -9999, Cloud Optimized GeoTIFF
  bands.tif         UInt8 band codes with a colour table, 0 = no data
  bands.geojson     one dissolved MultiPolygon per band (RFC 7946)
  stations.geojson  one Point per station read
  regions.csv/json  area in each band per region (with --regions)
  map.png           a picture for reports
  map.html          a self-contained web page (on a grid of over 6.5 M cells the picture
                    and the page show every 3rd, 5th... cell; the subtitle says so)
  manifest.json     what was run: version, parameters, inputs and outputs with SHA-256, counts

Written only when named (--layers all,support or --layers index,support), as it costs two
more passes of the search:

  support.tif       Float32 km from each cell centre to the nearest station within
                    --radius-km, no data -9999 where none (hatch cells beyond a chosen km)
  support_count.tif Float32 whole numbers: stations the weighting uses (within the radius,
                    at most --neighbors); 0 where none; below --min-stations = no data in index

Percentiles are turned into z = Phi^-1(p/100) (p clamped to [0.1, 99.9]) before
interpolation, so index.tif always holds z.

The files are written into a temporary directory beside --out and swapped in only when
every layer is complete, so a failed run leaves the previous layers untouched (the parent
of --out must be writable, and an existing --out not read-only). Files of your own in --out
are kept. A second run on the same --out stops at once while the first is running.

--mask FILE (GeoJSON Polygon/MultiPolygon features: land, a country, districts; read and
checked as --regions is, features need no name) makes cells wholly outside its polygons no
data in every layer; --mask regions uses the union of the --regions file. A cell is inside
when any part of it is (its share inside above 0): cells on the mask's edge keep their
value, and their areas count by their exact share inside (on the WGS84 ellipsoid) in the
band shares, the summary and the manifest. Features should not overlap (a cell's share is
at most 1). A mask that reaches no cell of the grid is refused.

A grid holding none of the stations (a bbox with west and east swapped is a grid across the
antimeridian), or whose cells all lack a value, is refused rather than published as an empty
map reading "0.0 % in drought"; --allow-empty publishes it all the same.

The layers are interpolated estimates, not official drought declarations.`,
		Example: `  # SPI per station to all layers at 0.1 deg over the stations' extent
  drygrid grid --stations spi.csv --out layers/

  # percentiles, a fixed bbox crossing the antimeridian, only the rasters
  drygrid grid --stations pct.tsv --kind percentile --bbox 170,-50,-170,-30 \
      --res 0.05 --layers index,bands --out layers/

  # area in drought per district
  drygrid grid --stations spi.csv --regions districts.geojson --region-key name --out layers/

  # land only: cells outside the coast are no data, coastal cells weighted by their land share
  drygrid grid --stations spi.csv --mask land.geojson --out layers/`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			job, err := f.job()
			if err != nil {
				return err
			}
			res, err := runJob(job, cmd.ErrOrStderr())
			if err != nil {
				return err
			}
			if res.CrossVal != nil {
				printCrossval(cmd.ErrOrStderr(), res.Values.Path, *res.CrossVal)
			}
			printHistory(cmd.ErrOrStderr(), res.History, "rows")
			return nil
		},
	}
	fl := cmd.Flags()
	f.inputFlags.register(fl)
	fl.Float64Var(&f.res, "res", 0.1, "cell size in degrees")
	fl.StringVar(&f.bbox, "bbox", "", "W,S,E,N in degrees; W > E crosses the antimeridian (default: the stations' extent widened by --radius-km)")
	f.interpFlags.register(fl, "cell", "a cell with fewer stations within the radius is no data")
	fl.BoolVar(&f.crossval, "crossval", false, "also cross-validate (leave one out) with the same parameters and print the figures")
	fl.StringVar(&f.scheme, "scheme", "", "band scheme file (TOML; default: the nine built-in bands; see 'drygrid scheme --example')")
	fl.StringVar(&f.regions, "regions", "", "regions GeoJSON (Polygon/MultiPolygon features) for area-in-drought statistics")
	fl.StringVar(&f.regionKey, "region-key", "", "feature property naming each region (default: id, then name)")
	fl.StringVar(&f.mask, "mask", "", "GeoJSON polygons outside which cells are no data (a cell is inside when its share inside is above 0; edge cells count by their share); \"regions\": the union of --regions")
	fl.StringVar(&f.layers, "layers", "all", "layers to write: "+strings.Join(pipeline.AllLayers, ",")+
		" (all), and "+strings.Join(pipeline.ExtraLayers, ",")+" only when named (all,support)")
	fl.Float64Var(&f.simplifyKm, "simplify-km", 0, "simplify band polygons to this tolerance in km (0: exact cell edges)")
	fl.StringVar(&f.title, "title", "", "title for the picture and the page")
	fl.StringVar(&f.source, "source", "", "the data's source, named in the production line under the picture and the page (default: left out)")
	fl.Float64Var(&f.hatchKm, "hatch-beyond-km", 0, "hatch on map.png and map.html the cells whose nearest station is farther than KM km (0: off)")
	fl.StringVar(&f.stationsOn, "stations-on-map", "auto", "station markers on map.png: auto (every station up to 500; beyond, smaller and thinned to one per map cell, at most 2,000), all, or none")
	fl.StringVar(&f.history, "history", "", "append the day's region rows to this CSV (with --regions); re-running a date replaces its rows")
	fl.StringVar(&f.date, "date", "", "the date the values describe, YYYY-MM-DD: in the titles and metadata, and the key of the history rows (history default: today, UTC)")
	fl.StringVar(&f.out, "out", "", "output directory (required; created if missing)")
	fl.BoolVar(&f.allowEmpty, "allow-empty", false, "publish the map even when no station lies inside the grid or no cell has a value")
	return cmd
}

// job turns the flags into a run description, checked by Validate. A
// --layers or --bbox value that does not parse is reported where Validate
// would check it, so that the first mistake of a command line is the one
// named.
func (f gridFlags) job() (pipeline.Job, error) {
	values, err := f.options()
	if err != nil {
		return pipeline.Job{}, err
	}
	j := pipeline.Job{
		Stations: f.stations, Values: values,
		Res: f.res, Params: f.params(), Scheme: f.scheme, Regions: f.regions, RegionKey: f.regionKey, Mask: f.mask,
		SimplifyKm: f.simplifyKm, Title: f.title, Source: f.source, StationsOnMap: f.stationsOn, HatchBeyondKm: f.hatchKm, Out: f.out,
		History: f.history, Date: f.date, CrossVal: f.crossval, Command: "grid", AllowEmpty: f.allowEmpty,
	}
	layers, layersErr := pipeline.ParseLayers(f.layers)
	if layersErr != nil {
		// The settings Validate checks before the layers.
		probe := j
		probe.Layers, probe.History, probe.Date = pipeline.LayerSet{"index": true}, "", ""
		if err := probe.Validate(); err != nil {
			return j, asUsage(err)
		}
		return j, asUsage(layersErr)
	}
	if f.regions == "" && !strings.Contains(f.layers, "regions") {
		delete(layers, "regions") // "all" without regions to report on
	}
	j.Layers = layers
	if f.bbox != "" {
		b, err := pipeline.ParseBBox(f.bbox)
		if err != nil {
			if verr := j.Validate(); verr != nil { // the bbox is checked last
				return j, asUsage(verr)
			}
			return j, asUsage(err)
		}
		j.BBox = &b
	}
	return j, asUsage(j.Validate())
}

// printHistory reports the rows a run added to its history file.
func printHistory(w io.Writer, h *pipeline.HistoryRows, what string) {
	if h != nil {
		fmt.Fprintf(w, "history: %d %s for %s in %s\n", h.Rows, what, h.Date, h.Path)
	}
}
