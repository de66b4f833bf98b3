package geotiff

import (
	"encoding/json"
	"path/filepath"
	"testing"
	"time"

	"drygrid/grid"
	"drygrid/internal/reftest"
)

// TestDateAndBandMetadataGDAL: the date the raster describes
// (TIFFTAG_DATETIME, tag 306 of TIFF 6.0 section 8, "YYYY:MM:DD HH:MM:SS")
// and the band's description and unit come back through GDAL as its
// TIFFTAG_DATETIME item, band description and unit type (GDAL 3.6, Debian
// python3-gdal: Dataset.GetMetadataItem, Band.GetDescription,
// Band.GetUnitType), beside the dataset's own items; without them the file
// has neither.
func TestDateAndBandMetadataGDAL(t *testing.T) {
	py := reftest.Python(t, "osgeo.gdal")
	spec := grid.Spec{West: -130, North: -37, Res: 0.1, Cols: 40, Rows: 30}
	r := tiffTestField(spec)
	dir := t.TempDir()
	opt := DefaultOptions()
	opt.DateTime = time.Date(2026, 11, 30, 0, 0, 0, 0, time.UTC)
	opt.Description = "SPI, 90 days ending 2026-11-30"
	opt.Units = "SPI (z)"
	with, without := filepath.Join(dir, "with.tif"), filepath.Join(dir, "without.tif")
	if err := WriteIndex(with, r, opt); err != nil {
		t.Fatal(err)
	}
	if err := WriteIndex(without, r, DefaultOptions()); err != nil {
		t.Fatal(err)
	}
	type seen struct {
		DateTime    *string           `json:"datetime"`
		Description string            `json:"description"`
		Units       string            `json:"units"`
		Metadata    map[string]string `json:"metadata"`
	}
	read := func(path string) seen {
		var s seen
		if err := json.Unmarshal(reftest.RunPython(t, py, "../testdata/tiff_meta_ref.py", nil, path), &s); err != nil {
			t.Fatal(err)
		}
		return s
	}
	got := read(with)
	if got.DateTime == nil || *got.DateTime != "2026:11:30 00:00:00" {
		t.Errorf("TIFFTAG_DATETIME %v, want 2026:11:30 00:00:00", got.DateTime)
	}
	if got.Description != opt.Description || got.Units != opt.Units {
		t.Errorf("band description %q, units %q; want %q, %q", got.Description, got.Units, opt.Description, opt.Units)
	}
	if got.Metadata["CAUTION"] != Caution {
		t.Errorf("caution item %q lost beside the band items", got.Metadata["CAUTION"])
	}
	bare := read(without)
	if bare.DateTime != nil || bare.Description != "" || bare.Units != "" {
		t.Errorf("without the options GDAL sees date %v, description %q, units %q", bare.DateTime, bare.Description, bare.Units)
	}
}
