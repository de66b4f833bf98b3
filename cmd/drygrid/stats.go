package main

import (
	"bufio"
	"fmt"
	"os"
	"path/filepath"

	"github.com/spf13/cobra"

	"drygrid/bands"
	"drygrid/geotiff"
	"drygrid/grid"
	"drygrid/history"
	"drygrid/layer/regions"
	"drygrid/publish"
	"drygrid/region"
)

type statsFlags struct {
	bands, index, regions, regionKey, scheme, out, history, date string
}

// newStatsCmd is `drygrid stats`: area in each band per region from a band
// raster written earlier.
func newStatsCmd() *cobra.Command {
	var f statsFlags
	c := &cobra.Command{
		Use:   "stats --bands bands.tif --regions FILE.geojson [--index index.tif] [--out DIR]",
		Short: "Area in drought per region from a band raster written earlier",
		Long: `stats reads a band raster (bands.tif from drygrid grid, or any single-band UInt8
GeoTIFF on EPSG:4326 whose codes are the scheme's) and a GeoJSON file of Polygon or
MultiPolygon regions, and writes regions.csv and regions.json into --out:

  region,area_km2,covered_km2,covered_pct,<key>_pct... (one per band),in_drought_pct,mean_z

Each cell counts with the share of its area inside the region (exact clipping, not a
cell-centre test) times its area on the WGS84 ellipsoid; band shares are percent of the
covered (not masked) area. mean_z (SPI units) needs --index index.tif on the same grid.
Regions are named by --region-key (default: the feature id, then the "name" property).

With --history FILE.csv --date YYYY-MM-DD the day's rows are also added to a history
table keyed by (date, region); running a date again replaces its rows. Draw it with
'drygrid chart'.

The figures come from interpolated estimates, not official drought declarations: consult
your national meteorological or hydrological service and local rules.`,
		Example: `  drygrid stats --bands layers/bands.tif --index layers/index.tif \
    --regions districts.geojson --region-key name --out layers/ \
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
	fl.StringVar(&f.out, "out", ".", "directory for regions.csv and regions.json")
	fl.StringVar(&f.history, "history", "", "history CSV to add the day's rows to (needs --date)")
	fl.StringVar(&f.date, "date", "", "the day the band raster describes, YYYY-MM-DD (for --history and regions.json)")
	return c
}

func runStats(cmd *cobra.Command, f statsFlags) error {
	if f.bands == "" || f.regions == "" {
		return usagef("stats needs --bands FILE.tif and --regions FILE.geojson")
	}
	if f.history != "" && f.date == "" {
		return usagef("--history needs --date YYYY-MM-DD (the day the band raster describes)")
	}
	if f.date != "" {
		if err := checkDate(f.date); err != nil {
			return err
		}
	}
	scheme, err := loadScheme(f.scheme)
	if err != nil {
		return err
	}
	regs, err := region.ReadRegions(f.regions, f.regionKey)
	if err != nil {
		return err
	}
	bandRaster, err := geotiff.ReadBands(f.bands)
	if err != nil {
		return err
	}
	if err := statsCheckCodes(f.bands, bandRaster, scheme); err != nil {
		return err
	}
	var index *grid.Float32
	if f.index != "" {
		if index, err = geotiff.ReadIndex(f.index); err != nil {
			return err
		}
		if err := region.SameGrid(bandRaster, index); err != nil {
			return fmt.Errorf("%s and %s: %w", f.bands, f.index, err)
		}
	}
	stats := region.Zonal(bandRaster, index, regs)
	if err := os.MkdirAll(f.out, 0o755); err != nil {
		return fmt.Errorf("--out %s: %w", f.out, err)
	}
	meta := regions.Meta{Date: f.date, Source: f.bands, Regions: f.regions, Grid: bandRaster.Spec.String()}
	if err := publish.WriteFile(filepath.Join(f.out, "regions.csv"), func(w *bufio.Writer) error {
		return regions.WriteCSV(w, stats, scheme)
	}); err != nil {
		return err
	}
	if err := publish.WriteFile(filepath.Join(f.out, "regions.json"), func(w *bufio.Writer) error {
		return regions.WriteJSON(w, stats, scheme, meta)
	}); err != nil {
		return err
	}
	if f.history != "" {
		if err := history.Append(f.history, f.date, stats, scheme); err != nil {
			return err
		}
	}
	e := cmd.ErrOrStderr()
	outside := 0
	for _, z := range stats {
		if z.AreaKm2 == 0 {
			outside++
		}
	}
	fmt.Fprintf(e, "stats: %d regions over %s -> %s\n", len(regs), bandRaster.Spec, filepath.Join(f.out, "regions.csv"))
	if outside > 0 {
		fmt.Fprintf(e, "warning: %d regions lie wholly outside the grid (area 0)\n", outside)
	}
	if f.history != "" {
		fmt.Fprintf(e, "history: %s rows for %s written to %s\n", scheme.Name, f.date, f.history)
	}
	return nil
}

// statsCheckCodes refuses a band raster holding codes the scheme lacks: its
// shares would not add up to the covered area.
func statsCheckCodes(path string, b *grid.Uint8, s *bands.Scheme) error {
	var seen [256]bool
	for _, c := range b.Data {
		seen[c] = true
	}
	for c, ok := range seen {
		if !ok || uint8(c) == b.NoData {
			continue
		}
		if _, has := s.Band(uint8(c)); !has {
			return fmt.Errorf("bands %s: holds code %d, for which scheme %q has no band (use the --scheme the raster was made with)", path, c, s.Name)
		}
	}
	return nil
}
