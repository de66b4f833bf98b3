package interp

import (
	"fmt"
	"math"
)

// KmPerDegree is the length of a degree of latitude used to size the
// blocks of spatial block cross-validation: 111.2 km (the meridian degree
// on the sphere of EarthRadiusKm is 111.195 km; common practice rounds it
// so).
const KmPerDegree = 111.2

// Block is the block of spatial block cross-validation a point falls in,
// for blocks of about km x km (km > 0): a deterministic latitude-longitude
// block grid anchored at 90S, 180W.
//
//   - Latitude bands are h = km / KmPerDegree degrees high: band i holds
//     the latitudes -90 + i h <= lat < -90 + (i+1) h (90N goes to the last
//     band).
//   - Each band is cut into cols = max(1, round(360 cos(phi) / h)) equal
//     longitude blocks, phi the band's centre latitude (clipped to 90):
//     about h / cos(phi) degrees wide, that is about km at the centre;
//     column j holds -180 + j w <= lon < -180 + (j+1) w, w = 360 / cols
//     (longitudes taken in [-180, 180)), so blocks never straddle the
//     antimeridian and a band's blocks are all the same width.
//
// Row and Col number the block; points with equal Row and Col are in one
// block.
func Block(lon, lat, km float64) (row, col int) {
	h := km / KmPerDegree
	bands := max(1, int(math.Ceil(180/h)))
	row = min(int(math.Floor((lat+90)/h)), bands-1)
	row = max(row, 0)
	phi := min(-90+(float64(row)+0.5)*h, 90)
	cols := max(1, int(math.Round(360*math.Cos(phi*degToRad)/h)))
	w := 360 / float64(cols)
	col = min(int(math.Floor((normLon(lon)+180)/w)), cols-1)
	return row, max(col, 0)
}

// CrossValidateBlocks is spatial block cross-validation (Roberts et al.
// 2017, Ecography 40: 913-929): the stations are grouped into blocks of
// about blockKm x blockKm (Block), and each station is predicted, with the
// parameters p and exactly as Grid would at its place, from the stations of
// every OTHER block: a whole block is left out at a time. A station with
// fewer than MinStations stations of other blocks within the radius is not
// counted. The figures are those of CrossValidate (RMSE, MAE, bias, band
// agreement; Residual.N the stations used), with BlockKm set and Blocks the
// number of blocks holding a station. Leaving one station out tests the
// map where stations are close (inside clusters); leaving blocks out tests
// it across gaps of about the block's size, which is what the map shows
// between clusters. Stations are spread over p.Workers goroutines; the
// result does not depend on their number. blockKm must be positive and
// finite.
func CrossValidateBlocks(pts []Point, p Params, blockKm float64, classify func(z float64) uint8) (CrossValResult, error) {
	if !(blockKm > 0) || math.IsInf(blockKm, 0) {
		return CrossValResult{}, fmt.Errorf("interp: block size %g km must be a positive number", blockKm)
	}
	ip, err := New(pts, p)
	if err != nil {
		return CrossValResult{}, err
	}
	return ip.crossValidateBlocks(pts, blockKm, classify), nil
}

// crossValidateBlocks is CrossValidateBlocks over the points ip was built
// from.
func (ip *Interpolator) crossValidateBlocks(pts []Point, blockKm float64, classify func(z float64) uint8) CrossValResult {
	n := len(pts)
	// Block numbers by rank: equal numbers, one block.
	blockOf := make([]int32, n)
	ids := map[[2]int]int32{}
	for r, i := range ip.id {
		row, col := Block(pts[i].Lon, pts[i].Lat, blockKm)
		b, ok := ids[[2]int{row, col}]
		if !ok {
			b = int32(len(ids))
			ids[[2]int{row, col}] = b
		}
		blockOf[r] = b
	}
	rank := ip.ranks(len(pts))
	res := ip.predictEach(n, func(c *cands, i int) Residual {
		return ip.leaveBlockOut(c, pts[i], blockOf, blockOf[rank[i]], classify)
	})
	out := summarise(ip.p, res, classify != nil)
	out.BlockKm, out.Blocks = blockKm, len(ids)
	return out
}

// leaveBlockOut predicts station q from the stations outside its block.
func (ip *Interpolator) leaveBlockOut(c *cands, q Point, blockOf []int32, own int32, classify func(z float64) uint8) Residual {
	m := ip.selectAt(q.Lon, q.Lat, c)
	kept := 0
	for j := range m {
		if blockOf[c.cs[j].rk] != own {
			c.cs[kept] = c.cs[j]
			kept++
		}
	}
	return ip.residualAt(c, kept, q, classify)
}
