package picture

import (
	"image"
	"image/color"
	"math"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"
	"golang.org/x/image/vector"
)

// picStroke adds a stroked segment (square caps, width w) to the rasterizer
// as a quad. Every quad winds the same way, so overlaps saturate rather than
// cancel in the rasterizer's accumulation.
func picStroke(z *vector.Rasterizer, x0, y0, x1, y1, w float64) {
	dx, dy := x1-x0, y1-y0
	n := math.Hypot(dx, dy)
	if n < 1e-9 || math.IsNaN(n) || math.IsInf(n, 0) {
		return
	}
	hw := w / 2
	ux, uy := dx/n*hw, dy/n*hw // along, half width
	nx, ny := -uy, ux          // normal, half width
	ax, ay := x0-ux, y0-uy
	bx, by := x1+ux, y1+uy
	z.MoveTo(float32(ax+nx), float32(ay+ny))
	z.LineTo(float32(bx+nx), float32(by+ny))
	z.LineTo(float32(bx-nx), float32(by-ny))
	z.LineTo(float32(ax-nx), float32(ay-ny))
	z.ClosePath()
}

// picDisc adds a disc of radius r (a 20-gon) to the rasterizer.
func picDisc(z *vector.Rasterizer, cx, cy, r float64) {
	const n = 20
	z.MoveTo(float32(cx+r), float32(cy))
	for i := 1; i < n; i++ {
		a := 2 * math.Pi * float64(i) / n
		z.LineTo(float32(cx+r*math.Cos(a)), float32(cy+r*math.Sin(a)))
	}
	z.ClosePath()
}

// picFill paints the rasterizer's coverage over the map rectangle in c.
func (p *picPainter) picFill(z *vector.Rasterizer, c color.Color) {
	z.Draw(p.img, p.l.mapR, image.NewUniform(c), image.Point{})
}

// ringPx gives the ring's points in pixels relative to the map rectangle.
func (p *picPainter) ringPx(r orb.Ring) [][2]float64 {
	out := make([][2]float64, 0, len(r))
	ox, oy := float64(p.l.mapR.Min.X), float64(p.l.mapR.Min.Y)
	for _, q := range r {
		x, y := p.l.x(q[0])-ox, p.l.y(q[1])-oy
		if math.IsNaN(x) || math.IsNaN(y) {
			continue
		}
		// Far-off points are pulled in to stay finite in float32; the
		// segments they end stay outside the map either way.
		x, y = math.Max(-1e5, math.Min(1e5, x)), math.Max(-1e5, math.Min(1e5, y))
		out = append(out, [2]float64{x, y})
	}
	return out
}

// drawRegions outlines the regions: a light casing under a thin dark line,
// legible over dark and light bands alike; clipped to the map.
func (p *picPainter) drawRegions() {
	if len(p.in.Regions) == 0 {
		return
	}
	r := p.l.mapR
	casing := vector.NewRasterizer(r.Dx(), r.Dy())
	line := vector.NewRasterizer(r.Dx(), r.Dy())
	for _, reg := range p.in.Regions {
		for _, poly := range reg.Geom {
			for _, ring := range poly {
				pts := p.ringPx(ring)
				for i := 1; i < len(pts); i++ {
					a, b := pts[i-1], pts[i]
					picStroke(casing, a[0], a[1], b[0], b[1], 3.4*p.s)
					picStroke(line, a[0], a[1], b[0], b[1], 1.4*p.s)
				}
			}
		}
	}
	p.picFill(casing, color.NRGBA{255, 255, 255, 150})
	p.picFill(line, color.NRGBA{20, 20, 20, 235})
}

// drawStations puts a small dark dot with a light outline at each chosen
// station marker (chooseMarks).
func (p *picPainter) drawStations() {
	m := p.marks
	if m == nil || len(m.list) == 0 {
		return
	}
	r := p.l.mapR
	halo := vector.NewRasterizer(r.Dx(), r.Dy())
	dot := vector.NewRasterizer(r.Dx(), r.Dy())
	for _, k := range m.list {
		picDisc(halo, k.x, k.y, m.r+m.halo)
		picDisc(dot, k.x, k.y, m.r)
	}
	p.picFill(halo, picWhite)
	p.picFill(dot, picInk)
}

// stationsDrawn counts the station markers drawn.
func (p *picPainter) stationsDrawn() int {
	if p.marks == nil {
		return 0
	}
	return len(p.marks.list)
}

// picLabel is a region name placed on the map: its baseline origin and the
// box it covers (halo and a small margin included), in image pixels.
type picLabel struct {
	name string
	x, y int
	box  image.Rectangle
}

