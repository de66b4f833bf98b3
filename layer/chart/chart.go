package chart

import (
	"bufio"
	"drygrid/bands"
	"drygrid/history"
	"drygrid/publish"
	"fmt"
	"image/color"
	"io"
	"math"
	"sort"
	"strings"
	"time"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
)

// Options shape the history chart.
type Options struct {
	// Region, when set, draws that region alone: its covered area's
	// shares by band stacked over time (driest at the bottom, in the
	// scheme's colours) with the share in drought as a line. Empty draws
	// the share in drought of several regions, one line each.
	Region string
	// Scheme gives the bands' order, labels, colours and drought flags of
	// the single-region view; it must be the scheme the history was
	// written with (default bands.Default()).
	Scheme *bands.Scheme
	// RegionsLimit is the most regions drawn in the all-regions view
	// (default 5): those with the highest latest share in drought, ties
	// by name. The caption says how many were left out.
	RegionsLimit int
	Title        string // default "Share of each region in drought", or "<Region>: share of the covered area in each band"
	WidthPx      int    // default 1200
	HeightPx     int    // default 720
}

// chartPalette is drygrid's own line palette for regions: eight hues spaced
// round the colour wheel at mixed lightness so neighbours in the legend stay
// apart for common colour-vision deficiencies; dash patterns repeat the
// distinction for print in grey.
var chartPalette = []color.RGBA{
	{0x1f, 0x4e, 0x9a, 0xff}, // deep blue
	{0xd9, 0x6a, 0x1c, 0xff}, // burnt orange
	{0x2a, 0x8c, 0x6b, 0xff}, // green
	{0x8e, 0x3b, 0x8f, 0xff}, // plum
	{0x5d, 0xa5, 0xd9, 0xff}, // sky
	{0x6b, 0x5a, 0x2e, 0xff}, // olive brown
	{0xc8, 0x3e, 0x6c, 0xff}, // raspberry
	{0x44, 0x44, 0x44, 0xff}, // charcoal
}

var chartDashes = [][]vg.Length{nil, {vg.Points(7), vg.Points(3)}, {vg.Points(2), vg.Points(2)}, {vg.Points(9), vg.Points(3), vg.Points(2), vg.Points(3)}}

// WriteFile writes history as a PNG chart: with Options.Region, that
// region's shares by band stacked over time; without, the share of each
// region's covered area in drought (percent) over time, one line per
// region. Both have a title, axis labels with units, a legend beside the
// plot and a caption with the caution that these are estimates, not
// official declarations.
func WriteFile(path string, h *history.History, opt Options) error {
	return publish.WriteFile(path, func(w *bufio.Writer) error { return Encode(w, h, opt) })
}

// Encode draws the chart of WriteFile to w.
func Encode(w io.Writer, h *history.History, opt Options) error {
	if h == nil || len(h.Dates) == 0 || len(h.Regions) == 0 {
		return fmt.Errorf("chart: the history has no rows")
	}
	if opt.RegionsLimit <= 0 {
		opt.RegionsLimit = 5
	}
	if opt.Scheme == nil {
		opt.Scheme = bands.Default()
	}
	if opt.Title == "" {
		opt.Title = "Share of each region in drought"
		if opt.Region != "" {
			opt.Title = opt.Region + ": share of the covered area in each band"
		}
	}
	if opt.WidthPx <= 0 {
		opt.WidthPx = 1200
	}
	if opt.HeightPx <= 0 {
		opt.HeightPx = 720
	}
	if opt.WidthPx < 400 || opt.HeightPx < 300 || opt.WidthPx > 8000 || opt.HeightPx > 8000 {
		return fmt.Errorf("chart: size %dx%d px outside 400x300 .. 8000x8000", opt.WidthPx, opt.HeightPx)
	}
	tx, err := chartNewText()
	if err != nil {
		return err
	}
	var fr *chartFigure
	if opt.Region != "" {
		st, err := StackRegion(h, opt.Region, opt.Scheme)
		if err != nil {
			return err
		}
		fr, err = chartStacked(tx, st, opt)
		if err != nil {
			return err
		}
	} else if fr, err = chartLines(tx, h, opt); err != nil {
		return err
	}
	return fr.draw(w, tx, opt)
}

// chartFigure is a chart ready to draw: the plot, its legend with a
// heading, and the caption's paragraphs (wrapped to the chart's width).
type chartFigure struct {
	p       *plot.Plot
	leg     plot.Legend
	heading string
	caption []string
}

