package station

import (
	"drygrid/internal/spitest"
	"drygrid/spi"
	"math/rand/v2"
	"runtime"
	"sync"
	"testing"
)

// idxBenchSeries builds 100,000 stations x 100 years (the performance
// target "SPI for 100,000 stations x 100 years <= 1 s"). To keep memory
// small on a shared machine, 1,000 distinct invented series (gamma shapes
// 0.5-8.5, about 5 % zeros) are shared round-robin; the work per station
// is the same as with 100,000 distinct series.
func idxBenchSeries() ([]idxSite, [][]idxEntry) {
	const distinct, stations, years = 1000, 100000, 100
	r := rand.New(rand.NewPCG(7, 7))
	base := make([][]idxEntry, distinct)
	for i := range base {
		x := spitest.GammaSample(uint64(i), years, 0.5+8*r.Float64(), 10+50*r.Float64(), true)
		s := make([]idxEntry, years)
		for y := range s {
			if r.Float64() < 0.05 {
				x[y] = 0
			}
			s[y] = idxEntry{total: x[y], line: uint32(y + 2), year: int32(1921 + y)}
		}
		base[i] = s
	}
	sites := make([]idxSite, stations)
	series := make([][]idxEntry, stations)
	for i := range sites {
		sites[i] = idxSite{ID: "S", Lat: 1, Lon: 2}
		series[i] = base[i%distinct]
	}
	return sites, series
}

// BenchmarkIndex100k is the whole per-station work of `drygrid index` for
// 100,000 stations x 100 years, target year 2020: reference sample, sort,
// mid-rank percentile, median, gamma MLE, Anderson-Darling test, SPI.
// One op = all 100,000 stations, with GOMAXPROCS workers.
func BenchmarkIndex100k(b *testing.B) {
	sites, series := idxBenchSeries()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		rows := idxComputeAll(sites, series, 2020, IndexOptions{})
		if !rows[0].HasIndex {
			b.Fatal(rows[0].Note)
		}
	}
}

// BenchmarkSPI100k is the SPI alone for 100,000 stations x 100 years: gamma
// MLE of each station's 100 totals and the SPI of its target year, with
// GOMAXPROCS workers (no percentile, no goodness-of-fit test).
func BenchmarkSPI100k(b *testing.B) {
	sites, series := idxBenchSeries()
	out := make([]float64, len(sites))
	workers := runtime.GOMAXPROCS(0)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		var wg sync.WaitGroup
		for w := 0; w < workers; w++ {
			wg.Add(1)
			go func(w int) {
				defer wg.Done()
				x := make([]float64, 0, 100)
				for k := w; k < len(sites); k += workers {
					x = x[:0]
					zeros := 0
					for _, e := range series[k] {
						x = append(x, e.total)
						if e.total == 0 {
							zeros++
						}
					}
					shape, scale, err := spi.GammaFit(x)
					if err != nil {
						b.Error(err)
						return
					}
					out[k] = spi.SPI(x[len(x)-1], shape, scale, float64(zeros)/float64(len(x)))
				}
			}(w)
		}
		wg.Wait()
	}
}
