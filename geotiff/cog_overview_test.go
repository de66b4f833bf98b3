package geotiff

import (
	"math"
	"math/rand/v2"
	"reflect"
	"testing"
)

// TestCOGLevelSizes: overviews halve, rounding up (GDAL's DIV_ROUND_UP),
// until the longer side is at most 512 px. The 1300 x 700 row is what
// gdal_translate -of COG (GDAL 3.6.2, 512 px blocks) wrote for that size;
// the others are worked by hand.
func TestCOGLevelSizes(t *testing.T) {
	cases := []struct {
		cols, rows int
		want       [][2]int
	}{
		{1, 1, nil},
		{512, 512, nil},
		{513, 10, [][2]int{{257, 5}}},
		{1300, 700, [][2]int{{650, 350}, {325, 175}}},
		{3600, 1800, [][2]int{{1800, 900}, {900, 450}, {450, 225}}},
		{10, 1025, [][2]int{{5, 513}, {3, 257}}},
	}
	for _, c := range cases {
		if got := cogLevelSizes(c.cols, c.rows); !reflect.DeepEqual(got, c.want) {
			t.Errorf("%d x %d: overviews %v, want %v", c.cols, c.rows, got, c.want)
		}
	}
}

// cogMeanOverview is the mean overview of data (cols x rows) reduced by
// factor f (a power of two), made as the encoders make it (cogMeanSums).
func cogMeanOverview(data []float32, cols, rows, f int, nodata float32, workers int) []float32 {
	s := cogMeanLevel1(data, cols, rows, nodata, workers)
	for g := 2; g < f; g *= 2 {
		s = s.half(workers)
	}
	return s.means(nodata)
}

// TestCOGMeanOverview: worked by hand. A 3 x 3 image halved gives 2 x 2;
// blocks on the right and bottom edges are cut short by the image.
func TestCOGMeanOverview(t *testing.T) {
	const nd = -9999
	data := []float32{
		1, 2, 10,
		3, nd, nd,
		nd, nd, 7,
	}
	// (1+2+3)/3 = 2; 10 (its no-data neighbour skipped); bottom-left all no
	// data; bottom-right 7.
	want := []float32{2, 10, nd, 7}
	for _, w := range []int{1, 3} {
		if got := cogMeanOverview(data, 3, 3, 2, nd, w); !reflect.DeepEqual(got, want) {
			t.Errorf("workers %d: mean overview %v, want %v", w, got, want)
		}
	}
	// Factor 4 of the same image: one pixel, the mean of 1, 2, 10, 3, 7.
	if got := cogMeanOverview(data, 3, 3, 4, nd, 1); got[0] != float32(23.0/5) {
		t.Errorf("factor 4 mean %v, want 4.6", got)
	}
}

// TestCOGModeOverview: worked by hand; our rule is the most frequent code
// other than no data, the lowest code on a tie, no data only when every
// cell is no data.
func TestCOGModeOverview(t *testing.T) {
	data := []uint8{
		0, 0, 5, 3, 9,
		0, 4, 3, 5, 9,
		0, 0, 2, 2, 0,
		0, 0, 2, 7, 0,
	}
	// Blocks: {0,0,0,4} -> 4 (no data ignored); {5,3,3,5} -> 3 (tie, lowest);
	// {9,9} -> 9 (cut short); {0,0,0,0} -> 0; {2,2,2,7} -> 2; {0,0} -> 0.
	want := []uint8{4, 3, 9, 0, 2, 0}
	for _, w := range []int{1, 2} {
		if got := cogModeOverview(data, 5, 4, 2, 0, w); !reflect.DeepEqual(got, want) {
			t.Errorf("workers %d: mode overview %v, want %v", w, got, want)
		}
	}
}

// TestCOGMeanOverviewLevels: the sums built level by level give, at every
// factor, the mean of the valid cells of each block summed directly in
// float64 (the definition), to within one float32 unit in the last place
// (only the order of the float64 additions differs), on random images with
// no data, NaN and odd sizes; blocks with no valid cell are no data.
func TestCOGMeanOverviewLevels(t *testing.T) {
	const nd = -9999
	r := rand.New(rand.NewPCG(3, 4))
	for trial := range 40 {
		cols, rows := 1+r.IntN(70), 1+r.IntN(70)
		data := make([]float32, cols*rows)
		for i := range data {
			switch r.IntN(6) {
			case 0:
				data[i] = nd
			case 1:
				data[i] = float32(math.NaN())
			default:
				data[i] = float32(r.NormFloat64() * math.Pow(10, float64(r.IntN(9)-6)))
			}
		}
		for f := 2; f <= 64; f *= 2 {
			got := cogMeanOverview(data, cols, rows, f, nd, 1+trial%3)
			oc := cogCeilDiv(cols, f)
			for oy := range cogCeilDiv(rows, f) {
				for ox := range oc {
					s, n := 0.0, 0
					for y := oy * f; y < min(oy*f+f, rows); y++ {
						for x := ox * f; x < min(ox*f+f, cols); x++ {
							if v := data[y*cols+x]; v != nd && v == v {
								s += float64(v)
								n++
							}
						}
					}
					g := got[oy*oc+ox]
					if n == 0 {
						if g != nd {
							t.Fatalf("trial %d f %d (%d, %d): %v, want no data", trial, f, ox, oy, g)
						}
						continue
					}
					want := float32(s / float64(n))
					if d := math.Float32bits(g) - math.Float32bits(want); g != want && d != 1 && d != math.MaxUint32 {
						t.Fatalf("trial %d f %d (%d, %d): %v, want %v (direct sum)", trial, f, ox, oy, g, want)
					}
				}
			}
		}
	}
}