// chartNewPlot is a plot with the title, axis labels, grid and date axis of
// both views, every text in the Go fonts.
func chartNewPlot(tx *chartText, title, ylabel string, dates []time.Time) *plot.Plot {
	p := plot.New()
	ink := color.Gray{0x11}
	p.TextHandler = tx.handler
	p.Title.Text = title
	tx.restyle(&p.Title.TextStyle, 15, true, ink)
	p.X.Label.Text = "Date (UTC)"
	p.Y.Label.Text = ylabel
	for _, ax := range []*plot.Axis{&p.X, &p.Y} {
		tx.restyle(&ax.Label.TextStyle, 11, false, ink)
		tx.restyle(&ax.Tick.Label, 9.5, false, ink)
	}
	tx.restyle(&p.Legend.TextStyle, 10, false, ink) // unused: the legend is drawn beside the plot
	p.X.Tick.Marker = chartTimeTicker{most: 8}
	p.Y.Tick.Marker = chartPctTicker{}
	t0, t1 := dates[0], dates[len(dates)-1]
	p.X.Min, p.X.Max = chartX(t0), chartX(t1)
	if t1.Sub(t0) < 48*time.Hour {
		p.X.Min -= 86400
		p.X.Max += 86400
	}
	return p
}

// chartNewLegend is the legend beside the plot, in the Go fonts.
func chartNewLegend(tx *chartText) plot.Legend {
	leg := plot.NewLegend()
	leg.Left, leg.Top = true, true
	tx.restyle(&leg.TextStyle, 10, false, color.Gray{0x11})
	leg.ThumbnailWidth = vg.Points(26)
	leg.Padding = vg.Points(3)
	return leg
}

// chartGrid is the light grid under (or over) the data.
func chartGrid(c color.Color) *plotter.Grid {
	grid := plotter.NewGrid()
	grid.Vertical.Color = c
	grid.Horizontal.Color = c
	return grid
}

// chartLines is the all-regions view: one line of the share in drought
// for each of at most opt.RegionsLimit regions.
func chartLines(tx *chartText, h *history.History, opt Options) (*chartFigure, error) {
	pick := chartPick(h, opt.RegionsLimit)
	p := chartNewPlot(tx, opt.Title, "Area in drought (% of covered area)", h.Dates)
	p.Add(chartGrid(color.Gray{0xdd}))
	top := 0.0
	for _, r := range pick {
		for _, v := range h.InDroughtPct[r] {
			if !math.IsNaN(v) {
				top = math.Max(top, v)
			}
		}
	}
	p.Y.Min, p.Y.Max = 0, chartNiceTop(top)

	// Markers only where points are few and not daily: on a daily history
	// they would bury the lines. A lone point between gaps keeps its
	// marker, else it would not show.
	markers := len(h.Dates) <= 60 && !chartDaily(h.Dates)
	width := vg.Points(2)
	if len(h.Dates) > 60 {
		width = vg.Points(1.6)
	}
	leg := chartNewLegend(tx)
	for k, r := range pick {
		col := chartPalette[k%len(chartPalette)]
		style := draw.LineStyle{Color: col, Width: width, Dashes: chartDashes[(k/len(chartPalette)+k)%len(chartDashes)]}
		glyph := draw.GlyphStyle{Color: col, Radius: vg.Points(2.3), Shape: chartShapes[k%len(chartShapes)]}
		var first plot.Thumbnailer
		for _, seg := range chartSegments(h.Dates, h.InDroughtPct[r]) {
			ln, sc, err := plotter.NewLinePoints(seg)
			if err != nil {
				return nil, fmt.Errorf("chart region %s: %w", h.Regions[r], err)
			}
			ln.LineStyle = style
			sc.GlyphStyle = glyph
			if !markers && len(seg) > 1 {
				sc.GlyphStyle.Radius = 0
			}
			p.Add(ln, sc)
			if first == nil {
				thumb := *sc
				if !markers {
					thumb.GlyphStyle.Radius = 0
				}
				first = chartThumb{ln, &thumb}
			}
		}
		if first == nil { // no value at all: still listed, marked
			leg.Add(h.Regions[r] + " (no data)")
			continue
		}
		leg.Add(chartLabel(h.Regions[r], h.InDroughtPct[r]), first)
	}
	return &chartFigure{p: p, leg: leg, heading: "Region, latest share", caption: []string{
		"In drought: the bands the scheme flags as drought (default scheme: z <= -1.0, SPI units), as percent of each region's covered (not masked) area.",
		"Caution: interpolated estimates from a station network, not official drought declarations; consult your national meteorological " +
			"or hydrological service and local rules." + chartOmitted(len(pick), len(h.Regions)),
	}}, nil
}

