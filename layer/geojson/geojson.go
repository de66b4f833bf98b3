package geojson

import (
	"bufio"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"

	"drygrid/bands"
	"drygrid/grid"
	"drygrid/polygon"

	"github.com/paulmach/orb"
)

// Caution is the caution text written when Options.Caution is
// empty: every human-facing output says what the maps are (docs/design.md,
// "The job").
const Caution = "Interpolated estimates from a station network, not official drought declarations. " +
	"Defer to the national meteorological or hydrological service and to local rules."

// Options controls the GeoJSON layers.
type Options struct {
	SimplifyKm float64        // 0 = off (exact cell edges); see polygon.PolygonizeSimplified
	Caution    string         // top-level foreign member text (RFC 7946 sec 6.1); empty = Caution
	Params     map[string]any // parameters used (power, neighbors, ...), a foreign member

	// What the layer shows, as top-level foreign members "date",
	// "window_days" and "kind" (RFC 7946 sec 6.1); each left out when
	// empty (zero).
	Date       string // the day the values describe, YYYY-MM-DD
	WindowDays int    // the window of the totals behind the index, in days
	Kind       string // the index kind (spi, percentile)
}

// EncodeBands writes the band layer (RFC 7946): a FeatureCollection with
// one Feature per band present in r, in scheme order, whose geometry is the
// dissolved MultiPolygon of polygon.PolygonizeRFC7946 (exterior rings
// counter-clockwise, holes clockwise, [lon, lat], split at the antimeridian,
// polygon.GeoJSONDecimals decimals, no crs member) and whose properties are code,
// key, label, color, drought and area_km2 (the cells' areas on the WGS84
// ellipsoid, to 0.01 km2). The top level carries a bbox and the foreign
// member "drygrid": {caution, generated_by, params}. Features are streamed
// to w; coordinates are formatted with strconv, not encoding/json, to get a
// fixed number of decimals and to avoid holding a whole band's text in
// memory. A code in r that the scheme lacks is an error (nothing written).
//
// It is BandAreas, a polygon.Tracer and EncodeBandPolygons fed the whole
// raster: a caller that streams the rows can do the same without holding
// the raster, and gets the same bytes.
func EncodeBands(w io.Writer, r *grid.Uint8, s *bands.Scheme, opt Options) error {
	if r == nil || s == nil {
		return fmt.Errorf("bands geojson: nil raster or scheme")
	}
	sp := r.Spec
	if sp.Cols <= 0 || sp.Rows <= 0 || len(r.Data) != sp.Len() {
		return fmt.Errorf("bands geojson: raster holds %d cells, grid %s needs %d", len(r.Data), sp, sp.Len())
	}
	if math.IsNaN(opt.SimplifyKm) || opt.SimplifyKm < 0 || math.IsInf(opt.SimplifyKm, 0) {
		return fmt.Errorf("bands geojson: simplify tolerance %g km must be a finite number >= 0", opt.SimplifyKm)
	}
	areas := NewBandAreas(sp, r.NoData)
	if err := areas.Rows(0, r.Data); err != nil {
		return fmt.Errorf("bands geojson: %w", err)
	}
	if err := areas.check(s); err != nil {
		return err
	}
	if _, err := gjMeta(opt); err != nil {
		return fmt.Errorf("bands geojson: %w", err)
	}
	tr, err := polygon.NewTracer(sp, r.NoData, opt.SimplifyKm)
	if err != nil {
		return fmt.Errorf("bands geojson: %w", err)
	}
	if err := tr.Rows(0, r.Data); err != nil {
		return fmt.Errorf("bands geojson: %w", err)
	}
	polys, err := tr.Finish()
	if err != nil {
		return fmt.Errorf("bands geojson: %w", err)
	}
	return EncodeBandPolygons(w, sp, polys, areas, s, opt)
}

// BandAreas accumulates, from the rows of a band raster fed in order, what
// the band layer needs besides the polygons: each code's cell count and
// area on the WGS84 ellipsoid (per row, the cell count times the row's
// cell area, grid.Spec.RowAreasKm2, summed north to south) and the
// bounding box of the cells with data. Its memory does not grow with the
// rows.
type BandAreas struct {
	spec    grid.Spec
	nodata  uint8
	rowArea []float64
	next    int // next row expected

	count [256]int
	area  [256]float64
	// Columns and rows of the cells with data: bounding box (maxC < 0:
	// none).
	minC, maxC, minR, maxR int
}

