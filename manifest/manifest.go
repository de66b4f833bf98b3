package manifest

import (
	"bufio"
	"bytes"
	"crypto/sha256"
	"drygrid/publish"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strings"
)

// Name is the file name of the manifest in an output directory.
const Name = "manifest.json"

// Format identifies the manifest layout; it changes when a member
// changes meaning.
const Format = "drygrid-manifest-1"

// File describes one input or output file: its path (as given for
// inputs, relative to the output directory for outputs), its role for an
// input ("stations", "totals", "regions", "scheme", "job"), its size in bytes
// and its SHA-256 (FIPS 180-4) in lower-case hex.
type File struct {
	Path   string `json:"path"`
	Role   string `json:"role,omitempty"`
	Bytes  int64  `json:"bytes"`
	SHA256 string `json:"sha256"`
}

// Manifest is the provenance record of one run. Every member but Timings is
// a function of the inputs and parameters alone, so two runs on the same
// inputs write byte-identical manifests apart from the "timings" member,
// whatever the core count. Maps are written with sorted keys
// (encoding/json), slices in the order given; Write sorts Inputs by
// role then path and Outputs by path.
type Manifest struct {
	Format     string             `json:"format"`
	Software   string             `json:"software"`
	Version    string             `json:"version"`
	Command    string             `json:"command"`
	Caution    string             `json:"caution"`
	Parameters map[string]any     `json:"parameters"`
	Inputs     []File             `json:"inputs"`
	Outputs    []File             `json:"outputs"`
	Counts     map[string]any     `json:"counts"`
	Grid       map[string]any     `json:"grid"`
	Timings    map[string]float64 `json:"timings"`
}

// HashFile returns the size and SHA-256 (hex) of the file at path, reading
// it as a stream.
func HashFile(path string) (int64, string, error) {
	f, err := os.Open(path)
	if err != nil {
		return 0, "", fmt.Errorf("manifest: %w", err)
	}
	defer f.Close()
	h := sha256.New()
	n, err := io.Copy(h, f)
	if err != nil {
		return 0, "", fmt.Errorf("manifest: reading %s: %w", path, err)
	}
	return n, hex.EncodeToString(h.Sum(nil)), nil
}

// Input describes the input file at path with its role.
func Input(path, role string) (File, error) {
	n, sum, err := HashFile(path)
	if err != nil {
		return File{}, err
	}
	return File{Path: filepath.ToSlash(path), Role: role, Bytes: n, SHA256: sum}, nil
}

// Outputs describes every regular file under dir except the manifest
// itself, with slash-separated paths relative to dir, sorted. Directories
// whose names are in skip (relative paths) are not entered.
func Outputs(dir string, skip map[string]bool) ([]File, error) {
	var out []File
	err := filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err != nil {
			return err
		}
		rel, err := filepath.Rel(dir, p)
		if err != nil {
			return err
		}
		rel = filepath.ToSlash(rel)
		if d.IsDir() {
			if rel != "." && skip[rel] {
				return filepath.SkipDir
			}
			return nil
		}
		if rel == Name || skip[rel] || !d.Type().IsRegular() {
			return nil
		}
		n, sum, err := HashFile(p)
		if err != nil {
			return err
		}
		out = append(out, File{Path: rel, Bytes: n, SHA256: sum})
		return nil
	})
	if err != nil {
		return nil, fmt.Errorf("manifest: %w", err)
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Path < out[j].Path })
	return out, nil
}

// Encode renders m as indented JSON with a final newline. Inputs are
// sorted by role then path and outputs by path, so the order the caller
// gathered them in does not matter.
func Encode(m *Manifest) ([]byte, error) {
	c := *m
	if c.Format == "" {
		c.Format = Format
	}
	c.Inputs = append([]File(nil), m.Inputs...)
	c.Outputs = append([]File(nil), m.Outputs...)
	sort.SliceStable(c.Inputs, func(i, j int) bool {
		if c.Inputs[i].Role != c.Inputs[j].Role {
			return c.Inputs[i].Role < c.Inputs[j].Role
		}
		return c.Inputs[i].Path < c.Inputs[j].Path
	})
	sort.SliceStable(c.Outputs, func(i, j int) bool { return c.Outputs[i].Path < c.Outputs[j].Path })
	if c.Inputs == nil {
		c.Inputs = []File{}
	}
	if c.Outputs == nil {
		c.Outputs = []File{}
	}
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	if err := enc.Encode(&c); err != nil {
		return nil, fmt.Errorf("manifest: %w", err)
	}
	return buf.Bytes(), nil
}

// Write writes m to dir/manifest.json (atomically).
func Write(dir string, m *Manifest) error {
	b, err := Encode(m)
	if err != nil {
		return err
	}
	return publish.WriteFile(filepath.Join(dir, Name), func(w *bufio.Writer) error {
		_, err := w.Write(b)
		return err
	})
}

// manifestMaxBytes bounds a manifest read back; real ones are kilobytes.
const manifestMaxBytes = 16 << 20

// ParseOutputs reads the output paths listed by a manifest (used to
// tell drygrid's own files from a user's when an output directory is
// replaced). Paths that are absolute, contain "..", or are not clean relative
// paths are errors, so a tampered manifest cannot name files outside the
// directory.
func ParseOutputs(name string, data []byte) ([]string, error) {
	if len(data) > manifestMaxBytes {
		return nil, fmt.Errorf("manifest %s: larger than %d bytes", name, manifestMaxBytes)
	}
	var m struct {
		Format  string `json:"format"`
		Outputs []struct {
			Path string `json:"path"`
		} `json:"outputs"`
	}
	dec := json.NewDecoder(bytes.NewReader(data))
	if err := dec.Decode(&m); err != nil {
		var se *json.SyntaxError
		if errors.As(err, &se) {
			line, col := manifestLineCol(data, se.Offset-1) // Offset is just past the bad byte
			return nil, fmt.Errorf("manifest %s line %d column %d: %v", name, line, col, err)
		}
		return nil, fmt.Errorf("manifest %s: %w", name, err)
	}
	if !strings.HasPrefix(m.Format, "drygrid-manifest-") {
		return nil, fmt.Errorf("manifest %s: format %q is not a drygrid manifest", name, m.Format)
	}
	out := make([]string, 0, len(m.Outputs))
	for i, o := range m.Outputs {
		p := o.Path
		if p == "" || strings.HasPrefix(p, "/") || strings.Contains(p, "\\") || strings.ContainsRune(p, 0) ||
			filepath.ToSlash(filepath.Clean(p)) != p || p == "." || p == ".." || strings.HasPrefix(p, "../") {
			return nil, fmt.Errorf("manifest %s: output %d: path %q is not a clean relative path", name, i, p)
		}
		out = append(out, p)
	}
	return out, nil
}

// manifestLineCol turns a byte offset into a 1-based line and column.
func manifestLineCol(data []byte, off int64) (int, int) {
	if off > int64(len(data)) {
		off = int64(len(data))
	}
	if off < 0 {
		off = 0
	}
	before := data[:off]
	line := bytes.Count(before, []byte{'\n'}) + 1
	col := int(off) - bytes.LastIndexByte(before, '\n')
	return line, col
}
