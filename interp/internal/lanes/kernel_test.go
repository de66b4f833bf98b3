package lanes

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

const degToRad = math.Pi / 180

// earthRadiusKm is the IUGG mean radius of the Earth (R1 of GRS 1980,
// Moritz 2000), the sphere interp measures on.
const earthRadiusKm = 6371.0088

// chordSqOf is the chord squared on the unit sphere of d km on the Earth:
// (2 sin(theta/2))^2 for the central angle theta = d / R (common practice).
func chordSqOf(d float64) float64 {
	c := 2 * math.Sin(d/earthRadiusKm/2)
	return c * c
}

// maxC2 is the largest chord squared the kernel serves, that of about
// 337 km: interp's grid takes the kernel for a radius whose chord squared
// is at most 4 * 7e-4 (the series of the weight stops below 3e-18 there).
const maxC2 = 4 * 7e-4

// wrapLon maps a longitude in degrees to [-180, 180), as interp's normLon.
func wrapLon(lon float64) float64 {
	if lon >= -180 && lon < 180 {
		return lon
	}
	l := math.Mod(lon+180, 360)
	if l < 0 {
		l += 360
	}
	l -= 180
	if l >= 180 {
		l -= 360
	}
	return l
}

// randomGroup is a kernel call of m stations scattered around four
// neighbouring cells out to about twice the chord c, some on a cell itself
// (or within 1 m of it), some on one place (ties), with equal or
// signed-zero values, and lane spans that are empty, part or all of the
// m stations.
func randomGroup(r *rand.Rand, m int, c float64, k *Consts) *Group {
	lon, lat := r.Float64()*360-180, r.Float64()*160-80
	g := &Group{M: m, K: k, D2: make([]float64, Width*m),
		Cos: make([]float64, Width), Sin: make([]float64, Width),
		Lom1: make([]int64, Width), Him1: make([]int64, Width), J0: int64(r.IntN(3))}
	g.U0, g.Delta = math.Inf(1), 0.002
	if r.IntN(2) == 0 { // a chord known to hold the k nearest
		g.U0 = math.Sqrt(k.C2max[0]) * r.Float64()
	}
	sp, cp := math.Sincos(lat * degToRad)
	g.Cp = cp
	var cx, cy [Width]float64
	for l := range Width {
		g.Sin[l], g.Cos[l] = math.Sincos(wrapLon(lon+0.1*float64(l)) * degToRad)
		g.Cz[l] = sp
		cx[l], cy[l] = cp*g.Cos[l], cp*g.Sin[l]
		a, b := r.IntN(m+1), r.IntN(m+1)
		if r.IntN(3) == 0 {
			a, b = 0, m
		}
		g.Lom1[l], g.Him1[l] = g.J0+int64(min(a, b)-1), g.J0+int64(max(a, b)-1)
	}
	// The group's stations start at j0 of the row's columns, its cells at
	// c0: stations before them, and cells after them, that it must not read.
	j0 := int(g.J0)
	x, y, z, v := make([]float64, j0+m), make([]float64, j0+m), make([]float64, j0+m), make([]float64, j0+m)
	for i := range j0 {
		x[i], y[i], z[i], v[i] = cx[0], cy[0], g.Cz[0], math.NaN()
	}
	g.X, g.Y, g.Z, g.V = x[j0:], y[j0:], z[j0:], v[j0:]
	defer func() {
		g.X, g.Y, g.Z, g.V = x, y, z, v
		c0 := r.IntN(3)
		pad := func(a []float64) []float64 {
			return append(append(make([]float64, c0), a...), math.NaN(), math.NaN())
		}
		padI := func(a []int64) []int64 {
			return append(append(make([]int64, c0), a...), 0, 0)
		}
		g.C0 = int64(c0)
		g.Cos, g.Sin, g.Lom1, g.Him1 = pad(g.Cos), pad(g.Sin), padI(g.Lom1), padI(g.Him1)
	}()
	for j := range m {
		l := r.IntN(Width)
		switch r.IntN(8) {
		case 0: // on a cell, or within 1 m of it
			g.X[j], g.Y[j], g.Z[j] = cx[l], cy[l], g.Cz[l]+r.Float64()*1e-8
		case 1: // on the place of the station before (a tie)
			if j > 0 {
				g.X[j], g.Y[j], g.Z[j] = g.X[j-1], g.Y[j-1], g.Z[j-1]
				break
			}
			fallthrough
		default:
			g.X[j] = cx[l] + (r.Float64()*2-1)*c
			g.Y[j] = cy[l] + (r.Float64()*2-1)*c
			g.Z[j] = g.Cz[l] + (r.Float64()*2-1)*c
		}
		switch r.IntN(6) {
		case 0:
			g.V[j] = 0
		case 1:
			g.V[j] = math.Copysign(0, -1)
		case 2:
			g.V[j] = 1.25
		default:
			g.V[j] = r.Float64()*6 - 3
		}
	}
	return g
}

