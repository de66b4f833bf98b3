package page

import (
	"bytes"
	"crypto/sha256"
	"encoding/base64"
	"encoding/json"
	"html"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"regexp"
	"runtime"
	"strings"
	"testing"

	"drygrid/bands"
	"drygrid/internal/layertest"
	"drygrid/internal/reftest"
	"drygrid/layer"
)

func pageEncodeT(t *testing.T, in Input) string {
	t.Helper()
	var b bytes.Buffer
	if err := Encode(&b, in); err != nil {
		t.Fatal(err)
	}
	return b.String()
}

// TestPageCSPHashes: the page's Content-Security-Policy allows nothing by
// default, and its script-src and style-src hashes are the SHA-256 of the
// exact inline text (CSP Level 3, W3C, "hash-source": base64 of the digest
// of the element's content), so the browser runs exactly this code.
func TestPageCSPHashes(t *testing.T) {
	page := pageEncodeT(t, pageFixtureInput(t, layertest.NewFixture(t, 164, -48, 178, -34, 0.5)))
	m := regexp.MustCompile(`<meta http-equiv="Content-Security-Policy" content="([^"]+)">`).FindStringSubmatch(page)
	if m == nil {
		t.Fatal("no CSP meta")
	}
	csp := html.UnescapeString(m[1]) // attribute text as the browser reads it
	if !strings.HasPrefix(csp, "default-src 'none';") {
		t.Errorf("CSP %q must start with default-src 'none'", csp)
	}
	hash := func(s string) string {
		h := sha256.Sum256([]byte(s))
		return "'sha256-" + base64.StdEncoding.EncodeToString(h[:]) + "'"
	}
	scripts := regexp.MustCompile(`(?s)<script>(.*?)</script>`).FindAllStringSubmatch(page, -1)
	styles := regexp.MustCompile(`(?s)<style>(.*?)</style>`).FindAllStringSubmatch(page, -1)
	if len(scripts) != 1 || len(styles) != 1 {
		t.Fatalf("%d inline scripts and %d styles, want one each", len(scripts), len(styles))
	}
	if !strings.Contains(csp, "script-src "+hash(scripts[0][1])+";") || !strings.Contains(csp, "style-src "+hash(styles[0][1])+";") {
		t.Errorf("CSP %q does not hold the hashes of the inline script and style", csp)
	}
	for _, bad := range []string{"unsafe-eval", "http:", "https:", "*", "data: 'self'", "connect-src"} {
		if strings.Contains(csp, bad) {
			t.Errorf("CSP %q allows %q", csp, bad)
		}
	}
}

// TestPageNoNetworkReferences: nothing in the page points off it. No
// http(s) or protocol-relative URL anywhere, and every src/href/url() is a
// fragment; the script calls no fetch, XMLHttpRequest, import(), WebSocket,
// EventSource or sendBeacon.
func TestPageNoNetworkReferences(t *testing.T) {
	plain := pageEncodeT(t, pageFixtureInput(t, layertest.NewFixture(t, 170, -25, -165, -10, 0.5)))
	// A page showing a subset of its stations links the whole layer beside
	// it, the one relative link allowed (a link the reader follows, not a
	// load: the page renders the same without the file).
	f := layertest.NewFixture(t, 170, -25, -165, -10, 0.5)
	in := pageFixtureInput(t, f)
	in.StationsGeoJSON, in.StationsHref, in.MaxStations = pageManyStations(f, 3000), "stations.geojson", 500
	thinned := pageEncodeT(t, in)
	if strings.Count(thinned, `href="stations.geojson"`) != 1 {
		t.Error("thinned page does not link stations.geojson once")
	}
	for _, page := range []string{plain, strings.Replace(thinned, `href="stations.geojson"`, `href="#"`, 1)} {
		for _, re := range []string{`https?:`, `(src|href|action)\s*=\s*"[^#"]`, `url\(\s*['"]?[^#'"\s]`, `["'(=]\s*//[a-zA-Z0-9]`,
			`\bfetch\s*\(`, `XMLHttpRequest`, `\bimport\s*\(`, `WebSocket`, `EventSource`, `sendBeacon`, `<link\b`, `<iframe\b`, `<img\b`} {
			if loc := regexp.MustCompile(re).FindStringIndex(page); loc != nil {
				lo, hi := max(0, loc[0]-40), min(len(page), loc[1]+40)
				t.Errorf("page matches %s: ...%s...", re, page[lo:hi])
			}
		}
	}
}

// TestPageWellFormed checks the page with Python's standard html.parser
// (testdata/page/html_check.py): doctype, lang, title, elements closed,
// unique ids, named buttons, scoped header cells, no outside references.
func TestPageWellFormed(t *testing.T) {
	py := reftest.Python(t, "html.parser")
	for _, in := range []Input{
		pageFixtureInput(t, layertest.NewFixture(t, 164, -48, 178, -34, 0.5)),
		{Scheme: bands.Default(), BBox: [4]float64{-180, -90, 180, 90}}, // no layers, no regions
	} {
		file := filepath.Join(t.TempDir(), "map.html")
		if err := WriteFile(file, in); err != nil {
			t.Fatal(err)
		}
		if out := strings.TrimSpace(string(reftest.RunPython(t, py, "../../testdata/page/html_check.py", nil, file))); out != "ok" {
			t.Errorf("html_check.py:\n%s", out)
		}
	}
}

