package page

import (
	"bufio"
	"bytes"
	"cmp"
	"crypto/sha256"
	_ "embed"
	"encoding/base64"
	"encoding/json"
	"errors"
	"fmt"
	"html/template"
	"io"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"

	"drygrid/bands"
	"drygrid/layer"
	"drygrid/publish"
)

// RegionRow is one region's line in the page's table and tooltip.
type RegionRow struct {
	Name         string
	AreaKm2      float64
	CoveredPct   float64            // percent of the region's area with data
	InDroughtPct float64            // percent of the covered area in drought bands
	SharePct     map[string]float64 // percent of the covered area by band key
	MeanZ        float64            // area-weighted mean z; NaN when nothing is covered
}

// Input is what map.html shows.
type Input struct {
	Title, Subtitle string
	Caution         string // empty gives layer.Caution
	NoDataLabel     string // the legend's no-data entry; empty gives layer.NoDataLabel
	Scheme          *bands.Scheme
	// RFC 7946 documents from drygrid's writers; nil or empty leaves the
	// layer out. Bands: properties code, key, label, color, drought,
	// area_km2. Stations: id, value, z, code, key, in_grid.
	BandsGeoJSON, StationsGeoJSON, RegionsGeoJSON []byte
	Regions                                       []RegionRow
	// BBox is W, S, E, N of the grid; E exceeds 180 on a grid crossing the
	// antimeridian (the GeoJSON coordinates are split at 180).
	BBox [4]float64
	// Produced is the production line at the foot of the page ("made
	// 2026-12-01 06:00 UTC · SPI, 30 days ending 2026-11-30 · data: ...");
	// empty leaves it out.
	Produced string
	// MaxStations is the most stations the page carries (0 gives
	// DefaultMaxStations, 2,000); a larger station layer is thinned to a
	// deterministic subset and the page says how many it shows.
	MaxStations int
	// StationsTotal, when above 0, says StationsGeoJSON is already the
	// page's subset of a layer of that many stations (ChooseStations'
	// choice, written by geojson.EncodeStationsSubset): the page embeds it
	// as given, without thinning it again, and says how many it shows of
	// StationsTotal (and links StationsHref) when it shows fewer, as when
	// it thins the whole layer itself. The subset must hold no more than
	// MaxStations stations nor more than StationsTotal. 0 leaves the page
	// to thin StationsGeoJSON itself.
	StationsTotal int
	// StationsHref, when set, is the file holding every station (usually
	// "stations.geojson" beside map.html), linked when the page shows a
	// subset.
	StationsHref string
	// FarGeoJSON is an RFC 7946 document of the cells whose nearest
	// station is farther than FarKm km (drawn over the bands with a thin
	// diagonal hatch); nil or empty leaves the layer out. FarKm above 0
	// adds the legend entry "Nearest station over FarKm km"; 0 leaves the
	// page as it was.
	FarGeoJSON []byte
	FarKm      float64
}

//go:embed assets/page.html
var pageHTML string

//go:embed assets/page.js
var pageJS string

//go:embed assets/far.js
var farJS string

//go:embed assets/page.css
var pageCSS string

var pageTmpl = template.Must(template.New("page").Parse(pageHTML))

// WriteFile writes map.html to path atomically.
func WriteFile(path string, in Input) error {
	return publish.WriteFile(path, func(w *bufio.Writer) error { return Encode(w, in) })
}

// Encode writes one self-contained HTML page: the layers drawn from the
// inline GeoJSON by embedded script, pan and zoom, tooltips, the legend, the
// region table and the caution. Its Content-Security-Policy forbids every
// network load; the script and style are allowed by their SHA-256 hashes.
func Encode(w io.Writer, in Input) error { return pageEncode(w, in, "") }

// pageEncode is Encode with extra script appended to the page's own
// (the browser test's self-check); the CSP hash covers the whole script.
func pageEncode(w io.Writer, in Input, extraJS string) error {
	d, err := pageData(in, extraJS)
	if err != nil {
		return err
	}
	// The template's text is small: the layers' JSON is written in its
	// slots straight from the caller's bytes, never copied into a string.
	var buf bytes.Buffer
	if err := pageTmpl.Execute(&buf, d); err != nil {
		return fmt.Errorf("page: render template: %w", err)
	}
	if err := d.writeSlots(w, buf.Bytes()); err != nil {
		return fmt.Errorf("page: write: %w", err)
	}
	return nil
}

