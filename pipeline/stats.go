package pipeline

import (
	"fmt"
	"os"
	"path/filepath"

	"drygrid/bands"
	"drygrid/geotiff"
	"drygrid/grid"
	"drygrid/history"
	"drygrid/layer/regions"
	"drygrid/manifest"
	"drygrid/region"
)

// StatsJob is area in each band per region from a band raster written
// earlier (`drygrid stats`).
type StatsJob struct {
	Bands     string // band raster GeoTIFF (UInt8 codes, EPSG:4326)
	Index     string // index raster on the same grid, for the mean z ("" = none)
	Regions   string // regions GeoJSON
	RegionKey string
	Scheme    string // band scheme file ("" = the default bands)
	Out       string // directory for regions.csv and regions.json (required; not a run's output directory)
	History   string // history CSV the day's rows are added to (needs Date)
	Date      string // the day the band raster describes, YYYY-MM-DD
}

// StatsResult is what Stats made.
type StatsResult struct {
	Spec    grid.Spec
	Scheme  *bands.Scheme
	Regions []region.ZonalStats
	// Outside counts the regions wholly outside the grid (area 0).
	Outside int
}

// Stats reads the band raster (and the index raster) and the regions,
// writes regions.csv and regions.json into Out through the regions layer
// of a run, and adds the day's rows to the history file.
func Stats(job StatsJob) (*StatsResult, error) {
	if job.Bands == "" || job.Regions == "" {
		return nil, Usagef("stats needs --bands FILE.tif and --regions FILE.geojson")
	}
	if job.History != "" && job.Date == "" {
		return nil, Usagef("--history needs --date YYYY-MM-DD (the day the band raster describes)")
	}
	if job.Date != "" {
		if err := CheckDate(job.Date); err != nil {
			return nil, err
		}
	}
	if job.Out == "" {
		return nil, Usagef("stats needs --out DIR, the directory for regions.csv and regions.json")
	}
	if err := checkStatsOut(job.Out); err != nil {
		return nil, err
	}
	scheme, err := LoadScheme(job.Scheme)
	if err != nil {
		return nil, err
	}
	regs, err := region.ReadRegions(job.Regions, job.RegionKey)
	if err != nil {
		return nil, err
	}
	bandRaster, err := geotiff.ReadBands(job.Bands)
	if err != nil {
		return nil, err
	}
	if err := checkCodes(job.Bands, bandRaster, scheme); err != nil {
		return nil, err
	}
	var index *grid.Float32
	if job.Index != "" {
		if index, err = geotiff.ReadIndex(job.Index); err != nil {
			return nil, err
		}
		if err := region.SameGrid(bandRaster, index); err != nil {
			return nil, fmt.Errorf("%s and %s: %w", job.Bands, job.Index, err)
		}
	}
	stats := region.Zonal(bandRaster, index, regs)
	if err := os.MkdirAll(job.Out, 0o755); err != nil {
		return nil, fmt.Errorf("--out %s: %w", job.Out, err)
	}
	meta := regions.Meta{Date: job.Date, Source: job.Bands, Regions: job.Regions, Grid: bandRaster.Spec.String()}
	if err := writeRegionFiles(job.Out, stats, scheme, meta); err != nil {
		return nil, err
	}
	if job.History != "" {
		if err := history.Append(job.History, job.Date, stats, scheme); err != nil {
			return nil, err
		}
	}
	res := &StatsResult{Spec: bandRaster.Spec, Scheme: scheme, Regions: stats}
	for _, z := range stats {
		if z.AreaKm2 == 0 {
			res.Outside++
		}
	}
	return res, nil
}

// checkStatsOut refuses an output directory that holds a manifest.json: it
// is the output directory of a run, whose regions.csv and regions.json the
// manifest lists with their SHA-256; writing new ones there would make the
// manifest wrong. It is a usage error (exit code 2): the
// command asks for the wrong place, and another --out is the remedy.
func checkStatsOut(out string) error {
	path := filepath.Join(out, manifest.Name)
	if _, err := os.Lstat(path); err == nil {
		return Usagef("--out %s holds %s: it is the output directory of a drygrid run, whose manifest lists its own regions.csv and regions.json with their SHA-256; write the statistics into another directory (e.g. --out %s)",
			out, path, filepath.Join(out, "stats"))
	}
	return nil
}

// checkCodes refuses a band raster holding codes the scheme lacks: its
// shares would not add up to the covered area.
func checkCodes(path string, b *grid.Uint8, s *bands.Scheme) error {
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
