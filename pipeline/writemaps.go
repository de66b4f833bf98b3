package pipeline

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"

	"drygrid/bands"
	"drygrid/layer"
	"drygrid/layer/geojson"
	"drygrid/layer/page"
	"drygrid/layer/picture"
	"drygrid/layer/regions"
	"drygrid/region"
)

// writeRegions writes regions.csv and regions.json.
func (w *layerWriter) writeRegions() error {
	stats, s := w.res.Regions, w.res.Scheme
	meta := regions.Meta{Source: "drygrid grid --stations " + w.job.Stations, Regions: w.job.Regions, Grid: w.res.Spec.String(),
		Date: w.job.Date, WindowDays: w.job.WindowDays, Kind: string(w.job.Values.Kind)}
	return writeRegionFiles(w.dir, stats, s, meta)
}

// writeRegionFiles writes regions.csv and regions.json into dir: the
// regions layer of a run and of Stats.
func writeRegionFiles(dir string, stats []region.ZonalStats, s *bands.Scheme, meta regions.Meta) error {
	if err := writeStream(filepath.Join(dir, "regions.csv"), func(out io.Writer) error {
		return regions.WriteCSV(out, stats, s)
	}); err != nil {
		return err
	}
	return writeStream(filepath.Join(dir, "regions.json"), func(out io.Writer) error {
		return regions.WriteJSON(out, stats, s, meta)
	})
}

// subtitle describes the run's parameters under the title.
func (w *layerWriter) subtitle() string {
	if w.job.Subtitle != "" {
		return w.job.Subtitle
	}
	p := w.job.Params
	shows := ""
	if d := w.job.Describe(); w.job.describes() && !strings.Contains(w.title(), d) {
		shows = d + "; " // a title of the user's own: the line says what the map shows
	}
	grid := fmt.Sprintf("%g deg grid", w.res.Spec.Res)
	if w.preview != nil && w.preview.f > 1 {
		grid += fmt.Sprintf(" (shown at %g deg)", w.preview.r.Spec.Res)
	}
	return shows + fmt.Sprintf("IDW power %g, %d neighbours within %g km, at least %d stations; %d stations; %s",
		p.Power, p.Neighbors, p.RadiusKm, p.MinStations, len(w.res.Values.Stations), grid)
}

func (w *layerWriter) title() string {
	if w.job.Title != "" {
		return w.job.Title
	}
	return "drygrid: " + w.job.Describe()
}

// produced is the production line of the picture and the page: when the
// run started (minutes, UTC), what the map shows and the data's source
// when the job gives it ("made 2026-12-01 06:00 UTC · SPI, 30 days ending
// 2026-11-30 · data: Kelverin Met Service (fictitious)").
func (w *layerWriter) produced() string {
	parts := []string{"made " + w.made.UTC().Format("2006-01-02 15:04") + " UTC", w.job.Describe()}
	if src := strings.TrimSpace(w.job.Source); src != "" {
		parts = append(parts, "data: "+src)
	}
	return strings.Join(parts, " · ")
}

// noDataLabel names the cells without a value in the legends: with a
// mask, cells outside it are among them.
func (w *layerWriter) noDataLabel() string {
	if w.job.Mask != "" {
		return layer.NoDataMaskedLabel
	}
	return layer.NoDataLabel
}

// writePicture writes map.png.
func (w *layerWriter) writePicture() error {
	in := picture.Input{Bands: w.preview.r, Scheme: w.res.Scheme,
		Title: w.title(), Subtitle: w.subtitle(), Caution: layer.Caution, Produced: w.produced()}
	in.Stations = picturePoints(w.res.Values)
	in.NoDataLabel = w.noDataLabel()
	far, err := w.farRaster()
	if err != nil {
		return err
	}
	in.Far, in.FarKm = far, w.job.HatchBeyondKm
	for _, r := range w.regions {
		in.Regions = append(in.Regions, picture.Region{Name: r.Key, Geom: r.Geom})
	}
	return picture.WriteFile(w.path("map.png"), in, picture.Options{Stations: picture.StationMarks(w.job.StationsOnMap)})
}

// writePage writes map.html with the layers inline.
func (w *layerWriter) writePage() error {
	bands, err := w.pageBands()
	if err != nil {
		return err
	}
	stations, total, err := w.pageStations()
	if err != nil {
		return err
	}
	spec := w.res.Spec
	in := page.Input{Title: w.title(), Subtitle: w.subtitle(), Caution: layer.Caution,
		Scheme: w.res.Scheme, BandsGeoJSON: bands, StationsGeoJSON: stations,
		BBox: [4]float64{spec.West, spec.South(), spec.East(), spec.North}, Produced: w.produced(),
		NoDataLabel: w.noDataLabel(), StationsTotal: total}
	far, err := w.farRaster()
	if err != nil {
		return err
	}
	if far != nil {
		if in.FarGeoJSON, err = farGeoJSON(far, w.job.HatchBeyondKm); err != nil {
			return err
		}
		in.FarKm = w.job.HatchBeyondKm
	}
	if w.job.Layers["stations"] {
		in.StationsHref = "stations.geojson" // beside map.html: every station when the page shows a subset
	}
	if w.job.Regions != "" {
		b, err := os.ReadFile(w.job.Regions)
		if err != nil {
			return fmt.Errorf("regions: %w", err)
		}
		in.RegionsGeoJSON = b
		in.Regions = pageRows(w.res.Regions, w.res.Scheme)
	}
	return page.WriteFile(w.path("map.html"), in)
}

// pageBands is the band layer the page carries: bands.geojson when the
// grid is its own preview, else the band polygons of the preview raster
// (a grid of f times the resolution), traced and encoded as bands.geojson
// is.
func (w *layerWriter) pageBands() ([]byte, error) {
	if w.preview.f == 1 {
		return w.bandsGeoJSON()
	}
	var buf bytes.Buffer
	opt := w.geojsonOptions()
	opt.SimplifyKm = w.job.SimplifyKm
	if err := geojson.EncodeBands(&buf, w.preview.r, w.res.Scheme, opt); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// pageRows turns zonal statistics into the page's table rows.
func pageRows(stats []region.ZonalStats, s *bands.Scheme) []page.RegionRow {
	rows := make([]page.RegionRow, 0, len(stats))
	for _, z := range stats {
		r := page.RegionRow{Name: z.Key, AreaKm2: z.AreaKm2, SharePct: map[string]float64{}, MeanZ: math.NaN()}
		r.CoveredPct = z.CoveredPct()
		if z.HasMeanZ {
			r.MeanZ = z.MeanZ
		}
		if z.CoveredKm2 > 0 {
			for _, b := range s.Bands {
				r.SharePct[b.Key], _ = z.BandPct(b.Code)
			}
			r.InDroughtPct, _ = z.InDroughtPct(s)
		}
		rows = append(rows, r)
	}
	return rows
}
