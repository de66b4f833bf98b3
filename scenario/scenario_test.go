package scenario

import (
	"bytes"
	"crypto/sha256"
	"fmt"
	"io"
	"math"
	"reflect"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"drygrid/bands"
	"drygrid/internal/reftest"
	"drygrid/station"
)

func scnCSVs(t *testing.T, s *Scenario) [3][]byte {
	t.Helper()
	var out [3][]byte
	for i, f := range []func(io.Writer) error{s.WriteStationsCSV, s.WriteTotalsCSV, s.WriteValuesCSV} {
		var b bytes.Buffer
		if err := f(&b); err != nil {
			t.Fatal(err)
		}
		out[i] = b.Bytes()
	}
	return out
}

func TestScenarioDeterministic(t *testing.T) {
	a, b := DemoScenario(), DemoScenario()
	if !reflect.DeepEqual(a, b) {
		t.Fatal("two calls of DemoScenario differ")
	}
	ca, cb := scnCSVs(t, a), scnCSVs(t, b)
	for i := range ca {
		if sha256.Sum256(ca[i]) != sha256.Sum256(cb[i]) {
			t.Fatalf("CSV %d differs between runs", i)
		}
		if len(ca[i]) < 1000 {
			t.Fatalf("CSV %d is only %d bytes", i, len(ca[i]))
		}
	}
}

func TestScenarioLayout(t *testing.T) {
	s := DemoScenario()
	if n := len(s.Sites); n < 150 || n > 300 {
		t.Fatalf("%d stations, want 150-300", n)
	}
	if len(s.Islands) < 3 || len(s.Islands) > 5 {
		t.Fatalf("%d islands", len(s.Islands))
	}
	// The demo's box: open ocean, roughly 38-45 S, 128-116 W.
	if s.BBox[0] < -128 || s.BBox[1] < -45 || s.BBox[2] > -116 || s.BBox[3] > -38 || s.BBox[0] >= s.BBox[2] || s.BBox[1] >= s.BBox[3] {
		t.Fatalf("bbox %v outside the open-ocean box 128-116 W, 45-38 S", s.BBox)
	}
	// Real land nearest the box, coordinates from memory of an atlas (lat,
	// lon): the demo must stay over open ocean, over 1000 km from any of it.
	// They are used only for this distance check, never in the demo.
	land := []struct {
		name     string
		lat, lon float64
	}{
		{"Pitcairn Island", -25.07, -130.10},
		{"Henderson Island", -24.37, -128.32},
		{"Ducie Island", -24.67, -124.78},
		{"Easter Island", -27.12, -109.35},
		{"Sala y Gomez", -26.47, -105.36},
		{"Chatham Islands", -44.0, -176.5},
		{"Robinson Crusoe Island", -33.64, -78.85},
		{"Chile coast near 41 S", -41.0, -73.8},
	}
	idRe := regexp.MustCompile(`^KLV-\d{4}$`)
	nameRe := regexp.MustCompile(`^[A-Z][a-z]+( [A-Z][a-z]+)?$`)
	ids, names := map[string]bool{}, map[string]bool{}
	islands := map[string]Island{}
	for _, is := range s.Islands {
		islands[is.Name] = is
	}
	for _, st := range s.Sites {
		if !idRe.MatchString(st.ID) || ids[st.ID] {
			t.Errorf("bad or repeated id %q", st.ID)
		}
		if !nameRe.MatchString(st.Name) || names[st.Name] {
			t.Errorf("bad or repeated name %q", st.Name)
		}
		ids[st.ID], names[st.Name] = true, true
		if st.Lon < s.BBox[0] || st.Lon > s.BBox[2] || st.Lat < s.BBox[1] || st.Lat > s.BBox[3] {
			t.Errorf("%s at %v, %v outside bbox %v", st.ID, st.Lat, st.Lon, s.BBox)
		}
		if is, ok := islands[st.Island]; !ok || !is.Contains(st.Lon, st.Lat) {
			t.Errorf("%s not on its island %q", st.ID, st.Island)
		}
		if st.ElevationM < 2 || st.ElevationM > 1500 {
			t.Errorf("%s elevation %v", st.ID, st.ElevationM)
		}
		for _, l := range land {
			if d := scnDistKm(st.Lon, st.Lat, l.lon, l.lat); d < 1000 {
				t.Errorf("%s is %.0f km from %s", st.ID, d, l.name)
			}
		}
	}
	// Clustered like a real network: most stations have a neighbour within
	// 10 km, yet a good share of the box has fewer than 3 stations within the
	// suggested radius (so the coverage mask shows) and a good share has more.
	close := 0
	for i, a := range s.Sites {
		for j, b := range s.Sites {
			if i != j && scnDistKm(a.Lon, a.Lat, b.Lon, b.Lat) < 10 {
				close++
				break
			}
		}
	}
	if close < len(s.Sites)*6/10 {
		t.Errorf("only %d of %d stations have a neighbour within 10 km", close, len(s.Sites))
	}
	masked, cells := 0, 0
	for lat := s.BBox[1] + 0.05; lat < s.BBox[3]; lat += 0.1 {
		for lon := s.BBox[0] + 0.05; lon < s.BBox[2]; lon += 0.1 {
			n := 0
			for _, st := range s.Sites {
				if scnDistKm(lon, lat, st.Lon, st.Lat) <= s.RadiusKm {
					n++
				}
			}
			cells++
			if n < 3 {
				masked++
			}
		}
	}
	t.Logf("%d stations, %d with a neighbour within 10 km; %d of %d cells masked at %v km", len(s.Sites), close, masked, cells, s.RadiusKm)
	if f := float64(masked) / float64(cells); f < 0.25 || f > 0.75 {
		t.Errorf("share of the box masked at %v km: %.2f, want 0.25-0.75", s.RadiusKm, f)
	}
}