// NewBandAreas starts the accumulation for a raster on grid spec whose
// no-data code is nodata.
func NewBandAreas(spec grid.Spec, nodata uint8) *BandAreas {
	return &BandAreas{spec: spec, nodata: nodata, rowArea: spec.RowAreasKm2(), minC: spec.Cols, maxC: -1, minR: spec.Rows, maxR: -1}
}

// Rows adds rows row0, row0+1, ... held in codes (whole rows, row-major).
// Blocks must come in order, from row 0, each where the previous ended.
func (a *BandAreas) Rows(row0 int, codes []uint8) error {
	sp := a.spec
	switch {
	case sp.Cols <= 0 || sp.Rows <= 0:
		return fmt.Errorf("band areas: grid %s has no cells", sp)
	case row0 != a.next:
		return fmt.Errorf("band areas: rows out of order: block starts at row %d, row %d expected", row0, a.next)
	case len(codes)%sp.Cols != 0:
		return fmt.Errorf("band areas: block of %d codes is not whole rows of %d", len(codes), sp.Cols)
	case row0+len(codes)/sp.Cols > sp.Rows:
		return fmt.Errorf("band areas: block of rows %d..%d runs past the grid's %d rows", row0, row0+len(codes)/sp.Cols-1, sp.Rows)
	}
	for k := 0; k < len(codes); k += sp.Cols {
		row := a.next
		var n [256]int
		for col, c := range codes[k : k+sp.Cols] {
			if c == a.nodata {
				continue
			}
			n[c]++
			a.minC, a.maxC = min(a.minC, col), max(a.maxC, col)
			a.minR, a.maxR = min(a.minR, row), max(a.maxR, row)
		}
		for c, m := range n {
			if m > 0 {
				a.area[c] += float64(m) * a.rowArea[row]
				a.count[c] += m
			}
		}
		a.next++
	}
	return nil
}

// Count is the number of cells of code c fed so far.
func (a *BandAreas) Count(c uint8) int { return a.count[c] }

// AreaKm2 is the area of the cells of code c fed so far, km2.
func (a *BandAreas) AreaKm2(c uint8) float64 { return a.area[c] }

// check: every code present has a band in s.
func (a *BandAreas) check(s *bands.Scheme) error {
	for c := range a.count {
		if a.count[c] > 0 {
			if _, ok := s.Band(uint8(c)); !ok {
				return fmt.Errorf("bands geojson: raster holds code %d in %d cells, which scheme %q has no band for", c, a.count[c], s.Name)
			}
		}
	}
	return nil
}