// TestPageContent: the caution (ours by default, at the top and the foot),
// every band's label, colour and range in the legend, the no-data entry, the
// region table with a row per region and a column per band, and the
// title escaped as text.
func TestPageContent(t *testing.T) {
	in := pageFixtureInput(t, layertest.NewFixture(t, 164, -48, 178, -34, 0.5))
	in.Title = `Rain <b>&</b> "drought"`
	page := pageEncodeT(t, in)
	if strings.Count(page, layer.Caution) != 2 {
		t.Errorf("caution appears %d times, want 2", strings.Count(page, layer.Caution))
	}
	if !strings.Contains(page, "<h1>Rain &lt;b&gt;&amp;&lt;/b&gt; &#34;drought&#34;</h1>") {
		t.Error("title not escaped as text")
	}
	want := map[string]string{ // docs/design.md's "Default bands" table; ranges from its z-range column
		"Parched": "z ≤ -2.0", "Very dry": "-2.0 &lt; z ≤ -1.5", "Dry": "-1.5 &lt; z ≤ -1.0", "Slightly dry": "-1.0 &lt; z ≤ -0.5",
		"Near normal": "-0.5 &lt; z &lt; 0.5", "Slightly wet": "0.5 ≤ z &lt; 1.0", "Wet": "1.0 ≤ z &lt; 1.5", "Very wet": "1.5 ≤ z &lt; 2.0", "Soaked": "z ≥ 2.0",
	}
	for _, b := range bands.Default().Bands {
		item := `fill="` + layertest.BrewerBrBG9[b.Code] + `" stroke="#808080"></rect></svg><span class="legend-label">` + b.Label +
			`</span><span class="legend-range">` + want[b.Label] + `</span>`
		if !strings.Contains(page, item) {
			t.Errorf("legend lacks %s with colour %s and range %s", b.Label, layertest.BrewerBrBG9[b.Code], want[b.Label])
		}
	}
	if !strings.Contains(page, `<span class="legend-label">No data (too few stations)</span>`) {
		t.Error("legend lacks the no-data entry")
	}
	body := page[strings.Index(page, "<tbody>"):strings.Index(page, "</tbody>")]
	if n := strings.Count(body, "<tr>"); n != len(in.Regions) {
		t.Errorf("table has %d rows, want %d", n, len(in.Regions))
	}
	if n := strings.Count(body, "<td "); n != len(in.Regions)*(4+9) {
		t.Errorf("table has %d cells, want %d", n, len(in.Regions)*13)
	}
	custom := in
	custom.Caution = "Estimates; ask the service."
	if p := pageEncodeT(t, custom); !strings.Contains(p, "Estimates; ask the service.") || strings.Contains(p, layer.Caution) {
		t.Error("a given caution must replace the default")
	}
}

// TestPageEmbedsSafely: a property holding "</script>" cannot end the data
// block, and the block still decodes to the document given.
func TestPageEmbedsSafely(t *testing.T) {
	doc := `{"type":"FeatureCollection","features":[{"type":"Feature","geometry":{"type":"Point","coordinates":[1,2]},` +
		`"properties":{"id":"</script><script>alert(1)</script><!--","value":1,"z":0.1,"code":5,"key":"normal","in_grid":true}}]}`
	in := Input{Scheme: bands.Default(), StationsGeoJSON: []byte(doc), BBox: [4]float64{0, 0, 10, 10}}
	page := pageEncodeT(t, in)
	if n, m := strings.Count(page, "<script"), strings.Count(page, "</script>"); n != 5 || m != 5 {
		t.Errorf("%d <script and %d </script>, want 5 each", n, m)
	}
	blk := regexp.MustCompile(`(?s)<script type="application/json" id="drygrid-stations">(.*?)</script>`).FindStringSubmatch(page)
	if blk == nil {
		t.Fatal("no stations block")
	}
	var got, want any
	if err := json.Unmarshal([]byte(blk[1]), &got); err != nil {
		t.Fatal(err)
	}
	json.Unmarshal([]byte(doc), &want)
	if !reflect.DeepEqual(got, want) {
		t.Errorf("embedded stations decode to %v, want %v", got, want)
	}
}

