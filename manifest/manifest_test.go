package manifest

import (
	"bufio"
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"drygrid/internal/reftest"
	"drygrid/publish"
)

// TestHashFileVectors: SHA-256 of the FIPS 180-4 examples. Source: NIST,
// "Secure Hash Standard" examples (SHA256.pdf, csrc.nist.gov, Cryptographic
// Standards and Guidelines): "abc" and the 448-bit two-block message;
// the empty-string digest is the well-known value (common practice).
func TestHashFileVectors(t *testing.T) {
	dir := t.TempDir()
	cases := []struct{ in, want string }{
		{"abc", "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"},
		{"abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq", "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1"},
		{"", "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855"},
	}
	for i, c := range cases {
		p := filepath.Join(dir, "f"+string(rune('0'+i)))
		if err := os.WriteFile(p, []byte(c.in), 0o644); err != nil {
			t.Fatal(err)
		}
		n, sum, err := HashFile(p)
		if err != nil {
			t.Fatal(err)
		}
		if sum != c.want || n != int64(len(c.in)) {
			t.Errorf("HashFile(%q) = %d, %s; want %d, %s", c.in, n, sum, len(c.in), c.want)
		}
	}
}

// TestManifestOutputsAgainstSha256sum: the outputs' digests and sizes agree
// with GNU coreutils sha256sum and stat (an independent implementation).
func TestManifestOutputsAgainstSha256sum(t *testing.T) {
	tool := reftest.Tool(t, "sha256sum")
	dir := t.TempDir()
	files := map[string]string{"a.txt": "one\n", "sub/b.bin": strings.Repeat("\x00\xff", 70000), Name: "{}"}
	for name, body := range files {
		p := filepath.Join(dir, filepath.FromSlash(name))
		os.MkdirAll(filepath.Dir(p), 0o755)
		if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	got, err := Outputs(dir, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 2 || got[0].Path != "a.txt" || got[1].Path != "sub/b.bin" {
		t.Fatalf("outputs %+v: want a.txt and sub/b.bin, sorted, without the manifest", got)
	}
	for _, f := range got {
		out, err := exec.Command(tool, filepath.Join(dir, filepath.FromSlash(f.Path))).Output()
		if err != nil {
			t.Fatal(err)
		}
		if want := strings.Fields(string(out))[0]; f.SHA256 != want {
			t.Errorf("%s: sha256 %s, sha256sum says %s", f.Path, f.SHA256, want)
		}
		if f.Bytes != int64(len(files[f.Path])) {
			t.Errorf("%s: %d bytes, want %d", f.Path, f.Bytes, len(files[f.Path]))
		}
	}
	skipped, err := Outputs(dir, map[string]bool{"sub": true})
	if err != nil || len(skipped) != 1 {
		t.Errorf("skip sub: %+v, %v", skipped, err)
	}
}

// TestEncodeManifestOrder: the encoding does not depend on the order the
// files were gathered in, and parses back as JSON (RFC 8259) with the
// members the format promises.
func TestEncodeManifestOrder(t *testing.T) {
	a := &Manifest{Version: "v", Parameters: map[string]any{"b": 1, "a": 2.5},
		Inputs:  []File{{Path: "z", Role: "stations"}, {Path: "a", Role: "regions"}, {Path: "b", Role: "regions"}},
		Outputs: []File{{Path: "y"}, {Path: "x"}}, Timings: map[string]float64{"total_s": 1}}
	b := &Manifest{Version: "v", Parameters: map[string]any{"a": 2.5, "b": 1},
		Inputs:  []File{{Path: "b", Role: "regions"}, {Path: "z", Role: "stations"}, {Path: "a", Role: "regions"}},
		Outputs: []File{{Path: "x"}, {Path: "y"}}, Timings: map[string]float64{"total_s": 1}}
	ea, err := Encode(a)
	if err != nil {
		t.Fatal(err)
	}
	eb, _ := Encode(b)
	if !bytes.Equal(ea, eb) {
		t.Errorf("order changed the manifest:\n%s\n%s", ea, eb)
	}
	var back map[string]any
	if err := json.Unmarshal(ea, &back); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"format", "version", "parameters", "inputs", "outputs", "counts", "grid", "timings"} {
		if _, ok := back[k]; !ok {
			t.Errorf("manifest lacks %q", k)
		}
	}
	if back["format"] != Format {
		t.Errorf("format %v", back["format"])
	}
	in := back["inputs"].([]any)
	if in[0].(map[string]any)["path"] != "a" || in[2].(map[string]any)["role"] != "stations" {
		t.Errorf("inputs not sorted by role, path: %v", in)
	}
	names, err := ParseOutputs("m", ea)
	if err != nil || strings.Join(names, ",") != "x,y" {
		t.Errorf("ParseOutputs = %v, %v", names, err)
	}
}

// TestParseManifestOutputsRejects: a manifest may only name clean relative
// paths inside its directory; syntax errors carry line and column.
func TestParseManifestOutputsRejects(t *testing.T) {
	cases := []struct{ in, want string }{
		{`{"format":"drygrid-manifest-1","outputs":[{"path":"../x"}]}`, "not a clean relative path"},
		{`{"format":"drygrid-manifest-1","outputs":[{"path":"/etc/passwd"}]}`, "not a clean relative path"},
		{`{"format":"drygrid-manifest-1","outputs":[{"path":"a/./b"}]}`, "not a clean relative path"},
		{`{"format":"drygrid-manifest-1","outputs":[{"path":""}]}`, "not a clean relative path"},
		{`{"format":"other","outputs":[]}`, "not a drygrid manifest"},
		{"{\n  \"format\": \"drygrid-manifest-1\",\n  \"outputs\": [,]\n}", "line 3 column 15"},
	}
	for _, c := range cases {
		_, err := ParseOutputs("m.json", []byte(c.in))
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want %q", c.in, err, c.want)
		}
	}
}

