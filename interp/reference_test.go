package interp

import (
	"bufio"
	"bytes"
	"encoding/json"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"

	"drygrid/grid"
	"drygrid/internal/reftest"
)

// readFixture reads a lon,lat,z CSV of invented stations from testdata/interp.
func readFixture(t *testing.T, name string) []Point {
	t.Helper()
	b, err := os.ReadFile("../testdata/interp/" + name)
	if err != nil {
		t.Fatal(err)
	}
	var pts []Point
	sc := bufio.NewScanner(bytes.NewReader(b))
	for line := 1; sc.Scan(); line++ {
		if line == 1 {
			continue // header
		}
		f := strings.Split(sc.Text(), ",")
		if len(f) != 3 {
			t.Fatalf("%s line %d: want 3 fields", name, line)
		}
		var v [3]float64
		for i := range f {
			if v[i], err = strconv.ParseFloat(f[i], 64); err != nil {
				t.Fatalf("%s line %d: %v", name, line, err)
			}
		}
		pts = append(pts, Point{v[0], v[1], v[2]})
	}
	return pts
}

// TestGridAgainstNumPyReference compares Grid with testdata/idw_ref.py, an
// independent NumPy brute-force great-circle IDW (haversine on R = 6371.0088
// km, Shepard 1968 weights, stable-sort ties), to 1e-5 on every cell, with
// masked cells matching exactly. The fixtures are invented stations: one
// set across the antimeridian (grid 170E..170W, so its longitudes run to
// 190) and one north of 55N (grid 60..90N, with the row next to the pole,
// a station on the pole and stations given as 0..360). The parameter sets
// reach every weighting path: power 2 within 337 km, power 3, and power 1.5
// beyond 637 km.
func TestGridAgainstNumPyReference(t *testing.T) {
	py := reftest.Python(t, "numpy")
	cases := []struct {
		name    string
		fixture string
		bbox    [4]float64 // west, south, east, north
		res     float64
		p       Params
	}{
		{"antimeridian", "antimeridian.csv", [4]float64{170, -25, -170, -15}, 0.25,
			Params{Power: 2, Neighbors: 8, RadiusKm: 250, MinStations: 3}},
		{"antimeridian-p3", "antimeridian.csv", [4]float64{170, -25, -170, -15}, 0.25,
			Params{Power: 3, Neighbors: 5, RadiusKm: 400, MinStations: 2}},
		{"polar", "polar.csv", [4]float64{-180, 60, 180, 90}, 0.5,
			Params{Power: 2, Neighbors: 12, RadiusKm: 300, MinStations: 3}},
		{"polar-wide", "polar.csv", [4]float64{-180, 60, 180, 90}, 0.5,
			Params{Power: 1.5, Neighbors: 6, RadiusKm: 800, MinStations: 4}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			pts := readFixture(t, tc.fixture)
			spec, err := grid.NewSpec(tc.bbox[0], tc.bbox[1], tc.bbox[2], tc.bbox[3], tc.res)
			if err != nil {
				t.Fatal(err)
			}
			ip, err := New(pts, tc.p)
			if err != nil {
				t.Fatal(err)
			}
			out := ip.Grid(spec, nil)
			job := map[string]any{
				"power": tc.p.Power, "neighbors": tc.p.Neighbors,
				"radius_km": tc.p.RadiusKm, "min_stations": tc.p.MinStations,
			}
			var ps, cs [][]float64
			for _, q := range pts {
				ps = append(ps, []float64{q.Lon, q.Lat, q.Z})
			}
			for row := range spec.Rows {
				for col := range spec.Cols {
					lon, lat := spec.Center(col, row)
					cs = append(cs, []float64{lon, lat})
				}
			}
			job["points"], job["cells"] = ps, cs
			in, err := json.Marshal(job)
			if err != nil {
				t.Fatal(err)
			}
			ref := strings.Fields(string(reftest.RunPython(t, py, "../testdata/idw_ref.py", in)))
			if len(ref) != spec.Len() {
				t.Fatalf("reference gave %d values for %d cells", len(ref), spec.Len())
			}
			masked, worst := 0, 0.0
			for i, s := range ref {
				got := out.Data[i]
				if s == "nan" {
					masked++
					if got != grid.NoDataIndex {
						t.Fatalf("cell %d (col %d row %d): reference masks it, Grid gives %v", i, i%spec.Cols, i/spec.Cols, got)
					}
					continue
				}
				want, err := strconv.ParseFloat(s, 64)
				if err != nil {
					t.Fatal(err)
				}
				if got == grid.NoDataIndex {
					t.Fatalf("cell %d (col %d row %d): Grid masks it, reference gives %v", i, i%spec.Cols, i/spec.Cols, want)
				}
				worst = max(worst, math.Abs(float64(got)-want))
				if math.Abs(float64(got)-want) > 1e-5 {
					t.Fatalf("cell %d (col %d row %d): Grid %v, reference %v", i, i%spec.Cols, i/spec.Cols, got, want)
				}
			}
			// The fixtures are built to have both kinds of cell.
			if masked == 0 || masked == spec.Len() {
				t.Fatalf("%d of %d cells masked: the fixture should have both", masked, spec.Len())
			}
			if strings.HasPrefix(tc.name, "polar") {
				// The row next to the pole (centres at 89.75N) must be estimated
				// from stations on every side of the pole, not masked.
				top := 0
				for col := range spec.Cols {
					if out.Data[col] != grid.NoDataIndex {
						top++
					}
				}
				if top != spec.Cols {
					t.Fatalf("row next to the pole: %d of %d cells have a value", top, spec.Cols)
				}
			}
			t.Logf("%d cells, %d masked, largest difference %.3g", spec.Len(), masked, worst)
		})
	}
}
