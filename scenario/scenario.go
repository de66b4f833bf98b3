package scenario

import (
	"bufio"
	"io"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/stat/distuv"
)

// The demo scenario is invented from end to end: the Kelverin Islands do not
// exist, and the area (38-45 S, 128-116 W) is open ocean in the South Pacific,
// far from any real island. Nothing here is real data.

// Scenario seeds and layout. Changing any of them changes the demo.
const (
	scnSeed1 = 0x4b4c5652_20251130 // "KLVR" + the invented window end
	scnSeed2 = 0x6472_7967_7269_64 // "drygrid"

	scnFirstYear = 1961
	scnLastYear  = 2025
	scnKmPerDeg  = 111.19508 // km per degree on R = 6371.0088 km
)

// Site is one invented station of the demo.
type Site struct {
	ID, Name             string
	Lat, Lon, ElevationM float64
	Island               string // the invented island it stands on
}

// YearTotal is one station's window total for one year; Missing marks a year
// without a total (written as an empty cell).
type YearTotal struct {
	Station string
	Year    int
	TotalMM float64
	Missing bool
}

// Island is an invented island, an ellipse in degrees rotated by RotDeg
// (counter-clockwise from east).
type Island struct {
	Name             string
	Lon, Lat         float64 // centre
	SemiLon, SemiLat float64 // semi-axes in degrees before rotation
	RotDeg           float64
	PeakM            float64
}

// Outline returns n points (lon, lat) of the island's coast, counter-clockwise,
// not closed.
func (is Island) Outline(n int) [][2]float64 {
	pts := make([][2]float64, n)
	for i := range pts {
		t := 2 * math.Pi * float64(i) / float64(n)
		pts[i] = is.at(math.Cos(t), math.Sin(t))
	}
	return pts
}

// at maps unit-disc coordinates (u, v) to lon, lat.
func (is Island) at(u, v float64) [2]float64 {
	r := is.RotDeg * math.Pi / 180
	x, y := u*is.SemiLon, v*is.SemiLat
	return [2]float64{is.Lon + x*math.Cos(r) - y*math.Sin(r), is.Lat + x*math.Sin(r) + y*math.Cos(r)}
}

// radius returns the normalised elliptic radius of (lon, lat): < 1 inside.
func (is Island) radius(lon, lat float64) float64 {
	r := is.RotDeg * math.Pi / 180
	dx, dy := lon-is.Lon, lat-is.Lat
	x := dx*math.Cos(r) + dy*math.Sin(r)
	y := -dx*math.Sin(r) + dy*math.Cos(r)
	return math.Hypot(x/is.SemiLon, y/is.SemiLat)
}

// Contains reports whether (lon, lat) is on the island.
func (is Island) Contains(lon, lat float64) bool { return is.radius(lon, lat) < 1 }

// Scenario is the invented demo: stations, 65 years of window totals and the
// target-year anomaly that was imposed on them.
type Scenario struct {
	Name, Window string
	TargetYear   int
	BBox         [4]float64 // W, S, E, N
	Sites        []Site
	Totals       []YearTotal
	// AnomalyZ is the z (SPI units) imposed on each station in the target
	// year, rounded to 0.001 (every station has one, even those whose totals
	// are too short for an index); the grid-only path interpolates it directly.
	AnomalyZ map[string]float64
	Islands  []Island
	// RadiusKm is a search radius that suits the demo network: small enough
	// for the open sea between the islands to be masked.
	RadiusKm float64
	// DryCentre and WetCentre (lon, lat) are the centres of the imposed anomaly.
	DryCentre, WetCentre [2]float64

	// Per-station climatology behind the totals (for the tests): gamma shape,
	// scale (mm) and the probability of a zero total.
	scnShape, scnScale, scnZeroQ map[string]float64
}

// scnIslandPlan: an island and how many stations (and towns) it carries.
type scnIslandPlan struct {
	Island
	stations, towns int
}

var scnPlan = []scnIslandPlan{
	{Island{"Wendrake", -125.6, -40.4, 1.10, 0.55, 20, 920}, 80, 3},
	{Island{"Orsolune", -124.1, -42.7, 0.60, 0.35, -15, 610}, 35, 2},
	{Island{"Tavrenna", -119.8, -41.1, 0.90, 0.45, 10, 1140}, 55, 2},
	{Island{"Imbreth", -117.5, -43.3, 0.70, 0.50, 35, 760}, 45, 2},
	{Island{"Kessary", -121.9, -38.9, 0.16, 0.10, 0, 45}, 4, 1},
}

