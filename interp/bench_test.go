package interp

import (
	"math"
	"math/rand/v2"
	"testing"

	"drygrid/grid"
)

// uniformSphere draws n points uniformly on the sphere from a fixed seed
// (longitude uniform, sine of latitude uniform: Archimedes' hat-box theorem)
// with values in [-3, 3].
func uniformSphere(n int, seed uint64) []Point {
	r := rand.New(rand.NewPCG(seed, 2))
	pts := make([]Point, n)
	for i := range pts {
		pts[i] = Point{
			Lon: r.Float64()*360 - 180,
			Lat: math.Asin(2*r.Float64()-1) / degToRad,
			Z:   r.Float64()*6 - 3,
		}
	}
	return pts
}

// BenchmarkGridGlobal is the project's target workload: 20,000 stations
// onto a global 0.1 degree grid (3600 x 1800 = 6.48 M cells), k = 12,
// 300 km.
func BenchmarkGridGlobal(b *testing.B) { benchGridGlobal(b, DefaultParams()) }

// benchGridGlobal grids uniformSphere(20000, 1) onto the global 0.1 degree
// grid with p.
func benchGridGlobal(b *testing.B, p Params) {
	ip, err := New(uniformSphere(20000, 1), p)
	if err != nil {
		b.Fatal(err)
	}
	spec, err := grid.Global(0.1)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		ip.Grid(spec, nil)
	}
	b.ReportMetric(float64(spec.Len())*float64(b.N)/b.Elapsed().Seconds(), "cells/s")
}

// BenchmarkNew is New on 20,000 stations: the checks and the two sorts (by
// longitude and by latitude).
func BenchmarkNew(b *testing.B) {
	pts := uniformSphere(20000, 1)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := New(pts, DefaultParams()); err != nil {
			b.Fatal(err)
		}
	}
}
