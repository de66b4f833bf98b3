package page

import (
	"bytes"
	"crypto/sha256"
	"encoding/base64"
	"html"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"drygrid/internal/layertest"
	"drygrid/internal/reftest"
)

// pageFarDoc is an invented far layer on the antimeridian fixture: a block
// of cells on each side of 180 (RFC 7946: split there).
const pageFarDoc = `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"beyond_km":150},"geometry":{"type":"MultiPolygon","coordinates":[` +
	`[[[175,-20],[180,-20],[180,-15],[175,-15],[175,-20]]],[[[-180,-20],[-175,-20],[-175,-15],[-180,-15],[-180,-20]]]]}}]}`

// TestPageFarLayer: with a far layer the page carries it (its JSON block,
// its group, its patterns and its script), the legend entry "Nearest
// station over 150 km", and a CSP whose script hash is the SHA-256 of the
// whole inline script (CSP Level 3, W3C, "hash-source"); without one (FarKm
// 0, no document) the page is byte for byte the page of an Input that
// never heard of the layer.
func TestPageFarLayer(t *testing.T) {
	f := layertest.NewFixture(t, 170, -25, -165, -10, 0.25)
	base := pageFixtureInput(t, f)
	in := base
	in.FarGeoJSON, in.FarKm = []byte(pageFarDoc), 150
	page := pageEncodeT(t, in)
	for _, s := range []string{`id="drygrid-far"`, `<g id="layer-far"></g>`, `id="far-hatch"`, `id="far-hatch-key"`,
		`<span class="legend-label">Nearest station over 150 km</span>`, `getElementById("layer-far")`} {
		if !strings.Contains(page, s) {
			t.Errorf("page lacks %s", s)
		}
	}
	m := regexp.MustCompile(`<meta http-equiv="Content-Security-Policy" content="([^"]+)">`).FindStringSubmatch(page)
	scripts := regexp.MustCompile(`(?s)<script>(.*?)</script>`).FindAllStringSubmatch(page, -1)
	if m == nil || len(scripts) != 1 {
		t.Fatalf("CSP %v, %d inline scripts", m, len(scripts))
	}
	h := sha256.Sum256([]byte(scripts[0][1]))
	if want := "script-src 'sha256-" + base64.StdEncoding.EncodeToString(h[:]) + "';"; !strings.Contains(html.UnescapeString(m[1]), want) {
		t.Errorf("CSP %q lacks %s", m[1], want)
	}
	var a, b bytes.Buffer
	if err := Encode(&a, base); err != nil {
		t.Fatal(err)
	}
	off := base
	off.FarGeoJSON, off.FarKm = nil, 0
	if err := Encode(&b, off); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a.Bytes(), b.Bytes()) || strings.Contains(a.String(), "far") {
		t.Error("a page without a far layer differs or mentions it")
	}
	bad := base
	bad.FarGeoJSON = []byte(pageFarDoc)
	if err := Encode(&b, bad); err == nil {
		t.Error("a far layer without its distance accepted")
	}
}

// TestPageFarInChromium opens a page with a far layer in headless Chromium
// (Debian's chromium, the page's outside reference): the page renders with
// no error, no CSP violation and no load, the far script draws its one
// feature with the hatch pattern, the legend entry is laid out, and the
// console holds no message.
func TestPageFarInChromium(t *testing.T) {
	chromium := reftest.Tool(t, "chromium")
	f := layertest.NewFixture(t, 170, -25, -165, -10, 0.25)
	in := pageFixtureInput(t, f)
	in.FarGeoJSON, in.FarKm = []byte(pageFarDoc), 150
	file := filepath.Join(t.TempDir(), "map.html")
	pageWriteSelfCheck(t, file, in)
	dom, a, logs := pageDumpDOM(t, chromium, file)
	pageWantBody(t, a, map[string]string{
		"data-rendered": "1", "data-errors": "0", "data-csp-violations": "0", "data-resources": "0",
		"data-far-drawn": "1", "data-selfcheck": "1", "data-zoomed": "true",
	})
	if !regexp.MustCompile(`<path [^>]*fill="url\(#far-hatch\)"[^>]*class="far"`).MatchString(dom) {
		t.Error("no far path with the hatch pattern in the rendered page")
	}
	// The pattern follows the zoom (the self-check zoomed with the wheel).
	if !regexp.MustCompile(`id="far-hatch"[^>]*patternTransform="scale\([0-9.e+-]+\) rotate\(-45\)"`).MatchString(dom) {
		t.Error("the far hatch pattern does not follow the view's scale")
	}
	if !strings.Contains(dom, `<span class="legend-label">Nearest station over 150 km</span>`) {
		t.Error("legend entry missing from the rendered page")
	}
	pageQuietConsole(t, logs)
}
