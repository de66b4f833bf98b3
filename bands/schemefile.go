package bands

import (
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/BurntSushi/toml"

	"drygrid/internal/tomlpos"
	"drygrid/spi"
)

// maxSchemeBytes bounds a scheme file; real ones are a few kilobytes.
const maxSchemeBytes = 1 << 20

// LoadScheme reads a band scheme from a TOML file (the format is described
// at ParseScheme). Errors name the file and, where there is one, the line.
func LoadScheme(path string) (*Scheme, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("scheme %s: %w", path, err)
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, maxSchemeBytes+1))
	if err != nil {
		return nil, fmt.Errorf("scheme %s: %w", path, err)
	}
	return ParseScheme(path, data)
}

// ParseScheme reads a band scheme from TOML; name is the file name used in
// error messages ("scheme NAME line L: ...") and, without directory and
// extension, the scheme's name when the file gives none.
//
// The cut points are written once, as a sorted list, and one rule says
// which band holds a value lying exactly on a cut, so bands can neither
// overlap nor leave a gap:
//
//	name = "coarse"            # optional; default: the file name without extension
//	unit = "z"                 # optional; the unit of the cuts: "z" (SPI units,
//	                           # the default), "percentile" (0-100; cuts strictly
//	                           # inside (0.1, 99.9), turned into z by
//	                           # spi.PercentileToZ) or "pct-of-normal" (percent
//	                           # of normal, cuts above 0). A run takes schemes
//	                           # of its values' unit (Scheme.For).
//	cuts = [-1.5, -0.5, 0.5]   # required: where neighbouring bands meet, in the
//	                           # unit, finite and strictly increasing
//	cut_belongs_to = "outer"   # required: which band holds a value exactly on a cut:
//	                           #   "outer": the one farther from normal (z = 0,
//	                           #            the 50th percentile, 100 % of
//	                           #            normal), i.e. the more unusual one
//	                           #            (drygrid's default scheme; no cut
//	                           #            may then be normal)
//	                           #   "lower": the one below  (bands lo < z <= hi)
//	                           #   "upper": the one above  (bands lo <= z < hi)
//
//	[[band]]                   # one per interval, lowest z (driest) first:
//	key = "dry"                # len(cuts)+1 of them. Required: key, unique,
//	label = "Dry"              # lower-case letters, digits, '-' and '_';
//	color = "#bf812d"          # label; color as "#rrggbb".
//	drought = true             # optional, default false: counts as "in drought";
//	                           # only a run of the driest bands, all at or
//	                           # below normal
//	# code = 1                 # optional raster code 1..255: on every band or
//	                           # on none (then 1, 2, ... in file order)
//	[[band]]
//	key = "normal-ish"
//	label = "Near normal"
//	color = "#f5f5f5"
//	...
//
// With "outer" and the cuts above the bands are z <= -1.5, -1.5 < z <= -0.5,
// -0.5 < z < 0.5 and z >= 0.5. Unknown keys are errors naming the key and its
// line. ExampleSchemeTOML gives a complete file, the default scheme.
func ParseScheme(name string, data []byte) (*Scheme, error) {
	if len(data) > maxSchemeBytes {
		return nil, fmt.Errorf("scheme %s: larger than %d bytes; a band scheme is a few lines", name, maxSchemeBytes)
	}
	var f schemeFile
	md, err := toml.Decode(string(data), &f)
	if err != nil {
		return nil, schemeTOMLError(name, err)
	}
	p := &schemeParser{file: name, data: data}
	if und := md.Undecoded(); len(und) > 0 {
		return nil, p.unknownKey(und)
	}
	return p.build(&f)
}

// ExampleSchemeTOML is a commented scheme file that reproduces Default():
// a starting point for a scheme of one's own.
func ExampleSchemeTOML() string { return exampleSchemeTOML }

