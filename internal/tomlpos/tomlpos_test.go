package tomlpos

import (
	"reflect"
	"testing"
)

// TestIndex places keys, headers and array-of-tables elements as the TOML
// 1.0 specification (toml.io/en/v1.0.0: keys, tables, arrays of tables,
// multi-line strings) defines them.
func TestIndex(t *testing.T) {
	doc := "name = \"x\"\n" +
		"notes = \"\"\"\nfake = 1\n\"\"\"\n" +
		"[grid]\n" +
		"  res = 0.1\n" +
		"\"quoted key\".part = 2\n" +
		"[[band]]\n" +
		"key = \"a\"\n" +
		"[[band]]\n" +
		"key = \"b\"\n" +
		"[out]\n" +
		"dir = \"o\"\n"
	want := []Key{
		{"name", 0, 1, 8},
		{"notes", 0, 2, 9},
		{"grid", 0, 5, 2},
		{"grid.res", 0, 6, 9},
		{"grid.quoted key.part", 0, 7, 21},
		{"band", 1, 8, 3},
		{"band.key", 1, 9, 7},
		{"band", 2, 10, 3},
		{"band.key", 2, 11, 7},
		{"out", 0, 12, 2},
		{"out.dir", 0, 13, 7},
	}
	if got := Index([]byte(doc)); !reflect.DeepEqual(got, want) {
		t.Errorf("Index:\n got %v\nwant %v", got, want)
	}
}

func TestJoinKey(t *testing.T) {
	for in, want := range map[string]string{
		"a":            "a",
		"a.b":          "a.b",
		` a . "b.c" `:  "a.b.c",
		`'lit'.x`:      "lit.x",
		`"with space"`: "with space",
	} {
		if got := JoinKey(in); got != want {
			t.Errorf("JoinKey(%q) = %q, want %q", in, got, want)
		}
	}
}

// FuzzIndex: the scanner never panics and every position lies in the text.
func FuzzIndex(f *testing.F) {
	f.Add([]byte("[a]\nb = 1\n[[c]]\nd = '''\nx\n'''\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		lines := 1
		for _, c := range data {
			if c == '\n' {
				lines++
			}
		}
		for _, k := range Index(data) {
			if k.Line < 1 || k.Line > lines || k.Col < 1 {
				t.Fatalf("key %+v outside the text of %d lines", k, lines)
			}
		}
	})
}

// TestUnknown: the first placed unknown key is named, with its table, its
// element in an array of tables, and the keys the table knows; an
// unplaced key is named only when no other can be placed.
func TestUnknown(t *testing.T) {
	doc := []byte("[grid]\nres = 1\n[[band]]\nkey = \"a\"\n[[band]]\ncolr = \"#000000\"\n[grid2]\nx = 1\n")
	first := First(Index(doc))
	known := map[string][]string{"band": {"key", "color"}}
	at, msg := Unknown([]string{"grid2.x", "band.colr", "nowhere"}, first, known)
	if at.Line != 6 || msg != `unknown key "colr" in [[band]] 2 (known: key, color)` {
		t.Errorf("Unknown: line %d %q", at.Line, msg)
	}
	at, msg = Unknown([]string{"nowhere"}, first, known)
	if at.Line != 0 || msg != `unknown key "nowhere" at the top level` {
		t.Errorf("unplaced: line %d %q", at.Line, msg)
	}
}
