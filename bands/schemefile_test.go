package bands

import (
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"
)

// The example file must reproduce Default() exactly; Default() is checked
// against the band table in band_test.go.
func TestExampleSchemeIsDefault(t *testing.T) {
	s, err := ParseScheme("example.toml", []byte(ExampleSchemeTOML()))
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(s, Default()) {
		t.Fatalf("example parses to\n%+v\nwant Default()\n%+v", s, Default())
	}
	if !strings.Contains(ExampleSchemeTOML(), "not official") {
		t.Error("the example must say the maps are estimates, not official declarations")
	}
}

func TestLoadScheme(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "coarse.toml")
	if err := os.WriteFile(path, []byte(schemeCoarse), 0o644); err != nil {
		t.Fatal(err)
	}
	s, err := LoadScheme(path)
	if err != nil {
		t.Fatal(err)
	}
	if s.Name != "coarse" {
		t.Errorf("name %q, want the file name without extension", s.Name)
	}
	if _, err := LoadScheme(filepath.Join(dir, "missing.toml")); err == nil || !strings.Contains(err.Error(), "missing.toml") {
		t.Errorf("missing file: %v", err)
	}
}

// Four bands by hand from the doc comment's example: with "outer",
// -1.5 and -0.5 go to the band below, 0.5 to the band above.
const schemeCoarse = `cuts = [-1.5, -0.5, 0.5]
cut_belongs_to = "outer"
[[band]]
key = "dry"
label = "Dry"
color = "#BF812D"
drought = true
[[band]]
key = "dryish"
label = "Dryish"
color = "#dfc27d"
[[band]]
key = "normal-ish"
label = "Near normal"
color = "#f5f5f5"
[[band]]
key = "wet"
label = "Wet"
color = "#80cdc1"
`

func TestParseSchemeRules(t *testing.T) {
	inf := math.Inf(1)
	type rng struct {
		min, max     float64
		minIn, maxIn bool
	}
	cases := []struct {
		rule string
		want []rng
	}{
		{"outer", []rng{{-inf, -1.5, false, true}, {-1.5, -0.5, false, true}, {-0.5, 0.5, false, false}, {0.5, inf, true, false}}},
		{"lower", []rng{{-inf, -1.5, false, true}, {-1.5, -0.5, false, true}, {-0.5, 0.5, false, true}, {0.5, inf, false, false}}},
		{"upper", []rng{{-inf, -1.5, false, false}, {-1.5, -0.5, true, false}, {-0.5, 0.5, true, false}, {0.5, inf, true, false}}},
	}
	for _, c := range cases {
		data := strings.Replace(schemeCoarse, `"outer"`, `"`+c.rule+`"`, 1)
		s, err := ParseScheme("x.toml", []byte(data))
		if err != nil {
			t.Fatalf("%s: %v", c.rule, err)
		}
		for i, w := range c.want {
			b := s.Bands[i]
			if b.Min != w.min || b.Max != w.max || b.MinInclusive != w.minIn || b.MaxInclusive != w.maxIn {
				t.Errorf("%s band %d: %s, want %+v", c.rule, i+1, b.Range(), w)
			}
			if b.Code != uint8(i+1) {
				t.Errorf("%s band %d code %d", c.rule, i+1, b.Code)
			}
		}
		if s.Bands[0].Color != "#bf812d" {
			t.Errorf("colour not normalised to lower case: %s", s.Bands[0].Color)
		}
	}
}

func TestParseSchemeExplicitCodes(t *testing.T) {
	data := `cuts = [0.0]
cut_belongs_to = "lower"
[[band]]
key = "low"
label = "Low"
color = "#000000"
drought = true
code = 10
[[band]]
key = "high"
label = "High"
color = "#ffffff"
code = 20
`
	s, err := ParseScheme("c.toml", []byte(data))
	if err != nil {
		t.Fatal(err)
	}
	if s.Bands[0].Code != 10 || s.Bands[1].Code != 20 || s.MaxCode() != 20 {
		t.Errorf("codes %d %d", s.Bands[0].Code, s.Bands[1].Code)
	}
	if s.Classify(0) != 10 || s.Classify(math.Nextafter(0, 1)) != 20 {
		t.Errorf("cut at 0 with lower: %d %d", s.Classify(0), s.Classify(math.Nextafter(0, 1)))
	}
}

