package bands

import (
	"encoding/json"
	"fmt"
	"math"
	"strings"
	"testing"

	"drygrid/internal/reftest"
	"drygrid/spi"
)

// unitRef runs testdata/units_ref.py (SciPy's norm.cdf and norm.ppf) on q.
func unitRef(t *testing.T, q map[string]any) (out struct {
	Legend []string  `json:"legend"`
	ZCut   []float64 `json:"zcut"`
	Band   []int     `json:"band"`
	Z      []float64 `json:"z"`
}) {
	t.Helper()
	py := reftest.Python(t, "scipy.stats")
	in, err := json.Marshal(q)
	if err != nil {
		t.Fatal(err)
	}
	b := reftest.RunPython(t, py, "../testdata/units_ref.py", in)
	if err := json.Unmarshal(b, &out); err != nil {
		t.Fatalf("units_ref.py: %v\n%s", err, b)
	}
	return out
}

// The percentile legend of the default scheme (z cuts): each z cut as
// 100 Phi(z) to one decimal, against SciPy's norm.cdf printed "%.1f".
func TestPercentileLegendAgainstSciPy(t *testing.T) {
	s := DefaultFor(UnitPercentile)
	var zc []float64
	for _, b := range s.Bands[:len(s.Bands)-1] {
		zc = append(zc, b.Max)
	}
	ref := unitRef(t, map[string]any{"zcuts": zc})
	want := []string{
		"p <= " + ref.Legend[0],
		ref.Legend[0] + " < p <= " + ref.Legend[1],
		ref.Legend[1] + " < p <= " + ref.Legend[2],
		ref.Legend[2] + " < p <= " + ref.Legend[3],
		ref.Legend[3] + " < p < " + ref.Legend[4],
		ref.Legend[4] + " <= p < " + ref.Legend[5],
		ref.Legend[5] + " <= p < " + ref.Legend[6],
		ref.Legend[6] + " <= p < " + ref.Legend[7],
		"p >= " + ref.Legend[7],
	}
	for i, b := range s.Bands {
		if got := s.RangeOf(b); got != want[i] {
			t.Errorf("band %s: %q, SciPy gives %q", b.Key, got, want[i])
		}
		if got := b.Range(); got != Default().Bands[i].Range() {
			t.Errorf("band %s: Range() %q changed", b.Key, got)
		}
	}
	// The slightly-dry band, as written in the issue: Phi(-1.0) = 0.158655,
	// Phi(-0.5) = 0.308538 (Abramowitz and Stegun 1964, Table 26.1).
	if got := s.RangeOf(s.Bands[3]); got != "15.9 < p <= 30.9" {
		t.Errorf("slightly dry: %q", got)
	}
	// An SPI run's legend stays in z, byte for byte.
	z := DefaultFor(UnitZ)
	for i, b := range z.Bands {
		if got := z.RangeOf(b); got != Default().Bands[i].Range() {
			t.Errorf("z legend of %s: %q, want %q", b.Key, got, Default().Bands[i].Range())
		}
	}
	if Default().RangeOf(Default().Bands[0]) != "z <= -2.0" {
		t.Error("the default scheme's own legend is not in z")
	}
}

const pctScheme = `unit = "percentile"
cuts = [2.25, 10, 20, 30, 70, 80, 90]
cut_belongs_to = "%s"
[[band]]
key = "a"
label = "A"
color = "#8c510a"
drought = true
[[band]]
key = "b"
label = "B"
color = "#bf812d"
drought = true
[[band]]
key = "c"
label = "C"
color = "#dfc27d"
[[band]]
key = "d"
label = "D"
color = "#f6e8c3"
[[band]]
key = "e"
label = "E"
color = "#f5f5f5"
[[band]]
key = "f"
label = "F"
color = "#c7eae5"
[[band]]
key = "g"
label = "G"
color = "#80cdc1"
[[band]]
key = "h"
label = "H"
color = "#35978f"
`