// scnRNG wraps a PCG stream. Only PCG's Uint64 is used (its algorithm is
// fixed), and every value written is rounded, so the scenario is the same on
// every platform.
type scnRNG struct{ p *rand.PCG }

// u returns a uniform number in (0, 1).
func (r scnRNG) u() float64 { return (float64(r.p.Uint64()>>11) + 0.5) / (1 << 53) }

// norm returns a standard normal deviate (Box-Muller).
func (r scnRNG) norm() float64 {
	return math.Sqrt(-2*math.Log(r.u())) * math.Cos(2*math.Pi*r.u())
}

func (r scnRNG) between(a, b float64) float64 { return a + (b-a)*r.u() }

func (r scnRNG) intn(n int) int { return int(r.p.Uint64() % uint64(n)) }

// Syllables of the invented names.
var (
	scnOnsets = []string{"b", "d", "f", "g", "h", "k", "l", "m", "n", "p", "r", "s", "t", "v", "w", "br", "dr", "gr", "kr", "tr", "th", "st", "sk", "fl", "q"}
	scnNuclei = []string{"a", "e", "i", "o", "u", "ae", "ei", "ou"}
	scnCodas  = []string{"", "", "", "n", "r", "l", "s", "th", "m", "k", "x"}
	scnKinds  = []string{"", "", "", " Point", " Hill", " Bay", " Field", " Creek", " Ridge", " Landing", " Head", " Flats", " Mill"}
)

func (r scnRNG) word() string {
	n := 2 + r.intn(2)
	var b strings.Builder
	for i := 0; i < n; i++ {
		b.WriteString(scnOnsets[r.intn(len(scnOnsets))])
		b.WriteString(scnNuclei[r.intn(len(scnNuclei))])
		if i == n-1 || r.intn(3) == 0 {
			b.WriteString(scnCodas[r.intn(len(scnCodas))])
		}
	}
	s := b.String()
	return strings.ToUpper(s[:1]) + s[1:]
}

// scnRound rounds x to d decimals.
func scnRound(x float64, d int) float64 {
	p := math.Pow(10, float64(d))
	return math.Round(x*p) / p
}

// scnDistKm is the great-circle distance on R = 6371.0088 km (haversine).
func scnDistKm(lon1, lat1, lon2, lat2 float64) float64 {
	const rad = math.Pi / 180
	dlat := (lat2 - lat1) * rad
	dlon := (lon2 - lon1) * rad
	a := math.Sin(dlat/2)*math.Sin(dlat/2) + math.Cos(lat1*rad)*math.Cos(lat2*rad)*math.Sin(dlon/2)*math.Sin(dlon/2)
	return 2 * 6371.0088 * math.Asin(math.Min(1, math.Sqrt(a)))
}

// Anomaly shape: a dry core on the western islands and a wet one on the east.
const (
	scnDryPeak, scnDryKm = -2.3, 320.0
	scnWetPeak, scnWetKm = 1.8, 240.0
)

// DemoScenario builds the invented Kelverin Islands scenario from a fixed
// seed; every call returns the same scenario.
func DemoScenario() *Scenario {
	rng := scnRNG{rand.NewPCG(scnSeed1, scnSeed2)}
	s := &Scenario{
		Name:       "the Kelverin Islands (fictitious)",
		Window:     "30 days ending 30 November",
		TargetYear: scnLastYear,
		BBox:       [4]float64{-128, -45, -116, -38},
		AnomalyZ:   make(map[string]float64),
		scnShape:   make(map[string]float64),
		scnScale:   make(map[string]float64),
		scnZeroQ:   make(map[string]float64),
		RadiusKm:   150,
		DryCentre:  [2]float64{-126.3, -40.4},
		WetCentre:  [2]float64{-117.4, -43.1},
	}
	names := make(map[string]bool)
	uniqueName := func() string {
		for {
			n := rng.word() + scnKinds[rng.intn(len(scnKinds))]
			if !names[n] {
				names[n] = true
				return n
			}
		}
	}
	for _, p := range scnPlan {
		is := p.Island
		s.Islands = append(s.Islands, is)
		// Towns: points well inside the island.
		towns := make([][2]float64, p.towns)
		for i := range towns {
			for {
				pt := is.at(rng.between(-0.7, 0.7), rng.between(-0.7, 0.7))
				if is.radius(pt[0], pt[1]) < 0.75 {
					towns[i] = pt
					break
				}
			}
		}
		for k := 0; k < p.stations; k++ {
			var lon, lat float64
			for {
				if k < p.stations*6/10 {
					// Clustered around a town (sigma about 12 km).
					t := towns[k%len(towns)]
					sig := 12 / scnKmPerDeg
					lat = t[1] + sig*rng.norm()
					lon = t[0] + sig*rng.norm()/math.Cos(t[1]*math.Pi/180)
				} else {
					pt := is.at(rng.between(-1, 1), rng.between(-1, 1))
					lon, lat = pt[0], pt[1]
				}
				lon, lat = scnRound(lon, 4), scnRound(lat, 4)
				if is.radius(lon, lat) >= 0.95 {
					continue
				}
				near := false
				for _, o := range s.Sites {
					if scnDistKm(lon, lat, o.Lon, o.Lat) < 0.5 {
						near = true
						break
					}
				}
				if !near {
					break
				}
			}
			r := is.radius(lon, lat)
			elev := math.Max(2, is.PeakM*(1-math.Pow(r, 1.5))*rng.between(0.7, 1.2))
			id := "KLV-" + scnPad4(len(s.Sites)+1)
			s.Sites = append(s.Sites, Site{ID: id, Name: uniqueName(), Lat: lat, Lon: lon, ElevationM: math.Round(elev), Island: is.Name})
		}
	}
	s.genTotals(rng)
	return s
}

