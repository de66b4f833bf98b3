package pipeline

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"drygrid/internal/reftest"
	"drygrid/interp"
)

// TestSupportLayerAgainstNumPyAndGDAL runs a job with --layers
// index,support on the example stations and reads support.tif and
// support_count.tif back with GDAL (python3-gdal), checking every cell
// against testdata/support_ref.py (independent brute-force NumPy haversine
// on R = 6371.0088 km): the distance to float32 rounding (one unit in the
// last place), no data exactly where no station is within the radius, the
// count exactly (cells with a station within 1e-6 km of the radius
// skipped). It also checks that "all" does not write the layer.
func TestSupportLayerAgainstNumPyAndGDAL(t *testing.T) {
	py := reftest.Python(t, "numpy", "osgeo.gdal")
	out := filepath.Join(t.TempDir(), "out")
	layers, err := ParseLayers("index,support")
	if err != nil {
		t.Fatal(err)
	}
	job := exampleJob(out, 0.1, 5, 120)
	job.Layers = layers
	res, err := Run(context.Background(), job)
	if err != nil {
		t.Fatal(err)
	}
	spec := res.Spec
	lines := supportRef(t, py, res, job.Params, filepath.Join(out, "support.tif"), filepath.Join(out, "support_count.tif"))
	none := 0
	for i, l := range lines {
		f := strings.Fields(l)
		want, _ := strconv.ParseFloat(f[0], 64)
		wantN, _ := strconv.Atoi(f[1])
		edge, _ := strconv.ParseFloat(f[2], 64)
		got, _ := strconv.ParseFloat(f[3], 64)
		gotN, _ := strconv.ParseFloat(f[4], 64)
		if math.IsNaN(want) {
			none++
			if !math.IsNaN(got) || gotN != 0 {
				t.Fatalf("cell %d: no station within the radius, support.tif %v, count %v", i, got, gotN)
			}
			continue
		}
		if d := math.Abs(float64(float32(want)) - got); d > float64(math.Nextafter32(float32(want), 1e9)-float32(want)) {
			t.Fatalf("cell %d: support.tif %v km, reference %v", i, got, want)
		}
		if edge >= 1e-6 && int(gotN) != wantN {
			t.Fatalf("cell %d: support_count.tif %v, reference %d", i, gotN, wantN)
		}
	}
	if none == 0 || none == spec.Len() {
		t.Fatalf("%d of %d cells without a station: want both kinds", none, spec.Len())
	}
	all, err := ParseLayers("all")
	if err != nil || all["support"] {
		t.Fatalf("all = %v, %v: support should be named only", all, err)
	}
	both, err := ParseLayers("all,support")
	if err != nil || !both["support"] || !both["page"] {
		t.Fatalf("all,support = %v, %v", both, err)
	}
	if _, err := os.Stat(filepath.Join(out, "bands.tif")); err == nil {
		t.Fatal("bands.tif written without being asked for")
	}
}

// exampleJob is a job on the example stations' SPI (exampleSPI) over a
// grid of res degrees: IDW power 2, at most neighbors stations within
// radiusKm, at least 3.
func exampleJob(out string, res float64, neighbors int, radiusKm float64) Job {
	job := Job{Stations: exampleSPI, Out: out, Res: res}
	job.Params.Power, job.Params.Neighbors, job.Params.RadiusKm, job.Params.MinStations = 2, neighbors, radiusKm, 3
	job.Values.Kind = "spi"
	return job
}

// supportRef runs testdata/support_ref.py on the stations of res and the
// centres of its grid's cells, with the search radius and the neighbours
// of p (and GDAL reading the rasters, when named), and gives its lines,
// one per cell in row-major order.
func supportRef(t *testing.T, py string, res *Result, p interp.Params, rasters ...string) []string {
	t.Helper()
	spec := res.Spec
	var ps, cs [][]float64
	for _, s := range res.Values.Stations {
		ps = append(ps, []float64{s.Lon, s.Lat})
	}
	for row := range spec.Rows {
		for col := range spec.Cols {
			lon, lat := spec.Center(col, row)
			cs = append(cs, []float64{lon, lat})
		}
	}
	req := map[string]any{"points": ps, "cells": cs, "radius_km": p.RadiusKm, "neighbors": p.Neighbors}
	if len(rasters) > 0 {
		req["rasters"] = rasters
	}
	in, err := json.Marshal(req)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(reftest.RunPython(t, py, "../testdata/support_ref.py", in))), "\n")
	if len(lines) != spec.Len() {
		t.Fatalf("%d lines for %d cells", len(lines), spec.Len())
	}
	return lines
}