const exampleSchemeTOML = `# drygrid band scheme: drygrid's default nine bands.
# Bands classify z, the standardized index (SPI units). The maps are
# interpolated estimates, not official declarations: for drought status
# follow the national meteorological or hydrological service.

name = "drygrid-default"

# The unit of the cuts: "z" (SPI units), "percentile" (0-100, turned into z)
# or "pct-of-normal" (percent of normal). A run takes a scheme of its
# values' unit; a percentile run also takes a z scheme such as this one.
unit = "z"

# Where neighbouring bands meet, lowest first. +/-1.0, 1.5 and 2.0 follow
# McKee et al. (1993) and WMO-No. 1090 (2012); +/-0.5 is drygrid's own.
cuts = [-2.0, -1.5, -1.0, -0.5, 0.5, 1.0, 1.5, 2.0]

# A value exactly on a cut goes to the band farther from zero: -1.0 is "dry",
# +1.0 is "wet". ("lower" or "upper" would give it to the band below or above.)
cut_belongs_to = "outer"

# One [[band]] per interval, lowest z first: len(cuts) + 1 bands. Codes are
# 1, 2, ... in this order unless every band gives "code = N" (1..255).
# Colours: ColorBrewer 9-class BrBG (Brewer, Penn State; Apache-2.0).

[[band]]            # z <= -2.0
key = "parched"
label = "Parched"
color = "#8c510a"
drought = true

[[band]]            # -2.0 < z <= -1.5
key = "very-dry"
label = "Very dry"
color = "#bf812d"
drought = true

[[band]]            # -1.5 < z <= -1.0
key = "dry"
label = "Dry"
color = "#dfc27d"
drought = true

[[band]]            # -1.0 < z <= -0.5
key = "slightly-dry"
label = "Slightly dry"
color = "#f6e8c3"

[[band]]            # -0.5 < z < 0.5
key = "normal"
label = "Near normal"
color = "#f5f5f5"

[[band]]            # 0.5 <= z < 1.0
key = "slightly-wet"
label = "Slightly wet"
color = "#c7eae5"

[[band]]            # 1.0 <= z < 1.5
key = "wet"
label = "Wet"
color = "#80cdc1"

[[band]]            # 1.5 <= z < 2.0
key = "very-wet"
label = "Very wet"
color = "#35978f"

[[band]]            # z >= 2.0
key = "soaked"
label = "Soaked"
color = "#01665e"
`

// OldKeys maps the default bands' former keys to their keys now: a scheme
// file written with the former keys (drying, moist) is read as if it used
// the new ones (slightly-dry, slightly-wet), for one release, so that
// columns and properties named after keys stay those of the default bands.
var OldKeys = map[string]string{"drying": "slightly-dry", "moist": "slightly-wet"}

// schemeFile is the TOML layout read by ParseScheme.
type schemeFile struct {
	Name         *string          `toml:"name"`
	Unit         *string          `toml:"unit"`
	Cuts         []float64        `toml:"cuts"`
	CutBelongsTo *string          `toml:"cut_belongs_to"`
	Band         []schemeFileBand `toml:"band"`
}

type schemeFileBand struct {
	Key     *string `toml:"key"`
	Label   *string `toml:"label"`
	Color   *string `toml:"color"`
	Drought bool    `toml:"drought"`
	Code    *int64  `toml:"code"`
}

var (
	schemeKeyRE    = regexp.MustCompile(`^[a-z0-9][a-z0-9_-]*$`)
	schemeTOMLLine = regexp.MustCompile(`^toml: line (\d+)(?: \(last key "([^"]*)"\))?: (.*)$`)
)

