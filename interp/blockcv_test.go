package interp

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"testing"

	"drygrid/internal/reftest"
)

// TestBlockKnown checks Block on hand-worked cases of its definition: at
// 111.2 km the bands are 1 degree high; at the equator 360 blocks of 1
// degree, at 60N (band 60..61, centre 60.5) round(360 cos 60.5 deg) = 177
// blocks of 360/177 degrees (cos 60.5 deg = 0.49242, from a table of
// cosines); 90N goes to the last band; longitudes in any form.
func TestBlockKnown(t *testing.T) {
	for _, c := range []struct {
		lon, lat, km float64
		row, col     int
	}{
		{-180, -90, 111.2, 0, 0},
		{0.5, 0.5, 111.2, 90, 180},
		{-0.5, -0.5, 111.2, 89, 179},
		{179.99, 0, 111.2, 90, 359},
		{180, 0, 111.2, 90, 0},     // 180 is -180
		{359.5, 0, 111.2, 90, 179}, // -0.5
		{0, 60.2, 111.2, 150, 88},  // floor(180 / (360/177)) = floor(88.5)
		{0, 90, 111.2, 179, 0},     // the last band, a single block (centre 89.5: round(3.14) = 3 blocks; 0 is in the second)
		{10, 10, 1e6, 0, 0},
	} {
		row, col := Block(c.lon, c.lat, c.km)
		want := c.col
		if c.lat == 90 {
			want = 1 // cols = round(360 cos 89.5 deg) = round(3.1416) = 3, lon 0 in [-60, 60)
		}
		if row != c.row || col != want {
			t.Errorf("Block(%g, %g, %g) = %d, %d; want %d, %d", c.lon, c.lat, c.km, row, col, c.row, want)
		}
	}
}

// TestBlockCVAgainstNumPyReference compares CrossValidateBlocks with
// testdata/blockcv_ref.py, an independent brute-force NumPy reference
// (blocks from their definition, haversine on R = 6371.0088 km, the k
// nearest of the other blocks' stations within the radius, Shepard 1968
// weights d^-p): every prediction and the RMSE, MAE and bias to 1e-9, the
// counts and the number of blocks exactly. Invented random stations, one
// set across the antimeridian.
func TestBlockCVAgainstNumPyReference(t *testing.T) {
	py := reftest.Python(t, "numpy")
	for _, c := range []struct {
		name    string
		pts     []Point
		blockKm float64
		p       Params
	}{
		{"europe-200", boxStations(11, 300, -10, 35, 30, 60), 200, Params{Power: 2, Neighbors: 10, RadiusKm: 400, MinStations: 3}},
		{"antimeridian-150-p3", boxStations(12, 60, 170, -25, 190, -10), 150, Params{Power: 3, Neighbors: 6, RadiusKm: 300, MinStations: 2}},
		{"wide-500-p1.5", boxStations(13, 60, 0, 0, 40, 30), 500, Params{Power: 1.5, Neighbors: 12, RadiusKm: 700, MinStations: 4}},
	} {
		t.Run(c.name, func(t *testing.T) {
			got, err := CrossValidateBlocks(c.pts, c.p, c.blockKm, nil)
			if err != nil {
				t.Fatal(err)
			}
			var ps [][]float64
			for _, q := range c.pts {
				ps = append(ps, []float64{q.Lon, q.Lat, q.Z})
			}
			in, _ := json.Marshal(map[string]any{"points": ps, "power": c.p.Power, "neighbors": c.p.Neighbors,
				"radius_km": c.p.RadiusKm, "min_stations": c.p.MinStations, "block_km": c.blockKm})
			var ref struct {
				Block   [][2]int   `json:"block"`
				Pred    []*float64 `json:"pred"`
				N       []int      `json:"n"`
				Counted int        `json:"n_counted"`
				Blocks  int        `json:"blocks"`
			}
			out := reftest.RunPython(t, py, "../testdata/blockcv_ref.py", in)
			if err := json.Unmarshal(out, &ref); err != nil {
				t.Fatal(err)
			}
			var figs struct {
				RMSE float64 `json:"rmse"`
				MAE  float64 `json:"mae"`
				Bias float64 `json:"bias"`
			}
			if err := json.Unmarshal(out, &figs); err != nil {
				t.Fatal(err)
			}
			for i, q := range c.pts {
				row, col := Block(q.Lon, q.Lat, c.blockKm)
				if [2]int{row, col} != ref.Block[i] {
					t.Fatalf("station %d: block %d,%d, reference %v", i, row, col, ref.Block[i])
				}
				r := got.Stations[i]
				if (ref.Pred[i] != nil) != r.Counted || r.N != ref.N[i] {
					t.Fatalf("station %d: counted %v n %d, reference %v n %d", i, r.Counted, r.N, ref.Pred[i] != nil, ref.N[i])
				}
				if r.Counted && math.Abs(r.Predicted-*ref.Pred[i]) > 1e-9 {
					t.Fatalf("station %d: predicted %.12g, reference %.12g", i, r.Predicted, *ref.Pred[i])
				}
			}
			if got.N != ref.Counted || got.Blocks != ref.Blocks || got.BlockKm != c.blockKm {
				t.Fatalf("n %d blocks %d, reference n %d blocks %d", got.N, got.Blocks, ref.Counted, ref.Blocks)
			}
			if got.N == 0 || got.N == len(c.pts) {
				t.Fatalf("%d of %d counted: the fixture should leave some out", got.N, len(c.pts))
			}
			for _, f := range [][2]float64{{got.RMSE, figs.RMSE}, {got.MAE, figs.MAE}, {got.Bias, figs.Bias}} {
				if math.Abs(f[0]-f[1]) > 1e-9 {
					t.Fatalf("figures %v %v %v, reference %v", got.RMSE, got.MAE, got.Bias, figs)
				}
			}
			t.Logf("%d stations, %d blocks, %d counted, RMSE %.4f", len(c.pts), got.Blocks, got.N, got.RMSE)
		})
	}
}