// Each bad file gives an error naming the file, the line where the
// trouble is, and what is wrong.
func TestParseSchemeErrors(t *testing.T) {
	// band makes a [[band]] table: header, key, label, color lines, then the
	// extra lines, or one blank line when there are none.
	band := func(key string, extra ...string) string {
		return "[[band]]\nkey = \"" + key + "\"\nlabel = \"L\"\ncolor = \"#000000\"\n" + strings.Join(extra, "\n") + "\n"
	}
	two := "cuts = [0.5]\ncut_belongs_to = \"outer\"\n"
	cases := []struct {
		name string
		data string
		want string // substring of the error
	}{
		{"toml syntax", "cuts = [0.5\n", "scheme bad.toml line 1 column 12"},
		{"wrong type", "cuts = \"x\"\n", "scheme bad.toml line 1: key cuts"},
		{"unknown top key", two + "colour = 1\n" + band("a") + band("b"), `line 3: unknown key "colour" at the top level`},
		{"unknown band key", two + band("a") + band("b", `colour = "#ffffff"`), `line 12: unknown key "colour" in [[band]] 2`},
		{"did you mean", two + band("a", `colour = "#ffffff"`) + band("b"), `did you mean "color"`},
		{"unknown table", two + "[meta]\nx = 1\n" + band("a") + band("b"), `line 3: unknown key "meta"`},
		{"no cuts", "cut_belongs_to = \"outer\"\n" + band("a"), "cuts is missing"},
		{"cuts not increasing", "cuts = [1.0, 0.5]\ncut_belongs_to = \"outer\"\n" + band("a") + band("b") + band("c"), "line 1: cuts must increase strictly"},
		{"repeated cut", "cuts = [0.5, 0.5]\ncut_belongs_to = \"outer\"\n" + band("a") + band("b") + band("c"), "must increase strictly"},
		{"infinite cut", "cuts = [-inf, 0.5]\ncut_belongs_to = \"outer\"\n" + band("a") + band("b") + band("c"), "must be finite"},
		{"nan cut", "cuts = [nan]\ncut_belongs_to = \"outer\"\n" + band("a") + band("b"), "must be finite"},
		{"no rule", "cuts = [0.5]\n" + band("a") + band("b"), "cut_belongs_to is missing"},
		{"bad rule", "cuts = [0.5]\ncut_belongs_to = \"middle\"\n" + band("a") + band("b"), `line 2: cut_belongs_to is "middle"`},
		{"outer at zero", "cuts = [0.0]\ncut_belongs_to = \"outer\"\n" + band("a") + band("b"), "line 2: a cut at 0 has no outer side"},
		{"too few bands", two + band("a"), "line 1: 1 cuts make 2 bands, but the file has 1"},
		{"too many bands", two + band("a") + band("b") + band("c"), "but the file has 3"},
		{"missing key", two + "[[band]]\nlabel = \"L\"\ncolor = \"#000000\"\n" + band("b"), "line 3: [[band]] 1 has no key"},
		{"missing colour", two + band("a") + "[[band]]\nkey = \"b\"\nlabel = \"L\"\n", "line 8: [[band]] 2 has no color"},
		{"bad key", two + band("A b") + band("b"), `line 4: [[band]] 1 key "A b"`},
		{"duplicate key", two + band("a") + band("a"), `line 9: [[band]] 2 key "a" is already used by [[band]] 1`},
		{"empty label", two + "[[band]]\nkey = \"a\"\nlabel = \" \"\ncolor = \"#000000\"\n" + band("b"), "line 5: [[band]] 1 label"},
		{"control char label", two + "[[band]]\nkey = \"a\"\nlabel = \"x\\u0007\"\ncolor = \"#000000\"\n" + band("b"), "line 5: [[band]] 1 label"},
		{"bad colour", two + band("a") + "[[band]]\nkey = \"b\"\nlabel = \"L\"\ncolor = \"#12345g\"\n", `line 11: [[band]] 2 color "#12345g" is not #rrggbb`},
		{"code 0", two + band("a", "code = 0") + band("b", "code = 2"), "line 7: [[band]] 1 code 0 must be in 1..255"},
		{"code 256", two + band("a", "code = 256") + band("b", "code = 2"), "code 256 must be in 1..255"},
		{"duplicate code", two + band("a", "code = 3") + band("b", "code = 3"), "line 12: [[band]] 2 code 3 is already used by [[band]] 1"},
		{"codes on some bands", two + band("a", "code = 3") + band("b"), "line 8: [[band]] 2 has no code, but other bands do"},
		{"drought above zero", "cuts = [-0.5, 0.5]\ncut_belongs_to = \"outer\"\n" + band("a", "drought = true") + band("b", "drought = true") + band("c"), "line 12: [[band]] 2 (-0.5 < z < 0.5) reaches above z = 0"},
		{"drought band straddling zero", "cuts = [0.5]\ncut_belongs_to = \"outer\"\n" + band("a", "drought = true") + band("b"), "line 7: [[band]] 1 (z < 0.5) reaches above z = 0"},
		{"drought not the driest", "cuts = [-2.0, -1.0]\ncut_belongs_to = \"outer\"\n" + band("a") + band("b", "drought = true") + band("c"), "line 12: [[band]] 2 is a drought band above a band that is not"},
		{"empty name", "name = \"\"\n" + two + band("a") + band("b"), "line 1: name"},
		{"too large", strings.Repeat("#", maxSchemeBytes+1), "larger than"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s, err := ParseScheme("bad.toml", []byte(c.data))
			if err == nil {
				t.Fatalf("accepted: %+v", s)
			}
			if !strings.HasPrefix(err.Error(), "scheme bad.toml") || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %q\nwant it to contain %q", err, c.want)
			}
		})
	}
}