// chartStacked is the single-region view: the shares by band stacked
// over time, driest at the bottom, and the share in drought as a line.
func chartStacked(tx *chartText, st *Stack, opt Options) (*chartFigure, error) {
	p := chartNewPlot(tx, opt.Title, "Share of the covered area (%)", st.Dates)
	p.Y.Min, p.Y.Max = 0, 100
	nb := len(st.Bands)
	leg := chartNewLegend(tx)
	swatches := make([]plot.Thumbnailer, nb)
	for b, band := range st.Bands {
		col := band.RGBA()
		tops := make([]float64, len(st.Dates))
		for d := range st.Dates {
			tops[d] = st.Top[d][b]
		}
		for _, run := range chartRuns(tops) {
			var ring plotter.XYs
			if run[1]-run[0] == 1 { // a lone day between gaps: a bar one day wide
				d := run[0]
				x, lo := chartX(st.Dates[d]), chartBottom(st, d, b)
				ring = plotter.XYs{{X: x - 43200, Y: lo}, {X: x + 43200, Y: lo}, {X: x + 43200, Y: st.Top[d][b]}, {X: x - 43200, Y: st.Top[d][b]}}
			} else {
				for d := run[0]; d < run[1]; d++ {
					ring = append(ring, plotter.XY{X: chartX(st.Dates[d]), Y: st.Top[d][b]})
				}
				for d := run[1] - 1; d >= run[0]; d-- {
					ring = append(ring, plotter.XY{X: chartX(st.Dates[d]), Y: chartBottom(st, d, b)})
				}
			}
			poly, err := plotter.NewPolygon(ring)
			if err != nil {
				return nil, fmt.Errorf("chart region %s band %s: %w", st.Region, band.Key, err)
			}
			poly.Color = col
			poly.LineStyle.Width = 0
			p.Add(poly)
		}
		swatches[b] = chartSwatch{col}
	}
	p.Add(chartGrid(color.NRGBA{0x40, 0x40, 0x40, 0x30}))
	// The boundaries between bands, thin, so that light bands (near
	// normal) stay apart from the white around the plot.
	edge := draw.LineStyle{Color: color.RGBA{0x55, 0x55, 0x55, 0xff}, Width: vg.Points(0.4)}
	for b := 0; b < nb-1; b++ {
		v := make([]float64, len(st.Dates))
		for d := range v {
			v[d] = st.Top[d][b]
		}
		for _, seg := range chartSegments(st.Dates, v) {
			if len(seg) < 2 {
				continue
			}
			ln, err := plotter.NewLine(seg)
			if err != nil {
				return nil, err
			}
			ln.LineStyle = edge
			p.Add(ln)
		}
	}
	drought := draw.LineStyle{Color: color.RGBA{0x11, 0x11, 0x11, 0xff}, Width: vg.Points(2.2)}
	var droughtThumb plot.Thumbnailer
	for _, seg := range chartSegments(st.Dates, st.InDrought) {
		if len(seg) == 1 { // a lone day: across its bar
			seg = plotter.XYs{{X: seg[0].X - 43200, Y: seg[0].Y}, {X: seg[0].X + 43200, Y: seg[0].Y}}
		}
		ln, err := plotter.NewLine(seg)
		if err != nil {
			return nil, err
		}
		ln.LineStyle = drought
		p.Add(ln)
		if droughtThumb == nil {
			droughtThumb = ln
		}
	}
	var dkeys []string
	for _, band := range st.Bands {
		if band.Drought {
			dkeys = append(dkeys, band.Label)
		}
	}
	if droughtThumb != nil {
		leg.Add(chartLabel("In drought", st.InDrought), droughtThumb)
	}
	for b := nb - 1; b >= 0; b-- { // wettest at the top, as in the stack
		v := make([]float64, len(st.Dates))
		for d := range v {
			v[d] = st.Share[d][b]
		}
		leg.Add(chartLabel(st.Bands[b].Label, v), swatches[b])
	}
	return &chartFigure{p: p, leg: leg, heading: "Band, latest share", caption: []string{
		"Shares of the region's covered (not masked) area in each band, stacked driest at the bottom; the black line is the share in drought " +
			"(" + chartList(dkeys, 6) + ").",
		"Caution: interpolated estimates from a station network, not official drought declarations; " +
			"consult your national meteorological or hydrological service and local rules.",
	}}, nil
}

