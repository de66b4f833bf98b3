package scenario

import (
	"bufio"
	"encoding/json"
	"hash/fnv"
	"io"
	"math"
	"strconv"
)

// Coast returns n points (lon, lat) of the island's invented coastline,
// counter-clockwise, not closed: the island's ellipse with its radius
// varied smoothly by a few harmonics (bays and headlands), their phases
// drawn from the island's name, so the same island always has the same
// coast. The radius is 1.04 to 1.36 times the ellipse's, so the coast
// encloses the ellipse and every station on the island; the polygon is
// star-shaped about the centre, so it never crosses itself.
func (is Island) Coast(n int) [][2]float64 {
	h := fnv.New64a()
	h.Write([]byte(is.Name))
	seed := h.Sum64()
	var phase [4]float64
	for k := range phase {
		seed = seed*6364136223846793005 + 1442695040888963407 // one step of Knuth's MMIX generator
		phase[k] = 2 * math.Pi * float64(seed>>11) / (1 << 53)
	}
	pts := make([][2]float64, n)
	for i := range pts {
		t := 2 * math.Pi * float64(i) / float64(n)
		f := 1.2 + 0.07*math.Sin(2*t+phase[0]) + 0.05*math.Sin(3*t+phase[1]) +
			0.025*math.Sin(5*t+phase[2]) + 0.015*math.Sin(8*t+phase[3])
		pts[i] = is.at(f*math.Cos(t), f*math.Sin(t))
	}
	return pts
}

// coastPoints is the number of points of each island's coast in
// WriteCoastGeoJSON.
const coastPoints = 180

// WriteCoastGeoJSON writes the islands' invented coastlines as GeoJSON
// (RFC 7946): a FeatureCollection of one Polygon per island, its exterior
// ring counter-clockwise, with the island's name; positions to 1e-5
// degrees. The coasts are invented, over open ocean.
func (s *Scenario) WriteCoastGeoJSON(w io.Writer) error {
	bw := bufio.NewWriter(w)
	bw.WriteString(`{"type":"FeatureCollection","features":[`)
	for i, is := range s.Islands {
		if i > 0 {
			bw.WriteString(",")
		}
		name, err := json.Marshal(is.Name) // JSON's string escaping (strconv.Quote is Go's)
		if err != nil {
			return err
		}
		bw.WriteString("\n" + `{"type":"Feature","properties":{"name":` + string(name) + `,"invented":true},"geometry":{"type":"Polygon","coordinates":[[`)
		pts := is.Coast(coastPoints)
		pts = append(pts, pts[0])
		for k, p := range pts {
			if k > 0 {
				bw.WriteString(",")
			}
			bw.WriteString("[" + strconv.FormatFloat(p[0], 'f', 5, 64) + "," + strconv.FormatFloat(p[1], 'f', 5, 64) + "]")
		}
		bw.WriteString("]]}}")
	}
	bw.WriteString("\n]}\n")
	return bw.Flush()
}
