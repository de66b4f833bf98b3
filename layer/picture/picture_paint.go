package picture

import (
	"drygrid/layer"
	"image"
	"image/color"
	"image/draw"
	"math"
	"strings"

	"golang.org/x/image/font"
)

// picPainter holds the layout decided for one picture and draws it.
type picPainter struct {
	in    Input
	faces *picFaces
	img   *image.RGBA
	l     picLayout
	s     float64 // scale: width / 1400

	fTitle, fSub, fHead, fLabel, fSmall, fBody, fName font.Face

	width, height int
	margin        int
	titleLines    []string
	subLines      []string
	headerBottom  int
	lonStep       float64
	latStep       float64
	hatchPer      int // spacing of the no-data hatch, in pixels (from the scale)
	lonDec        int
	latDec        int
	legendX       int
	legendY       int
	legendW       int
	legendCols    int
	legendBelow   bool
	contentTop    int
	cautionLines  []string
	cautionTop    int
	cautionH      int
	producedLines []string
	producedTop   int
	marksMode     StationMarks
	marks         *picMarks
	labels        []picLabel
	scaleKm       float64 // the scale bar's length in km and in pixels (0: none)
	scalePx       int
	noDataCodes   [256]bool
	lut           [256]color.RGBA
}

func (p *picPainter) px(v float64) int { return int(math.Round(v * p.s)) }

// layout decides every position from the width and the grid's shape.
func (p *picPainter) layout(width int) {
	p.width = width
	p.s = float64(width) / 1400
	f := p.faces
	p.fTitle = f.face(30*p.s, true)
	p.fSub = f.face(18*p.s, false)
	p.fHead = f.face(17*p.s, true)
	p.fLabel = f.face(16*p.s, true)
	p.fSmall = f.face(14*p.s, false)
	p.fBody = f.face(16*p.s, false)
	p.fName = f.face(13*p.s, true)
	p.margin = p.px(32)

	title := strings.TrimSpace(p.in.Title)
	if title == "" {
		title = "Precipitation index bands"
	}
	inner := width - 2*p.margin
	p.titleLines = picWrap(p.fTitle, title, inner)
	if sub := strings.TrimSpace(p.in.Subtitle); sub != "" {
		p.subLines = picWrap(p.fSub, sub, inner)
	}
	y := p.margin + len(p.titleLines)*picLineHeight(p.fTitle)
	if len(p.subLines) > 0 {
		y += p.px(4) + len(p.subLines)*picLineHeight(p.fSub)
	}
	p.headerBottom = y
	p.contentTop = y + p.px(28)

	// Grid extent and shape: equirectangular, true scale at the middle
	// latitude (x stretched by cos of it, kept >= 0.25 near the poles).
	spec := p.in.Bands.Spec
	l := &p.l
	l.west, l.north = spec.West, spec.North
	l.lonSpan, l.latSpan = float64(spec.Cols)*spec.Res, float64(spec.Rows)*spec.Res
	l.crossing = spec.West+l.lonSpan > 180+1e-9
	k := math.Max(math.Cos((spec.North-l.latSpan/2)*math.Pi/180), 0.25)

	p.legendW = p.px(300)
	gap := p.px(36)
	latLabW := picTextWidth(p.fSmall, "88.8°S") + p.px(12)
	ratio := l.latSpan / (l.lonSpan * k) // height over width
	availW := inner - latLabW - gap - p.legendW
	mapW := availW
	mapH := int(math.Round(float64(mapW) * ratio))
	if maxH := int(1.1 * float64(availW)); mapH > maxH {
		mapH = maxH
		mapW = int(math.Round(float64(mapH) / ratio))
	}
	p.legendBelow = float64(mapW) > 2.2*float64(mapH)
	if p.legendBelow {
		// A wide strip: the map takes the whole width, the legend goes
		// under it in three columns.
		availW = inner - latLabW
		mapW = availW
		mapH = int(math.Round(float64(mapW) * ratio))
	}
	mapW, mapH = max(mapW, 1), max(mapH, 1)
	x0 := p.margin + (availW-mapW)/2
	if !p.legendBelow {
		// Centre the map and legend block in the width.
		l.mapR = image.Rect(x0+latLabW, p.contentTop, x0+latLabW+mapW, p.contentTop+mapH)
		p.legendX, p.legendY, p.legendCols = l.mapR.Max.X+gap, p.contentTop, 1
	} else {
		l.mapR = image.Rect(p.margin+latLabW, p.contentTop, p.margin+latLabW+mapW, p.contentTop+mapH)
		p.legendX, p.legendY, p.legendCols, p.legendW = p.margin, l.mapR.Max.Y+p.px(40)+picLineHeight(p.fSmall), 3, inner
	}

	// Graticule: a nice step per axis, widened until labels stop touching.
	lonGap := float64(picTextWidth(p.fSmall, "188°W") + p.px(16))
	latGap := 1.6 * float64(picLineHeight(p.fSmall))
	p.lonStep = picAxisStep(l.lonSpan, float64(mapW), lonGap)
	p.latStep = picAxisStep(l.latSpan, float64(mapH), latGap)
	if p.lonStep != math.Trunc(p.lonStep) {
		// Decimal labels are wider: check again with one.
		p.lonStep = picAxisStep(l.lonSpan, float64(mapW), float64(picTextWidth(p.fSmall, "188.8°W")+p.px(16)))
	}
	p.lonDec, p.latDec = picDecimals(p.lonStep), picDecimals(p.latStep)

	// Station markers, then the region names around them.
	p.marks = p.chooseMarks(p.marksMode)
	p.placeLabels()

	contentBot := l.mapR.Max.Y + p.px(12) + picLineHeight(p.fSmall)
	contentBot = max(contentBot, p.legendY+p.legend(nil, 0, 0, p.legendW, p.legendCols))

	caution := strings.TrimSpace(p.in.Caution)
	if caution == "" {
		caution = layer.Caution
	}
	pad := p.px(14)
	p.cautionLines = picWrap(p.fBody, caution, inner-2*pad-p.px(6))
	p.cautionTop = contentBot + p.px(28)
	p.cautionH = 2*pad + len(p.cautionLines)*picLineHeight(p.fBody)
	p.height = p.cautionTop + p.cautionH + p.margin
	if prod := strings.TrimSpace(p.in.Produced); prod != "" {
		p.producedLines = picWrap(p.fSmall, prod, inner)
		p.producedTop = p.cautionTop + p.cautionH + p.px(10)
		p.height = p.producedTop + len(p.producedLines)*picLineHeight(p.fSmall) + p.margin
	}
}