// EncodeBandPolygons writes the band layer of EncodeBands from polygons
// already traced (polygon.Tracer, or polygon.PolygonizeSimplified with
// opt.SimplifyKm) and the areas of the same rows (all of them fed): the
// same bytes as EncodeBands on the whole raster, without it. opt.SimplifyKm
// is not used here (the polygons are already simplified or not). A code
// with cells that the scheme lacks, areas of another grid or with rows
// missing, are errors (nothing written).
func EncodeBandPolygons(w io.Writer, spec grid.Spec, polys map[uint8]orb.MultiPolygon, areas *BandAreas, s *bands.Scheme, opt Options) error {
	if areas == nil || s == nil {
		return fmt.Errorf("bands geojson: nil areas or scheme")
	}
	sp := spec
	if areas.spec != sp {
		return fmt.Errorf("bands geojson: areas of grid %s, polygons of grid %s", areas.spec, sp)
	}
	if areas.next != sp.Rows || sp.Rows <= 0 {
		return fmt.Errorf("bands geojson: areas of %d rows, the grid has %d", areas.next, sp.Rows)
	}
	if err := areas.check(s); err != nil {
		return err
	}
	meta, err := gjMeta(opt)
	if err != nil {
		return fmt.Errorf("bands geojson: %w", err)
	}
	count, area := &areas.count, &areas.area
	minC, maxC, minR, maxR := areas.minC, areas.maxC, areas.minR, areas.maxR
	d := polygon.GeoJSONDecimals(sp)

	bw := bufio.NewWriterSize(w, 1<<16)
	buf := make([]byte, 0, 1<<16)
	buf = append(buf, `{"type":"FeatureCollection","drygrid":`...)
	buf = append(buf, meta...)
	if maxC >= 0 {
		w0 := sp.West + float64(minC)*sp.Res
		e0 := sp.West + float64(maxC+1)*sp.Res
		switch {
		case e0-w0 >= 360-sp.Res/2:
			w0, e0 = -180, 180 // every longitude
		case w0 >= 180:
			w0, e0 = w0-360, e0-360
		case e0 > 180:
			e0 -= 360 // crosses: west > east (RFC 7946 section 5.2)
		}
		n0, s0 := sp.North-float64(minR)*sp.Res, sp.North-float64(maxR+1)*sp.Res
		buf = append(buf, `,"bbox":[`...)
		for k, v := range []float64{w0, s0, e0, n0} {
			if k > 0 {
				buf = append(buf, ',')
			}
			buf = gjNum(buf, polygon.Round(v, d), d)
		}
		buf = append(buf, ']')
	}
	buf = append(buf, `,"features":[`...)
	first := true
	for _, b := range s.Bands {
		mp := polys[b.Code]
		if count[b.Code] == 0 || len(mp) == 0 {
			continue
		}
		if !first {
			buf = append(buf, ',')
		}
		first = false
		buf = append(buf, "\n"+`{"type":"Feature","properties":{"code":`...)
		buf = strconv.AppendInt(buf, int64(b.Code), 10)
		buf = append(buf, `,"key":`...)
		buf = gjString(buf, b.Key)
		buf = append(buf, `,"label":`...)
		buf = gjString(buf, b.Label)
		buf = append(buf, `,"color":`...)
		buf = gjString(buf, b.Color)
		buf = append(buf, `,"drought":`...)
		buf = strconv.AppendBool(buf, b.Drought)
		buf = append(buf, `,"area_km2":`...)
		buf = gjNum(buf, math.Round(area[b.Code]*100)/100, 2)
		buf = append(buf, `},"geometry":{"type":"MultiPolygon","coordinates":[`...)
		for pi, poly := range mp {
			if pi > 0 {
				buf = append(buf, ',')
			}
			buf = append(buf, '[')
			for ri, ring := range poly {
				if ri > 0 {
					buf = append(buf, ',')
				}
				buf = append(buf, '[')
				for k, p := range ring {
					if k > 0 {
						buf = append(buf, ',')
					}
					buf = append(buf, '[')
					buf = gjNum(buf, p[0], d)
					buf = append(buf, ',')
					buf = gjNum(buf, p[1], d)
					buf = append(buf, ']')
				}
				buf = append(buf, ']')
				if len(buf) > 1<<15 {
					if _, err := bw.Write(buf); err != nil {
						return fmt.Errorf("bands geojson: write: %w", err)
					}
					buf = buf[:0]
				}
			}
			buf = append(buf, ']')
		}
		buf = append(buf, "]}}"...)
	}
	buf = append(buf, "\n]}\n"...)
	if _, err := bw.Write(buf); err != nil {
		return fmt.Errorf("bands geojson: write: %w", err)
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("bands geojson: write: %w", err)
	}
	return nil
}

// gjMeta encodes the "drygrid" foreign member's value, followed by the
// members "date", "window_days" and "kind" of those given (the callers
// write it right after `"drygrid":`). encoding/json sorts map keys, so the
// text is deterministic.
func gjMeta(opt Options) ([]byte, error) {
	caution := opt.Caution
	if caution == "" {
		caution = Caution
	}
	params := opt.Params
	if params == nil {
		params = map[string]any{}
	}
	b, err := json.Marshal(map[string]any{"caution": caution, "generated_by": "drygrid", "params": params})
	if err != nil {
		return nil, fmt.Errorf("encode parameters (foreign member drygrid): %w", err)
	}
	if opt.Date != "" {
		d, _ := json.Marshal(opt.Date)
		b = append(append(b, `,"date":`...), d...)
	}
	if opt.WindowDays > 0 {
		b = append(b, fmt.Sprintf(`,"window_days":%d`, opt.WindowDays)...)
	}
	if opt.Kind != "" {
		k, _ := json.Marshal(opt.Kind)
		b = append(append(b, `,"kind":`...), k...)
	}
	return b, nil
}

// gjNum appends v with at most d decimals, trailing zeros dropped ("-180",
// "0.3", "12.25"), never "-0". v should already be rounded (polygon.Round).
func gjNum(buf []byte, v float64, d int) []byte {
	start := len(buf)
	buf = strconv.AppendFloat(buf, v, 'f', d, 64)
	if d > 0 {
		k := len(buf)
		for buf[k-1] == '0' {
			k--
		}
		if buf[k-1] == '.' {
			k--
		}
		buf = buf[:k]
	}
	if string(buf[start:]) == "-0" {
		buf = append(buf[:start], '0')
	}
	return buf
}

// gjString appends s as a JSON string.
func gjString(buf []byte, s string) []byte {
	b, _ := json.Marshal(s) // a string always encodes
	return append(buf, b...)
}
