package main

import (
	"fmt"
	"path/filepath"

	"github.com/spf13/cobra"

	"drygrid/pipeline"
)

type statsFlags struct {
	bands, index, regions, regionKey, scheme, out, history, date string
}

// newStatsCmd is `drygrid stats`: area in each band per region from a band
// raster written earlier.
func newStatsCmd() *cobra.Command {
	var f statsFlags
	c := &cobra.Command{
		Use:   "stats --bands bands.tif --regions FILE.geojson [--index index.tif] --out DIR",
		Short: "Area in drought per region from a band raster written earlier",
		Long: `stats reads a band raster (bands.tif from drygrid grid, or any single-band UInt8
GeoTIFF on EPSG:4326 whose codes are the scheme's) and a GeoJSON file of Polygon or
MultiPolygon regions, and writes regions.csv and regions.json into --out (required):

  region,area_km2,covered_km2,covered_pct,<key>_pct... (one per band),in_drought_pct,mean_z

Each cell counts with the share of its area inside the region (exact clipping, not a
cell-centre test) times its area on the WGS84 ellipsoid; band shares are percent of the
covered (not masked) area. mean_z (SPI units) needs --index index.tif on the same grid.
Regions are named by --region-key (default: the feature id, then the "name" property).

--out may not be the output directory of a drygrid run (one holding a manifest.json): its
manifest lists that run's regions.csv and regions.json with their SHA-256, which new files
would contradict. Such an --out is a usage error (exit code 2); write elsewhere.

With --history FILE.csv --date YYYY-MM-DD the day's rows are also added to a history
table keyed by (date, region); running a date again replaces its rows. Draw it with
'drygrid chart'.

The figures come from interpolated estimates, not official drought declarations: consult
your national meteorological or hydrological service and local rules.`,
		Example: `  drygrid stats --bands layers/bands.tif --index layers/index.tif \
    --regions districts.geojson --region-key name --out stats/ \
    --history drought-history.csv --date 2026-05-01`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error { return runStats(cmd, f) },
	}
	fl := c.Flags()
	fl.StringVar(&f.bands, "bands", "", "band raster GeoTIFF (UInt8 codes, EPSG:4326), e.g. bands.tif (required)")
	fl.StringVar(&f.index, "index", "", "index raster GeoTIFF (Float32 z) on the same grid, for mean_z")
	fl.StringVar(&f.regions, "regions", "", "regions GeoJSON (Polygon/MultiPolygon features) (required)")
	fl.StringVar(&f.regionKey, "region-key", "", "member or property naming each region (default: id, then name)")
	fl.StringVar(&f.scheme, "scheme", "", "band scheme TOML file (default: the built-in nine bands)")
	fl.StringVar(&f.out, "out", "", "directory for regions.csv and regions.json (required; not a run's output directory)")
	fl.StringVar(&f.history, "history", "", "history CSV to add the day's rows to (needs --date)")
	fl.StringVar(&f.date, "date", "", "the day the band raster describes, YYYY-MM-DD (for --history and regions.json)")
	return c
}

func runStats(cmd *cobra.Command, f statsFlags) error {
	res, err := pipeline.Stats(pipeline.StatsJob{Bands: f.bands, Index: f.index, Regions: f.regions,
		RegionKey: f.regionKey, Scheme: f.scheme, Out: f.out, History: f.history, Date: f.date})
	if err != nil {
		return asUsage(err)
	}
	e := cmd.ErrOrStderr()
	fmt.Fprintf(e, "stats: %d regions over %s -> %s\n", len(res.Regions), res.Spec, filepath.Join(f.out, "regions.csv"))
	if res.Outside > 0 {
		fmt.Fprintf(e, "warning: %d regions lie wholly outside the grid (area 0)\n", res.Outside)
	}
	if f.history != "" {
		fmt.Fprintf(e, "history: %s rows for %s written to %s\n", res.Scheme.Name, f.date, f.history)
	}
	return nil
}