// draw paints everything in order, from the background up.
func (p *picPainter) draw() {
	draw.Draw(p.img, p.img.Bounds(), image.NewUniform(picWhite), image.Point{}, draw.Src)
	p.drawHeader()
	p.drawBands()
	p.drawGraticule()
	p.drawRegions()
	p.drawStations()
	p.drawFrame()
	p.drawRegionNames()
	p.legend(p.img, p.legendX, p.legendY, p.legendW, p.legendCols)
	p.drawCaution()
	y := p.producedTop
	for _, ln := range p.producedLines {
		picDrawText(p.img, p.fSmall, p.margin, y+picAscent(p.fSmall), picMuted, ln)
		y += picLineHeight(p.fSmall)
	}
}

func (p *picPainter) drawHeader() {
	y := p.margin
	for _, ln := range p.titleLines {
		picDrawText(p.img, p.fTitle, p.margin, y+picAscent(p.fTitle), picInk, ln)
		y += picLineHeight(p.fTitle)
	}
	y += p.px(4)
	for _, ln := range p.subLines {
		picDrawText(p.img, p.fSub, p.margin, y+picAscent(p.fSub), picMuted, ln)
		y += picLineHeight(p.fSub)
	}
	// A thin rule under the header.
	r := image.Rect(p.margin, p.headerBottom+p.px(10), p.width-p.margin, p.headerBottom+p.px(10)+max(1, p.px(1)))
	draw.Draw(p.img, r, image.NewUniform(color.RGBA{200, 200, 200, 255}), image.Point{}, draw.Src)
}

// picHatch is the no-data fill at pixel (x, y): light grey with thin
// diagonal lines, in image coordinates so the legend swatch matches the map.
func (p *picPainter) hatchAt(x, y int) color.RGBA {
	if p.hatchPer == 0 {
		p.hatchPer = max(6, p.px(9))
	}
	if (x+y)%p.hatchPer == 0 {
		return picNoDataLine
	}
	return picNoData
}

// farPer is the spacing in pixels of the far-cell hatch.
func (p *picPainter) farPer() int { return max(6, p.px(6)) }

// farLine says whether pixel (x, y) lies on a line of the far-cell hatch:
// thin lines falling to the right (the no-data hatch rises), in image
// coordinates so the legend swatch matches the map.
func (p *picPainter) farLine(x, y int) bool {
	per := p.farPer()
	return ((x-y)%per+per)%per == 0
}

