package picture

import (
	"drygrid/layer"
	"image"
	"image/color"
	"image/draw"
	"strconv"
	"strings"

	"golang.org/x/image/font"
	"golang.org/x/image/vector"
)

// picLegendItem is one legend row: a swatch, a label and an optional range.
type picLegendItem struct {
	label, rng string
	gapBefore  bool // a little space above (symbols after the bands)
	swatch     func(dst *image.RGBA, r image.Rectangle)
}

// legendItems lists every band with swatch, label and z range; no data;
// the station and region symbols when drawn.
func (p *picPainter) legendItems() []picLegendItem {
	var items []picLegendItem
	for _, b := range p.in.Scheme.Bands {
		c := b.RGBA()
		items = append(items, picLegendItem{label: b.Label, rng: p.rangeText(p.in.Scheme.RangeOf(b)), swatch: func(dst *image.RGBA, r image.Rectangle) {
			draw.Draw(dst, r, image.NewUniform(c), image.Point{}, draw.Src)
			picBorder(dst, r)
		}})
	}
	noData := p.in.NoDataLabel
	if noData == "" {
		noData = layer.NoDataLabel
	}
	items = append(items, picLegendItem{label: noData, swatch: func(dst *image.RGBA, r image.Rectangle) {
		for yy := r.Min.Y; yy < r.Max.Y; yy++ {
			for xx := r.Min.X; xx < r.Max.X; xx++ {
				dst.SetRGBA(xx, yy, p.hatchAt(xx, yy))
			}
		}
		picBorder(dst, r)
	}})
	if p.in.Far != nil {
		items = append(items, picLegendItem{label: layer.FarLabel(p.in.FarKm), swatch: func(dst *image.RGBA, r image.Rectangle) {
			for yy := r.Min.Y; yy < r.Max.Y; yy++ {
				for xx := r.Min.X; xx < r.Max.X; xx++ {
					c := picWhite
					if p.farLine(xx, yy) {
						c = picFarLine
					}
					dst.SetRGBA(xx, yy, c)
				}
			}
			picBorder(dst, r)
		}})
	}
	gap := true
	if n := p.stationsDrawn(); n > 0 {
		items = append(items, picLegendItem{label: picStationLabel(n, p.marks.inside), gapBefore: gap, swatch: func(dst *image.RGBA, r image.Rectangle) {
			z := vector.NewRasterizer(r.Dx(), r.Dy())
			cx, cy := float64(r.Dx())/2, float64(r.Dy())/2
			picDisc(z, cx, cy, p.marks.r+p.marks.halo)
			z.Draw(dst, r, image.NewUniform(color.RGBA{150, 150, 150, 255}), image.Point{})
			z.Reset(r.Dx(), r.Dy())
			picDisc(z, cx, cy, p.marks.r)
			z.Draw(dst, r, image.NewUniform(picInk), image.Point{})
		}})
		gap = false
	}
	if len(p.in.Regions) > 0 {
		items = append(items, picLegendItem{label: "Region outline", gapBefore: gap, swatch: func(dst *image.RGBA, r image.Rectangle) {
			c := r.Min.Y + r.Dy()/2
			h := max(1, p.px(0.7))
			draw.Draw(dst, image.Rect(r.Min.X, c-h, r.Max.X, c+h), image.NewUniform(color.RGBA{20, 20, 20, 255}), image.Point{}, draw.Src)
		}})
	}
	return items
}

func picBorder(dst *image.RGBA, r image.Rectangle) {
	c := image.NewUniform(color.RGBA{0x80, 0x80, 0x80, 255})
	for _, e := range []image.Rectangle{
		image.Rect(r.Min.X, r.Min.Y, r.Max.X, r.Min.Y+1), image.Rect(r.Min.X, r.Max.Y-1, r.Max.X, r.Max.Y),
		image.Rect(r.Min.X, r.Min.Y, r.Min.X+1, r.Max.Y), image.Rect(r.Max.X-1, r.Min.Y, r.Max.X, r.Max.Y),
	} {
		draw.Draw(dst, e, c, image.Point{}, draw.Src)
	}
}