// schemeTOMLError turns a TOML decoding error into "scheme F line L: ...".
func schemeTOMLError(file string, err error) error {
	var pe toml.ParseError
	if errors.As(err, &pe) {
		msg := pe.Message
		if pe.LastKey != "" {
			msg = fmt.Sprintf("after key %q: %s", pe.LastKey, msg)
		}
		if pe.Position.Col > 0 {
			return fmt.Errorf("scheme %s line %d column %d: %s", file, pe.Position.Line, pe.Position.Col, msg)
		}
		return fmt.Errorf("scheme %s line %d: %s", file, pe.Position.Line, msg)
	}
	// Type mismatches come back as plain errors "toml: line L (last key K): ...".
	if m := schemeTOMLLine.FindStringSubmatch(err.Error()); m != nil {
		if m[2] != "" {
			return fmt.Errorf("scheme %s line %s: key %s: %s", file, m[1], m[2], m[3])
		}
		return fmt.Errorf("scheme %s line %s: %s", file, m[1], m[3])
	}
	return fmt.Errorf("scheme %s: %w", file, err)
}

type schemeParser struct {
	file   string
	data   []byte
	inBand map[schemeLineKey]int  // first line of a path in a band (0: outside)
	first  map[string]tomlpos.Key // first place of a path anywhere
}

type schemeLineKey struct {
	path string
	band int
}

// index finds the lines, the first time an error needs one.
func (p *schemeParser) index() {
	if p.first != nil {
		return
	}
	p.inBand, p.first = map[schemeLineKey]int{}, map[string]tomlpos.Key{}
	for _, k := range tomlpos.Index(p.data) {
		if k.Path != "band" && !strings.HasPrefix(k.Path, "band.") {
			k.Elem = 0 // only [[band]] elements number the bands
		}
		lk := schemeLineKey{k.Path, k.Elem}
		if _, ok := p.inBand[lk]; !ok {
			p.inBand[lk] = k.Line
		}
		if _, ok := p.first[k.Path]; !ok {
			p.first[k.Path] = k
		}
	}
}

// lineOf is the line of key path in band b (0: outside bands), falling back
// to the band's header; 0 when unknown.
func (p *schemeParser) lineOf(path string, b int) int {
	p.index()
	if l, ok := p.inBand[schemeLineKey{path, b}]; ok {
		return l
	}
	if b > 0 {
		return p.inBand[schemeLineKey{"band", b}]
	}
	return 0
}

func (p *schemeParser) errf(line int, format string, args ...any) error {
	if line > 0 {
		return fmt.Errorf("scheme %s line %d: %s", p.file, line, fmt.Sprintf(format, args...))
	}
	return fmt.Errorf("scheme %s: %s", p.file, fmt.Sprintf(format, args...))
}

// schemeKnownKeys lists the keys of each level, for the unknown-key hint.
var schemeKnownKeys = map[string][]string{
	"":     {"name", "unit", "cuts", "cut_belongs_to", "band"},
	"band": {"key", "label", "color", "drought", "code"},
}

// unknownKey reports the first (by line) key the format does not know.
func (p *schemeParser) unknownKey(keys []toml.Key) error {
	p.index()
	paths := make([]string, len(keys))
	for i, k := range keys {
		paths[i] = strings.Join(k, ".")
	}
	at, msg := tomlpos.Unknown(paths, p.first, schemeKnownKeys)
	if strings.HasSuffix(at.Path, ".colour") || at.Path == "colour" {
		msg += `; did you mean "color"?`
	}
	return p.errf(at.Line, "%s", msg)
}