// pageBand is a band as the legend and the script see it.
type pageBand struct {
	Code    uint8  `json:"code"`
	Key     string `json:"key"`
	Label   string `json:"label"`
	Color   string `json:"color"`
	Range   string `json:"range"`
	Drought bool   `json:"drought"`
}

// pageRow is a region row formatted for the table (text) and the script.
type pageRow struct {
	Name      string             `json:"name"`
	AreaKm2   *float64           `json:"area_km2"`
	Covered   *float64           `json:"covered_pct"`
	InDrought *float64           `json:"in_drought_pct"`
	MeanZ     *float64           `json:"mean_z"`
	Shares    map[string]float64 `json:"share_pct"`
	Cells     []pageCell         `json:"-"`
}

// pageCell is one table cell: its text and the number it sorts by.
type pageCell struct {
	Text string
	Sort string
}

type pageMeta struct {
	BBox        [4]float64 `json:"bbox"`
	Bands       []pageBand `json:"bands"`
	Regions     []pageRow  `json:"regions"`
	NoDataLabel string     `json:"nodata_label"`
}

type pageView struct {
	Title, Subtitle, Caution string
	CSP                      string
	Style                    template.CSS
	Script                   template.JS
	Meta                     template.JS
	Bands                    template.JS
	Stations                 template.JS
	Regions                  template.JS
	Far                      template.JS
	FarLabel                 string // the far layer's legend entry ("" without one)
	HasFar                   bool
	Legend                   []pageBand
	LegendNote               string // what the legend's ranges are in (bands.Scheme.LegendNote)
	NoDataLabel              string
	HasStations, HasRegions  bool
	Produced                 string
	StationsTotal            string // "500,000" when thinned, else ""
	StationsShown            string
	StationsHref             string
	Drought                  string
	Rows                     []pageRow
	Cols                     []pageBand

	slots [][]byte // the layers' JSON, written where the template holds their marks
}

