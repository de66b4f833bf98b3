package chart

import (
	"bytes"
	"drygrid/bands"
	"drygrid/history"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"testing"
	"time"

	xfont "golang.org/x/image/font"
	"golang.org/x/image/font/gofont/gobold"
	"golang.org/x/image/font/gofont/goregular"
	"golang.org/x/image/font/opentype"
	"golang.org/x/image/font/sfnt"
	"gonum.org/v1/plot/vg/draw"
)

// chartDemoHistory is an invented history: regions named by letter, shares
// on a smooth invented curve, one gap.
func chartDemoHistory(regions, days int) *history.History {
	h := &history.History{}
	t0 := time.Date(2026, 3, 1, 0, 0, 0, 0, time.UTC)
	for d := 0; d < days; d++ {
		h.Dates = append(h.Dates, t0.AddDate(0, 0, d))
	}
	for r := 0; r < regions; r++ {
		h.Regions = append(h.Regions, "district-"+string(rune('a'+r)))
		s := make([]float64, days)
		for d := range s {
			v := 30 + 25*math.Sin(float64(d)/9+float64(r)) + float64(r*4) - float64(d)/3
			s[d] = math.Max(0, math.Min(100, v))
		}
		if r == 1 && days > 20 {
			s[15], s[16], s[17] = math.NaN(), math.NaN(), math.NaN()
		}
		h.InDroughtPct = append(h.InDroughtPct, s)
	}
	return h
}

// TestHistoryChart: the chart is a PNG of the asked size (decoded by Go's
// image/png, a reader independent of gonum/plot's encoder); with more
// regions than the limit it still draws. DRYGRID_CHART_OUT=DIR keeps the
// pictures for a look.
func TestHistoryChart(t *testing.T) {
	dir := os.Getenv("DRYGRID_CHART_OUT")
	if dir == "" {
		dir = t.TempDir()
	}
	for _, c := range []struct {
		name          string
		regions, days int
	}{{"chart-6x60.png", 6, 60}, {"chart-12x3.png", 12, 3}, {"chart-1x1.png", 1, 1}} {
		path := filepath.Join(dir, c.name)
		if err := WriteFile(path, chartDemoHistory(c.regions, c.days), Options{}); err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		data, _ := os.ReadFile(path)
		img, err := png.Decode(bytes.NewReader(data))
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if b := img.Bounds(); b.Dx() != 1200 || b.Dy() != 720 {
			t.Errorf("%s: %v, want 1200x720", c.name, b)
		}
	}
	if err := Encode(&bytes.Buffer{}, &history.History{}, Options{}); err == nil {
		t.Error("empty history drawn")
	}
}

// TestDailyCharts: on a daily history (330 days, six regions, as issue 18
// tried) both views are PNGs of the asked size, decoded by Go's image/png
// (a reader independent of gonum/plot's encoder): the single-region view
// of a region with gaps, the all-regions view, a date range of one day and
// another size. Drawing twice gives the same bytes.
func TestDailyCharts(t *testing.T) {
	dir := os.Getenv("DRYGRID_CHART_OUT")
	if dir == "" {
		dir = t.TempDir()
	}
	h := chartDailyHistory(t, 6, 330)
	day := func(s string) time.Time {
		d, _ := time.Parse("2006-01-02", s)
		return d
	}
	for _, c := range []struct {
		name string
		h    *history.History
		opt  Options
		w, y int
	}{
		{"daily-region.png", h, Options{Region: "district-b"}, 1200, 720},
		{"daily-all.png", h, Options{}, 1200, 720},
		{"daily-region-jan.png", h.Between(day("2026-01-10"), day("2026-02-20")), Options{Region: "district-b"}, 1200, 720},
		{"daily-region-1day.png", h.Between(day("2026-03-01"), day("2026-03-01")), Options{Region: "district-c"}, 1200, 720},
		{"daily-all-small.png", h.Between(day("2026-06-01"), day("2026-06-20")), Options{WidthPx: 800, HeightPx: 500}, 800, 500},
	} {
		var a, b bytes.Buffer
		if err := Encode(&a, c.h, c.opt); err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if err := Encode(&b, c.h, c.opt); err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if !bytes.Equal(a.Bytes(), b.Bytes()) {
			t.Errorf("%s: two draws differ", c.name)
		}
		img, err := png.Decode(bytes.NewReader(a.Bytes()))
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if bd := img.Bounds(); bd.Dx() != c.w || bd.Dy() != c.y {
			t.Errorf("%s: %v, want %dx%d", c.name, bd, c.w, c.y)
		}
		if err := os.WriteFile(filepath.Join(dir, c.name), a.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	if err := Encode(&bytes.Buffer{}, h, Options{Region: "nowhere"}); err == nil {
		t.Error("unknown region drawn")
	}
}

// TestChartFont: every text of the chart (title, axis labels, tick
// labels, legend, heading, caption) is set in the Go fonts, the TTF files
// map.png draws with (layer/picture/font.go embeds goregular and gobold),
// through the chart's own handler, never gonum/plot's default (Liberation).
func TestChartFont(t *testing.T) {
	tx, err := chartNewText()
	if err != nil {
		t.Fatal(err)
	}
	h := chartDailyHistory(t, 3, 20)
	lines, err := chartLines(tx, h, Options{Title: "t", RegionsLimit: 2})
	if err != nil {
		t.Fatal(err)
	}
	st, _ := StackRegion(h, "district-a", bands.Default())
	stacked, err := chartStacked(tx, st, Options{Title: "t"})
	if err != nil {
		t.Fatal(err)
	}
	wantName := map[bool]string{false: chartFontName(t, goregular.TTF), true: chartFontName(t, gobold.TTF)}
	for _, fr := range []*chartFigure{lines, stacked} {
		p := fr.p
		for what, sty := range map[string]draw.TextStyle{
			"title": p.Title.TextStyle, "x label": p.X.Label.TextStyle, "y label": p.Y.Label.TextStyle,
			"x ticks": p.X.Tick.Label, "y ticks": p.Y.Tick.Label, "legend": fr.leg.TextStyle,
			"heading": tx.style(10, true, nil), "caption": tx.style(9, false, nil),
		} {
			if sty.Handler != tx.handler {
				t.Errorf("%s: another text handler %#v", what, sty.Handler)
				continue
			}
			face := tx.handler.Fonts.Lookup(sty.Font, sty.Font.Size)
			bold := sty.Font.Weight == xfont.WeightBold
			if got := face.Name(); face.Face == nil || sty.Font.Typeface != chartTypeface {
				t.Errorf("%s: font %q", what, got)
			}
			if got := chartFaceName(t, face.Face); got != wantName[bold] {
				t.Errorf("%s: face %q, want %q", what, got, wantName[bold])
			}
		}
	}
}

func chartFontName(t *testing.T, ttf []byte) string {
	t.Helper()
	f, err := opentype.Parse(ttf)
	if err != nil {
		t.Fatal(err)
	}
	return chartFaceName(t, f)
}

func chartFaceName(t *testing.T, f *opentype.Font) string {
	t.Helper()
	n, err := f.Name(nil, sfnt.NameIDFull)
	if err != nil {
		t.Fatal(err)
	}
	return n
}
