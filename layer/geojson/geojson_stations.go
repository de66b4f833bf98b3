package geojson

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strconv"
	"unicode/utf8"

	"drygrid/bands"
	"drygrid/grid"
)

// Station is one station of the station layer.
type Station struct {
	ID       string
	Lon, Lat float64 // degrees; longitudes are written in [-180, 180]
	Value    float64 // the input value (SPI or percentile); NaN is written as null
	Z        float64 // the z (SPI units) interpolated from it
	HasZ     bool    // false writes z as null
	Code     uint8   // band code of z, 0 = none (written as null, with key)
	InGrid   bool    // whether the station lies inside the grid
}

// EncodeStations writes the station layer (RFC 7946): one Point Feature
// per station, in the order given, with properties id, value, z (null when
// !HasZ), code and key (null when Code is 0) and in_grid, plus a bbox and the
// foreign member "drygrid": {caution, generated_by, params}. Each Feature is
// written as encoding/json writes the paulmach/orb/geojson Feature it
// stands for (sorted property keys, encoding/json's numbers and string
// escaping, so deterministic), straight into a buffered w: nothing is
// allocated per station and the text is never held whole. The positions
// are checked (and the bbox found) in a first pass over pts, so a bad
// position writes nothing.
func EncodeStations(w io.Writer, pts []Station, s *bands.Scheme, opt Options) error {
	return gjEncodeStations(w, pts, nil, s, opt)
}

// EncodeStationsSubset writes the station layer of pts as a page carries
// a subset of it (page.ChooseStations gives keep, one flag per station):
// when keep marks every station, or is nil, it is EncodeStations' output;
// otherwise the same collection (the same foreign members and the bbox of
// every station in pts) with only the Features keep marks, in their order,
// laid out as the page's own thinning of a whole layer copies them (no
// newline before a Feature, none before the closing bracket), so that a
// page given this subset is byte for byte the page given the whole layer.
// keep must be as long as pts.
func EncodeStationsSubset(w io.Writer, pts []Station, keep []bool, s *bands.Scheme, opt Options) error {
	if keep != nil && len(keep) != len(pts) {
		return fmt.Errorf("stations geojson: %d flags for %d stations", len(keep), len(pts))
	}
	all := true
	for _, k := range keep {
		all = all && k
	}
	if all {
		keep = nil
	}
	return gjEncodeStations(w, pts, keep, s, opt)
}

// gjEncodeStations writes the layer of every station (keep nil), or of the
// stations keep marks (the page's layout, EncodeStationsSubset).
func gjEncodeStations(w io.Writer, pts []Station, keep []bool, s *bands.Scheme, opt Options) error {
	meta, err := gjMeta(opt)
	if err != nil {
		return fmt.Errorf("stations geojson: %w", err)
	}
	var bound [4]float64 // W, S, E, N
	for k, p := range pts {
		if !gjFinite(p.Lon) || !gjFinite(p.Lat) || p.Lat < -90 || p.Lat > 90 {
			return fmt.Errorf("stations geojson: station %d (%q): position %g, %g is not a valid longitude, latitude", k+1, p.ID, p.Lon, p.Lat)
		}
		lon := grid.WrapLon(p.Lon)
		if k == 0 {
			bound = [4]float64{lon, p.Lat, lon, p.Lat}
		} else {
			bound = gjExtend(bound, lon, p.Lat)
		}
	}
	keys := gjStationKeys(s)
	bw := bufio.NewWriterSize(w, 1<<16)
	buf := make([]byte, 0, 512)
	buf = append(buf, `{"type":"FeatureCollection","drygrid":`...)
	buf = append(buf, meta...)
	if len(pts) > 0 {
		buf = append(buf, `,"bbox":[`...)
		for i, v := range bound {
			if i > 0 {
				buf = append(buf, ',')
			}
			buf = gjAppendFloat(buf, v)
		}
		buf = append(buf, ']')
	}
	buf = append(buf, `,"features":[`...)
	shown := 0
	for k, p := range pts {
		if keep != nil && !keep[k] {
			continue
		}
		if shown > 0 {
			buf = append(buf, ',')
		}
		if keep == nil {
			buf = append(buf, '\n')
		}
		buf = gjAppendStation(buf, p, &keys)
		shown++
		if len(buf) >= 1<<12 {
			bw.Write(buf)
			buf = buf[:0]
		}
	}
	if keep == nil {
		buf = append(buf, '\n')
	}
	buf = append(buf, "]}\n"...)
	bw.Write(buf)
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("stations geojson: write: %w", err)
	}
	return nil
}

// gjExtend is the bound b (W, S, E, N) extended to hold (x, y), as
// orb.Bound.Extend does it, down to the sign of a zero: a point inside
// (or on the edge) leaves b as it is, and any other point takes the
// math.Min and math.Max of all four sides.
func gjExtend(b [4]float64, x, y float64) [4]float64 {
	if y >= b[1] && y <= b[3] && x >= b[0] && x <= b[2] {
		return b
	}
	return [4]float64{math.Min(b[0], x), math.Min(b[1], y), math.Max(b[2], x), math.Max(b[3], y)}
}