func (p *schemeParser) build(f *schemeFile) (*Scheme, error) {
	name := strings.TrimSuffix(filepath.Base(p.file), filepath.Ext(p.file))
	if name == "" || name == "." || name == string(filepath.Separator) {
		name = "custom"
	}
	if f.Name != nil {
		name = *f.Name
		if err := schemeCheckText(name); err != nil || strings.TrimSpace(name) == "" {
			return nil, p.errf(p.lineOf("name", 0), "name %q must be non-empty printable text", name)
		}
	}
	unit := UnitZ
	if f.Unit != nil {
		u, err := ParseUnit(*f.Unit)
		if err != nil {
			return nil, p.errf(p.lineOf("unit", 0), "%v", err)
		}
		unit = u
	}
	centre := unit.Centre()
	cutLine := func() int { return p.lineOf("cuts", 0) }
	if len(f.Cuts) == 0 {
		return nil, p.errf(cutLine(), `cuts is missing or empty: give the values (in the scheme's unit, z unless unit says otherwise) where bands meet, e.g. cuts = [-1.0, 1.0]`)
	}
	for i, c := range f.Cuts {
		if math.IsNaN(c) || math.IsInf(c, 0) {
			return nil, p.errf(cutLine(), "cut %d is %v; cuts must be finite", i+1, c)
		}
		if i > 0 && c <= f.Cuts[i-1] {
			return nil, p.errf(cutLine(), "cuts must increase strictly: cut %d (%g) follows %g", i+1, c, f.Cuts[i-1])
		}
		if unit == UnitPercentile && !(c > spi.MinPercentile && c < spi.MaxPercentile) {
			return nil, p.errf(cutLine(), "cut %d (%g): percentile cuts must lie strictly between %g and %g, where percentiles are clamped before they become z", i+1, c, spi.MinPercentile, spi.MaxPercentile)
		}
		if unit == UnitPctOfNormal && c <= 0 {
			return nil, p.errf(cutLine(), "cut %d (%g): percent of normal is never below 0; cuts must be above 0", i+1, c)
		}
	}
	// cuts are the cut points in the bands' domain: percentiles become z
	// (spi.PercentileToZ, the conversion of the values), which must still
	// increase strictly.
	cuts := f.Cuts
	if unit == UnitPercentile {
		cuts = make([]float64, len(f.Cuts))
		for i, c := range f.Cuts {
			cuts[i] = spi.PercentileToZ(c)
			if i > 0 && cuts[i] <= cuts[i-1] {
				return nil, p.errf(cutLine(), "percentile cuts %g and %g are too close: they give the same z", f.Cuts[i-1], c)
			}
		}
	}
	ruleLine := func() int { return p.lineOf("cut_belongs_to", 0) }
	if f.CutBelongsTo == nil {
		return nil, p.errf(0, `cut_belongs_to is missing: say which band holds a value exactly on a cut ("outer", "lower" or "upper")`)
	}
	rule := *f.CutBelongsTo
	// toLower[i]: cut i belongs to the band below it.
	toLower := make([]bool, len(f.Cuts))
	for i, c := range f.Cuts {
		switch rule {
		case "lower":
			toLower[i] = true
		case "upper":
			toLower[i] = false
		case "outer":
			if c == centre {
				return nil, p.errf(ruleLine(), `a cut at %g has no outer side (it is normal in %s); with a cut at %g use cut_belongs_to = "lower" or "upper"`, centre, unit.Describe(), centre)
			}
			toLower[i] = c < centre
		default:
			return nil, p.errf(ruleLine(), `cut_belongs_to is %q; it must be "outer", "lower" or "upper"`, rule)
		}
	}
	if want := len(f.Cuts) + 1; len(f.Band) != want {
		return nil, p.errf(cutLine(), "%d cuts make %d bands, but the file has %d [[band]] tables", len(f.Cuts), want, len(f.Band))
	}
	if len(f.Band) > 255 {
		return nil, p.errf(cutLine(), "%d bands; band rasters hold at most 255", len(f.Band))
	}
	withCode := 0
	for _, b := range f.Band {
		if b.Code != nil {
			withCode++
		}
	}
	if withCode != 0 && withCode != len(f.Band) {
		for i, b := range f.Band {
			if b.Code == nil {
				return nil, p.errf(p.lineOf("band", i+1), "[[band]] %d has no code, but other bands do: give code on every band or on none", i+1)
			}
		}
	}
	s := &Scheme{Name: name, Unit: unit, Bands: make([]Band, len(f.Band))}
	keyLine := map[string]int{}
	codeBand := map[uint8]int{}
	droughtRun := true
	for i, fb := range f.Band {
		n := i + 1
		bl := func(field string) int { return p.lineOf("band."+field, n) }
		var b Band
		for _, req := range []struct {
			field string
			v     *string
		}{{"key", fb.Key}, {"label", fb.Label}, {"color", fb.Color}} {
			if req.v == nil {
				return nil, p.errf(p.lineOf("band", n), "[[band]] %d has no %s", n, req.field)
			}
		}
		b.Key = *fb.Key
		if k, ok := OldKeys[b.Key]; ok {
			b.Key = k // the default bands' former name, accepted for one release
		}
		if len(b.Key) > 64 || !schemeKeyRE.MatchString(b.Key) {
			return nil, p.errf(bl("key"), "[[band]] %d key %q: use 1-64 lower-case letters, digits, '-' or '_', starting with a letter or digit", n, b.Key)
		}
		if prev, dup := keyLine[b.Key]; dup {
			return nil, p.errf(bl("key"), "[[band]] %d key %q is already used by [[band]] %d", n, b.Key, prev)
		}
		keyLine[b.Key] = n
		b.Label = *fb.Label
		if err := schemeCheckText(b.Label); err != nil || strings.TrimSpace(b.Label) == "" || len(b.Label) > 200 {
			return nil, p.errf(bl("label"), "[[band]] %d label %q must be 1-200 bytes of printable text", n, b.Label)
		}
		b.Color = strings.ToLower(*fb.Color)
		if _, ok := parseHexColor(b.Color); !ok {
			return nil, p.errf(bl("color"), "[[band]] %d color %q is not #rrggbb", n, *fb.Color)
		}
		b.Code = uint8(n)
		if fb.Code != nil {
			if *fb.Code < 1 || *fb.Code > 255 {
				return nil, p.errf(bl("code"), "[[band]] %d code %d must be in 1..255 (0 is no data)", n, *fb.Code)
			}
			b.Code = uint8(*fb.Code)
		}
		if prev, dup := codeBand[b.Code]; dup {
			return nil, p.errf(bl("code"), "[[band]] %d code %d is already used by [[band]] %d", n, b.Code, prev)
		}
		codeBand[b.Code] = n
		b.Min, b.Max = math.Inf(-1), math.Inf(1)
		if i > 0 {
			b.Min, b.MinInclusive = cuts[i-1], !toLower[i-1]
		}
		if i < len(cuts) {
			b.Max, b.MaxInclusive = cuts[i], toLower[i]
		}
		b.Drought = fb.Drought
		if b.Drought {
			if !droughtRun {
				return nil, p.errf(bl("drought"), "[[band]] %d is a drought band above a band that is not: drought bands must be the driest ones, first in the file", n)
			}
			if i < len(f.Cuts) && f.Cuts[i] > centre || i == len(f.Cuts) {
				return nil, p.errf(bl("drought"), "[[band]] %d (%s) reaches above %s and cannot be a drought band", n, b.RangeIn(unit), map[Unit]string{UnitZ: "z = 0", UnitPercentile: "the 50th percentile", UnitPctOfNormal: "100 % of normal"}[unit])
			}
		} else {
			droughtRun = false
		}
		s.Bands[i] = b
	}
	if err := s.Validate(); err != nil {
		return nil, fmt.Errorf("scheme %s: %w", p.file, err)
	}
	return s, nil
}

// schemeCheckText rejects invalid UTF-8 and control characters in names and
// labels, which end up in legends, CSV headers and web pages.
func schemeCheckText(s string) error {
	if !utf8.ValidString(s) {
		return errors.New("not UTF-8")
	}
	for _, r := range s {
		if unicode.IsControl(r) {
			return fmt.Errorf("control character %s", strconv.QuoteRune(r))
		}
	}
	return nil
}
