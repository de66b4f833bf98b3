package tomlpos

import (
	"regexp"
	"strconv"
	"strings"
	"unicode/utf8"
)

// Key is one key assignment or table header.
type Key struct {
	// Path is the dotted key with its table prefix, quotes removed
	// ("grid.res", "band.color"); a header's Path is the table's name.
	Path string
	// Elem is the 1-based element of the array of tables ([[name]]) the key
	// or header belongs to; 0 outside arrays of tables.
	Elem int
	// Line is 1-based; Col is the 1-based column (in runes) of the value
	// after "=", or of a header's name.
	Line, Col int
}

var (
	keyPart  = `(?:[A-Za-z0-9_-]+|"[^"\n]*"|'[^'\n]*')`
	assignRE = regexp.MustCompile(`^(\s*)(` + keyPart + `(?:\s*\.\s*` + keyPart + `)*)\s*=\s*`)
	tableRE  = regexp.MustCompile(`^\s*(\[\[?)\s*([^\]]+?)\s*\]\]?`)
	partRE   = regexp.MustCompile(keyPart)
)

// JoinKey normalises a dotted TOML key: parts unquoted, joined by '.'.
func JoinKey(k string) string {
	var parts []string
	for _, p := range partRE.FindAllString(k, -1) {
		if len(p) >= 2 && (p[0] == '"' || p[0] == '\'') {
			p = p[1 : len(p)-1]
		}
		parts = append(parts, p)
	}
	return strings.Join(parts, ".")
}

// Index lists the key assignments and table headers of data in file order.
// Lines inside multi-line strings are skipped.
func Index(data []byte) []Key {
	var out []Key
	section, elem, inMulti := "", 0, ""
	elems := map[string]int{} // [[name]] headers seen so far
	for i, l := range strings.Split(string(data), "\n") {
		n := i + 1
		if inMulti != "" {
			if strings.Count(l, inMulti)%2 == 1 {
				inMulti = ""
			}
			continue
		}
		if m := tableRE.FindStringSubmatchIndex(l); m != nil && !assignRE.MatchString(l) {
			section, elem = JoinKey(l[m[4]:m[5]]), 0
			if l[m[2]:m[3]] == "[[" {
				elems[section]++
				elem = elems[section]
			}
			out = append(out, Key{section, elem, n, utf8.RuneCountInString(l[:m[4]]) + 1})
			continue
		}
		if m := assignRE.FindStringSubmatchIndex(l); m != nil {
			k := JoinKey(l[m[4]:m[5]])
			if section != "" {
				k = section + "." + k
			}
			out = append(out, Key{k, elem, n, utf8.RuneCountInString(l[:m[1]]) + 1})
			for _, q := range []string{`"""`, `'''`} {
				if strings.Count(l[m[1]:], q)%2 == 1 {
					inMulti = q
				}
			}
		}
	}
	return out
}

// Unknown describes the first, by position in the file, of the undecoded
// key paths (dotted, as toml.Key.String gives them): its place (zero when
// the scanner could not place it) and a message "unknown key "x" in
// [table] (known: a, b)", with "in [[table]] N" inside an array of tables.
// first maps a path to its first place (see First); known lists the keys
// each table accepts.
func Unknown(paths []string, first map[string]Key, known map[string][]string) (Key, string) {
	best, bestPath := Key{}, ""
	for i, p := range paths {
		k := first[p]
		if i == 0 || (k.Line > 0 && (best.Line == 0 || k.Line < best.Line)) {
			best, bestPath = k, p
		}
	}
	level, last := "", bestPath
	if i := strings.LastIndexByte(bestPath, '.'); i >= 0 {
		level, last = bestPath[:i], bestPath[i+1:]
	}
	where := "at the top level"
	if level != "" {
		where = "in [" + level + "]"
		if best.Elem > 0 {
			where = "in [[" + level + "]] " + strconv.Itoa(best.Elem)
		}
	}
	msg := "unknown key " + strconv.Quote(last) + " " + where
	if k, ok := known[level]; ok {
		msg += " (known: " + strings.Join(k, ", ") + ")"
	}
	return best, msg
}

// First maps each path of an index to its first place in the file.
func First(index []Key) map[string]Key {
	first := map[string]Key{}
	for _, k := range index {
		if _, ok := first[k.Path]; !ok {
			first[k.Path] = k
		}
	}
	return first
}