// clusteredNetwork is an invented clustered station network: clusters of
// size stations within about 10 km of their centre (each cluster kept
// inside one block of blockKm, so a block leaves a cluster out whole),
// the centres on a jittered grid about spacingKm apart. A cluster's
// values share a random offset (sd 0.8) on a smooth regional field, with a
// little station noise (sd 0.05): stations of one cluster agree, clusters
// differ.
func clusteredNetwork(seed uint64, nx, ny, size int, spacingKm, blockKm float64) []Point {
	r := rand.New(rand.NewPCG(seed, 2017))
	var pts []Point
	step := spacingKm / KmPerDegree
	for i := range nx {
		for j := range ny {
			lat := 40 + float64(j)*step + (r.Float64()-0.5)*step*0.4
			lon := 0 + float64(i)*step/math.Cos(lat*degToRad) + (r.Float64()-0.5)*step*0.4
			br, bc := Block(lon, lat, blockKm)
			off := 0.8 * r.NormFloat64()
			for range size {
				for {
					la := lat + (r.Float64()-0.5)*0.18
					lo := lon + (r.Float64()-0.5)*0.18/math.Cos(lat*degToRad)
					if rr, cc := Block(lo, la, blockKm); rr != br || cc != bc {
						continue
					}
					z := 0.5*math.Sin(lo/4) + off + 0.05*r.NormFloat64()
					pts = append(pts, Point{lo, la, z})
					break
				}
			}
		}
	}
	return pts
}

// TestBlockCVRanksRadiiDifferently is the point of block cross-validation
// (Roberts et al. 2017): on a clustered network leaving one station out
// tests only the inside of clusters, where every radius gives nearly the
// same error and the smallest wins, while leaving blocks out tests the gaps
// between clusters, where a small radius is worse. The network is invented
// (clusteredNetwork); the assertion is on the ranking, not on values.
func TestBlockCVRanksRadiiDifferently(t *testing.T) {
	const blockKm = 100
	pts := clusteredNetwork(7, 10, 8, 5, 260, blockKm)
	combos, err := SearchCombos(Params{Power: 1, Neighbors: 30, RadiusKm: 300, MinStations: 3}, []string{"radius-km=150,200,300,600,1000"})
	if err != nil {
		t.Fatal(err)
	}
	loo, err := Search(pts, combos, nil)
	if err != nil {
		t.Fatal(err)
	}
	blk, err := SearchBlocks(pts, combos, blockKm, nil)
	if err != nil {
		t.Fatal(err)
	}
	for i := range combos {
		t.Logf("radius %4g km: leave-one-out n %3d RMSE %.4f; blocks of %d km (%d) n %3d RMSE %.4f",
			combos[i].RadiusKm, loo[i].N, loo[i].RMSE, blockKm, blk[i].Blocks, blk[i].N, blk[i].RMSE)
	}
	lr, br := Rank(loo), Rank(blk)
	t.Logf("leave-one-out ranks %v, blocks rank %v", lr, br)
	// Leave-one-out: the smallest radius first, the errors rising with
	// the radius (far clusters only dilute a station's own cluster).
	if lr[0] != 0 || !(loo[0].RMSE < loo[3].RMSE) {
		t.Fatalf("leave-one-out should rank the smallest radius first: ranks %v", lr)
	}
	// Blocks: the smallest radius predicts nothing (no other cluster within
	// it), 200 km only the closest pairs of clusters and worse than the
	// best by over 0.1 in z; a radius of 600 km or more comes first.
	if blk[0].N != 0 || blk[1].N == 0 || combos[br[0]].RadiusKm < 600 || !(blk[1].RMSE > blk[br[0]].RMSE+0.1) {
		t.Fatalf("blocks should rank a radius of 600 km or more first, and 200 km clearly worse: ranks %v", br)
	}
	// The same figures for any worker count.
	p := combos[3]
	p.Workers = 1
	a, _ := CrossValidateBlocks(pts, p, blockKm, nil)
	p.Workers = 7
	b, _ := CrossValidateBlocks(pts, p, blockKm, nil)
	for i := range a.Stations {
		if math.Float64bits(a.Stations[i].Predicted) != math.Float64bits(b.Stations[i].Predicted) {
			t.Fatalf("station %d: %v with 1 worker, %v with 7", i, a.Stations[i].Predicted, b.Stations[i].Predicted)
		}
	}
	if _, err := CrossValidateBlocks(pts, p, 0, nil); err == nil {
		t.Fatal("blocks of 0 km accepted")
	}
}
