package interp

import (
	"errors"
	"fmt"
	"math"
	"sync"

	"github.com/tidwall/rtree"

	"drygrid/interp/internal/lanes"
)

// Point is one station: longitude in degrees (any form: -180..180 or
// 0..360), latitude in degrees, and its value Z in SPI units.
type Point struct {
	Lon, Lat, Z float64
}

// exactKm is the distance below which a cell takes a station's value (1 m).
const exactKm = 0.001

// lonEps widens the longitude and latitude bounds of a search (degrees) so
// that rounding in the bounds never drops a station; the chord test
// decides.
const lonEps = 1e-9

// Interpolator holds the stations, ordered by longitude and by latitude,
// and an R-tree of them. It is built once by New and is safe for concurrent
// use.
type Interpolator struct {
	p        Params
	theta    float64       // search radius as a central angle, radians
	thetaDeg float64       // the same in degrees
	c2max    float64       // chord length squared of the search radius (unit sphere)
	fast     bool          // power 2 and c2max <= 0.01: the series path of estimate
	k        int           // Neighbors, at most the number of stations (sizes the buffers)
	lanes    *lanes.Consts // the lane kernel's constants (package lanes)
	work     sync.Pool     // *rowWork kept between calls of Grid and Rows

	// Stations in longitude order (rank r), ties by input order.
	lon     []float64
	x, y, z []float64 // unit vectors
	cosLat  []float64 // hypot(x, y): the cosine of the latitude, for sector bearings
	val     []float64
	id      []int32 // position in the input

	// Ranks in latitude order and their latitudes, ascending: the stations
	// of a latitude band are a range of them (rowCandidates).
	latRank []int32
	latVal  []float64

	// The R-tree of the (lon, lat) points -> rank, for At; built on first
	// use (the grid does not need it).
	treeOnce sync.Once
	rt       rtree.RTreeG[int32]
	pts      [][2]float64 // the points in rank order, for the tree
}

// tree is the R-tree of the stations, built on the first call.
func (ip *Interpolator) tree() *rtree.RTreeG[int32] {
	ip.treeOnce.Do(func() {
		for r, pt := range ip.pts {
			ip.rt.Insert(pt, pt, int32(r))
		}
	})
	return &ip.rt
}

// New validates the parameters and the points and orders the stations by
// longitude and by latitude.
func New(pts []Point, p Params) (*Interpolator, error) {
	if err := p.Validate(); err != nil {
		return nil, err
	}
	if len(pts) == 0 {
		return nil, errors.New("interp: no stations to interpolate from")
	}
	if len(pts) > math.MaxInt32 {
		return nil, fmt.Errorf("interp: %d stations are more than %d", len(pts), math.MaxInt32)
	}
	for i, q := range pts {
		switch {
		case math.IsNaN(q.Lon) || math.IsInf(q.Lon, 0):
			return nil, fmt.Errorf("interp: station %d: longitude %g is not a finite number", i, q.Lon)
		case math.IsNaN(q.Lat) || q.Lat < -90 || q.Lat > 90:
			return nil, fmt.Errorf("interp: station %d: latitude %g is outside [-90, 90]", i, q.Lat)
		case math.IsNaN(q.Z) || math.IsInf(q.Z, 0):
			return nil, fmt.Errorf("interp: station %d: value %g is not a finite number", i, q.Z)
		}
	}
	n := len(pts)
	byLon := make([]sortKey, n)
	nl := make([]float64, n)
	for i := range pts {
		nl[i] = normLon(pts[i].Lon)
		byLon[i] = sortKey{nl[i], int32(i)}
	}
	sortKeys(byLon)
	order := make([]int32, n)
	for r, k := range byLon {
		order[r] = k.i
	}
	theta := p.RadiusKm / EarthRadiusKm
	ch := 2 * math.Sin(theta/2)
	ip := &Interpolator{
		p: p, theta: theta, thetaDeg: theta / degToRad, c2max: ch * ch,
		lon: make([]float64, n), x: make([]float64, n), y: make([]float64, n), z: make([]float64, n),
		val: make([]float64, n), id: order, pts: make([][2]float64, n),
	}
	if p.Sectors > 0 {
		ip.cosLat = make([]float64, n)
	}
	ip.fast = p.Power == 2 && ip.c2max <= 0.01
	ip.k = min(p.Neighbors, n)
	ip.lanes = lanes.NewConsts(ip.c2max)
	for r, i := range order {
		q := pts[i]
		ip.lon[r] = nl[i]
		ip.x[r], ip.y[r], ip.z[r] = unitVector(q.Lon, q.Lat)
		if p.Sectors > 0 {
			ip.cosLat[r] = math.Hypot(ip.x[r], ip.y[r])
		}
		ip.val[r] = q.Z
		ip.pts[r] = [2]float64{nl[i], q.Lat}
	}
	byLat := byLon // reused: (latitude, rank)
	for r := range byLat {
		byLat[r] = sortKey{ip.pts[r][1], int32(r)}
	}
	sortKeys(byLat)
	ip.latRank, ip.latVal = make([]int32, n), make([]float64, n)
	for i, k := range byLat {
		ip.latRank[i], ip.latVal[i] = k.i, k.key
	}
	return ip, nil
}