// A percentile scheme's cuts become z by spi.PercentileToZ (checked
// against SciPy's norm.ppf), and classifying a percentile's z equals
// classifying the percentile itself by the percentile cuts (SciPy side:
// plain comparison, no z), on the cut points, their neighbours at 1e-9,
// 1e-6 and 0.01, the clamp zone and a sweep of 0-100. (Not at one ulp from
// a cut: p / 100 can round a neighbour onto the cut's z; see Unit.)
func TestPercentileCutsClassifyAsPercentiles(t *testing.T) {
	cuts := []float64{2.25, 10, 20, 30, 70, 80, 90}
	var ps []float64
	for _, c := range cuts {
		for _, d := range []float64{0, 1e-9, 1e-6, 0.01} {
			ps = append(ps, c-d, c+d)
		}
	}
	ps = append(ps, 0, 0.05, 0.1, 99.9, 99.95, 100)
	for p := 0.0; p <= 100; p += 0.125 {
		ps = append(ps, p)
	}
	for _, rule := range []string{"outer", "lower", "upper"} {
		s, err := ParseScheme("pct.toml", []byte(fmt.Sprintf(pctScheme, rule)))
		if err != nil {
			t.Fatal(err)
		}
		if s.Unit != UnitPercentile {
			t.Fatalf("unit %q", s.Unit)
		}
		ref := unitRef(t, map[string]any{"pcuts": cuts, "rule": rule, "ps": ps})
		for i, b := range s.Bands[:len(s.Bands)-1] {
			if math.Abs(b.Max-ref.ZCut[i]) > 1e-12 {
				t.Errorf("%s: cut %g as z %v, SciPy norm.ppf %v", rule, cuts[i], b.Max, ref.ZCut[i])
			}
			if b.Max != spi.PercentileToZ(cuts[i]) {
				t.Errorf("%s: cut %g is not spi.PercentileToZ's z", rule, cuts[i])
			}
		}
		for i, p := range ps {
			got := s.Classify(spi.PercentileToZ(p))
			if want := s.Bands[ref.Band[i]].Code; got != want {
				t.Errorf("%s: percentile %v (z %v) in band %d, by the percentile itself %d", rule, p, spi.PercentileToZ(p), got, want)
			}
		}
		// The legend gives the cuts back as written.
		if got := s.RangeOf(s.Bands[0]); got != map[string]string{"outer": "p <= 2.25", "lower": "p <= 2.25", "upper": "p < 2.25"}[rule] {
			t.Errorf("%s: first band %q", rule, got)
		}
		if got := s.RangeOf(s.Bands[4]); !strings.Contains(got, "30.0") || !strings.Contains(got, "70.0") {
			t.Errorf("%s: middle band %q", rule, got)
		}
	}
}

func TestSchemeUnits(t *testing.T) {
	pon := strings.Replace(fmt.Sprintf(pctScheme, "outer"), `unit = "percentile"`, `unit = "percent-of-normal"`, 1)
	pon = strings.Replace(pon, "cuts = [2.25, 10, 20, 30, 70, 80, 90]", "cuts = [50, 70, 85, 115, 130, 150, 200]", 1)
	s, err := ParseScheme("pon.toml", []byte(pon))
	if err != nil {
		t.Fatal(err)
	}
	if s.Unit != UnitPctOfNormal || s.Bands[0].Max != 50 || !s.Bands[0].MaxInclusive || s.Bands[4].MinInclusive != true {
		t.Fatalf("percent-of-normal scheme read as %+v", s)
	}
	if got := s.RangeOf(s.Bands[2]); got != "70 < % of normal <= 85" {
		t.Errorf("range %q", got)
	}
	if s.Classify(85) != s.Bands[2].Code || s.Classify(85.0001) != s.Bands[3].Code || s.Classify(115) != s.Bands[4].Code {
		t.Error("percent-of-normal cuts classify percent of normal, outer from 100")
	}
	z, err := ParseScheme("z.toml", []byte(strings.Replace(ExampleSchemeTOML(), `unit = "z"`, "", 1)))
	if err != nil || z.Unit != UnitZ {
		t.Fatalf("no unit: %v %v", z, err)
	}
	cases := []struct{ name, text, want string }{
		{"unknown unit", strings.Replace(ExampleSchemeTOML(), `unit = "z"`, `unit = "sigma"`, 1), `line 11: unit "sigma": want "z", "percentile" or "pct-of-normal"`},
		{"percentile cut in the clamp", strings.Replace(fmt.Sprintf(pctScheme, "outer"), "2.25", "0.05", 1), `cut 1 (0.05): percentile cuts must lie strictly between 0.1 and 99.9`},
		{"percentile cut at 0.1", strings.Replace(fmt.Sprintf(pctScheme, "outer"), "2.25", "0.1", 1), `cut 1 (0.1): percentile cuts must lie strictly between`},
		{"percentile cut at 100", strings.Replace(fmt.Sprintf(pctScheme, "outer"), "90]", "100]", 1), `cut 7 (100): percentile cuts must lie strictly between`},
		{"percentile outer at 50", strings.Replace(fmt.Sprintf(pctScheme, "outer"), "30, 70", "30, 50", 1), `a cut at 50 has no outer side (it is normal in percentile)`},
		{"percentile drought above 50", strings.Replace(strings.Replace(fmt.Sprintf(pctScheme, "lower"), "[2.25, 10, 20, 30, 70, 80, 90]", "[2.25, 10, 60, 70, 80, 90, 95]", 1), "color = \"#dfc27d\"", "color = \"#dfc27d\"\ndrought = true", 1), `[[band]] 3 (10.0 < p <= 60.0) reaches above the 50th percentile`},
		{"percent of normal below 0", strings.Replace(pon, "[50,", "[-5,", 1), `cut 1 (-5): percent of normal is never below 0`},
	}
	for _, c := range cases {
		_, err := ParseScheme("bad.toml", []byte(c.text))
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want it to contain %q", c.name, err, c.want)
		}
	}
}