// picLabelTries are the candidate positions of a name, in units of the
// name's height (dy) and half width (dx), from its polygon's centroid out.
var picLabelTries = [][2]float64{{0, 0}, {0, -1.2}, {0, 1.2}, {-1, 0}, {1, 0}, {-1, -1.2}, {1, -1.2}, {-1, 1.2}, {1, 1.2}, {0, -2.4}, {0, 2.4}}

// placeLabels decides where each region's name goes: at the first
// candidate position around the centroid of its largest polygon whose box
// stays in the map, keeps its centre inside the polygon, overlaps no name
// already placed and covers no station marker. When markers were thinned
// (they are a sample already) and no position is free of them, the first
// position free of other names is taken and the markers under the name are
// left out. A name that still does not fit, or is wider than 90 % of its
// polygon, is dropped.
func (p *picPainter) placeLabels() {
	f := p.fName
	asc := picAscent(f)
	m := p.marks
	ox, oy := p.l.mapR.Min.X, p.l.mapR.Min.Y
	var markBoxes []image.Rectangle
	if m != nil {
		for _, k := range m.list {
			markBoxes = append(markBoxes, m.box(k, ox, oy))
		}
	}
	hitsMarker := func(b image.Rectangle) bool {
		for _, q := range markBoxes {
			if q.Overlaps(b) {
				return true
			}
		}
		return false
	}
	for _, reg := range p.in.Regions {
		if reg.Name == "" || len(reg.Geom) == 0 {
			continue
		}
		best, bestA := -1, 0.0
		for i, poly := range reg.Geom {
			if a := math.Abs(planar.Area(poly)); a > bestA {
				best, bestA = i, a
			}
		}
		if best < 0 || len(reg.Geom[best]) == 0 {
			continue
		}
		poly := reg.Geom[best]
		c, _ := planar.CentroidArea(poly)
		b := poly[0].Bound()
		wpx := math.Abs(p.l.x(b.Max[0]) - p.l.x(b.Min[0]))
		tw := picTextWidth(f, reg.Name)
		if float64(tw) > wpx*0.9 {
			continue
		}
		cx, cy := p.l.x(c[0]), p.l.y(c[1])
		if math.IsNaN(cx) || math.IsNaN(cy) || math.IsInf(cx, 0) || math.IsInf(cy, 0) {
			continue
		}
		h := float64(asc + asc/3)
		var free, clear *picLabel
		for _, t := range picLabelTries {
			mx, my := cx+t[0]*float64(tw)/2, cy+t[1]*h
			if t != [2]float64{0, 0} && !planar.PolygonContains(poly, orb.Point{p.lonOf(mx), p.latOf(my)}) {
				continue
			}
			x, y := int(math.Round(mx))-tw/2, int(math.Round(my))
			lb := &picLabel{name: reg.Name, x: x, y: y + asc/3, box: image.Rect(x-3, y-asc-3, x+tw+3, y+asc/3+3)}
			if !lb.box.In(p.l.mapR) || p.labelClash(lb.box) {
				continue
			}
			if clear == nil {
				clear = lb
			}
			if !hitsMarker(lb.box) {
				free = lb
				break
			}
		}
		if free == nil && clear != nil && m != nil && m.cell > 0 {
			free = clear
			keep := m.list[:0]
			kb := markBoxes[:0]
			for i, k := range m.list {
				if !markBoxes[i].Overlaps(free.box) {
					keep = append(keep, k)
					kb = append(kb, markBoxes[i])
				}
			}
			m.list, markBoxes = keep, kb
		}
		if free != nil {
			p.labels = append(p.labels, *free)
		}
	}
}

// labelClash reports whether box overlaps a name already placed.
func (p *picPainter) labelClash(box image.Rectangle) bool {
	for _, q := range p.labels {
		if q.box.Overlaps(box) {
			return true
		}
	}
	return false
}

// lonOf and latOf invert x and y (image pixels to degrees).
func (p *picPainter) lonOf(x float64) float64 {
	return p.l.west + (x-float64(p.l.mapR.Min.X))/float64(p.l.mapR.Dx())*p.l.lonSpan
}

func (p *picPainter) latOf(y float64) float64 {
	return p.l.north - (y-float64(p.l.mapR.Min.Y))/float64(p.l.mapR.Dy())*p.l.latSpan
}

// drawRegionNames writes the names placed by placeLabels, with a halo.
func (p *picPainter) drawRegionNames() {
	for _, lb := range p.labels {
		picDrawHalo(p.img, p.fName, lb.x, lb.y, picInk, color.RGBA{255, 255, 255, 255}, lb.name)
	}
}