func scnPad4(n int) string {
	str := strconv.Itoa(n)
	for len(str) < 4 {
		str = "0" + str
	}
	return str
}

// genTotals draws 65 years of window totals per station from a gamma with a
// station-specific shape and scale, with a few stations that see zero totals,
// gaps and short records, and imposes the target-year anomaly.
func (s *Scenario) genTotals(rng scnRNG) {
	n := len(s.Sites)
	// Pick the special stations by a fixed draw: zero-prone, gappy, short.
	order := make([]int, n)
	for i := range order {
		order[i] = i
	}
	for i := n - 1; i > 0; i-- {
		j := rng.intn(i + 1)
		order[i], order[j] = order[j], order[i]
	}
	zeroQ := make(map[int]float64)
	for _, i := range order[0:6] {
		zeroQ[i] = rng.between(0.05, 0.15)
	}
	gappy := make(map[int]bool)
	for _, i := range order[6:14] {
		gappy[i] = true
	}
	shortStart := map[int]int{order[14]: 2001, order[15]: 1999, order[16]: 1997} // 25, 27, 29 years
	noTarget := order[17]                                                        // no target-year total
	fields := scnYearFields()
	for i, st := range s.Sites {
		shape := rng.between(1.5, 6)
		west := math.Max(0, math.Min(1, (st.Lon+116)/-12)) // 0 east .. 1 west
		mean := 70 + 40*west + 0.06*st.ElevationM + 15*rng.u()
		scale := mean / shape
		g := distuv.Gamma{Alpha: shape, Beta: 1 / scale}
		q := zeroQ[i]
		s.scnShape[st.ID], s.scnScale[st.ID], s.scnZeroQ[st.ID] = shape, scale, q
		// Target-year anomaly: the smooth field plus a little local noise.
		dDry := scnDistKm(st.Lon, st.Lat, s.DryCentre[0], s.DryCentre[1])
		dWet := scnDistKm(st.Lon, st.Lat, s.WetCentre[0], s.WetCentre[1])
		z := scnDryPeak*math.Exp(-(dDry/scnDryKm)*(dDry/scnDryKm)) +
			scnWetPeak*math.Exp(-(dWet/scnWetKm)*(dWet/scnWetKm)) + 0.12*rng.norm()
		z = scnRound(math.Max(-3.5, math.Min(3.5, z)), 3)
		s.AnomalyZ[st.ID] = z
		first := scnFirstYear
		if y, ok := shortStart[i]; ok {
			first = y
		}
		missing := make(map[int]bool)
		if gappy[i] {
			for g := 1 + rng.intn(3); g > 0; g-- {
				y0 := first + rng.intn(scnLastYear-first-6)
				span := 1 + rng.intn(6)
				for y := y0; y < y0+span; y++ {
					missing[y] = true
				}
			}
		}
		if i == noTarget {
			missing[scnLastYear] = true
		}
		for y := first; y <= scnLastYear; y++ {
			var h float64
			if y == scnLastYear {
				h = distuv.UnitNormal.CDF(z) // the target year: H = Phi(z)
			} else {
				// Other years: a smooth field shared by neighbouring stations
				// plus local noise, unit variance in z, so wet and dry years
				// come in regional patterns as they do in nature.
				local := distuv.UnitNormal.Quantile(rng.u())
				h = distuv.UnitNormal.CDF(scnFieldWeight*fields[y-scnFirstYear].at(st.Lon, st.Lat) +
					math.Sqrt(1-scnFieldWeight*scnFieldWeight)*local)
			}
			total := 0.0
			if h > q {
				total = scnRound(g.Quantile((h-q)/(1-q)), 1)
			}
			s.Totals = append(s.Totals, YearTotal{Station: st.ID, Year: y, TotalMM: total, Missing: missing[y]})
			if missing[y] {
				s.Totals[len(s.Totals)-1].TotalMM = 0
			}
		}
	}
}