// gjStationKeys is, by band code, the JSON text of the band's key in the
// station layer: the quoted key, or null for code 0 and codes the scheme
// (if any) lacks.
func gjStationKeys(s *bands.Scheme) [256][]byte {
	var keys [256][]byte
	for c := range keys {
		keys[c] = []byte("null")
	}
	if s != nil {
		for c := 1; c < 256; c++ {
			if b, ok := s.Band(uint8(c)); ok {
				keys[c] = gjAppendString(nil, b.Key)
			}
		}
	}
	return keys
}

// gjAppendStation appends the station's Feature byte for byte as json.Marshal writes the orb Feature of a Point with
// the properties code, id, in_grid, key, value and z (in that order, as
// encoding/json sorts map keys).
func gjAppendStation(b []byte, p Station, keys *[256][]byte) []byte {
	b = append(b, `{"type":"Feature","geometry":{"type":"Point","coordinates":[`...)
	b = gjAppendFloat(b, grid.WrapLon(p.Lon))
	b = append(b, ',')
	b = gjAppendFloat(b, p.Lat)
	b = append(b, `]},"properties":{"code":`...)
	if p.Code == 0 {
		b = append(b, "null"...)
	} else {
		b = strconv.AppendInt(b, int64(p.Code), 10)
	}
	b = append(b, `,"id":`...)
	b = gjAppendString(b, p.ID)
	b = append(b, `,"in_grid":`...)
	b = strconv.AppendBool(b, p.InGrid)
	b = append(b, `,"key":`...)
	b = append(b, keys[p.Code]...)
	b = append(b, `,"value":`...)
	b = gjAppendNullable(b, p.Value, true)
	b = append(b, `,"z":`...)
	b = gjAppendNullable(b, p.Z, p.HasZ)
	return append(b, "}}"...)
}

// gjAppendNullable appends v as encoding/json writes a float64, or null
// when !ok or v is not finite.
func gjAppendNullable(b []byte, v float64, ok bool) []byte {
	if !ok || !gjFinite(v) {
		return append(b, "null"...)
	}
	return gjAppendFloat(b, v)
}

// gjAppendFloat appends the finite v as encoding/json writes a float64
// (its floatEncoder): the shortest round-trip digits, in 'f' form unless
// |v| is below 1e-6 or at least 1e21, where 'e' form with the exponent's
// leading zero dropped ("1e-7", not "1e-07"); -0 stays "-0".
func gjAppendFloat(b []byte, v float64) []byte {
	abs := math.Abs(v)
	f := byte('f')
	if abs != 0 && (abs < 1e-6 || abs >= 1e21) {
		f = 'e'
	}
	b = strconv.AppendFloat(b, v, f, -1, 64)
	if f == 'e' {
		if n := len(b); n >= 4 && b[n-4] == 'e' && b[n-3] == '-' && b[n-2] == '0' {
			b[n-2] = b[n-1]
			b = b[:n-1]
		}
	}
	return b
}

// gjAppendString appends s quoted as json.Marshal writes a string (HTML
// escaping on): \" and \\; \b, \f, \n, \r and \t; other bytes below 0x20
// and <, > and & as \u00XX; each byte of invalid UTF-8 as \ufffd; U+2028
// and U+2029 as \u2028 and \u2029; everything else as it is.
func gjAppendString(b []byte, s string) []byte {
	const hex = "0123456789abcdef"
	b = append(b, '"')
	start := 0
	for i := 0; i < len(s); {
		if c := s[i]; c < utf8.RuneSelf {
			if c >= 0x20 && c != '"' && c != '\\' && c != '<' && c != '>' && c != '&' {
				i++
				continue
			}
			b = append(b, s[start:i]...)
			switch c {
			case '\\', '"':
				b = append(b, '\\', c)
			case '\b':
				b = append(b, '\\', 'b')
			case '\f':
				b = append(b, '\\', 'f')
			case '\n':
				b = append(b, '\\', 'n')
			case '\r':
				b = append(b, '\\', 'r')
			case '\t':
				b = append(b, '\\', 't')
			default:
				b = append(b, '\\', 'u', '0', '0', hex[c>>4], hex[c&0xF])
			}
			i++
			start = i
			continue
		}
		r, size := utf8.DecodeRuneInString(s[i:])
		if r == utf8.RuneError && size == 1 {
			b = append(b, s[start:i]...)
			b = append(b, `\ufffd`...)
			i++
			start = i
			continue
		}
		if r == '\u2028' || r == '\u2029' {
			b = append(b, s[start:i]...)
			b = append(b, '\\', 'u', '2', '0', '2', hex[r&0xF])
			i += size
			start = i
			continue
		}
		i += size
	}
	b = append(b, s[start:]...)
	return append(b, '"')
}

func gjFinite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