// TestPageRejects: errors name what is wrong.
func TestPageRejects(t *testing.T) {
	ok := [4]float64{0, 0, 10, 10}
	for name, c := range map[string]struct {
		in   Input
		want string
	}{
		"no scheme":     {Input{BBox: ok}, "no band scheme"},
		"bad bbox":      {Input{Scheme: bands.Default(), BBox: [4]float64{10, 0, 0, 10}}, "bbox"},
		"NaN bbox":      {Input{Scheme: bands.Default(), BBox: [4]float64{math.NaN(), 0, 1, 1}}, "not finite"},
		"wide bbox":     {Input{Scheme: bands.Default(), BBox: [4]float64{-180, 0, 200, 1}}, "bbox"},
		"bad bands":     {Input{Scheme: bands.Default(), BBox: ok, BandsGeoJSON: []byte(`{"type":`)}, "bands GeoJSON"},
		"bad regions":   {Input{Scheme: bands.Default(), BBox: ok, RegionsGeoJSON: []byte(`{} {}`)}, "regions GeoJSON"},
		"bad colour":    {Input{Scheme: &bands.Scheme{Bands: []bands.Band{{Code: 1, Key: "a", Label: "A", Color: "red"}}}, BBox: ok}, "colour"},
		"colour inject": {Input{Scheme: &bands.Scheme{Bands: []bands.Band{{Code: 1, Key: "a", Label: "A", Color: `#aabbcc"x`}}}, BBox: ok}, "colour"},
	} {
		var b bytes.Buffer
		err := Encode(&b, c.in)
		if err == nil || !strings.Contains(err.Error(), c.want) || !strings.HasPrefix(err.Error(), "page: ") {
			t.Errorf("%s: err = %v, want a page: error about %s", name, err, c.want)
		}
	}
	// NaN statistics are shown as a dash and sent as JSON null.
	in := Input{Scheme: bands.Default(), BBox: ok, Regions: []RegionRow{{Name: "Empty", MeanZ: math.NaN(), CoveredPct: 0, SharePct: map[string]float64{"dry": math.Inf(1)}}}}
	p := pageEncodeT(t, in)
	if !strings.Contains(p, `<td data-v="">–</td>`) || !strings.Contains(p, `"mean_z":null`) {
		t.Error("NaN mean z must show as a dash and encode as null")
	}
}

// TestPageDeterministic: the same input gives the same bytes for any
// GOMAXPROCS; maps (shares) are written in a fixed order.
func TestPageDeterministic(t *testing.T) {
	in := pageFixtureInput(t, layertest.NewFixture(t, 164, -48, 178, -34, 0.5))
	var first string
	for i, procs := range []int{1, 2, 1, 2} {
		prev := runtime.GOMAXPROCS(procs)
		p := pageEncodeT(t, in)
		runtime.GOMAXPROCS(prev)
		if i == 0 {
			first = p
		} else if p != first {
			t.Fatal("page bytes differ between runs")
		}
	}
	file := filepath.Join(t.TempDir(), "map.html")
	if err := WriteFile(file, in); err != nil {
		t.Fatal(err)
	}
	if b, err := os.ReadFile(file); err != nil || string(b) != first {
		t.Errorf("WriteFile wrote different bytes from Encode (%v)", err)
	}
}

// pageEmbedJSON is what the page does to each JSON document it embeds:
// pageCheckJSON when the view is built (empty input is a null slot), then
// pageWriteEscaped when writeSlots writes the slot.
func pageEmbedJSON(b []byte) (string, error) {
	doc, err := pageCheckJSON(b)
	if err != nil || doc == nil {
		return "null", err
	}
	var sb strings.Builder
	if err := pageWriteEscaped(&sb, doc); err != nil {
		return "", err
	}
	return sb.String(), nil
}

// FuzzPageEmbedJSON: for any input the embedder either refuses it or gives
// text holding no "<" that decodes to the same JSON value (so no input can
// close the script block or change the data).
func FuzzPageEmbedJSON(f *testing.F) {
	for _, s := range []string{``, `null`, `{"a":"</script>"}`, `[1,2,"<!--"]`, `"\u2028"`, `{"type":"FeatureCollection","features":[]}`, `{`, `1 2`} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, b []byte) {
		s, err := pageEmbedJSON(b)
		if err != nil {
			if json.Valid(b) && len(bytes.Trim(b, " \t\r\n")) > 0 {
				t.Fatalf("valid JSON %q refused: %v", b, err)
			}
			return
		}
		if strings.Contains(s, "<") {
			t.Fatalf("embedded text %q holds <", s)
		}
		if len(bytes.Trim(b, " \t\r\n")) == 0 {
			if s != "null" {
				t.Fatalf("empty input gave %q", s)
			}
			return
		}
		// Numbers stay text (UseNumber): 1e400 is valid JSON, not a float64.
		dec := func(b []byte, v *any) error {
			d := json.NewDecoder(bytes.NewReader(b))
			d.UseNumber()
			return d.Decode(v)
		}
		var x, y any
		if err := dec(b, &x); err != nil {
			t.Fatalf("accepted invalid JSON %q", b)
		}
		if err := dec([]byte(s), &y); err != nil {
			t.Fatalf("embedded text %q does not decode: %v", s, err)
		}
		if !reflect.DeepEqual(x, y) {
			t.Fatalf("embedded %q decodes to %v, input %v", s, y, x)
		}
	})
}
