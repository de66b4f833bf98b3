package pipeline

import (
	"bytes"
	"context"
	"math"
	"os"
	"path/filepath"
	"testing"

	"drygrid/geotiff"
	"drygrid/layer/geojson"
	"drygrid/region"
)

// TestRunStreamsAsCompute: a run's layers, made in one pass over the rows
// without a whole raster, are those of the whole rasters Compute holds, on
// the demo's job (mask, districts, every layer) at two resolutions: index.tif
// and bands.tif read back (through this package's GeoTIFF reader) are the
// rasters cell for cell, bit for bit; bands.geojson is byte for byte what
// geojson.EncodeBands writes from the whole band raster; the districts'
// statistics are region.Zonal's on the whole rasters, exactly; the band
// shares are equal. A law of the pass (streaming changes no figure), not a
// reference check: the whole-raster encoders are checked against GDAL and
// shapely in their packages.
func TestRunStreamsAsCompute(t *testing.T) {
	ctx := context.Background()
	for _, res := range []float64{0.05, 0.02} {
		dir := t.TempDir()
		job, err := DemoJob(ctx, dir, nil)
		if err != nil {
			t.Fatal(err)
		}
		job.Res, job.History, job.Extra = res, "", nil
		if job.Mask == "" || job.Regions == "" {
			t.Fatal("the demo's job has no mask or no regions: the test would check less than it says")
		}
		whole, err := Compute(ctx, job)
		if err != nil {
			t.Fatal(err)
		}
		job.Out = filepath.Join(dir, "out")
		run, err := Run(ctx, job)
		if err != nil {
			t.Fatal(err)
		}
		if run.Index != nil || run.Bands != nil {
			t.Errorf("res %g: Run kept a whole raster", res)
		}
		idx, err := geotiff.ReadIndex(filepath.Join(job.Out, "index.tif"))
		if err != nil {
			t.Fatal(err)
		}
		bnd, err := geotiff.ReadBands(filepath.Join(job.Out, "bands.tif"))
		if err != nil {
			t.Fatal(err)
		}
		if idx.Spec != whole.Spec || bnd.Spec != whole.Spec {
			t.Fatalf("res %g: grids %v, %v, Compute's %v", res, idx.Spec, bnd.Spec, whole.Spec)
		}
		for i, v := range whole.Index.Data {
			if math.Float32bits(idx.Data[i]) != math.Float32bits(v) || bnd.Data[i] != whole.Bands.Data[i] {
				t.Fatalf("res %g: cell %d: index.tif %v bands.tif %d, Compute %v %d", res, i, idx.Data[i], bnd.Data[i], v, whole.Bands.Data[i])
			}
		}
		var want bytes.Buffer
		w := &layerWriter{job: &job, res: whole}
		if err := geojson.EncodeBands(&want, whole.Bands, whole.Scheme, w.geojsonOptions()); err != nil {
			t.Fatal(err)
		}
		got, err := os.ReadFile(filepath.Join(job.Out, "bands.geojson"))
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got, want.Bytes()) {
			t.Errorf("res %g: bands.geojson (%d bytes) differs from EncodeBands on the whole raster (%d bytes)", res, len(got), want.Len())
		}
		regs, err := region.ReadRegions(job.Regions, job.RegionKey)
		if err != nil {
			t.Fatal(err)
		}
		zs := region.Zonal(whole.Bands, whole.Index, regs)
		if len(zs) == 0 || len(run.Regions) != len(zs) {
			t.Fatalf("res %g: %d regions from the run, %d from Zonal", res, len(run.Regions), len(zs))
		}
		for i := range zs {
			if run.Regions[i] != zs[i] {
				t.Errorf("res %g: region %s: run %+v, Zonal %+v", res, zs[i].Key, run.Regions[i], zs[i])
			}
		}
		if run.CoveredCells != whole.CoveredCells || run.InDroughtPct != whole.InDroughtPct || run.MaskKm2 != whole.MaskKm2 {
			t.Errorf("res %g: run covers %d cells, %v %% in drought, mask %v km2; Compute %d, %v, %v",
				res, run.CoveredCells, run.InDroughtPct, run.MaskKm2, whole.CoveredCells, whole.InDroughtPct, whole.MaskKm2)
		}
		for c, p := range whole.BandPct {
			if run.BandPct[c] != p {
				t.Errorf("res %g: band %d: run %v %%, Compute %v %%", res, c, run.BandPct[c], p)
			}
		}
	}
}