// legend measures (dst nil) or draws the legend in a box of width w at
// (x, y), its rows in cols columns, and gives its height. Under the rows:
// which bands count as in drought, the projection and graticule steps.
func (p *picPainter) legend(dst *image.RGBA, x, y, w, cols int) int {
	y0 := y
	text := func(f font.Face, c color.Color, s string, width int) {
		for _, ln := range picWrap(f, s, width) {
			if dst != nil {
				picDrawText(dst, f, x, y+picAscent(f), c, ln)
			}
			y += picLineHeight(f)
		}
	}
	text(p.fHead, picInk, "Precipitation index band", w)
	text(p.fSmall, picMuted, p.in.Scheme.LegendNote(), w)
	y += p.px(10)

	items := p.legendItems()
	cols = max(1, cols)
	colGap := p.px(28)
	colW := (w - (cols-1)*colGap) / cols
	perCol := (len(items) + cols - 1) / cols
	sw, sh := p.px(38), p.px(22)
	rowH := sh + p.px(9)
	// Ranges stand in their own column, just right of the widest label.
	widest := 0
	for _, it := range items {
		if it.rng != "" {
			widest = max(widest, picTextWidth(p.fLabel, it.label))
		}
	}
	top, bottom := y, y
	for i, it := range items {
		c := i / perCol
		if i%perCol == 0 {
			y = top
		} else if it.gapBefore {
			y += p.px(8)
		}
		cx := x + c*(colW+colGap)
		textX := cx + sw + p.px(12)
		lw := picTextWidth(p.fLabel, it.label)
		rw := picTextWidth(p.fSmall, it.rng)
		twoLines := it.rng != "" && textX+lw+p.px(10)+rw > cx+colW
		if dst != nil {
			it.swatch(dst, image.Rect(cx, y, cx+sw, y+sh))
			if twoLines {
				picDrawText(dst, p.fLabel, textX, y+picAscent(p.fLabel), picInk, it.label)
				picDrawText(dst, p.fSmall, textX, y+picLineHeight(p.fLabel)+picAscent(p.fSmall), picMuted, it.rng)
			} else {
				base := y + sh/2 + picAscent(p.fLabel)*4/10
				picDrawText(dst, p.fLabel, textX, base, picInk, it.label)
				if it.rng != "" {
					rx := textX + widest + p.px(16)
					if rx+rw > cx+colW {
						rx = cx + colW - rw
					}
					picDrawText(dst, p.fSmall, rx, base, picMuted, it.rng)
				}
			}
		}
		if twoLines {
			y += max(rowH, picLineHeight(p.fLabel)+picLineHeight(p.fSmall)+p.px(6))
		} else {
			y += rowH
		}
		bottom = max(bottom, y)
	}
	y = bottom + p.px(6)
	var dry []string
	for _, b := range p.in.Scheme.Bands {
		if b.Drought {
			dry = append(dry, b.Label)
		}
	}
	if len(dry) > 0 {
		text(p.fSmall, picMuted, "In drought: "+strings.Join(dry, ", ")+".", w)
		y += p.px(4)
	}
	text(p.fSmall, picMuted, "Equirectangular projection; "+p.graticuleNote()+".", w)
	y += p.px(8)
	y += p.scaleBar(dst, x, y, w)
	return y - y0
}

// graticuleNote describes the graticule spacing.
func (p *picPainter) graticuleNote() string {
	deg := func(s float64) string { return strconv.FormatFloat(s, 'f', picDecimals(s), 64) + "°" }
	if p.lonStep == p.latStep {
		return "graticule every " + deg(p.lonStep)
	}
	return "meridians every " + deg(p.lonStep) + ", parallels every " + deg(p.latStep)
}

// rangeText writes a band's range with the <= and >= signs when the font
// has them.
func (p *picPainter) rangeText(s string) string {
	t := strings.NewReplacer("<=", "≤", ">=", "≥").Replace(s)
	if picHasGlyphs(p.fSmall, t) {
		return t
	}
	return s
}