func TestScenarioTotals(t *testing.T) {
	s := DemoScenario()
	if s.TargetYear != 2025 || s.Window == "" || !strings.Contains(s.Name, "fictitious") {
		t.Fatalf("scenario header %q %q %d", s.Name, s.Window, s.TargetYear)
	}
	type rec struct {
		years, zeros, missing int
		values                []float64
		first                 int
		targetMissing         bool
	}
	by := map[string]*rec{}
	seen := map[string]bool{}
	for _, y := range s.Totals {
		k := y.Station + "/" + strconv.Itoa(y.Year)
		if seen[k] {
			t.Fatalf("repeated station-year %s", k)
		}
		seen[k] = true
		if y.Year < 1961 || y.Year > 2025 || y.TotalMM < 0 || math.IsNaN(y.TotalMM) {
			t.Fatalf("bad total %+v", y)
		}
		r := by[y.Station]
		if r == nil {
			r = &rec{first: y.Year}
			by[y.Station] = r
		}
		if y.Missing {
			r.missing++
			if y.Year == s.TargetYear {
				r.targetMissing = true
			}
			continue
		}
		r.years++
		if y.TotalMM == 0 {
			r.zeros++
		}
		if y.Year != s.TargetYear {
			r.values = append(r.values, y.TotalMM)
		}
	}
	if len(by) != len(s.Sites) {
		t.Fatalf("totals for %d stations, sites %d", len(by), len(s.Sites))
	}
	var short, gappy, zeroed, noTarget int
	var stdMeans []float64
	var all, nAll float64
	for _, st := range s.Sites {
		r := by[st.ID]
		if r.years < 30 {
			short++
		}
		if r.missing > 0 && !r.targetMissing {
			gappy++
		}
		if r.targetMissing {
			noTarget++
		}
		if r.zeros > 0 {
			zeroed++
		}
		for _, v := range r.values {
			all += v
			nAll++
		}
		k, th, q := s.scnShape[st.ID], s.scnScale[st.ID], s.scnZeroQ[st.ID]
		if k < 1.5 || k > 6 {
			t.Errorf("%s shape %v outside 1.5-6", st.ID, k)
		}
		if q > 0 {
			// Zero years ~ Binomial(n, q): within 4 standard deviations.
			n := float64(len(r.values))
			var z float64
			for _, v := range r.values {
				if v == 0 {
					z++
				}
			}
			if math.Abs(z-n*q) > 4*math.Sqrt(n*q*(1-q))+1 {
				t.Errorf("%s: %v zero years of %v, q = %.3f", st.ID, z, n, q)
			}
			continue
		}
		// Gamma law: mean k theta, variance k theta^2 (Johnson, Kotz and
		// Balakrishnan 1994, Continuous Univariate Distributions vol. 1, ch. 17).
		var m float64
		for _, v := range r.values {
			m += v
		}
		n := float64(len(r.values))
		m /= n
		stdMeans = append(stdMeans, (m-k*th)/(math.Sqrt(k)*th/math.Sqrt(n)))
	}
	if short < 2 || short > 3 { // the scenario's own plan: three short records (scenario.go)
		t.Errorf("%d stations with under 30 years, want 2-3", short)
	}
	if gappy < 5 || noTarget != 1 || zeroed < 3 {
		t.Errorf("gappy %d, without target year %d, with zero totals %d", gappy, noTarget, zeroed)
	}
	// Standardised sample means of the stations: mean ~0, sd ~1 (central
	// limit theorem); over ~200 stations the mean's standard error is ~0.07.
	var mu, sd float64
	for _, z := range stdMeans {
		mu += z
	}
	mu /= float64(len(stdMeans))
	for _, z := range stdMeans {
		sd += (z - mu) * (z - mu)
	}
	sd = math.Sqrt(sd / float64(len(stdMeans)-1))
	t.Logf("short %d gappy %d no-target %d zeroed %d; standardised means mean %.3f sd %.3f; mean total %.1f mm", short, gappy, noTarget, zeroed, mu, sd, all/nAll)
	// Years share a regional field (scnFieldWeight of each station's z), so
	// the stations' means are correlated and the mean over stations varies
	// more than 1/sqrt(N): its variance is about w^2 var(A) + (1 - w^2)/N,
	// where A is a year's field averaged over the stations (var(A) is read
	// off the scenario's own fields; the gamma transform keeps this to first
	// order).
	var aVar float64
	fields := scnYearFields()
	for _, f := range fields {
		var a float64
		for _, st := range s.Sites {
			a += f.at(st.Lon, st.Lat)
		}
		a /= float64(len(s.Sites))
		aVar += a * a
	}
	aVar /= float64(len(fields))
	w2 := scnFieldWeight * scnFieldWeight
	se := math.Sqrt(w2*aVar + (1-w2)/float64(len(stdMeans)))
	t.Logf("field variance over the network %.3f, standard error of the mean %.3f", aVar, se)
	if math.Abs(mu) > 4*se || sd < 0.6 || sd > 1.25 {
		t.Errorf("standardised station means: mean %.3f (se %.3f) sd %.3f, want ~0 and ~1", mu, se, sd)
	}
	// A plausible 30-day total for a wet maritime mid-latitude climate
	// (common practice; a chosen bound for the invented scenario).
	if m := all / nAll; m < 60 || m > 200 {
		t.Errorf("mean window total %.1f mm", m)
	}
}

