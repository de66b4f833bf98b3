package chart

import (
	"fmt"
	"image/color"
	"sync"

	xfont "golang.org/x/image/font"
	"golang.org/x/image/font/gofont/gobold"
	"golang.org/x/image/font/gofont/goregular"
	"golang.org/x/image/font/opentype"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// chartTypeface names the Go fonts in the chart's font cache.
const chartTypeface font.Typeface = "Go"

// chartFonts parses the embedded Go fonts (regular, bold) once: the same
// TTF files map.png draws with (layer/picture/font.go), so the chart and
// the map look alike. gonum/plot's own default (Liberation Serif) is not
// used, and no system fonts are read.
var chartFonts = sync.OnceValues(func() (font.Collection, error) {
	var coll font.Collection
	for _, f := range []struct {
		ttf    []byte
		weight xfont.Weight
	}{{goregular.TTF, xfont.WeightNormal}, {gobold.TTF, xfont.WeightBold}} {
		face, err := opentype.Parse(f.ttf)
		if err != nil {
			return nil, fmt.Errorf("chart: parse embedded Go font: %w", err)
		}
		coll = append(coll, font.Face{Font: font.Font{Typeface: chartTypeface, Weight: f.weight}, Face: face})
	}
	return coll, nil
})

// chartText makes the chart's text styles: every text of the chart is drawn
// through its handler, whose font cache holds only the Go fonts (no
// package-level state of gonum/plot is changed).
type chartText struct{ handler text.Plain }

func chartNewText() (*chartText, error) {
	coll, err := chartFonts()
	if err != nil {
		return nil, err
	}
	return &chartText{handler: text.Plain{Fonts: font.NewCache(coll)}}, nil
}

// style is the regular or bold Go font at size points.
func (c *chartText) style(size float64, bold bool, col color.Color) draw.TextStyle {
	f := font.Font{Typeface: chartTypeface, Size: vg.Points(size)}
	if bold {
		f.Weight = xfont.WeightBold
	}
	return draw.TextStyle{Color: col, Font: f, Handler: c.handler}
}

// restyle sets sty's font (the regular or bold Go font at size points),
// colour and handler, keeping its alignment and rotation.
func (c *chartText) restyle(sty *draw.TextStyle, size float64, bold bool, col color.Color) {
	n := c.style(size, bold, col)
	sty.Color, sty.Font, sty.Handler = n.Color, n.Font, n.Handler
}
