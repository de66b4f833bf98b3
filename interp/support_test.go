package interp

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"

	"drygrid/grid"
	"drygrid/internal/reftest"
)

// boxStations are n invented stations spread uniformly in the box
// (longitudes may run past 180), from a fixed seed.
func boxStations(seed uint64, n int, west, south, east, north float64) []Point {
	r := rand.New(rand.NewPCG(seed, 18))
	pts := make([]Point, n)
	for i := range pts {
		pts[i] = Point{west + (east-west)*r.Float64(), south + (north-south)*r.Float64(), 2*r.Float64() - 1}
	}
	return pts
}

// TestSupportAgainstNumPyReference compares Support with
// testdata/support_ref.py, an independent brute-force NumPy reference
// (haversine on the sphere of R = 6371.0088 km, every station against every
// cell): the distance to the nearest station within the radius to float32
// rounding (the reference's float64 rounded to float32, at most one unit
// in the last place apart), no data exactly where the reference finds none,
// and the count within the radius capped at k exactly. Cells with a station
// within 1e-6 km of the radius itself are skipped for the count (the chord
// test and the haversine may round either way there; the random fixture
// has none or nearly none). The stations are random and invented: one set
// across the antimeridian, one reaching the pole, one with few stations so
// that many cells have none within the radius.
func TestSupportAgainstNumPyReference(t *testing.T) {
	py := reftest.Python(t, "numpy")
	cases := []struct {
		name string
		pts  []Point
		bbox [4]float64
		res  float64
		p    Params
	}{
		{"antimeridian", boxStations(1, 300, 165, -30, 195, -10), [4]float64{160, -32, -160, -8}, 0.25,
			Params{Power: 2, Neighbors: 8, RadiusKm: 250, MinStations: 3}},
		{"polar", boxStations(2, 200, -180, 70, 180, 90), [4]float64{-180, 65, 180, 90}, 1,
			Params{Power: 2, Neighbors: 12, RadiusKm: 400, MinStations: 3}},
		{"sparse", boxStations(3, 25, 0, 0, 20, 15), [4]float64{-2, -2, 22, 17}, 0.2,
			Params{Power: 3, Neighbors: 3, RadiusKm: 150, MinStations: 2}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			spec, err := grid.NewSpec(tc.bbox[0], tc.bbox[1], tc.bbox[2], tc.bbox[3], tc.res)
			if err != nil {
				t.Fatal(err)
			}
			ip, err := New(tc.pts, tc.p)
			if err != nil {
				t.Fatal(err)
			}
			dist := make([]float32, spec.Len())
			count := make([]uint16, spec.Len())
			if err := ip.Support(spec, 0, spec.Rows, dist, count); err != nil {
				t.Fatal(err)
			}
			var ps, cs [][]float64
			for _, q := range tc.pts {
				ps = append(ps, []float64{q.Lon, q.Lat})
			}
			for row := range spec.Rows {
				for col := range spec.Cols {
					lon, lat := spec.Center(col, row)
					cs = append(cs, []float64{lon, lat})
				}
			}
			in, _ := json.Marshal(map[string]any{"points": ps, "cells": cs, "radius_km": tc.p.RadiusKm, "neighbors": tc.p.Neighbors})
			lines := strings.Split(strings.TrimSpace(string(reftest.RunPython(t, py, "../testdata/support_ref.py", in))), "\n")
			if len(lines) != spec.Len() {
				t.Fatalf("reference gave %d lines for %d cells", len(lines), spec.Len())
			}
			none, capped, skipped := 0, 0, 0
			for i, line := range lines {
				f := strings.Fields(line)
				wantN, _ := strconv.Atoi(f[1])
				edge, _ := strconv.ParseFloat(f[2], 64)
				if f[0] == "nan" {
					none++
					if dist[i] != grid.NoDataIndex || count[i] != 0 {
						t.Fatalf("cell %d: no station within the radius in the reference, Support gives %v km, %d", i, dist[i], count[i])
					}
					continue
				}
				want, _ := strconv.ParseFloat(f[0], 64)
				if d := ulps32(dist[i], float32(want)); d > 1 {
					t.Fatalf("cell %d: distance %v km, reference %v (%d float32 units apart)", i, dist[i], want, d)
				}
				if edge < 1e-6 {
					skipped++
					continue
				}
				if int(count[i]) != wantN {
					t.Fatalf("cell %d: count %d, reference %d", i, count[i], wantN)
				}
				if wantN == tc.p.Neighbors {
					capped++
				}
			}
			if none == 0 || none == spec.Len() || capped == 0 {
				t.Fatalf("%d cells without a station, %d capped at k, of %d: the fixture should have all kinds", none, capped, spec.Len())
			}
			t.Logf("%d cells: %d without a station within the radius, %d capped at k, %d on the radius skipped", spec.Len(), none, capped, skipped)
		})
	}
}