func TestScenarioAnomaly(t *testing.T) {
	s := DemoScenario()
	if len(s.AnomalyZ) != len(s.Sites) {
		t.Fatalf("%d anomalies for %d sites", len(s.AnomalyZ), len(s.Sites))
	}
	nearest := func(c [2]float64) Site {
		best, bd := Site{}, math.Inf(1)
		for _, st := range s.Sites {
			if d := scnDistKm(st.Lon, st.Lat, c[0], c[1]); d < bd {
				best, bd = st, d
			}
		}
		return best
	}
	if z := s.AnomalyZ[nearest(s.DryCentre).ID]; z > -1.9 || z < -2.8 {
		t.Errorf("dry core z %v, want about -2.3", z)
	}
	if z := s.AnomalyZ[nearest(s.WetCentre).ID]; z < 1.3 || z > 2.3 {
		t.Errorf("wet core z %v, want about +1.8", z)
	}
	if s.DryCentre[0] > s.WetCentre[0] {
		t.Error("dry core should be west of the wet one")
	}
	perBand := map[uint8]int{}
	sch := bands.Default()
	for _, st := range s.Sites {
		perBand[sch.Classify(s.AnomalyZ[st.ID])]++
	}
	t.Logf("stations per band: %v", perBand)
	if len(perBand) < 6 {
		t.Errorf("stations fall in only %d bands: %v", len(perBand), perBand)
	}
}

// The target-year totals carry the imposed anomaly: SciPy's gamma CDF of each
// total (with the zero mass at q / 2, Stagge et al. 2015) gives back Phi(z) up to the 0.1 mm
// rounding of the total (scipy.stats.gamma.cdf/pdf, norm.ppf; SciPy 1.10).
func TestScenarioTargetYearAgainstSciPy(t *testing.T) {
	py := reftest.Python(t, "scipy.stats")
	s := DemoScenario()
	var in bytes.Buffer
	var ids []string
	var totals []float64
	for _, y := range s.Totals {
		if y.Year != s.TargetYear || y.Missing {
			continue
		}
		ids = append(ids, y.Station)
		totals = append(totals, y.TotalMM)
		fmt.Fprintf(&in, "%.1f %.17g %.17g %.17g\n", y.TotalMM, s.scnShape[y.Station], s.scnScale[y.Station], s.scnZeroQ[y.Station])
	}
	out := strings.Fields(string(reftest.RunPython(t, py, "../testdata/scenario_gamma_ref.py", in.Bytes())))
	if len(out) != 3*len(ids) {
		t.Fatalf("%d numbers from SciPy for %d stations", len(out), len(ids))
	}
	checked, worst := 0, 0.0
	for i, id := range ids {
		z := s.AnomalyZ[id]
		if totals[i] == 0 {
			// A zero target total only where Phi(z) fell in the zero mass.
			if h := 0.5 * math.Erfc(-z/math.Sqrt2); h > s.scnZeroQ[id]+1e-9 {
				t.Errorf("%s: zero total but Phi(z) = %v > q = %v", id, h, s.scnZeroQ[id])
			}
			continue
		}
		zr, _ := strconv.ParseFloat(out[3*i+1], 64)
		dens, _ := strconv.ParseFloat(out[3*i+2], 64)
		phi := math.Exp(-zr*zr/2) / math.Sqrt(2*math.Pi)
		tol := 0.05*dens/phi*1.01 + 6e-4 // total rounded to 0.1 mm, z to 0.001
		if math.Abs(zr-z) > tol {
			t.Errorf("%s: SciPy z %.5f, imposed %.3f (tolerance %.2g)", id, zr, z, tol)
		}
		worst = max(worst, math.Abs(zr-z))
		checked++
	}
	t.Logf("%d stations checked against SciPy; largest |z - z_scipy| %.2g", checked, worst)
	if checked < len(s.Sites)-10 {
		t.Errorf("only %d stations checked", checked)
	}
}

