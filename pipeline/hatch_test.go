package pipeline

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"drygrid/internal/reftest"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"
)

// TestFarCellsAgainstNumPy runs the example job with --hatch-beyond-km and
// checks the far-cell raster the picture and the page hatch against
// testdata/support_ref.py (independent brute-force NumPy haversine on
// R = 6371.0088 km): a cell is far exactly when it holds a band and its
// nearest station (reference) is farther than the distance (cells within
// 1e-3 km of the distance skipped: float32 distances). The page's far layer
// covers exactly as many cells (planar area in square degrees, whose cells
// are res x res), and map.html carries the layer and its legend entry, which
// a run without the flag leaves out.
func TestFarCellsAgainstNumPy(t *testing.T) {
	py := reftest.Python(t, "numpy")
	const km = 45.0
	out := filepath.Join(t.TempDir(), "out")
	layers, err := ParseLayers("bands,map,page")
	if err != nil {
		t.Fatal(err)
	}
	job := exampleJob(out, 0.1, 12, 150)
	job.Layers, job.HatchBeyondKm = layers, km
	res, err := Run(context.Background(), job)
	if err != nil {
		t.Fatal(err)
	}
	// Run streams its rasters; Compute, on the same job, holds the band
	// raster whose far cells the picture and the page hatch (the grid is
	// its own preview).
	whole, err := Compute(context.Background(), job)
	if err != nil {
		t.Fatal(err)
	}
	res.Bands = whole.Bands
	far, err := res.farCells(res.Bands, km)
	if err != nil || far == nil {
		t.Fatalf("far cells: %v, %v", far, err)
	}
	spec := res.Spec
	lines := supportRef(t, py, res, job.Params)
	nFar, nNear, nFarData := 0, 0, 0
	for i, l := range lines {
		want, _ := strconv.ParseFloat(strings.Fields(l)[0], 64)
		has := res.Bands.Data[i] != res.Bands.NoData
		if far.Data[i] != 0 {
			nFarData++
		}
		if has && math.Abs(want-km) < 1e-3 {
			continue
		}
		wantFar := has && !math.IsNaN(want) && want > km
		if (far.Data[i] != 0) != wantFar {
			t.Fatalf("cell %d: far %d, reference distance %v km, has a value %v", i, far.Data[i], want, has)
		}
		if wantFar {
			nFar++
		} else if has {
			nNear++
		}
	}
	if nFar == 0 || nNear == 0 {
		t.Fatalf("%d far and %d near cells with a value: want both", nFar, nNear)
	}

	html, err := os.ReadFile(filepath.Join(out, "map.html"))
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range []string{`id="drygrid-far"`, `id="layer-far"`, `id="far-hatch"`, "Nearest station over 45 km"} {
		if !bytes.Contains(html, []byte(s)) {
			t.Errorf("map.html lacks %s", s)
		}
	}
	doc, err := farGeoJSON(far, km)
	if err != nil {
		t.Fatal(err)
	}
	var fc struct {
		Features []struct {
			Geometry struct {
				Coordinates [][][][2]float64 `json:"coordinates"`
			} `json:"geometry"`
		} `json:"features"`
	}
	if err := json.Unmarshal(doc, &fc); err != nil || len(fc.Features) != 1 {
		t.Fatalf("far GeoJSON: %v, %d features", err, len(fc.Features))
	}
	var mp orb.MultiPolygon
	for _, p := range fc.Features[0].Geometry.Coordinates {
		var poly orb.Polygon
		for _, r := range p {
			var ring orb.Ring
			for _, pt := range r {
				ring = append(ring, orb.Point(pt))
			}
			poly = append(poly, ring)
		}
		mp = append(mp, poly)
	}
	// Planar area of the traced polygons (paulmach/orb, shoelace) in
	// square degrees against the number of far cells.
	if got, want := planar.Area(mp)/(spec.Res*spec.Res), float64(nFarData); math.Abs(got-want) > 1e-6*want {
		t.Errorf("far polygons cover %v cells, the raster marks %v", got, want)
	}

	// Off: no far layer, no legend entry.
	out0 := filepath.Join(t.TempDir(), "out0")
	job.Out, job.HatchBeyondKm = out0, 0
	res0, err := Run(context.Background(), job)
	if err != nil {
		t.Fatal(err)
	}
	if f0, err := res0.farCells(whole.Bands, 0); f0 != nil || err != nil {
		t.Errorf("far cells at 0 km: %v, %v", f0, err)
	}
	html0, err := os.ReadFile(filepath.Join(out0, "map.html"))
	if err != nil {
		t.Fatal(err)
	}
	if bytes.Contains(html0, []byte("far")) || bytes.Contains(html0, []byte("Nearest station over")) {
		t.Error("map.html without --hatch-beyond-km carries the far layer")
	}
}