// pageData checks the input and prepares everything the template writes.
func pageData(in Input, extraJS string) (*pageView, error) {
	if in.Scheme == nil || len(in.Scheme.Bands) == 0 {
		return nil, errors.New("page: no band scheme")
	}
	b := in.BBox
	for _, v := range b {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("page: bbox %v is not finite", b)
		}
	}
	if !(b[0] < b[2]) || !(b[1] < b[3]) || b[2]-b[0] > 360+1e-9 || b[0] < -180 || b[0] >= 180 || b[1] < -90 || b[3] > 90 {
		return nil, fmt.Errorf("page: bbox %v must have -180 <= W < 180, W < E (E past 180 across the antimeridian, at most 360 wide) and -90 <= S < N <= 90", b)
	}
	v := &pageView{
		Title:       strings.TrimSpace(in.Title),
		Subtitle:    strings.TrimSpace(in.Subtitle),
		Caution:     strings.TrimSpace(in.Caution),
		NoDataLabel: cmp.Or(in.NoDataLabel, layer.NoDataLabel),
		LegendNote:  in.Scheme.LegendNote(),
		Style:       template.CSS(pageCSS),
	}
	if math.IsNaN(in.FarKm) || math.IsInf(in.FarKm, 0) || in.FarKm < 0 {
		return nil, fmt.Errorf("page: far-cell distance %g km must be 0 (none) or more", in.FarKm)
	}
	if in.FarKm > 0 {
		v.FarLabel = layer.FarLabel(in.FarKm)
	}
	script := pageJS
	if far, err := pageCheckJSON(in.FarGeoJSON); err != nil {
		return nil, fmt.Errorf("page: far GeoJSON: %w", err)
	} else if far != nil {
		if in.FarKm == 0 {
			return nil, errors.New("page: a far layer needs its distance (FarKm)")
		}
		v.Far, v.HasFar = v.slot(far), true
		script += farJS // the far layer's drawing, carried only with the layer
	}
	script += extraJS
	v.Script = template.JS(script)
	if v.Title == "" {
		v.Title = "Precipitation index bands"
	}
	v.Produced = strings.TrimSpace(in.Produced)
	limit := in.MaxStations
	if limit == 0 {
		limit = DefaultMaxStations
	}
	if limit < 0 {
		return nil, fmt.Errorf("page: MaxStations %d is negative", limit)
	}
	if in.StationsTotal < 0 {
		return nil, fmt.Errorf("page: StationsTotal %d is negative", in.StationsTotal)
	}
	stations := in.StationsGeoJSON
	if len(bytes.TrimSpace(stations)) > 0 {
		// A subset given (StationsTotal) is only counted: it holds at
		// most limit stations, so pageThinStations leaves it as it is.
		th, err := pageThinStations(stations, limit, pageProjectionOf(b))
		if err != nil {
			return nil, fmt.Errorf("page: stations GeoJSON: %w", err)
		}
		if in.StationsTotal > 0 {
			if th.shown < th.total || th.total > in.StationsTotal {
				return nil, fmt.Errorf("page: stations GeoJSON holds %d stations, more than the page carries (%d) or StationsTotal (%d): give ChooseStations' subset", th.total, limit, in.StationsTotal)
			}
			th.total = in.StationsTotal
		}
		stations = th.doc
		if th.shown < th.total {
			v.StationsTotal = layer.GroupThousands(strconv.Itoa(th.total))
			v.StationsShown = layer.GroupThousands(strconv.Itoa(th.shown))
			v.StationsHref = in.StationsHref
		}
	}
	if v.Caution == "" {
		v.Caution = layer.Caution
	}
	var dry []string
	for _, band := range in.Scheme.Bands {
		pb := pageBand{Code: band.Code, Key: band.Key, Label: band.Label, Color: band.Color, Range: pageRangeText(in.Scheme.RangeOf(band)), Drought: band.Drought}
		if c := band.RGBA(); fmt.Sprintf("#%02x%02x%02x", c.R, c.G, c.B) != strings.ToLower(band.Color) {
			return nil, fmt.Errorf("page: band %s colour %q is not #rrggbb", band.Key, band.Color)
		}
		pb.Color = strings.ToLower(band.Color)
		v.Legend = append(v.Legend, pb)
		if band.Drought {
			dry = append(dry, band.Label)
		}
	}
	v.Cols = v.Legend
	v.Drought = strings.Join(dry, ", ")
	for _, r := range in.Regions {
		v.Rows = append(v.Rows, pageMakeRow(r, v.Legend))
	}
	meta, err := json.Marshal(pageMeta{BBox: b, Bands: v.Legend, Regions: v.Rows, NoDataLabel: v.NoDataLabel})
	if err != nil {
		return nil, fmt.Errorf("page: encode region table: %w", err)
	}
	v.Meta = template.JS(meta)
	for _, l := range []struct {
		name string
		src  []byte
		dst  *template.JS
		has  *bool
	}{
		{"bands", in.BandsGeoJSON, &v.Bands, nil},
		{"stations", stations, &v.Stations, &v.HasStations},
		{"regions", in.RegionsGeoJSON, &v.Regions, &v.HasRegions},
	} {
		doc, err := pageCheckJSON(l.src)
		if err != nil {
			return nil, fmt.Errorf("page: %s GeoJSON: %w", l.name, err)
		}
		*l.dst = v.slot(doc)
		if l.has != nil {
			*l.has = doc != nil
		}
	}
	v.CSP = "default-src 'none'; script-src '" + pageHash(script) + "'; style-src '" + pageHash(pageCSS) +
		"'; img-src data:; base-uri 'none'; form-action 'none'"
	return v, nil
}

// pageHash is the CSP source expression for an inline block (CSP Level 2:
// base64 of the SHA-256 of the exact text).
func pageHash(s string) string {
	h := sha256.Sum256([]byte(s))
	return "sha256-" + base64.StdEncoding.EncodeToString(h[:])
}

// pageSlotMark is the mark of slot k in the template's text: it begins
// with "<", which the template escapes in every text of the caller's and
// pageWriteEscaped in every JSON document, so only a slot writes it.
func pageSlotMark(k int) string { return "<drygrid-slot-" + strconv.Itoa(k) + ">" }

// slot gives the template the mark of a JSON document written later by
// writeSlots (doc nil: null).
func (v *pageView) slot(doc []byte) template.JS {
	if doc == nil {
		doc = []byte("null")
	}
	v.slots = append(v.slots, doc)
	return template.JS(pageSlotMark(len(v.slots) - 1))
}

