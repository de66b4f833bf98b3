package chart

import (
	"bytes"
	"drygrid/history"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"testing"
	"time"
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
