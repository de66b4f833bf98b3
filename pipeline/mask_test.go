package pipeline

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"drygrid/geotiff"
	"drygrid/grid"
	"drygrid/internal/reftest"
	"drygrid/layer"
)

// maskRing is an invented coastline around the example's stations, wholly
// inside the test grid, with edges across cells at every angle.
var maskRing = [][2]float64{{-126.37, -42.61}, {-124.02, -42.93}, {-121.48, -42.27}, {-121.13, -40.66},
	{-122.04, -39.55}, {-123.61, -39.82}, {-124.35, -40.71}, {-125.12, -39.48}, {-126.58, -39.93}, {-126.37, -42.61}}

var maskBBox = [4]float64{-127, -43.5, -120.5, -39}

func writeMask(t *testing.T, rings ...[][2]float64) string {
	t.Helper()
	var polys []string
	for i, r := range rings {
		b, _ := json.Marshal([][][2]float64{r})
		// A mask's features need no name: the first has none.
		props := fmt.Sprintf(`{"featurecla":"Land","name":"f%d"}`, i)
		if i == 0 {
			props = `{"featurecla":"Land"}`
		}
		polys = append(polys, `{"type":"Feature","properties":`+props+`,"geometry":{"type":"Polygon","coordinates":`+string(b)+`}}`)
	}
	p := filepath.Join(t.TempDir(), "land.geojson")
	if err := os.WriteFile(p, []byte(`{"type":"FeatureCollection","features":[`+strings.Join(polys, ",")+`]}`), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func maskJob(out, mask string) Job {
	job := NewJob(exampleSPI, out)
	b := maskBBox
	job.BBox, job.Res, job.Mask = &b, 0.1, mask
	return job
}

// TestMaskIndexNoData: with --mask, index.tif (read back through
// geotiff.ReadIndex) is no data in every cell wholly outside the mask and
// holds the unmasked value, bit for bit, in every cell with a share inside
// (edge cells keep their value), on the streamed path (index,bands) and in
// memory (all layers). Which cells the polygon reaches comes from shapely
// 1.8 (testdata/regions_ref.py "shares": the exact intersection of the
// polygon with each cell box).
func TestMaskIndexNoData(t *testing.T) {
	py := reftest.Python(t, "shapely", "pyproj")
	s, err := grid.NewSpec(maskBBox[0], maskBBox[1], maskBBox[2], maskBBox[3], 0.1)
	if err != nil {
		t.Fatal(err)
	}
	req, _ := json.Marshal(map[string]any{"mode": "shares",
		"spec":    map[string]any{"west": s.West, "north": s.North, "res": s.Res, "cols": s.Cols, "rows": s.Rows},
		"polygon": [][][2]float64{maskRing}, "step": 0.01})
	var ref [][2]float64
	if err := json.Unmarshal(reftest.RunPython(t, py, "../testdata/regions_ref.py", req), &ref); err != nil {
		t.Fatal(err)
	}
	inside := map[int]bool{}
	for _, r := range ref {
		inside[int(r[0])] = true
	}
	mask := writeMask(t, maskRing)
	for _, layers := range []string{"index,bands", "index,bands,geojson,stations,map,page"} {
		dir := t.TempDir()
		plain, masked := filepath.Join(dir, "plain"), filepath.Join(dir, "masked")
		for _, out := range []string{plain, masked} {
			m := ""
			if out == masked {
				m = mask
			}
			job := maskJob(out, m)
			job.Layers, _ = ParseLayers(layers)
			if _, err := Run(context.Background(), job); err != nil {
				t.Fatal(err)
			}
		}
		a, err := geotiff.ReadIndex(filepath.Join(plain, "index.tif"))
		if err != nil {
			t.Fatal(err)
		}
		b, err := geotiff.ReadIndex(filepath.Join(masked, "index.tif"))
		if err != nil {
			t.Fatal(err)
		}
		if b.Spec != s {
			t.Fatalf("grid %s, want %s", b.Spec, s)
		}
		kept, dropped := 0, 0
		for cell := range b.Data {
			switch {
			case !inside[cell] && b.Data[cell] != b.NoData:
				t.Errorf("layers %s: cell %d wholly outside the mask holds %v", layers, cell, b.Data[cell])
			case inside[cell] && math.Float32bits(b.Data[cell]) != math.Float32bits(a.Data[cell]):
				t.Errorf("layers %s: cell %d inside holds %v, unmasked %v", layers, cell, b.Data[cell], a.Data[cell])
			case inside[cell] && b.Data[cell] != b.NoData:
				kept++
			case !inside[cell] && a.Data[cell] != a.NoData:
				dropped++
			}
		}
		if kept < 500 || dropped < 500 {
			t.Errorf("layers %s: %d cells kept, %d masked: the case checks too little", layers, kept, dropped)
		}
	}
}

// TestMaskAreas: the band areas of a masked grid sum to its covered area
// (a property of the weighted tally), the covered area is at most the
// mask's area within the grid, and the mask's area within the grid is the
// polygon's area on the WGS84 ellipsoid from pyproj 3.4 (Karney 2013
// geodesics, edges densified every 0.002 degrees along lon-lat lines:
// testdata/regions_ref.py "area"), for a polygon wholly inside the grid,
// within 1e-8 relative. The streamed run's figures are the in-memory
// run's.
func TestMaskAreas(t *testing.T) {
	py := reftest.Python(t, "pyproj", "shapely")
	req, _ := json.Marshal(map[string]any{"mode": "area", "polygons": [][][][2]float64{{maskRing}}, "step": 0.002})
	var ref []float64
	if err := json.Unmarshal(reftest.RunPython(t, py, "../testdata/regions_ref.py", req), &ref); err != nil {
		t.Fatal(err)
	}
	// A second feature half outside the grid: only its part inside counts.
	half := [][2]float64{{-120.9, -43.3}, {-119.5, -43.3}, {-119.5, -42.8}, {-120.9, -42.8}, {-120.9, -43.3}}
	for _, c := range []struct {
		rings [][][2]float64
		check bool
	}{{[][][2]float64{maskRing}, true}, {[][][2]float64{maskRing, half}, false}} {
		job := maskJob("", writeMask(t, c.rings...))
		res, err := Compute(context.Background(), job)
		if err != nil {
			t.Fatal(err)
		}
		tl := res.tally
		sum := 0.0
		for _, b := range res.Scheme.Bands {
			sum += tl.CodeKm2[b.Code]
		}
		if math.Abs(sum-tl.CoveredKm2) > 1e-9*tl.CoveredKm2 || tl.CoveredKm2 <= 0 || tl.CoveredKm2 > tl.AreaKm2*(1+1e-12) {
			t.Errorf("band areas %v, covered %v, mask %v km2", sum, tl.CoveredKm2, tl.AreaKm2)
		}
		if res.MaskKm2 != tl.AreaKm2 || res.MaskCells != tl.Inside || res.CoveredPct != 100*tl.CoveredKm2/tl.AreaKm2 {
			t.Errorf("result figures %v %v %v", res.MaskKm2, res.MaskCells, res.CoveredPct)
		}
		if c.check && math.Abs(tl.AreaKm2-ref[0]) > 1e-8*ref[0] {
			t.Errorf("mask area %.6f km2, pyproj %.6f", tl.AreaKm2, ref[0])
		}
		if !c.check {
			// The half-outside square adds its part west of -120.5 only.
			if tl.AreaKm2 <= ref[0] {
				t.Errorf("mask area %v with the second feature, not above %v", tl.AreaKm2, ref[0])
			}
		}
		// The streamed run tallies the same figures.
		job.Out = t.TempDir()
		job.Layers = LayerSet{"index": true, "bands": true}
		sres, err := Run(context.Background(), job)
		if err != nil {
			t.Fatal(err)
		}
		if sres.tally.Shares != tl.Shares || sres.CoveredCells != res.CoveredCells || sres.MaskCells != res.MaskCells {
			t.Errorf("streamed figures differ: %v %v vs %v %v", sres.tally.CoveredKm2, sres.CoveredCells, tl.CoveredKm2, res.CoveredCells)
		}
	}
}

// TestMaskRegions: --mask regions masks to the union of the regions, and
// needs them.
func TestMaskRegions(t *testing.T) {
	job := maskJob("x", MaskRegions)
	if err := job.Validate(); err == nil || !strings.Contains(err.Error(), "--mask regions needs --regions") {
		t.Errorf("mask regions without regions: %v", err)
	}
	job.Out = ""
	job.Regions, job.RegionKey = writeMask(t, maskRing), "featurecla"
	a, err := Compute(context.Background(), job)
	if err != nil {
		t.Fatal(err)
	}
	job.Mask, job.Regions = job.Regions, ""
	b, err := Compute(context.Background(), job)
	if err != nil {
		t.Fatal(err)
	}
	if a.tally.Shares != b.tally.Shares || len(a.Regions) != 1 {
		t.Errorf("mask regions %v, mask file %v", a.tally.AreaKm2, b.tally.AreaKm2)
	}
}

// TestMaskNoDataLabel: with a mask the legends of the page say that cells
// outside it are no data too; without one they say as before.
func TestMaskNoDataLabel(t *testing.T) {
	for _, withMask := range []bool{false, true} {
		out := filepath.Join(t.TempDir(), "layers")
		job := maskJob(out, writeMask(t, maskRing))
		if !withMask {
			job.Mask = ""
		}
		job.Layers, _ = ParseLayers("page")
		if _, err := Run(context.Background(), job); err != nil {
			t.Fatal(err)
		}
		page, err := os.ReadFile(filepath.Join(out, "map.html"))
		if err != nil {
			t.Fatal(err)
		}
		want, other := layer.NoDataLabel, layer.NoDataMaskedLabel
		if withMask {
			want, other = other, want
		}
		if !strings.Contains(string(page), want) || strings.Contains(string(page), other) {
			t.Errorf("mask %v: the page does not name no data as %q", withMask, want)
		}
	}
}