// scnFieldWeight is the share (as a correlation) of a year's regional field
// in each station's z; the rest is local noise.
const scnFieldWeight = 0.85

// scnField is one year's smooth random field of unit variance: a sum of
// plane waves with random directions, wavelengths and phases (random
// Fourier features), over km east and north of the archipelago's centre.
type scnField struct{ kx, ky, phase [8]float64 }

func (f scnField) at(lon, lat float64) float64 {
	const lon0, lat0, kmPerDeg = -122.0, -41.5, 111.195
	x := (lon - lon0) * kmPerDeg * math.Cos(lat0*math.Pi/180)
	y := (lat - lat0) * kmPerDeg
	sum := 0.0
	for j := range f.kx {
		sum += math.Cos(f.kx[j]*x + f.ky[j]*y + f.phase[j])
	}
	return sum * math.Sqrt(2.0/float64(len(f.kx)))
}

// scnYearFields draws one field per year from a stream of its own, so the
// other draws of the scenario do not depend on it.
func scnYearFields() []scnField {
	rng := scnRNG{rand.NewPCG(scnSeed1^0x9e3779b97f4a7c15, scnSeed2)}
	out := make([]scnField, scnLastYear-scnFirstYear+1)
	for y := range out {
		for j := range out[y].kx {
			theta := rng.between(0, 2*math.Pi)
			k := 2 * math.Pi / rng.between(500, 1600) // wavelength 500-1600 km
			out[y].kx[j], out[y].ky[j] = k*math.Cos(theta), k*math.Sin(theta)
			out[y].phase[j] = rng.between(0, 2*math.Pi)
		}
	}
	return out
}

func scnF(x float64, d int) string { return strconv.FormatFloat(x, 'f', d, 64) }

// scnCSV quotes a field when it needs it (RFC 4180).
func scnCSV(s string) string {
	if strings.ContainsAny(s, ",\"\r\n") {
		return `"` + strings.ReplaceAll(s, `"`, `""`) + `"`
	}
	return s
}

func scnWrite(w io.Writer, header string, rows func(emit func(fields ...string))) error {
	bw := bufio.NewWriter(w)
	bw.WriteString(header + "\n")
	rows(func(fields ...string) {
		for i, f := range fields {
			if i > 0 {
				bw.WriteByte(',')
			}
			bw.WriteString(scnCSV(f))
		}
		bw.WriteByte('\n')
	})
	return bw.Flush()
}

// WriteStationsCSV writes station,name,latitude,longitude,elevation_m.
func (s *Scenario) WriteStationsCSV(w io.Writer) error {
	return scnWrite(w, "station,name,latitude,longitude,elevation_m", func(emit func(...string)) {
		for _, st := range s.Sites {
			emit(st.ID, st.Name, scnF(st.Lat, 4), scnF(st.Lon, 4), scnF(st.ElevationM, 0))
		}
	})
}

// WriteTotalsCSV writes station,year,total_mm; missing years have an empty total.
func (s *Scenario) WriteTotalsCSV(w io.Writer) error {
	return scnWrite(w, "station,year,total_mm", func(emit func(...string)) {
		for _, t := range s.Totals {
			v := ""
			if !t.Missing {
				v = scnF(t.TotalMM, 1)
			}
			emit(t.Station, strconv.Itoa(t.Year), v)
		}
	})
}

// WriteValuesCSV writes station,latitude,longitude,spi with the imposed
// anomaly z, for the grid-only path.
func (s *Scenario) WriteValuesCSV(w io.Writer) error {
	return scnWrite(w, "station,latitude,longitude,spi", func(emit func(...string)) {
		for _, st := range s.Sites {
			emit(st.ID, scnF(st.Lat, 4), scnF(st.Lon, 4), scnF(s.AnomalyZ[st.ID], 3))
		}
	})
}
