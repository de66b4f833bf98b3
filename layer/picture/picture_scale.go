package picture

import (
	"drygrid/layer"
	"image"
	"image/draw"
	"math"
	"strconv"
)

// WGS84 (NIMA TR8350.2): semi-major axis in km and flattening.
const (
	wgs84A = 6378.137
	wgs84F = 1 / 298.257223563
)

// KmPerDegreeLon is the length in km of one degree of longitude along the
// parallel at latitude lat (degrees) on the WGS84 ellipsoid: the parallel's
// radius is N cos(lat), N = a / sqrt(1 - e^2 sin^2 lat) the radius of
// curvature in the prime vertical (Snyder 1987, USGS Professional Paper
// 1395, "Map Projections: A Working Manual", chapter 3; from memory).
func KmPerDegreeLon(lat float64) float64 {
	phi := lat * math.Pi / 180
	e2 := wgs84F * (2 - wgs84F)
	s := math.Sin(phi)
	n := wgs84A / math.Sqrt(1-e2*s*s)
	return math.Pi / 180 * n * math.Cos(phi)
}

// centreLat is the latitude of the map's centre parallel, along which the
// scale bar is true.
func (p *picPainter) centreLat() float64 { return p.l.north - p.l.latSpan/2 }

// kmPerPx is the picture's scale along its centre parallel: km per pixel
// in x.
func (p *picPainter) kmPerPx() float64 {
	return KmPerDegreeLon(p.centreLat()) * p.l.lonSpan / float64(p.l.mapR.Dx())
}

// picNiceKm gives the longest length 1, 2 or 5 x 10^k km that fits in
// maxPx pixels at kmPerPx, or 0 when none is at least 0.001 km.
func picNiceKm(kmPerPx, maxPx float64) float64 {
	if !(kmPerPx > 0) || math.IsInf(kmPerPx, 0) || !(maxPx > 0) {
		return 0
	}
	limit := kmPerPx * maxPx
	best := 0.0
	for e := -3; e <= 5; e++ {
		for _, m := range []float64{1, 2, 5} {
			v := m * math.Pow(10, float64(e))
			if v <= limit*(1+1e-12) {
				best = v
			}
		}
	}
	return best
}

// picKmText writes a length in km without trailing zeros (0.5, 20, 1000).
func picKmText(v float64) string {
	if v >= 1000 {
		return layer.GroupThousands(strconv.Itoa(int(math.Round(v))))
	}
	return strconv.FormatFloat(v, 'f', -1, 64)
}

// scaleBar measures (dst nil) or draws the scale bar at (x, y) in a box w
// wide and gives its height: a bar of a round number of km, half filled,
// with 0, the middle and the end labelled, and a line saying the latitude
// along which it is true.
func (p *picPainter) scaleBar(dst *image.RGBA, x, y, w int) int {
	km := picNiceKm(p.kmPerPx(), math.Min(float64(w)*0.8, 260*p.s))
	if km == 0 {
		return 0
	}
	y0 := y
	barPx := int(math.Round(km / p.kmPerPx()))
	half := barPx / 2
	h := max(4, p.px(7))
	note := "Scale true along " + picLatLabel(math.Round(p.centreLat()*10)/10, 1) + " (the centre parallel)"
	asc := picAscent(p.fSmall)
	if dst != nil {
		picDrawText(dst, p.fSmall, x, y+asc, picMuted, note)
	}
	y += picLineHeight(p.fSmall) + p.px(4)
	if dst != nil {
		ink := image.NewUniform(picInk)
		draw.Draw(dst, image.Rect(x, y, x+half, y+h), ink, image.Point{}, draw.Src)
		draw.Draw(dst, image.Rect(x+half, y, x+barPx, y+h), image.NewUniform(picWhite), image.Point{}, draw.Src)
		t := max(1, p.px(1))
		for _, e := range []image.Rectangle{
			image.Rect(x, y, x+barPx, y+t), image.Rect(x, y+h-t, x+barPx, y+h),
			image.Rect(x, y, x+t, y+h), image.Rect(x+barPx-t, y, x+barPx, y+h),
		} {
			draw.Draw(dst, e, ink, image.Point{}, draw.Src)
		}
		ly := y + h + p.px(4) + asc
		picDrawText(dst, p.fSmall, x, ly, picMuted, "0")
		mid := picKmText(km / 2)
		picDrawText(dst, p.fSmall, x+half-picTextWidth(p.fSmall, mid)/2, ly, picMuted, mid)
		end := picKmText(km) + " km"
		picDrawText(dst, p.fSmall, x+barPx-picTextWidth(p.fSmall, picKmText(km))/2, ly, picMuted, end)
	}
	p.scaleKm, p.scalePx = km, barPx
	y += h + p.px(4) + picLineHeight(p.fSmall)
	return y - y0
}
