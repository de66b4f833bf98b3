package page

import (
	"bytes"
	"encoding/json"
	"math/rand/v2"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"drygrid/internal/layertest"
	"drygrid/internal/reftest"
	"drygrid/layer"
)

// pageManyStations invents n stations over the fixture's grid (a fixed
// seed; a quarter in a tight cluster) as a station layer with the
// properties drygrid's writer gives, and the collection's foreign members.
func pageManyStations(f *layertest.Fixture, n int) []byte {
	rng := rand.New(rand.NewPCG(18, 4))
	s := f.Spec
	var b bytes.Buffer
	b.WriteString(`{"type":"FeatureCollection","date":"2026-11-30","kind":"spi","features":[`)
	for i := 0; i < n; i++ {
		lon := s.West + rng.Float64()*float64(s.Cols)*s.Res
		lat := s.North - rng.Float64()*float64(s.Rows)*s.Res
		if i%4 == 0 {
			lon, lat = s.West+1+rng.NormFloat64()*0.1, s.North-2+rng.NormFloat64()*0.1
		}
		if i > 0 {
			b.WriteByte(',')
		}
		z := rng.NormFloat64()
		b.WriteString(`{"type":"Feature","geometry":{"type":"Point","coordinates":[`)
		b.WriteString(strconv.FormatFloat(lon, 'f', 5, 64) + "," + strconv.FormatFloat(lat, 'f', 5, 64))
		b.WriteString(`]},"properties":{"id":"ST` + strconv.Itoa(i) + `","value":` + strconv.FormatFloat(80+30*z, 'f', 1, 64) +
			`,"z":` + strconv.FormatFloat(z, 'f', 3, 64) + `,"code":5,"key":"normal","in_grid":true}}`)
	}
	b.WriteString(`]}`)
	return b.Bytes()
}

// TestPageThinsStations: a page made from 500,000 invented stations
// carries at most DefaultMaxStations of them, stays under 2 MB (the
// fixture's page without stations is about 0.2 MB; 2,000 stations add
// about 0.3 MB), says how many it shows of how many and links
// stations.geojson; the subset is the same on every run; the collection's
// other members are kept. A page of few stations embeds them unchanged.
func TestPageThinsStations(t *testing.T) {
	f := layertest.NewFixture(t, 164, -48, 178, -34, 0.1)
	in := pageFixtureInput(t, f)
	few := in.StationsGeoJSON
	in.StationsGeoJSON = pageManyStations(f, 500000)
	in.StationsHref = "stations.geojson"
	in.Produced = "made 2026-12-01 06:00 UTC · SPI, 30 days ending 2026-11-30 · data: Kelverin Met Service (fictitious)"
	page := pageEncodeT(t, in)
	if len(page) > 2<<20 {
		t.Errorf("page of 500,000 stations is %d bytes, want under 2 MB", len(page))
	}
	m := regexp.MustCompile(`(?s)<script type="application/json" id="drygrid-stations">(.*?)</script>`).FindStringSubmatch(page)
	if m == nil {
		t.Fatal("no station layer in the page")
	}
	var doc struct {
		Type     string            `json:"type"`
		Date     string            `json:"date"`
		Features []json.RawMessage `json:"features"`
	}
	if err := json.Unmarshal([]byte(m[1]), &doc); err != nil {
		t.Fatalf("embedded station layer: %v", err)
	}
	n := len(doc.Features)
	if n > DefaultMaxStations || n < DefaultMaxStations/4 || doc.Type != "FeatureCollection" || doc.Date != "2026-11-30" {
		t.Errorf("embedded %d stations (want %d..%d), type %q, date %q", n, DefaultMaxStations/4, DefaultMaxStations, doc.Type, doc.Date)
	}
	for _, want := range []string{layer.GroupThousands(strconv.Itoa(n)) + " of 500,000 stations shown", `<a href="stations.geojson">stations.geojson</a>`, in.Produced} {
		if !strings.Contains(page, want) {
			t.Errorf("page lacks %q", want)
		}
	}
	if again := pageEncodeT(t, in); again != page {
		t.Error("the thinned page differs between runs")
	}
	in.StationsGeoJSON = few
	small := pageEncodeT(t, in)
	if strings.Contains(small, "stations shown") || !strings.Contains(small, string(bytes.ReplaceAll(few, []byte("<"), []byte(`\u003c`)))) {
		t.Error("a page of few stations must embed them as given, with no note")
	}
}

// TestPageThinnedInChromium opens the page of 500,000 invented stations in
// headless Chromium (Debian's chromium package, the page's outside
// reference): the script renders every embedded station with no error, no
// CSP violation, no resource load and nothing on the console.
func TestPageThinnedInChromium(t *testing.T) {
	chromium := reftest.Tool(t, "chromium")
	f := layertest.NewFixture(t, 164, -48, 178, -34, 0.1)
	in := pageFixtureInput(t, f)
	in.StationsGeoJSON = pageManyStations(f, 500000)
	in.StationsHref = "stations.geojson"
	file := filepath.Join(t.TempDir(), "map.html")
	if err := WriteFile(file, in); err != nil {
		t.Fatal(err)
	}
	page, _ := os.ReadFile(file)
	shown := strings.Count(string(page), `"type":"Point"`)
	dom, a, logs := pageDumpDOM(t, chromium, file)
	pageWantBody(t, a, map[string]string{
		"data-rendered": "1", "data-errors": "0", "data-csp-violations": "0", "data-resources": "0",
		"data-stations-drawn": strconv.Itoa(shown),
	})
	if shown > DefaultMaxStations || !strings.Contains(dom, `href="stations.geojson"`) {
		t.Errorf("%d stations embedded; link in the DOM: %v", shown, strings.Contains(dom, `href="stations.geojson"`))
	}
	pageQuietConsole(t, logs)
}
