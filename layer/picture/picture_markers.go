package picture

import (
	"drygrid/layer"
	"fmt"
	"image"
	"math"
	"sort"
	"strconv"
)

// StationMarks says which stations map.png marks.
type StationMarks string

const (
	// MarksAuto (the default) marks every station at full size up to
	// FewStations inside the map; beyond that the markers shrink and thin
	// to one per square cell of the map (the station nearest the cell's
	// centre), at most MaxMarkers of them.
	MarksAuto StationMarks = "auto"
	// MarksAll marks every station inside the grid at full size.
	MarksAll StationMarks = "all"
	// MarksNone marks no station.
	MarksNone StationMarks = "none"
)

// ParseStationMarks reads "auto", "all" or "none" ("" is auto).
func ParseStationMarks(s string) (StationMarks, error) {
	switch StationMarks(s) {
	case "", MarksAuto:
		return MarksAuto, nil
	case MarksAll, MarksNone:
		return StationMarks(s), nil
	}
	return "", fmt.Errorf("station markers %q: want auto, all or none", s)
}

// MaxMarkers bounds the station markers drawn in auto mode, at any width;
// up to FewStations inside the map, auto mode draws them all.
const (
	MaxMarkers  = 2000
	FewStations = 500
)

// Marker sizes at the reference width of 1400 px: the dot's radius and the
// light halo around it. Auto mode shrinks both, to at most half, as the
// stations get denser than one per picFullSpacing px (mean spacing).
const (
	picDotR        = 3.2
	picHaloW       = 1.6
	picMinShrink   = 0.5
	picFullSpacing = 40.0
)

// picMarker is one station marker, in pixels relative to the map rectangle.
type picMarker struct {
	x, y float64
	idx  int // the station's position in Input.Stations
}

// picMarks are the markers chosen for a picture.
type picMarks struct {
	inside  int         // stations inside the grid
	list    []picMarker // markers drawn, in input order
	r, halo float64     // dot radius and halo width, px
	cell    int         // thinning cell, px (0: not thinned)
}

// box is the square a marker covers, halo included.
func (m *picMarks) box(k picMarker, ox, oy int) image.Rectangle {
	e := m.r + m.halo
	return image.Rect(ox+int(math.Floor(k.x-e)), oy+int(math.Floor(k.y-e)), ox+int(math.Ceil(k.x+e)), oy+int(math.Ceil(k.y+e)))
}

// chooseMarks picks the markers: every station inside the map for
// MarksAll, none for MarksNone; for MarksAuto the stations are binned into
// square cells of at least the marker's width (beyond FewStations; up to
// that every one is kept), growing until at most
// MaxMarkers cells hold a station, and each cell keeps the station nearest
// its centre (the first in input order on a tie).
func (p *picPainter) chooseMarks(mode StationMarks) *picMarks {
	r := p.l.mapR
	w, h := float64(r.Dx()), float64(r.Dy())
	ox, oy := float64(r.Min.X), float64(r.Min.Y)
	m := &picMarks{r: picDotR * p.s, halo: picHaloW * p.s}
	all := make([]picMarker, 0, len(p.in.Stations))
	for i, st := range p.in.Stations {
		x, y := p.l.x(st.Lon)-ox, p.l.y(st.Lat)-oy
		if !(x >= 0 && y >= 0 && x <= w && y <= h) {
			continue // outside the grid, or not a number
		}
		all = append(all, picMarker{x, y, i})
	}
	m.inside = len(all)
	switch mode {
	case MarksNone:
		return m
	case MarksAll:
		m.list = all
		return m
	}
	if len(all) <= FewStations {
		m.list = all
		return m
	}
	// Shrink with the mean spacing of the stations over the map.
	spacing := math.Sqrt(w * h / float64(len(all)))
	f := math.Min(1, math.Max(picMinShrink, spacing/(picFullSpacing*p.s)))
	m.r, m.halo = picDotR*p.s*f, picHaloW*p.s*f
	cell := max(2, int(math.Ceil(2*(m.r+m.halo))))
	for {
		m.list = picThin(all, cell)
		if len(m.list) <= MaxMarkers {
			break
		}
		cell += max(1, cell/8)
	}
	if len(m.list) < len(all) {
		m.cell = cell
	}
	return m
}

// picThin keeps, in each cell of size px, the marker nearest the cell's
// centre (the earlier one on a tie), in input order.
func picThin(all []picMarker, size int) []picMarker {
	type best struct {
		d float64
		k int
	}
	cells := map[[2]int]best{}
	s := float64(size)
	for k, m := range all {
		c := [2]int{int(m.x / s), int(m.y / s)}
		cx, cy := (float64(c[0])+0.5)*s, (float64(c[1])+0.5)*s
		d := (m.x-cx)*(m.x-cx) + (m.y-cy)*(m.y-cy)
		if b, ok := cells[c]; !ok || d < b.d {
			cells[c] = best{d, k}
		}
	}
	keep := make([]int, 0, len(cells))
	for _, b := range cells {
		keep = append(keep, b.k)
	}
	sort.Ints(keep)
	out := make([]picMarker, len(keep))
	for i, k := range keep {
		out[i] = all[k]
	}
	return out
}

// picStationLabel labels the station symbol with the count drawn and, when
// fewer than all are marked, the count inside the grid.
func picStationLabel(drawn, inside int) string {
	switch {
	case drawn < inside:
		return fmt.Sprintf("Stations (%s of %s shown)", layer.GroupThousands(strconv.Itoa(drawn)), layer.GroupThousands(strconv.Itoa(inside)))
	case drawn == 1:
		return "Station (1)"
	}
	return fmt.Sprintf("Stations (%s)", layer.GroupThousands(strconv.Itoa(drawn)))
}