// drawBands fills the map rectangle with the band colours, each pixel
// taking the cell under its centre (nearest neighbour).
func (p *picPainter) drawBands() {
	b := p.in.Bands
	spec := b.Spec
	for i := range p.noDataCodes {
		p.noDataCodes[i] = true
	}
	for _, band := range p.in.Scheme.Bands {
		if band.Code != b.NoData {
			p.lut[band.Code] = band.RGBA()
			p.noDataCodes[band.Code] = false
		}
	}
	r := p.l.mapR
	cols := make([]int, r.Dx())
	for i := range cols {
		cols[i] = min(int((float64(i)+0.5)/float64(r.Dx())*float64(spec.Cols)), spec.Cols-1)
	}
	var far []uint8
	if p.in.Far != nil {
		far = p.in.Far.Data
	}
	for j := 0; j < r.Dy(); j++ {
		row := min(int((float64(j)+0.5)/float64(r.Dy())*float64(spec.Rows)), spec.Rows-1)
		y := r.Min.Y + j
		off := p.img.PixOffset(r.Min.X, y)
		for i, c := range cols {
			code := b.Data[row*spec.Cols+c]
			col := p.lut[code]
			if p.noDataCodes[code] {
				col = p.hatchAt(r.Min.X+i, y)
			} else if far != nil && far[row*spec.Cols+c] != 0 && p.farLine(r.Min.X+i, y) {
				col = picFarLine
			}
			px := p.img.Pix[off+4*i : off+4*i+4 : off+4*i+4]
			px[0], px[1], px[2], px[3] = col.R, col.G, col.B, 255
		}
	}
}

// graticuleLines gives the meridians and parallels to draw, in degrees.
func (p *picPainter) graticuleLines() (lons, lats []float64) {
	l := p.l
	return picStepsFrom(l.west, l.west+l.lonSpan, p.lonStep), picStepsFrom(l.north-l.latSpan, l.north, p.latStep)
}

func (p *picPainter) drawGraticule() {
	r := p.l.mapR
	lons, lats := p.graticuleLines()
	src := image.NewUniform(picGrat)
	for _, lon := range lons {
		x := int(math.Round(p.l.x(lon)))
		if x <= r.Min.X || x >= r.Max.X-1 {
			continue
		}
		draw.Draw(p.img, image.Rect(x, r.Min.Y, x+1, r.Max.Y), src, image.Point{}, draw.Over)
	}
	for _, lat := range lats {
		y := int(math.Round(p.l.y(lat)))
		if y <= r.Min.Y || y >= r.Max.Y-1 {
			continue
		}
		draw.Draw(p.img, image.Rect(r.Min.X, y, r.Max.X, y+1), src, image.Point{}, draw.Over)
	}
}

// drawFrame draws the frame, ticks and degree labels around the map.
func (p *picPainter) drawFrame() {
	r := p.l.mapR
	ink := image.NewUniform(picFrame)
	t := max(1, p.px(1.2))
	for _, e := range []image.Rectangle{
		image.Rect(r.Min.X-t, r.Min.Y-t, r.Max.X+t, r.Min.Y),
		image.Rect(r.Min.X-t, r.Max.Y, r.Max.X+t, r.Max.Y+t),
		image.Rect(r.Min.X-t, r.Min.Y, r.Min.X, r.Max.Y),
		image.Rect(r.Max.X, r.Min.Y, r.Max.X+t, r.Max.Y),
	} {
		draw.Draw(p.img, e, ink, image.Point{}, draw.Src)
	}
	tick := p.px(6)
	lons, lats := p.graticuleLines()
	asc := picAscent(p.fSmall)
	for _, lon := range lons {
		x := min(int(math.Round(p.l.x(lon))), r.Max.X-1)
		draw.Draw(p.img, image.Rect(x, r.Max.Y+t, x+1, r.Max.Y+t+tick), ink, image.Point{}, draw.Src)
		s := picLonLabel(lon, p.lonDec)
		w := picTextWidth(p.fSmall, s)
		picDrawText(p.img, p.fSmall, x-w/2, r.Max.Y+t+tick+p.px(4)+asc, picMuted, s)
	}
	for _, lat := range lats {
		y := min(int(math.Round(p.l.y(lat))), r.Max.Y-1)
		draw.Draw(p.img, image.Rect(r.Min.X-t-tick, y, r.Min.X-t, y+1), ink, image.Point{}, draw.Src)
		s := picLatLabel(lat, p.latDec)
		w := picTextWidth(p.fSmall, s)
		picDrawText(p.img, p.fSmall, r.Min.X-t-tick-p.px(5)-w, y+asc*4/10, picMuted, s)
	}
}

func (p *picPainter) drawCaution() {
	pad := p.px(14)
	box := image.Rect(p.margin, p.cautionTop, p.width-p.margin, p.cautionTop+p.cautionH)
	draw.Draw(p.img, box, image.NewUniform(picCautionBg), image.Point{}, draw.Src)
	draw.Draw(p.img, image.Rect(box.Min.X, box.Min.Y, box.Min.X+p.px(6), box.Max.Y), image.NewUniform(picCautionBar), image.Point{}, draw.Src)
	y := box.Min.Y + pad
	for _, ln := range p.cautionLines {
		picDrawText(p.img, p.fBody, box.Min.X+p.px(6)+pad, y+picAscent(p.fBody), picInk, ln)
		y += picLineHeight(p.fBody)
	}
}