// ulps32 is how many float32 values lie between a and b (finite, same sign).
func ulps32(a, b float32) int64 {
	d := int64(math.Float32bits(a)) - int64(math.Float32bits(b))
	if d < 0 {
		return -d
	}
	return d
}

// TestSupportDeterministic: the same bits whatever the worker count and
// the block split (the package's promise), and the count is At's n at each
// covered cell centre, also under the sector rule.
func TestSupportDeterministic(t *testing.T) {
	pts := boxStations(4, 400, -20, 30, 25, 60)
	spec, err := grid.NewSpec(-25, 25, 30, 65, 0.5)
	if err != nil {
		t.Fatal(err)
	}
	for _, sectors := range []int{0, 4} {
		p := Params{Power: 2, Neighbors: 8, RadiusKm: 200, MinStations: 3, Sectors: sectors, Workers: 1}
		ip1, _ := New(pts, p)
		d1, c1 := make([]float32, spec.Len()), make([]uint16, spec.Len())
		if err := ip1.Support(spec, 0, spec.Rows, d1, c1); err != nil {
			t.Fatal(err)
		}
		p.Workers = 7
		ip7, _ := New(pts, p)
		d7, c7 := make([]float32, spec.Len()), make([]uint16, spec.Len())
		for row0 := 0; row0 < spec.Rows; row0 += 13 {
			n := min(13, spec.Rows-row0)
			if err := ip7.Support(spec, row0, n, d7[row0*spec.Cols:(row0+n)*spec.Cols], c7[row0*spec.Cols:(row0+n)*spec.Cols]); err != nil {
				t.Fatal(err)
			}
		}
		for i := range d1 {
			if math.Float32bits(d1[i]) != math.Float32bits(d7[i]) || c1[i] != c7[i] {
				t.Fatalf("sectors %d cell %d: 1 worker %v %d, 7 workers in blocks %v %d", sectors, i, d1[i], c1[i], d7[i], c7[i])
			}
		}
		covered := 0
		for row := range spec.Rows {
			for col := range spec.Cols {
				lon, lat := spec.Center(col, row)
				_, n, ok := ip1.At(lon, lat)
				i := row*spec.Cols + col
				if ok {
					covered++
				}
				if (ok || sectors == 0) && n != int(c1[i]) {
					t.Fatalf("sectors %d cell %d: count %d, At uses %d", sectors, i, c1[i], n)
				}
			}
		}
		if covered == 0 {
			t.Fatal("no covered cell")
		}
	}
	// Only one of the two asked for.
	ip, _ := New(pts, DefaultParams())
	d, c := make([]float32, spec.Len()), make([]uint16, spec.Len())
	if err := ip.Support(spec, 0, spec.Rows, d, nil); err != nil {
		t.Fatal(err)
	}
	if err := ip.Support(spec, 0, spec.Rows, nil, c); err != nil {
		t.Fatal(err)
	}
	if err := ip.Support(spec, 0, spec.Rows, d[1:], nil); err == nil {
		t.Fatal("a short slice was accepted")
	}
}
