package chart

import (
	"bufio"
	"drygrid/history"
	"drygrid/publish"
	"fmt"
	"image/color"
	"io"
	"math"
	"sort"
	"time"

	xfont "golang.org/x/image/font"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
)

// Options shape the history chart.
type Options struct {
	// RegionsLimit is the most regions drawn (default 8): those with the
	// highest latest share in drought, ties by name. The caption says how
	// many were left out.
	RegionsLimit int
	Title        string // default "Share of each region in drought"
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

// WriteFile writes history as a PNG line chart: the share of each
// region's covered area in drought (percent) over time, with title, axis
// labels with units, a legend beside the plot and a caption with the
// caution that these are estimates, not official declarations.
func WriteFile(path string, h *history.History, opt Options) error {
	return publish.WriteFile(path, func(w *bufio.Writer) error { return Encode(w, h, opt) })
}

// Encode draws the chart of WriteFile to w.
func Encode(w io.Writer, h *history.History, opt Options) error {
	if h == nil || len(h.Dates) == 0 || len(h.Regions) == 0 {
		return fmt.Errorf("chart: the history has no rows")
	}
	if opt.RegionsLimit <= 0 {
		opt.RegionsLimit = 8
	}
	if opt.Title == "" {
		opt.Title = "Share of each region in drought"
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
	pick := chartPick(h, opt.RegionsLimit)

	p := plot.New()
	p.Title.Text = opt.Title
	p.Title.TextStyle.Font.Size = vg.Points(15)
	p.X.Label.Text = "Date (UTC)"
	p.Y.Label.Text = "Area in drought (% of covered area)"
	p.X.Label.TextStyle.Font.Size = vg.Points(11)
	p.Y.Label.TextStyle.Font.Size = vg.Points(11)
	p.X.Tick.Label.Font.Size = vg.Points(9.5)
	p.Y.Tick.Label.Font.Size = vg.Points(9.5)
	p.X.Tick.Marker = chartTimeTicker{}
	grid := plotter.NewGrid()
	grid.Vertical.Color = color.Gray{0xdd}
	grid.Horizontal.Color = color.Gray{0xdd}
	p.Add(grid)

	t0, t1 := h.Dates[0], h.Dates[len(h.Dates)-1]
	p.X.Min, p.X.Max = chartX(t0), chartX(t1)
	if t1.Sub(t0) < 48*time.Hour {
		p.X.Min -= 86400
		p.X.Max += 86400
	}
	top := 0.0
	for _, r := range pick {
		for _, v := range h.InDroughtPct[r] {
			if !math.IsNaN(v) {
				top = math.Max(top, v)
			}
		}
	}
	p.Y.Min, p.Y.Max = 0, chartNiceTop(top)
	p.Y.Tick.Marker = chartPctTicker{}

	leg := plot.NewLegend()
	leg.Left, leg.Top = true, true
	leg.TextStyle.Font.Size = vg.Points(10)
	leg.ThumbnailWidth = vg.Points(26)
	leg.Padding = vg.Points(3)
	for k, r := range pick {
		col := chartPalette[k%len(chartPalette)]
		style := draw.LineStyle{Color: col, Width: vg.Points(2), Dashes: chartDashes[(k/len(chartPalette)+k)%len(chartDashes)]}
		glyph := draw.GlyphStyle{Color: col, Radius: vg.Points(2.3), Shape: chartShapes[k%len(chartShapes)]}
		var first plot.Thumbnailer
		segs := chartSegments(h.Dates, h.InDroughtPct[r])
		npts := 0
		for _, seg := range segs {
			npts += len(seg)
		}
		for _, seg := range segs {
			ln, sc, err := plotter.NewLinePoints(seg)
			if err != nil {
				return fmt.Errorf("chart region %s: %w", h.Regions[r], err)
			}
			ln.LineStyle = style
			sc.GlyphStyle = glyph
			if npts > 31 { // markers only where days are few
				sc.GlyphStyle.Radius = 0
			}
			p.Add(ln, sc)
			if first == nil {
				first = chartThumb{ln, sc}
			}
		}
		if first == nil { // no value at all: still listed, marked
			leg.Add(h.Regions[r] + " (no data)")
			continue
		}
		leg.Add(chartLabel(h.Regions[r], h.InDroughtPct[r]), first)
	}

	wpt := vg.Length(opt.WidthPx) * vg.Inch / 96
	hpt := vg.Length(opt.HeightPx) * vg.Inch / 96
	img := vgimg.NewWith(vgimg.UseWH(wpt, hpt), vgimg.UseDPI(96), vgimg.UseBackgroundColor(color.White))
	dc := draw.New(img)
	captionH := vg.Points(54)
	legendW := vg.Points(200)
	p.Draw(draw.Crop(dc, vg.Points(6), -legendW, captionH, -vg.Points(6)))
	legArea := draw.Crop(dc, wpt-legendW+vg.Points(14), -vg.Points(8), captionH, -vg.Points(52))
	leg.Draw(legArea)
	head := draw.TextStyle{Color: color.Gray{0x22}, Font: font.From(plot.DefaultFont, vg.Points(10.5)), Handler: plot.DefaultTextHandler}
	head.Font.Weight = xfont.WeightBold
	dc.FillText(head, vg.Point{X: wpt - legendW + vg.Points(14), Y: hpt - vg.Points(44)}, "Region, latest share")

	capSty := draw.TextStyle{Color: color.Gray{0x33}, Font: font.From(plot.DefaultFont, vg.Points(9.5)), Handler: plot.DefaultTextHandler}
	lines := []string{
		"In drought: the bands the scheme flags as drought (default scheme: z <= -1.0, SPI units), as percent of each region's covered (not masked) area.",
		"Caution: interpolated estimates from a station network, not official drought declarations; consult your national meteorological",
		"or hydrological service and local rules." + chartOmitted(len(pick), len(h.Regions)),
	}
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

// chartTimeTicker puts ticks on whole days (or months for long spans).
type chartTimeTicker struct{}

func (chartTimeTicker) Ticks(min, max float64) []plot.Tick {
	const day = 86400.0
	span := (max - min) / day
	steps := []float64{1, 2, 7, 14, 30.4375, 61, 91.3, 182.6, 365.25, 730.5, 1826.25}
	step := steps[len(steps)-1]
	for _, s := range steps {
		if span/s <= 8 {
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
