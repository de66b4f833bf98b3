package geojson

import (
	"io"
	"math/rand/v2"
	"strconv"
	"testing"

	"drygrid/bands"
)

// gjBenchStations invents n stations over the globe (a fixed seed), with
// the fields a run gives them.
func gjBenchStations(n int) []Station {
	rng := rand.New(rand.NewPCG(7, 11))
	s := bands.Default()
	pts := make([]Station, n)
	for i := range pts {
		z := rng.NormFloat64()
		pts[i] = Station{ID: "ST" + strconv.Itoa(i), Lon: rng.Float64()*360 - 180, Lat: rng.Float64()*180 - 90,
			Value: z, Z: z, HasZ: true, Code: s.Classify(z), InGrid: rng.IntN(8) != 0}
	}
	return pts
}

// BenchmarkEncodeStations writes the station layer of 500,000 stations to
// io.Discard; with -benchmem, B/op is what the encoder allocates on the
// way (the stations themselves are made before the timer starts).
func BenchmarkEncodeStations(b *testing.B) {
	pts := gjBenchStations(500000)
	s := bands.Default()
	opt := Options{Params: map[string]any{"kind": "spi"}, Date: "2026-11-30", Kind: "spi"}
	b.ReportAllocs()
	b.ResetTimer()
	for range b.N {
		if err := EncodeStations(io.Discard, pts, s, opt); err != nil {
			b.Fatal(err)
		}
	}
}
