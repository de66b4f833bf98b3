package station

import (
	"bytes"
	"hash/maphash"
	"runtime"
	"strconv"
	"testing"
)

// valuesBigTable is an SPI table of n stations with distinct points and
// ids like the WMO-style "ST0001234", about 40 bytes a row.
func valuesBigTable(n int) []byte {
	var b bytes.Buffer
	b.Grow(n * 40)
	b.WriteString("station,latitude,longitude,spi\n")
	for i := range n {
		b.WriteString("ST")
		b.WriteString(strconv.Itoa(1_000_000 + i))
		b.WriteByte(',')
		b.WriteString(strconv.FormatFloat(-89.9+float64(i%1799)/10, 'f', 4, 64))
		b.WriteByte(',')
		b.WriteString(strconv.FormatFloat(-179.9+float64(i/1799)*0.0005, 'f', 4, 64))
		b.WriteByte(',')
		b.WriteString(strconv.FormatFloat(float64(i%97)/20-2.4, 'f', 2, 64))
		b.WriteByte('\n')
	}
	return b.Bytes()
}

// BenchmarkParseValuesMemory reads a table of a million stations and
// reports the heap the result holds (retained-B/station, after a GC, the
// table's bytes excluded) and all that the reading allocated
// (alloc-B/station).
func BenchmarkParseValuesMemory(b *testing.B) {
	const n = 1_000_000
	data := valuesBigTable(n)
	b.SetBytes(int64(len(data)))
	b.ResetTimer()
	var retained, alloc float64
	for range b.N {
		var m0, m1, m2 runtime.MemStats
		runtime.GC()
		runtime.ReadMemStats(&m0)
		v, err := ParseValues("big.csv", bytes.NewReader(data), ValueOptions{Kind: KindSPI})
		if err != nil || len(v.Stations) != n {
			b.Fatal(err)
		}
		runtime.ReadMemStats(&m1)
		runtime.GC()
		runtime.ReadMemStats(&m2)
		retained += float64(m2.HeapAlloc) - float64(m0.HeapAlloc)
		alloc += float64(m1.TotalAlloc - m0.TotalAlloc)
		runtime.KeepAlive(v)
	}
	b.ReportMetric(retained/float64(b.N)/n, "retained-B/station")
	b.ReportMetric(alloc/float64(b.N)/n, "alloc-B/station")
}

// Reading a value table costs under 250 bytes a station in all (the
// station itself is 80, its id its bytes, the two hash tables 16 bytes an
// entry at up to half load); BenchmarkParseValuesMemory reports what the
// result keeps.
func TestValuesMemoryPerStation(t *testing.T) {
	const n = 200_000
	data := valuesBigTable(n)
	var v *Values
	var err error
	grew := heapGrowth(func() { v, err = ParseValues("big.csv", bytes.NewReader(data), ValueOptions{Kind: KindSPI}) })
	if err != nil || len(v.Stations) != n || v.Stations[n-1].ID != "ST1199999" {
		t.Fatal(err)
	}
	per := float64(grew) / n
	t.Logf("%.0f bytes a station allocated", per)
	if per > 250 {
		t.Errorf("%.0f bytes a station allocated, want under 250", per)
	}
}

// More stations than the limit are refused at the first one too many.
func TestValuesStationLimit(t *testing.T) {
	defer func(n int) { valuesMaxStations = n }(valuesMaxStations)
	valuesMaxStations = 3
	data := "station,lat,lon,spi\nA,1,1,0.5\nB,2,2,0.5\nA,1,1,0.5\nC,3,3,\nD,4,4,1\n"
	_, err := ParseValues("x.csv", bytes.NewReader([]byte(data)), ValueOptions{})
	want := "x.csv line 6 column 1 (station): more than 3 stations; the limit keeps memory bounded: split the table, or grid fewer stations"
	if err == nil || err.Error() != want {
		t.Fatalf("error\n got %v\nwant %s", err, want)
	}
}

// The id table finds an id whose hash another id took first (kept apart
// by string): such a collision is forced here.
func TestValuesIDTableCollision(t *testing.T) {
	ids := []string{"A", "B"}
	m := &valuesIDTable{seed: maphash.MakeSeed(), byHash: map[uint64]int32{}, overflow: map[string]int32{}}
	idOf := func(at int32) string { return ids[at] }
	m.put("A", 0)
	m.byHash[maphash.String(m.seed, "B")] = 0 // B's hash now taken by A
	if _, ok := m.get([]byte("B"), idOf); ok {
		t.Fatal("B found before it was put")
	}
	m.put("B", 1)
	if at, ok := m.get([]byte("B"), idOf); !ok || at != 1 || m.overflow["B"] != 1 {
		t.Fatalf("B: %d %v", at, ok)
	}
	if at, ok := m.get([]byte("A"), idOf); !ok || at != 0 {
		t.Fatalf("A: %d %v", at, ok)
	}
}
