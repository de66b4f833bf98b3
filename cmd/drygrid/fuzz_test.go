package main

import (
	"bytes"
	"math"
	"strings"
	"testing"

	"drygrid/station"
)

// FuzzStationList: the station list of the index step (id, latitude,
// longitude) never panics the reader; errors name the file; every station
// accepted comes back once, in range.
func FuzzStationList(f *testing.F) {
	f.Add([]byte("station,latitude,longitude\nA,10,20\nB,-5,370\n"))
	f.Add([]byte("id;lat;lon\nA;10,5;20\nA;10,5;20\n"))
	f.Add([]byte("\ufeffsite\tlat\tlng\n\"A\"\"\"\t1\t2\n"))
	totals := []byte("station,year,total\nA,2001,1\nA,2002,2\nB,2001,3\n")
	f.Fuzz(func(t *testing.T, data []byte) {
		res, err := station.ComputeIndexReaders("stations.csv", bytes.NewReader(data), "totals.csv", bytes.NewReader(totals), station.IndexOptions{MinYears: 1, Year: 2001})
		if err != nil {
			if !strings.Contains(err.Error(), "stations.csv") && !strings.Contains(err.Error(), "totals.csv") {
				t.Fatalf("error without the file name: %v", err)
			}
			return
		}
		seen := map[string]bool{}
		for _, r := range res.Rows {
			if seen[r.Station] {
				t.Fatalf("station %q twice", r.Station)
			}
			seen[r.Station] = true
			if !(r.Lat >= -90 && r.Lat <= 90) || math.IsNaN(r.Lon) || math.IsInf(r.Lon, 0) {
				t.Fatalf("station %q at %v, %v", r.Station, r.Lat, r.Lon)
			}
		}
	})
}
