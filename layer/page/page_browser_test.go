package page

import (
	"bytes"
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"testing"
	"time"

	"drygrid/internal/layertest"
	"drygrid/internal/reftest"
)

// pageChromium runs Debian's headless Chromium on a local file with every
// network path shut (no background traffic, host names resolve nowhere) and
// gives its stdout and stderr. extra adds --dump-dom or --screenshot=FILE.
func pageChromium(t *testing.T, chromium, file string, extra ...string) (stdout, stderr string) {
	t.Helper()
	args := []string{"--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
		"--disable-background-networking", "--disable-component-update", "--disable-sync",
		"--disable-default-apps", "--disable-extensions", "--mute-audio",
		"--user-data-dir=" + t.TempDir(), "--enable-logging=stderr", "--v=0",
		"--host-resolver-rules=MAP * ~NOTFOUND", "--window-size=1400,1000", "--virtual-time-budget=3000"}
	args = append(args, extra...)
	args = append(args, "file://"+file)
	ctx, cancel := context.WithTimeout(context.Background(), 3*time.Minute)
	defer cancel()
	cmd := exec.CommandContext(ctx, chromium, args...)
	var o, e bytes.Buffer
	cmd.Stdout, cmd.Stderr = &o, &e
	if err := cmd.Run(); err != nil {
		t.Fatalf("chromium %v: %v\n%s", extra, err, e.String())
	}
	return o.String(), e.String()
}

// pageBodyAttrs reads the attributes of the dumped DOM's <body> tag.
func pageBodyAttrs(t *testing.T, dom string) map[string]string {
	t.Helper()
	m := regexp.MustCompile(`(?s)<body([^>]*)>`).FindStringSubmatch(dom)
	if m == nil {
		t.Fatalf("no <body> in the dumped DOM:\n%.2000s", dom)
	}
	out := map[string]string{}
	for _, a := range regexp.MustCompile(`([a-z-]+)="([^"]*)"`).FindAllStringSubmatch(m[1], -1) {
		out[a[1]] = a[2]
	}
	return out
}

// pageWriteSelfCheck writes the page of in, with the self-check script
// (pageSelfCheckJS) appended to its own, to path.
func pageWriteSelfCheck(t *testing.T, path string, in Input) {
	t.Helper()
	var page bytes.Buffer
	if err := pageEncode(&page, in, pageSelfCheckJS); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, page.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
}

// pageDumpDOM opens file in Chromium (pageChromium) with --dump-dom and
// gives the DOM after the page ran, its <body> attributes and Chromium's
// log.
func pageDumpDOM(t *testing.T, chromium, file string) (dom string, body map[string]string, logs string) {
	t.Helper()
	dom, logs = pageChromium(t, chromium, file, "--dump-dom")
	return dom, pageBodyAttrs(t, dom), logs
}

// pageWantBody checks the <body> attributes a against want.
func pageWantBody(t *testing.T, a, want map[string]string) {
	t.Helper()
	for k, w := range want {
		if a[k] != w {
			t.Errorf("body %s = %q, want %q (last error %q, last violation %q)", k, a[k], w, a["data-last-error"], a["data-last-violation"])
		}
	}
}

// pageQuietConsole fails on any console message, refused load or Content
// Security Policy report in Chromium's log.
func pageQuietConsole(t *testing.T, logs string) {
	t.Helper()
	for _, ln := range strings.Split(logs, "\n") {
		if strings.Contains(ln, "CONSOLE") || strings.Contains(ln, "Refused to") || strings.Contains(ln, "Content Security Policy") {
			t.Errorf("chromium console: %s", ln)
		}
	}
}

// TestPageInChromium opens map.html from disk in headless Chromium (Debian's
// chromium package, the page's outside reference) and checks, from the DOM
// Chromium dumps after running the page: the script rendered every layer
// with no error; no Content-Security-Policy violation and no resource load
// happened (Resource Timing, W3C); all nine legend labels are laid out; a
// station and a region show their tooltips; wheel zoom moves the view; the
// table sorts. Chromium's console log must hold no message at all.
func TestPageInChromium(t *testing.T) {
	chromium := reftest.Tool(t, "chromium")
	f := layertest.NewFixture(t, 170, -25, -165, -10, 0.25) // crosses the antimeridian
	in := pageFixtureInput(t, f)
	file := filepath.Join(t.TempDir(), "map.html")
	pageWriteSelfCheck(t, file, in)
	dom, a, logs := pageDumpDOM(t, chromium, file)
	t.Logf("body attributes after the run: %v", a)

	nStations := strings.Count(string(in.StationsGeoJSON), `"type":"Point"`)
	nBands := strings.Count(string(in.BandsGeoJSON), `"type":"MultiPolygon"`)
	pageWantBody(t, a, map[string]string{
		"data-rendered": "1", "data-errors": "0", "data-csp-violations": "0", "data-resources": "0",
		"data-legend-shown": "10", // nine bands and the no-data entry
		"data-bands-drawn":  strconv.Itoa(nBands), "data-stations-drawn": strconv.Itoa(nStations), "data-regions-drawn": "3",
		"data-selfcheck": "1", "data-zoomed": "true",
	})
	if nBands != 9 {
		t.Errorf("fixture draws %d bands, want all 9", nBands)
	}
	for _, b := range in.Scheme.Bands {
		if !strings.Contains(dom, `<span class="legend-label">`+b.Label+`</span>`) {
			t.Errorf("legend label %q missing from the rendered page", b.Label)
		}
	}
	if s := a["data-tip-station"]; !strings.Contains(s, "Station KV001") || !strings.Contains(s, "z: ") {
		t.Errorf("station tooltip = %q, want the id and z", s)
	}
	if s := a["data-tip-region"]; !strings.Contains(s, in.Regions[0].Name) || !strings.Contains(s, "In drought:") {
		t.Errorf("region tooltip = %q, want %s and its drought share", s, in.Regions[0].Name)
	}
	if a["data-grat-labels"] == "" || a["data-grat-labels"] == "0" {
		t.Errorf("no graticule labels drawn")
	}
	// Sorting "In drought %" twice gives descending order.
	rows := append([]RegionRow(nil), in.Regions...)
	sort.SliceStable(rows, func(i, j int) bool { return rows[i].InDroughtPct > rows[j].InDroughtPct })
	var want []string
	for _, r := range rows {
		want = append(want, r.Name)
	}
	if got := a["data-sorted"]; got != strings.Join(want, "|") {
		t.Errorf("table sorted by in-drought share descending = %q, want %q", got, strings.Join(want, "|"))
	}
	pageQuietConsole(t, logs)
	if out := os.Getenv("DRYGRID_PAGE_OUT"); out != "" {
		plain := filepath.Join(out, "map.html")
		if err := WriteFile(plain, in); err != nil {
			t.Fatal(err)
		}
		shot := filepath.Join(out, "map-screenshot.png")
		pageChromium(t, chromium, plain, "--screenshot="+shot)
		t.Logf("screenshot: %s", shot)
	}
}