// writeSlots writes the template's text with each slot's mark replaced
// by its document, escaped by pageWriteEscaped; every slot must be
// written once.
func (v *pageView) writeSlots(w io.Writer, text []byte) error {
	const prefix = "<drygrid-slot-"
	written := 0
	for {
		i := bytes.Index(text, []byte(prefix))
		if i < 0 {
			break
		}
		end := bytes.IndexByte(text[i:], '>')
		if end < 0 {
			return fmt.Errorf("a broken slot mark in the template's text")
		}
		k, err := strconv.Atoi(string(text[i+len(prefix) : i+end]))
		if err != nil || k < 0 || k >= len(v.slots) {
			return fmt.Errorf("a broken slot mark in the template's text")
		}
		if _, err := w.Write(text[:i]); err != nil {
			return err
		}
		if err := pageWriteEscaped(w, v.slots[k]); err != nil {
			return err
		}
		written++
		text = text[i+end+1:]
	}
	if written != len(v.slots) {
		return fmt.Errorf("%d of %d slots in the template's text", written, len(v.slots))
	}
	_, err := w.Write(text)
	return err
}

// pageWriteEscaped writes JSON safe inside a <script type="application/json">
// block: "<" (which valid JSON holds only inside strings) becomes \u003c, so
// no "</script" or "<!--" can end or confuse the block; U+2028 and U+2029 are
// escaped too.
func pageWriteEscaped(w io.Writer, b []byte) error {
	for len(b) > 0 {
		i := bytes.IndexAny(b, "<\u2028\u2029")
		if i < 0 {
			_, err := w.Write(b)
			return err
		}
		if _, err := w.Write(b[:i]); err != nil {
			return err
		}
		esc, n := `\u003c`, 1
		if b[i] != '<' {
			r, size := utf8.DecodeRune(b[i:])
			esc, n = fmt.Sprintf(`\u%04x`, r), size
		}
		if _, err := io.WriteString(w, esc); err != nil {
			return err
		}
		b = b[i+n:]
	}
	return nil
}

// pageCheckJSON checks that b, trimmed of JSON whitespace, is one JSON
// value and gives it (not copied); empty input gives nil.
func pageCheckJSON(b []byte) ([]byte, error) {
	b = bytes.Trim(b, " \t\r\n") // JSON whitespace (RFC 8259 section 2)
	if len(b) == 0 {
		return nil, nil
	}
	if !json.Valid(b) {
		var x any
		err := json.Unmarshal(b, &x)
		return nil, fmt.Errorf("not valid JSON: %v", err)
	}
	return b, nil
}

// pageRangeText writes a band's range with the <= and >= signs.
func pageRangeText(s string) string {
	return strings.NewReplacer("<=", "≤", ">=", "≥").Replace(s)
}

// pageFinite gives a pointer to v, or nil (JSON null) when v is not finite.
func pageFinite(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}

// pageNum formats a number for the table, or an en dash when missing.
func pageNum(v *float64, dec int) pageCell {
	if v == nil {
		return pageCell{Text: "–", Sort: ""}
	}
	return pageCell{Text: layer.GroupThousands(strconv.FormatFloat(*v, 'f', dec, 64)), Sort: strconv.FormatFloat(*v, 'g', -1, 64)}
}

func pageMakeRow(r RegionRow, bands []pageBand) pageRow {
	row := pageRow{
		Name: r.Name, AreaKm2: pageFinite(r.AreaKm2), Covered: pageFinite(r.CoveredPct),
		InDrought: pageFinite(r.InDroughtPct), MeanZ: pageFinite(r.MeanZ), Shares: map[string]float64{},
	}
	for k, v := range r.SharePct {
		if f := pageFinite(v); f != nil {
			row.Shares[k] = *f
		}
	}
	row.Cells = []pageCell{pageNum(row.AreaKm2, 0), pageNum(row.Covered, 1), pageNum(row.InDrought, 1), pageNum(row.MeanZ, 2)}
	for _, b := range bands {
		var p *float64
		if v, ok := row.Shares[b.Key]; ok {
			p = &v
		}
		row.Cells = append(row.Cells, pageNum(p, 1))
	}
	return row
}
