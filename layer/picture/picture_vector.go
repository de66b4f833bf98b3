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

// drawStations puts a small dark dot with a light outline at each station
// inside the grid.
func (p *picPainter) drawStations() {
	if len(p.in.Stations) == 0 {
		return
	}
	r := p.l.mapR
	halo := vector.NewRasterizer(r.Dx(), r.Dy())
	dot := vector.NewRasterizer(r.Dx(), r.Dy())
	ox, oy := float64(r.Min.X), float64(r.Min.Y)
	rad := 3.2 * p.s
	for _, st := range p.in.Stations {
		x, y := p.l.x(st.Lon)-ox, p.l.y(st.Lat)-oy
		if !(x >= 0 && y >= 0 && x <= float64(r.Dx()) && y <= float64(r.Dy())) {
			continue // outside the grid, or not a number
		}
		picDisc(halo, x, y, rad+1.6*p.s)
		picDisc(dot, x, y, rad)
	}
	p.picFill(halo, picWhite)
	p.picFill(dot, picInk)
}

// stationsDrawn counts the stations inside the grid, the ones drawn.
func (p *picPainter) stationsDrawn() int {
	n := 0
	r := p.l.mapR
	for _, st := range p.in.Stations {
		x, y := p.l.x(st.Lon), p.l.y(st.Lat)
		if x >= float64(r.Min.X) && y >= float64(r.Min.Y) && x <= float64(r.Max.X) && y <= float64(r.Max.Y) {
			n++
		}
	}
	return n
}

// drawRegionNames writes each region's name at the centroid of its largest
// polygon when the name fits inside that polygon's width and clashes with
// no name already written.
func (p *picPainter) drawRegionNames() {
	var placed []image.Rectangle
	f := p.fName
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
		x := int(math.Round(p.l.x(c[0]))) - tw/2
		y := int(math.Round(p.l.y(c[1])))
		asc := picAscent(f)
		box := image.Rect(x-3, y-asc-3, x+tw+3, y+asc/3+3)
		if !box.In(p.l.mapR) {
			continue
		}
		clash := false
		for _, q := range placed {
			if q.Overlaps(box) {
				clash = true
				break
			}
		}
		if clash {
			continue
		}
		placed = append(placed, box)
		picDrawHalo(p.img, f, x, y+asc/3, picInk, color.RGBA{255, 255, 255, 255}, reg.Name)
	}
}