// Params are the settings the interpolator was built with.
func (ip *Interpolator) Params() Params { return ip.p }

// Len is the number of stations.
func (ip *Interpolator) Len() int { return len(ip.val) }

// At estimates the value at lon, lat (degrees, any longitude form). n is the
// number of stations used (those within the radius, at most Neighbors);
// ok is false when the point is masked (fewer than MinStations within the
// radius) or the latitude is not in [-90, 90]. At the centre of a grid cell
// it agrees with Grid up to the rounding of a sum taken in another order.
func (ip *Interpolator) At(lon, lat float64) (z float64, n int, ok bool) {
	if math.IsNaN(lat) || lat < -90 || lat > 90 || math.IsNaN(lon) || math.IsInf(lon, 0) {
		return 0, 0, false
	}
	c := newCands(ip.k)
	m := ip.selectAt(lon, lat, c)
	cx, cy, cz := unitVector(lon, lat)
	return ip.estimateAt(c, m, lon, lat, cx, cy, cz)
}

// selectAt puts in c the stations within the radius of lon, lat, found
// through the R-tree: the circle's bounding box, split in two where it
// crosses the antimeridian, all longitudes where it holds a pole. It
// returns their number.
func (ip *Interpolator) selectAt(lon, lat float64, c *cands) int {
	cx, cy, cz := unitVector(lon, lat)
	c.reset(0)
	offer := func(_, _ [2]float64, r int32) bool {
		dx, dy, dz := cx-ip.x[r], cy-ip.y[r], cz-ip.z[r]
		if d2 := chordSq(dx, dy, dz); d2 <= ip.c2max {
			c.cs = append(c.cs, cand{d2, ip.val[r], r})
		}
		return true
	}
	lo, hi := lat-ip.thetaDeg-lonEps, lat+ip.thetaDeg+lonEps
	dl := lonHalfWidth(lat, ip.theta)
	l := normLon(lon)
	a, b := l-dl-lonEps, l+dl+lonEps
	tree := ip.tree()
	switch {
	case dl > 179:
		tree.Search([2]float64{-181, lo}, [2]float64{181, hi}, offer)
	case a < -180:
		tree.Search([2]float64{a + 360, lo}, [2]float64{181, hi}, offer)
		tree.Search([2]float64{-181, lo}, [2]float64{b, hi}, offer)
	case b >= 180:
		tree.Search([2]float64{a, lo}, [2]float64{181, hi}, offer)
		tree.Search([2]float64{-181, lo}, [2]float64{b - 360, hi}, offer)
	default:
		tree.Search([2]float64{a, lo}, [2]float64{b, hi}, offer)
	}
	return len(c.cs)
}