// TestWeightIsGreatCircle: the kernel's weight of one station is
// 1/theta^2 for the central angle theta = 2 asin(c/2) of the chord c (the
// chord of a unit circle, common practice), computed with math.Asin, to
// 1e-15 relative (a few units in the last place on each side: the
// reference rounds in the square root, the arcsine and the square) from 1 m
// out to the kernel's largest radius (337 km): the series (1/c^2)(1 - t/3 -
// t^2/15 - 31 t^3/945 - 289 t^4/14175), t = c^2/4, is the reciprocal of
// the Maclaurin series of 4 asin^2(c/2) / c^2, worked out term by term with
// exact fractions, and stops below 3e-18.
func TestWeightIsGreatCircle(t *testing.T) {
	r := rand.New(rand.NewPCG(9, 10))
	c2max, exactChordSq := maxC2, chordSqOf(0.001)
	g := &Group{M: 1, K: NewConsts(c2max), D2: make([]float64, Width),
		X: make([]float64, 1), Y: make([]float64, 1), Z: []float64{0}, V: []float64{1},
		Cp: 1, Cos: []float64{1, 1, 1, 1}, Sin: make([]float64, Width), Him1: []int64{0, 0, 0, 0},
		Lom1: []int64{-1, -1, -1, -1}, U0: math.Inf(1)}
	for range 20000 {
		c := math.Sqrt(exactChordSq) * math.Pow(math.Sqrt(c2max/exactChordSq), r.Float64()) * 0.999
		g.X[0], g.Y[0] = 1-c*c/2, c*math.Sqrt(1-c*c/4)
		chordsGo(g)
		g.Tau = g.K.C2max
		sumsGo(g)
		if g.N[0] != 1 || g.N2[0] != 1 {
			t.Fatalf("chord %g: %d and %d stations counted", c, g.N[0], g.N2[0])
		}
		theta := 2 * math.Asin(math.Sqrt(g.D2[0])/2)
		if want := 1 / (theta * theta); math.Abs(g.Sw[0]-want) > 1e-15*want {
			t.Fatalf("chord %g: weight %.17g, 1/theta^2 %.17g (relative %.2g)", c, g.Sw[0], want, (g.Sw[0]-want)/want)
		}
	}
}

// TestChordsKeepLargest: the first pass counts exactly the stations
// of each lane's own span within the radius, writes +Inf for every other,
// and its largest chords are those of a sort of the counted ones (zero past
// their number), so that the k-th smallest of n > k is Top[n-k].
func TestChordsKeepLargest(t *testing.T) {
	r := rand.New(rand.NewPCG(13, 14))
	k := NewConsts(0.0022)
	for trial := range 2000 {
		g := randomGroup(r, trial%41, 0.07, k)
		chordsGo(g)
		for l := range Width {
			var in []float64
			for j := range g.M {
				j0, c := int(g.J0), int(g.C0)+l
				dx, dy, dz := g.X[j0+j]-g.Cp*g.Cos[c], g.Y[j0+j]-g.Cp*g.Sin[c], g.Z[j0+j]-g.Cz[l]
				c2 := dx*dx + dy*dy + dz*dz
				own := g.J0+int64(j) > g.Lom1[c] && g.J0+int64(j) <= g.Him1[c]
				if got := g.D2[Width*j+l]; !own || c2 > g.Lim[l]*(1+1e-12) {
					if !math.IsInf(got, 1) && !(own && math.Abs(c2-g.Lim[l]) < 1e-15) {
						t.Fatalf("trial %d lane %d station %d: d2 %v, outside", trial, l, j, got)
					}
				} else if math.Abs(got-c2) > 1e-15 {
					t.Fatalf("trial %d lane %d station %d: d2 %v, want %v", trial, l, j, got, c2)
				}
				if got := g.D2[Width*j+l]; !math.IsInf(got, 1) {
					in = append(in, got)
				}
			}
			if int(g.N[l]) != len(in) {
				t.Fatalf("trial %d lane %d: n %d, %d counted", trial, l, g.N[l], len(in))
			}
			slices.Sort(in)
			for i := range Kept {
				want := 0.0
				if i < len(in) {
					want = in[len(in)-1-i]
				}
				if g.Top[i][l] != want {
					t.Fatalf("trial %d lane %d: top %v, sorted %v", trial, l, g.Top, in)
				}
			}
			if n := len(in); n > 12 {
				if got, want := KthChord(g.D2, l, g.M, 12, math.Inf(1), make([]uint64, g.M)), in[11]; got != want {
					t.Fatalf("trial %d lane %d: KthChord %v, sorted %v", trial, l, got, want)
				}
			}
		}
	}
}
