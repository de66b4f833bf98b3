package main

import (
	"bufio"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

const badDir = "../../testdata/bad"

// corpusCase is one line of testdata/bad/expected.tsv.
type corpusCase struct {
	file, kind string
	exit       int
	want       string
	line       int
}

func readCorpus(t *testing.T) []corpusCase {
	t.Helper()
	f, err := os.Open(filepath.Join(badDir, "expected.tsv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var out []corpusCase
	sc := bufio.NewScanner(f)
	for n := 1; sc.Scan(); n++ {
		l := sc.Text()
		if l == "" || strings.HasPrefix(l, "#") {
			continue
		}
		parts := strings.SplitN(l, "\t", 4)
		if len(parts) != 4 {
			t.Fatalf("expected.tsv line %d: want 4 tab-separated fields", n)
		}
		code, err := strconv.Atoi(parts[2])
		if err != nil {
			t.Fatalf("expected.tsv line %d: exit %q", n, parts[2])
		}
		out = append(out, corpusCase{parts[0], parts[1], code, parts[3], n})
	}
	return out
}

// captureStderr runs f with os.Stderr sent to a file and returns what was
// written.
func captureStderr(t *testing.T, f func()) string {
	t.Helper()
	tmp, err := os.CreateTemp(t.TempDir(), "stderr")
	if err != nil {
		t.Fatal(err)
	}
	prev := os.Stderr
	os.Stderr = tmp
	defer func() { os.Stderr = prev }()
	f()
	tmp.Seek(0, io.SeekStart)
	b, _ := io.ReadAll(tmp)
	tmp.Close()
	return string(b)
}

// TestBadInputCorpus runs the real command on every file of testdata/bad and
// checks the exit code and the message (file, line and column, or feature
// index), that nothing panics, and that an earlier output directory is left
// byte-identical. The expected messages are in
// testdata/bad/expected.tsv; the files are made by testdata/bad/make_corpus.py.
func TestBadInputCorpus(t *testing.T) {
	cases := readCorpus(t)
	if len(cases) < 30 {
		t.Fatalf("corpus has %d cases, want at least 30", len(cases))
	}
	listed := map[string]bool{}
	for _, c := range cases {
		listed[c.file] = true
	}
	entries, _ := os.ReadDir(badDir)
	for _, e := range entries {
		if n := e.Name(); n != "expected.tsv" && n != "make_corpus.py" && !listed[n] {
			t.Errorf("testdata/bad/%s has no line in expected.tsv", n)
		}
	}
	dir := t.TempDir()
	out := filepath.Join(dir, "layers")
	if code := run([]string{"grid", "--stations", exampleSPI, "--layers", "index,bands", "--out", out}); code != exitOK {
		t.Fatalf("first run: exit %d", code)
	}
	before := hashDir(t, out)
	never := filepath.Join(badDir, "never-written")
	for _, c := range cases {
		t.Run(c.file, func(t *testing.T) {
			p := filepath.Join(badDir, c.file)
			var args []string
			switch c.kind {
			case "values":
				args = []string{"grid", "--stations", p, "--layers", "index", "--out", out}
			case "pct":
				args = []string{"grid", "--stations", p, "--kind", "percentile", "--layers", "index", "--out", out}
			case "pon":
				args = []string{"grid", "--stations", p, "--kind", "pct-of-normal", "--layers", "index", "--out", out}
			case "ponscheme":
				args = []string{"grid", "--stations", "../../testdata/stations/pct_of_normal.csv", "--kind", "pct-of-normal", "--scheme", p, "--layers", "index", "--out", out}
			case "totals":
				args = []string{"index", "--totals", p, "--stations", "../../testdata/index/stations.csv", "--out", filepath.Join(out, "i.csv")}
			case "stationlist":
				args = []string{"index", "--totals", "../../testdata/index/totals.csv", "--stations", p, "--out", filepath.Join(out, "i.csv")}
			case "regions":
				args = []string{"grid", "--stations", exampleSPI, "--regions", p, "--layers", "index", "--out", out}
			case "mask":
				args = []string{"grid", "--stations", exampleSPI, "--mask", p, "--layers", "index", "--out", out}
			case "scheme":
				args = []string{"grid", "--stations", exampleSPI, "--scheme", p, "--layers", "index", "--out", out}
			case "job":
				args = []string{"run", p}
			case "daily":
				args = []string{"totals", "--daily", p, "--date", "2021-01-31", "--windows", "30", "--out", filepath.Join(out, "t.csv")}
			default:
				t.Fatalf("expected.tsv line %d: unknown kind %q", c.line, c.kind)
			}
			var code int
			msg := captureStderr(t, func() { code = run(args) })
			if code != c.exit {
				t.Errorf("exit %d, want %d; stderr:\n%s", code, c.exit, msg)
			}
			want := "drygrid: " + strings.NewReplacer("{file}", p, "{dir}", badDir).Replace(c.want)
			if !strings.Contains(msg, want) {
				t.Errorf("stderr:\n%s\nwant it to contain:\n%s", msg, want)
			}
			if strings.Contains(msg, "panic") || strings.Contains(msg, "goroutine ") {
				t.Errorf("panicked:\n%s", msg)
			}
			if _, err := os.Stat(never); err == nil {
				os.RemoveAll(never)
				t.Errorf("the job wrote its output directory")
			}
		})
	}
	after := hashDir(t, out)
	if len(after) != len(before) {
		t.Errorf("output files changed: %v -> %v", before, after)
	}
	for name, h := range before {
		if after[name] != h {
			t.Errorf("%s changed after the bad runs", name)
		}
	}
}