// Files saved on Windows: a UTF-8 byte-order mark and CRLF line ends read
// the same, and error lines still count right.
func TestParseSchemeBOMAndCRLF(t *testing.T) {
	crlf := "\ufeff" + strings.ReplaceAll(ExampleSchemeTOML(), "\n", "\r\n")
	s, err := ParseScheme("win.toml", []byte(crlf))
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(s, Default()) {
		t.Errorf("CRLF example differs from Default()")
	}
	bad := strings.Replace(crlf, `color = "#dfc27d"`, `color = "#dfc27"`, 1)
	_, err = ParseScheme("win.toml", []byte(bad))
	want := "line " + strconv.Itoa(1+strings.Count(strings.Split(ExampleSchemeTOML(), `"#dfc27d"`)[0], "\n")) + ": [[band]] 3 color"
	if err == nil || !strings.Contains(err.Error(), want) {
		t.Errorf("error %v, want %q", err, want)
	}
}

// Keys may be written as an inline array of tables; the positions are then
// coarser but the scheme is the same.
func TestParseSchemeInlineBands(t *testing.T) {
	data := `cuts = [0.5]
cut_belongs_to = "upper"
band = [
  {key = "low", label = "Low", color = "#000000"},
  {key = "high", label = "High", color = "#ffffff"},
]
`
	s, err := ParseScheme("i.toml", []byte(data))
	if err != nil {
		t.Fatal(err)
	}
	if len(s.Bands) != 2 || s.Classify(0.5) != 2 || s.Name != "i" {
		t.Errorf("%+v", s)
	}
}

// Large hostile inputs must stay linear: many tables, many unknown keys.
func BenchmarkParseSchemeHostile(b *testing.B) {
	var tables, keys strings.Builder
	for i := 0; tables.Len() < maxSchemeBytes-20; i++ {
		tables.WriteString("[[band]]\n")
	}
	for i := 0; keys.Len() < maxSchemeBytes-20; i++ {
		keys.WriteString("k")
		keys.WriteString(strings.Repeat("x", i%7))
		keys.WriteString(strconv.Itoa(i))
		keys.WriteString(" = 1\n")
	}
	for _, in := range []struct{ name, data string }{{"tables", tables.String()}, {"keys", keys.String()}} {
		b.Run(in.name, func(b *testing.B) {
			for b.Loop() {
				if _, err := ParseScheme("big.toml", []byte(in.data)); err == nil {
					b.Fatal("accepted")
				}
			}
		})
	}
}

// TestSchemeOldKeys: a scheme file written with the default bands' former
// keys (the example scheme of the previous release, with drying and moist)
// reads as the default scheme's keys, labels as written.
func TestSchemeOldKeys(t *testing.T) {
	text := strings.NewReplacer(`key = "slightly-dry"`, `key = "drying"`, `key = "slightly-wet"`, `key = "moist"`).Replace(ExampleSchemeTOML())
	if text == ExampleSchemeTOML() {
		t.Fatal("the example scheme no longer names the renamed bands")
	}
	s, err := ParseScheme("old.toml", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	want := Default()
	for i, b := range s.Bands {
		if b.Key != want.Bands[i].Key || b.Label != want.Bands[i].Label {
			t.Errorf("band %d: key %q label %q, want %q %q", i+1, b.Key, b.Label, want.Bands[i].Key, want.Bands[i].Label)
		}
	}
}
