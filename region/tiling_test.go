package region

import (
	"fmt"
	"math/rand/v2"

	"github.com/paulmach/orb"
)

// jitterTiling cuts the box w..e x s..n into nx*ny quadrilateral-ish tiles
// whose shared edges are jittered polylines of sub segments, so neighbours
// share their edges exactly and together cover the box exactly once. Tiles
// are checked like parsed regions (closed, simple, oriented).
func jitterTiling(rng *rand.Rand, w, s, e, n float64, nx, ny, sub int) ([]Region, error) {
	dx, dy := (e-w)/float64(nx), (n-s)/float64(ny)
	node := make([][]orb.Point, nx+1)
	for i := range node {
		node[i] = make([]orb.Point, ny+1)
		for j := range node[i] {
			x, y := w+float64(i)*dx, s+float64(j)*dy
			if i > 0 && i < nx {
				x += (rng.Float64() - 0.5) * 0.3 * dx
			}
			if j > 0 && j < ny {
				y += (rng.Float64() - 0.5) * 0.3 * dy
			}
			if i == nx {
				x = e
			}
			if j == ny {
				y = n
			}
			node[i][j] = orb.Point{x, y}
		}
	}
	// edge polylines, from the first node to the second, excluding the ends
	edge := func(a, b orb.Point, boundary bool, ox, oy float64) []orb.Point {
		var pts []orb.Point
		for k := 1; k < sub; k++ {
			t := float64(k) / float64(sub)
			p := orb.Point{a[0] + t*(b[0]-a[0]), a[1] + t*(b[1]-a[1])}
			if !boundary {
				p[0] += (rng.Float64() - 0.5) * 0.12 * ox
				p[1] += (rng.Float64() - 0.5) * 0.12 * oy
			}
			pts = append(pts, p)
		}
		return pts
	}
	hor := make([][][]orb.Point, nx) // hor[i][j]: node(i,j) -> node(i+1,j)
	for i := range hor {
		hor[i] = make([][]orb.Point, ny+1)
		for j := range hor[i] {
			hor[i][j] = edge(node[i][j], node[i+1][j], j == 0 || j == ny, 0, dy)
		}
	}
	ver := make([][][]orb.Point, nx+1) // ver[i][j]: node(i,j) -> node(i,j+1)
	for i := range ver {
		ver[i] = make([][]orb.Point, ny)
		for j := range ver[i] {
			ver[i][j] = edge(node[i][j], node[i][j+1], i == 0 || i == nx, dx, 0)
		}
	}
	rev := func(p []orb.Point) []orb.Point {
		out := make([]orb.Point, len(p))
		for k := range p {
			out[len(p)-1-k] = p[k]
		}
		return out
	}
	var out []Region
	for j := 0; j < ny; j++ {
		for i := 0; i < nx; i++ {
			var r orb.Ring
			r = append(r, node[i][j])
			r = append(r, hor[i][j]...)
			r = append(r, node[i+1][j])
			r = append(r, ver[i+1][j]...)
			r = append(r, node[i+1][j+1])
			r = append(r, rev(hor[i][j+1])...)
			r = append(r, node[i][j+1])
			r = append(r, rev(ver[i][j])...)
			r = append(r, node[i][j])
			key := fmt.Sprintf("t%d-%d", i, j)
			g, err := regNormalise(orb.Polygon{r})
			if err != nil {
				return nil, fmt.Errorf("tile %s: %w", key, err)
			}
			out = append(out, Region{Key: key, Index: len(out), Geom: g})
		}
	}
	return out, nil
}