func TestScenarioCSVRoundTrip(t *testing.T) {
	s := DemoScenario()
	c := scnCSVs(t, s)
	v, err := station.ParseValues("values.csv", bytes.NewReader(c[2]), station.ValueOptions{Kind: station.KindSPI})
	if err != nil {
		t.Fatal(err)
	}
	if len(v.Stations) != len(s.Sites) || len(v.Warnings) != 0 || len(v.Rejected) != 0 {
		t.Fatalf("values: %d stations, %d warnings %v, %d rejected", len(v.Stations), len(v.Warnings), v.Warnings, len(v.Rejected))
	}
	for i, st := range v.Stations {
		if st.ID != s.Sites[i].ID || st.Z != s.AnomalyZ[st.ID] || st.Lat != s.Sites[i].Lat || st.Lon != s.Sites[i].Lon {
			t.Fatalf("values row %d: %+v vs %+v z %v", i, st, s.Sites[i], s.AnomalyZ[st.ID])
		}
	}
	tb, err := station.NewTable("stations.csv", bytes.NewReader(c[0]))
	if err != nil {
		t.Fatal(err)
	}
	if want := []string{"station", "name", "latitude", "longitude", "elevation_m"}; !reflect.DeepEqual(tb.Header, want) {
		t.Fatalf("stations header %q", tb.Header)
	}
	n := 0
	for {
		rec, _, err := tb.Next()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatal(err)
		}
		if rec[0] != s.Sites[n].ID || rec[1] != s.Sites[n].Name {
			t.Fatalf("stations row %d: %q", n, rec)
		}
		n++
	}
	if n != len(s.Sites) {
		t.Fatalf("%d station rows", n)
	}
	tt, err := station.NewTable("totals.csv", bytes.NewReader(c[1]))
	if err != nil {
		t.Fatal(err)
	}
	if want := []string{"station", "year", "total_mm"}; !reflect.DeepEqual(tt.Header, want) {
		t.Fatalf("totals header %q", tt.Header)
	}
	var rows, empty int
	for {
		rec, _, err := tt.Next()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatal(err)
		}
		y := s.Totals[rows]
		if rec[0] != y.Station || rec[1] != strconv.Itoa(y.Year) || (rec[2] == "") != y.Missing {
			t.Fatalf("totals row %d: %q vs %+v", rows, rec, y)
		}
		if rec[2] == "" {
			empty++
		} else if x, _ := strconv.ParseFloat(rec[2], 64); x != y.TotalMM {
			t.Fatalf("totals row %d: %q vs %v", rows, rec, y.TotalMM)
		}
		rows++
	}
	if rows != len(s.Totals) || empty == 0 {
		t.Fatalf("%d total rows (%d empty), want %d", rows, empty, len(s.Totals))
	}
}

func TestIslandOutline(t *testing.T) {
	for _, is := range DemoScenario().Islands {
		pts := is.Outline(64)
		// Shoelace area > 0 means counter-clockwise (RFC 7946 exterior rings).
		var a float64
		for i := range pts {
			j := (i + 1) % len(pts)
			a += pts[i][0]*pts[j][1] - pts[j][0]*pts[i][1]
		}
		// The area of an ellipse is pi a b (any rotation); a 64-gon is within 0.2 %.
		want := math.Pi * is.SemiLon * is.SemiLat
		if a/2 <= 0 || math.Abs(a/2-want)/want > 0.002 {
			t.Errorf("%s: ring area %v, ellipse %v", is.Name, a/2, want)
		}
		for _, p := range pts {
			if r := is.radius(p[0], p[1]); math.Abs(r-1) > 1e-9 {
				t.Errorf("%s: outline point at radius %v", is.Name, r)
			}
		}
	}
}