// chartBottom is the bottom of band b's layer on date d.
func chartBottom(st *Stack, d, b int) float64 {
	if b == 0 {
		return 0
	}
	return st.Top[d][b-1]
}

// chartRuns are the runs [start, end) of consecutive days with a value.
func chartRuns(v []float64) [][2]int {
	var out [][2]int
	start := -1
	for i := 0; i <= len(v); i++ {
		ok := i < len(v) && !math.IsNaN(v[i])
		switch {
		case ok && start < 0:
			start = i
		case !ok && start >= 0:
			out = append(out, [2]int{start, i})
			start = -1
		}
	}
	return out
}

// chartSwatch is a legend entry: a box of the band's colour, outlined so
// that a light band shows on white.
type chartSwatch struct{ c color.Color }

func (s chartSwatch) Thumbnail(c *draw.Canvas) {
	pts := []vg.Point{{X: c.Min.X, Y: c.Min.Y}, {X: c.Min.X, Y: c.Max.Y}, {X: c.Max.X, Y: c.Max.Y}, {X: c.Max.X, Y: c.Min.Y}}
	c.FillPolygon(s.c, pts)
	c.StrokeLines(draw.LineStyle{Color: color.Gray{0x77}, Width: vg.Points(0.6)}, append(pts, pts[0]))
}

// chartDaily says whether dates are at most a day or two apart (a daily
// history, perhaps with a few missing days).
func chartDaily(dates []time.Time) bool {
	if len(dates) < 2 {
		return false
	}
	return dates[len(dates)-1].Sub(dates[0]) <= time.Duration(len(dates)-1)*48*time.Hour
}

// draw lays the figure out on a canvas of opt's size: plot on the left,
// legend on the right under its heading, caption at the bottom, and writes
// the PNG.
func (fr *chartFigure) draw(w io.Writer, tx *chartText, opt Options) error {
	wpt := vg.Length(opt.WidthPx) * vg.Inch / 96
	hpt := vg.Length(opt.HeightPx) * vg.Inch / 96
	img := vgimg.NewWith(vgimg.UseWH(wpt, hpt), vgimg.UseDPI(96), vgimg.UseBackgroundColor(color.White))
	dc := draw.New(img)
	capSty := tx.style(9.5, false, color.Gray{0x33})
	var lines []string
	for _, para := range fr.caption {
		lines = append(lines, chartWrap(capSty, para, wpt-vg.Points(28))...)
	}
	captionH := vg.Points(15) + vg.Length(len(lines))*vg.Points(13)
	legendW := vg.Points(200)
	fr.p.X.Tick.Marker = chartTimeTicker{most: max(3, min(8, opt.WidthPx/150))}
	fr.p.Draw(draw.Crop(dc, vg.Points(6), -legendW, captionH, -vg.Points(6)))
	legArea := draw.Crop(dc, wpt-legendW+vg.Points(14), -vg.Points(8), captionH, -vg.Points(52))
	fr.leg.Draw(legArea)
	dc.FillText(tx.style(10.5, true, color.Gray{0x22}), vg.Point{X: wpt - legendW + vg.Points(14), Y: hpt - vg.Points(44)}, fr.heading)
	for i, l := range lines {
		dc.FillText(capSty, vg.Point{X: vg.Points(14), Y: captionH - vg.Points(15) - vg.Length(i)*vg.Points(13)}, l)
	}
	if _, err := (vgimg.PngCanvas{Canvas: img}).WriteTo(w); err != nil {
		return fmt.Errorf("chart: %w", err)
	}
	return nil
}

var chartShapes = []draw.GlyphDrawer{draw.CircleGlyph{}, draw.SquareGlyph{}, draw.TriangleGlyph{}, draw.RingGlyph{}, draw.BoxGlyph{}, draw.PyramidGlyph{}, draw.CrossGlyph{}, draw.PlusGlyph{}}

// chartThumb draws a legend entry as the line with its marker.
type chartThumb struct {
	l *plotter.Line
	s *plotter.Scatter
}

func (c chartThumb) Thumbnail(dc *draw.Canvas) {
	c.l.Thumbnail(dc)
	c.s.Thumbnail(dc)
}

func chartX(t time.Time) float64 { return float64(t.Unix()) }

