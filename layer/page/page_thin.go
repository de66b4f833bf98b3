package page

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
)

// DefaultMaxStations is the most stations a page carries when
// Input.MaxStations is 0. A denser station layer is thinned to a
// deterministic subset (one station per square cell of the map, the one
// nearest the cell's centre) and the page says how many it shows and links
// the whole layer (Input.StationsHref).
const DefaultMaxStations = 2000

// pageThinned is a station layer as the page carries it.
type pageThinned struct {
	doc          []byte // the GeoJSON embedded: src itself, or the subset
	total, shown int    // features in src, and in doc
}

// pageThinStations reads the station FeatureCollection src in one
// streaming pass (the points and where each feature lies in src) and,
// when it holds more than limit features, keeps at most limit of them:
// the map's extent is cut into square cells (in degrees of latitude,
// longitude scaled as pr places it), the smallest cell size found by bisection at
// which at most limit cells hold a station, and each cell keeps the
// station nearest its centre (the first on a tie). Everything outside the
// features array stays as it is, byte for byte; the features kept are
// copied as they are, in their order; features without a point are left
// out of a thinned layer.
func pageThinStations(src []byte, limit int, pr pageProjection) (*pageThinned, error) {
	var xs, ys []float64
	var spans [][2]int64
	arr := [2]int64{-1, -1}
	dec := json.NewDecoder(bytes.NewReader(src))
	if t, err := dec.Token(); err != nil || t != json.Delim('{') {
		return nil, errors.New("not a JSON object")
	}
	for dec.More() {
		t, err := dec.Token()
		if err != nil {
			return nil, err
		}
		if key, _ := t.(string); key != "features" || arr[0] >= 0 {
			var skip json.RawMessage
			if err := dec.Decode(&skip); err != nil {
				return nil, err
			}
			continue
		}
		if t, err := dec.Token(); err != nil || t != json.Delim('[') {
			return nil, errors.New(`"features" is not an array`)
		}
		arr[0] = dec.InputOffset() // just after '['
		for dec.More() {
			from := dec.InputOffset()
			var f struct {
				Geometry *struct {
					Type        string    `json:"type"`
					Coordinates []float64 `json:"coordinates"`
				} `json:"geometry"`
			}
			x, y := math.NaN(), math.NaN()
			if err := dec.Decode(&f); err != nil {
				// A geometry whose coordinates are not a flat array (not a
				// point): decode it again as anything.
				var e *json.UnmarshalTypeError
				if !errors.As(err, &e) {
					return nil, err
				}
			} else if g := f.Geometry; g != nil && g.Type == "Point" && len(g.Coordinates) >= 2 {
				x, y = pr.xy(g.Coordinates[0], g.Coordinates[1])
			}
			xs, ys = append(xs, x), append(ys, y)
			spans = append(spans, [2]int64{from, dec.InputOffset()})
		}
		if _, err := dec.Token(); err != nil {
			return nil, err
		}
		arr[1] = dec.InputOffset() - 1 // at ']'
	}
	if _, err := dec.Token(); err != nil {
		return nil, err
	}
	if _, err := dec.Token(); err != io.EOF {
		return nil, fmt.Errorf("data after the collection")
	}
	n := len(xs)
	if n <= limit {
		return &pageThinned{doc: src, total: n, shown: n}, nil
	}
	keep := pageChoose(xs, ys, limit)
	var out bytes.Buffer
	out.Write(src[:arr[0]])
	shown := 0
	for i, sp := range spans {
		if !keep[i] {
			continue
		}
		if shown > 0 {
			out.WriteByte(',')
		}
		out.Write(bytes.TrimLeft(src[sp[0]:sp[1]], " \t\r\n,"))
		shown++
	}
	out.Write(src[arr[1]:])
	return &pageThinned{doc: out.Bytes(), total: n, shown: shown}, nil
}

// pageChoose marks, for points (xs, ys) (NaN: no point), at most limit of
// them: one per occupied square cell, the one nearest the cell's centre,
// at the smallest cell size (bisected in 40 steps between a size too
// small and the whole extent) at which at most limit cells are occupied.
func pageChoose(xs, ys []float64, limit int) []bool {
	keep := make([]bool, len(xs))
	if limit <= 0 {
		return keep
	}
	valid := func(i int) bool {
		return !math.IsNaN(xs[i]) && !math.IsNaN(ys[i]) && !math.IsInf(xs[i], 0) && !math.IsInf(ys[i], 0)
	}
	x0, y0, x1, y1 := math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
	for i := range xs {
		if valid(i) {
			x0, y0, x1, y1 = math.Min(x0, xs[i]), math.Min(y0, ys[i]), math.Max(x1, xs[i]), math.Max(y1, ys[i])
		}
	}
	if x0 > x1 {
		return keep
	}
	span := math.Max(math.Max(x1-x0, y1-y0), 1e-9)
	cellOf := func(i int, d float64) (int64, float64, float64) {
		cx, cy := math.Floor((xs[i]-x0)/d), math.Floor((ys[i]-y0)/d)
		return int64(cx)<<32 ^ int64(cy), x0 + (cx+0.5)*d, y0 + (cy+0.5)*d
	}
	occupied := func(d float64) int { // stops counting past limit
		seen := map[int64]struct{}{}
		for i := range xs {
			if !valid(i) {
				continue
			}
			k, _, _ := cellOf(i, d)
			seen[k] = struct{}{}
			if len(seen) > limit {
				break
			}
		}
		return len(seen)
	}
	lo, hi := span*1e-7, span*1.001 // hi: one cell holds every point
	if occupied(lo) <= limit {
		hi = lo
	} else {
		for range 40 {
			mid := math.Sqrt(lo * hi)
			if occupied(mid) <= limit {
				hi = mid
			} else {
				lo = mid
			}
		}
	}
	type best struct {
		d float64
		i int
	}
	cells := map[int64]best{}
	for i := range xs {
		if !valid(i) {
			continue
		}
		k, cx, cy := cellOf(i, hi)
		d := (xs[i]-cx)*(xs[i]-cx) + (ys[i]-cy)*(ys[i]-cy)
		if b, ok := cells[k]; !ok || d < b.d {
			cells[k] = best{d, i}
		}
	}
	for _, b := range cells {
		keep[b.i] = true
	}
	return keep
}
