package region

import (
	"errors"
	"fmt"
	"os"

	"drygrid/grid"

	"github.com/paulmach/orb"
)

// ReadMask reads the polygons of a mask from a GeoJSON file; see ParseMask.
func ReadMask(path string) ([]Region, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("mask %s: %w", path, err)
	}
	return ParseMask(path, data)
}

// ParseMask reads the polygons of a mask (land, a country, the districts
// whose union is mapped) from GeoJSON with ParseRegions and all its checks,
// but a mask's features need no name and may share one: a feature is named
// by its "id" member or "name" property when it has one, else by its index.
// Errors begin "mask NAME" in place of "regions NAME"; a JSON syntax error
// is wrapped as ParseRegions wraps it.
func ParseMask(name string, data []byte) ([]Region, error) {
	r, err := parseRegions(name, data, "", true)
	if err != nil {
		return nil, &maskError{prefix: "regions " + name, err: err}
	}
	return r, nil
}

// maskError renames a regions error of a mask file.
type maskError struct {
	prefix string
	err    error
}

func (e *maskError) Error() string {
	msg := e.err.Error()
	if len(msg) >= len(e.prefix) && msg[:len(e.prefix)] == e.prefix {
		return "mask" + msg[len("regions"):]
	}
	return msg
}

func (e *maskError) Unwrap() error { return e.err }

// Mask is the union of polygons outside which a grid's cells are no data,
// and the exact share of each cell inside it, row by row: the same share
// Coverage gives (taken of the cell's area on the WGS84 ellipsoid), summed
// over the mask's features and capped at 1 (features are meant not to
// overlap; where two do, a cell's share is at most 1). A cell is inside
// when its share is above 0. Row computes one row at a time, so a mask
// costs memory for its polygons and one row, never for the whole grid. A
// Mask is not safe for use by several goroutines at once.
type Mask struct {
	spec     grid.Spec
	features []rowCover
	sc       rowScratch
	auth     authCoef // of strip authJ
	authJ    int
}

// ErrMaskOutside is returned by NewMask when no polygon of the mask reaches
// the grid.
var ErrMaskOutside = errors.New("the mask does not reach the grid")

// NewMask prepares the mask of the union of the regions' polygons on the
// grid s: each polygon shifted by -360, 0 or +360 degrees wherever that
// shift reaches the grid, as Coverage does. It returns ErrMaskOutside
// (wrapped) when no polygon's bounding box overlaps the grid, or when the
// mask holds no polygon.
func NewMask(s grid.Spec, regions []Region) (*Mask, error) {
	m := &Mask{spec: s, authJ: -1}
	polygons := 0
	var all orb.Bound
	for i, r := range regions {
		if i == 0 {
			all = r.Geom.Bound()
		} else {
			all = all.Union(r.Geom.Bound())
		}
		for _, p := range r.Geom {
			if len(p) > 0 {
				polygons++
			}
		}
		if f := newRowCover(s, r.Geom); f.reaches() {
			m.features = append(m.features, f)
		}
	}
	if polygons == 0 {
		return nil, errors.New("the mask holds no polygon")
	}
	if len(m.features) == 0 {
		return nil, fmt.Errorf("%w: its polygons span longitude %g to %g, latitude %g to %g, the grid is %s",
			ErrMaskOutside, all.Min[0], all.Max[0], all.Min[1], all.Max[1], s)
	}
	return m, nil
}

// Row writes the share of each cell of grid row r (0 the northernmost)
// inside the mask into dst[:Cols]: 0 outside, 1 wholly inside, the exact
// share of the cell's ellipsoidal area on the mask's edge. Each feature's
// share is Coverage's for the feature, bit for bit.
func (m *Mask) Row(r int, dst []float64) {
	s := m.spec
	dst = dst[:s.Cols]
	clear(dst)
	j := s.Rows - 1 - r // strip from the south
	for fi := range m.features {
		f := &m.features[fi]
		if j < f.j0 || j > f.j1 {
			continue
		}
		if m.authJ != j {
			m.auth, m.authJ = stripAuth(s, j), j
		}
		for i, v := range f.row(j, &m.auth, &m.sc) {
			if v > 0 {
				dst[f.c0+i] += v
			}
		}
	}
	for i, v := range dst {
		if v > 1 {
			dst[i] = 1
		}
	}
}