// chartPick chooses up to limit regions: the highest latest share first.
func chartPick(h *history.History, limit int) []int {
	idx := make([]int, len(h.Regions))
	latest := make([]float64, len(h.Regions))
	for r := range idx {
		idx[r] = r
		latest[r] = -1
		for _, v := range h.InDroughtPct[r] {
			if !math.IsNaN(v) {
				latest[r] = v
			}
		}
	}
	sort.SliceStable(idx, func(a, b int) bool {
		if latest[idx[a]] != latest[idx[b]] {
			return latest[idx[a]] > latest[idx[b]]
		}
		return h.Regions[idx[a]] < h.Regions[idx[b]]
	})
	if len(idx) > limit {
		idx = idx[:limit]
	}
	return idx
}

func chartLabel(name string, v []float64) string {
	if len(name) > 22 {
		name = name[:21] + "…"
	}
	for i := len(v) - 1; i >= 0; i-- {
		if !math.IsNaN(v[i]) {
			return fmt.Sprintf("%s  %.0f %%", name, v[i])
		}
	}
	return name
}

func chartOmitted(shown, all int) string {
	if shown == all {
		return ""
	}
	return fmt.Sprintf("  Showing %d of %d regions: the highest latest shares.", shown, all)
}

// chartSegments splits a series at missing days (NaN) so gaps stay gaps.
func chartSegments(dates []time.Time, v []float64) []plotter.XYs {
	var out []plotter.XYs
	var cur plotter.XYs
	for i, y := range v {
		if math.IsNaN(y) {
			if len(cur) > 0 {
				out = append(out, cur)
				cur = nil
			}
			continue
		}
		cur = append(cur, plotter.XY{X: chartX(dates[i]), Y: y})
	}
	if len(cur) > 0 {
		out = append(out, cur)
	}
	return out
}

// chartNiceTop is the y axis top: 100 or a round step above the largest
// share, at least 10 %.
func chartNiceTop(v float64) float64 {
	for _, t := range []float64{10, 20, 30, 40, 50, 60, 80, 100} {
		if v <= t*0.96 {
			return t
		}
	}
	return 100
}

// chartPctTicker labels the share axis every 5, 10 or 20 percent.
type chartPctTicker struct{}

func (chartPctTicker) Ticks(min, max float64) []plot.Tick {
	step := 10.0
	switch {
	case max-min <= 20:
		step = 2
	case max-min <= 40:
		step = 5
	}
	var ticks []plot.Tick
	for v := math.Ceil(min/step) * step; v <= max+1e-9; v += step {
		ticks = append(ticks, plot.Tick{Value: v, Label: fmt.Sprintf("%g %%", v)})
	}
	return ticks
}

// chartTimeTicker puts ticks on whole days (or months for long spans), at
// most about most of them, so that labels stay apart on a narrow chart.
type chartTimeTicker struct{ most int }

func (tt chartTimeTicker) Ticks(min, max float64) []plot.Tick {
	const day = 86400.0
	span := (max - min) / day
	steps := []float64{1, 2, 7, 14, 30.4375, 61, 91.3, 182.6, 365.25, 730.5, 1826.25}
	step := steps[len(steps)-1]
	for _, s := range steps {
		if span/s <= float64(tt.most) {
			step = s
			break
		}
	}
	var ticks []plot.Tick
	t0 := time.Unix(int64(min), 0).UTC()
	start := time.Date(t0.Year(), t0.Month(), t0.Day(), 0, 0, 0, 0, time.UTC)
	if step >= 30 {
		start = time.Date(t0.Year(), t0.Month(), 1, 0, 0, 0, 0, time.UTC)
	}
	label := "2006-01-02"
	if step >= 30 {
		label = "2006-01"
	}
	for i := 0; i < 400; i++ {
		var t time.Time
		if step >= 30 {
			t = start.AddDate(0, i*int(math.Round(step/30.4375)), 0)
		} else {
			t = start.AddDate(0, 0, i*int(step))
		}
		x := chartX(t)
		if x > max {
			break
		}
		if x >= min {
			ticks = append(ticks, plot.Tick{Value: x, Label: t.Format(label)})
		}
	}
	return ticks
}

// chartWrap breaks a paragraph into lines no wider than width in sty.
func chartWrap(sty draw.TextStyle, para string, width vg.Length) []string {
	var lines []string
	line := ""
	for _, w := range strings.Fields(para) {
		try := w
		if line != "" {
			try = line + " " + w
		}
		if line != "" && sty.Width(try) > width {
			lines = append(lines, line)
			try = w
		}
		line = try
	}
	if line != "" {
		lines = append(lines, line)
	}
	return lines
}
