package bands

import (
	"math"
	"testing"
)

// FuzzParseScheme: ParseScheme never panics; whatever it accepts validates,
// has unique codes, and puts every cut point, its nextafter neighbours and
// the infinities into exactly one band.
func FuzzParseScheme(f *testing.F) {
	f.Add([]byte(ExampleSchemeTOML()))
	f.Add([]byte(schemeCoarse))
	f.Add([]byte("cuts = [0.0]\ncut_belongs_to = \"lower\"\n[[band]]\nkey = \"a\"\nlabel = \"A\"\ncolor = \"#000000\"\ncode = 7\n[[band]]\nkey = \"b\"\nlabel = \"B\"\ncolor = \"#ffffff\"\ncode = 3\n"))
	f.Add([]byte("cuts = [0.5]\ncut_belongs_to = \"upper\"\nband = [{key = \"l\", label = \"L\", color = \"#000000\"}, {key = \"h\", label = \"H\", color = \"#ffffff\"}]\n"))
	f.Add([]byte("name = \"x\"\n[meta]\n'quoted key' = \"\"\"\nmulti\n\"\"\"\n"))
	f.Add([]byte("cuts = [nan, inf]\n"))
	f.Add([]byte("[[band]]\n[[band]]\nkey.x = 1\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := ParseScheme("fuzz.toml", data)
		if err != nil {
			if s != nil {
				t.Fatal("scheme and error both returned")
			}
			return
		}
		if err := s.Validate(); err != nil {
			t.Fatalf("accepted a scheme that does not validate: %v", err)
		}
		probes := []float64{math.Inf(-1), math.Inf(1), 0}
		for _, b := range s.Bands[1:] {
			probes = append(probes, b.Min, math.Nextafter(b.Min, math.Inf(-1)), math.Nextafter(b.Min, math.Inf(1)))
		}
		for _, z := range probes {
			n := 0
			for _, b := range s.Bands {
				if b.Contains(z) {
					n++
				}
			}
			if n != 1 || s.Classify(z) == 0 {
				t.Fatalf("z = %v in %d bands (code %d)", z, n, s.Classify(z))
			}
		}
		seen := map[uint8]bool{}
		for _, b := range s.Bands {
			if seen[b.Code] || b.Code == 0 {
				t.Fatalf("code %d repeated or zero", b.Code)
			}
			seen[b.Code] = true
		}
	})
}