// FuzzParseManifestOutputs: no input panics, and every path accepted stays
// inside the directory.
func FuzzParseManifestOutputs(f *testing.F) {
	f.Add([]byte(`{"format":"drygrid-manifest-1","outputs":[{"path":"a.tif"},{"path":"inputs/x.csv"}]}`))
	f.Add([]byte(`{"format":"drygrid-manifest-1","outputs":[{"path":"../a"}]}`))
	f.Add([]byte("{\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		names, err := ParseOutputs("fuzz", data)
		if err != nil {
			return
		}
		for _, n := range names {
			if !filepath.IsLocal(n) {
				t.Fatalf("accepted %q, which leaves the directory", n)
			}
		}
	})
}

// TestHashFileAfterWrite: HashFile gives the SHA-256 of the file as it is
// (crypto/sha256 of its bytes, read here independently): after a write,
// and after the file was changed in place, even to the same size.
func TestHashFileAfterWrite(t *testing.T) {
	path := filepath.Join(t.TempDir(), "layer.bin")
	want := func() (int64, string) {
		b, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		h := sha256.Sum256(b)
		return int64(len(b)), hex.EncodeToString(h[:])
	}
	write := func(s string) {
		if err := publish.WriteFile(path, func(w *bufio.Writer) error { _, err := w.WriteString(s); return err }); err != nil {
			t.Fatal(err)
		}
	}
	check := func(what string) {
		t.Helper()
		n, sum, err := HashFile(path)
		wn, wsum := want()
		if err != nil || n != wn || sum != wsum {
			t.Errorf("%s: HashFile %d %s %v, file %d %s", what, n, sum, err, wn, wsum)
		}
	}
	write("first contents")
	check("as written")
	// Many chunks of the 1 MiB buffer, and a write larger than it, which
	// goes past the buffer to the file (and to the hash) directly.
	big := make([]byte, 3<<20+12345)
	for i := range big {
		big[i] = byte(i*7 + i>>13)
	}
	if err := publish.WriteFile(path, func(w *bufio.Writer) error {
		for i := 0; i < 1<<20; i += 1000 {
			w.Write(big[i:min(i+1000, 1<<20)])
		}
		_, err := w.Write(big[1<<20:])
		return err
	}); err != nil {
		t.Fatal(err)
	}
	check("written in chunks")
	write("second contents, longer")
	// Changed in place to the same size, with a later modification time.
	if err := os.WriteFile(path, []byte("SECOND CONTENTS, LONGER"), 0o644); err != nil {
		t.Fatal(err)
	}
	later := time.Now().Add(2 * time.Second)
	if err := os.Chtimes(path, later, later); err != nil {
		t.Fatal(err)
	}
	check("changed after the write")
	write("third")
	if f, err := os.OpenFile(path, os.O_APPEND|os.O_WRONLY, 0); err == nil {
		f.WriteString("!")
		f.Close()
	}
	check("appended to after the write")
	check("asked twice")
}