// Scheme.For: a run takes schemes of its unit (a percentile run also z
// schemes); the refusal names both units.
func TestSchemeFor(t *testing.T) {
	pct, err := ParseScheme("pct.toml", []byte(fmt.Sprintf(pctScheme, "outer")))
	if err != nil {
		t.Fatal(err)
	}
	pon := DefaultPctOfNormal()
	for _, c := range []struct {
		s    *Scheme
		u    Unit
		ok   bool
		want string
	}{
		{Default(), UnitZ, true, "z <= -2.0"},
		{Default(), UnitPercentile, true, "p <= 2.3"},
		{Default(), UnitPctOfNormal, false, `scheme "drygrid-default" has its cuts in z (unit = "z"), but the values are in % of normal: give a scheme with unit = "pct-of-normal"`},
		{pct, UnitPercentile, true, "p <= 2.25"},
		{pct, UnitZ, false, `has its cuts in percentile (unit = "percentile"), but the values are in z: give a scheme with unit = "z"`},
		{pct, UnitPctOfNormal, false, `but the values are in % of normal`},
		{pon, UnitPctOfNormal, true, "% of normal <= 40"},
		{pon, UnitZ, false, `has its cuts in % of normal (unit = "pct-of-normal"), but the values are in z`},
		{pon, UnitPercentile, false, `but the values are in percentile`},
	} {
		got, err := c.s.For(c.u)
		if c.ok != (err == nil) {
			t.Errorf("%s for %s: error %v", c.s.Name, c.u, err)
			continue
		}
		if err != nil {
			if !strings.Contains(err.Error(), c.want) {
				t.Errorf("%s for %s: %v, want %q", c.s.Name, c.u, err, c.want)
			}
			continue
		}
		if r := got.RangeOf(got.Bands[0]); r != c.want {
			t.Errorf("%s for %s: legend %q, want %q", c.s.Name, c.u, r, c.want)
		}
		if &got.Bands[0] == &c.s.Bands[0] {
			t.Error("For shares the bands")
		}
	}
}

// The percent-of-normal default: the nine bands of Default with our own
// cuts, tiling the line, drought at 70 % of normal or less.
func TestDefaultPctOfNormal(t *testing.T) {
	s := DefaultPctOfNormal()
	if err := s.Validate(); err != nil {
		t.Fatal(err)
	}
	want := map[float64]string{0: "parched", 40: "parched", 40.01: "very-dry", 70: "dry", 70.01: "slightly-dry",
		85: "slightly-dry", 100: "normal", 115: "slightly-wet", 149.9: "wet", 150: "very-wet", 200: "soaked", 1e4: "soaked"}
	for v, key := range want {
		b, _ := s.Band(s.Classify(v))
		if b.Key != key {
			t.Errorf("%g %% of normal in %q, want %q", v, b.Key, key)
		}
	}
	for _, b := range s.Bands {
		if b.Drought != (b.Max <= 70) {
			t.Errorf("band %s drought %v", b.Key, b.Drought)
		}
	}
}
