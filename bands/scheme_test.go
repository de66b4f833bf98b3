package bands

import (
	"math"
	"strings"
	"testing"
)

func TestValidate(t *testing.T) {
	inf := math.Inf(1)
	type edit func(s *Scheme)
	cases := []struct {
		name string
		edit edit
		ok   bool
	}{
		{"default", func(s *Scheme) {}, true},
		{"gap between bands", func(s *Scheme) { s.Bands[1].Min = -1.9 }, false},
		{"overlap: cut in both bands", func(s *Scheme) { s.Bands[1].MinInclusive = true }, false},
		{"cut in neither band", func(s *Scheme) { s.Bands[4].MaxInclusive = false; s.Bands[5].MinInclusive = false }, false},
		{"overlapping ranges", func(s *Scheme) { s.Bands[2].Max = -0.9 }, false},
		{"bands out of order", func(s *Scheme) { s.Bands[3], s.Bands[4] = s.Bands[4], s.Bands[3] }, false},
		{"duplicate code", func(s *Scheme) { s.Bands[8].Code = 1 }, false},
		{"code 0", func(s *Scheme) { s.Bands[0].Code = 0 }, false},
		{"duplicate key", func(s *Scheme) { s.Bands[8].Key = "parched" }, false},
		{"empty key", func(s *Scheme) { s.Bands[2].Key = "" }, false},
		{"colour without #", func(s *Scheme) { s.Bands[0].Color = "8c510a" }, false},
		{"colour too short", func(s *Scheme) { s.Bands[0].Color = "#8c510" }, false},
		{"colour too long", func(s *Scheme) { s.Bands[0].Color = "#8c510a0" }, false},
		{"colour not hex", func(s *Scheme) { s.Bands[0].Color = "#12345g" }, false},
		{"colour with space", func(s *Scheme) { s.Bands[0].Color = "# 12345" }, false},
		{"colour with sign", func(s *Scheme) { s.Bands[0].Color = "#+12345" }, false},
		{"colour name", func(s *Scheme) { s.Bands[0].Color = "brown" }, false},
		{"upper-case colour", func(s *Scheme) { s.Bands[0].Color = "#8C510A" }, true},
		{"first band not from -inf", func(s *Scheme) { s.Bands[0].Min = -10 }, false},
		{"last band not to +inf", func(s *Scheme) { s.Bands[8].Max = 10 }, false},
		{"NaN bound", func(s *Scheme) { s.Bands[3].Max, s.Bands[4].Min = math.NaN(), math.NaN() }, false},
		{"infinite inner cut", func(s *Scheme) {
			s.Bands = []Band{
				{1, "a", "A", -inf, inf, false, false, "#000000", false},
				{2, "b", "B", inf, inf, true, true, "#ffffff", false},
			}
		}, false},
		{"empty range", func(s *Scheme) {
			s.Bands = []Band{
				{1, "a", "A", -inf, 0, false, true, "#000000", false},
				{2, "b", "B", 0, 0, false, false, "#111111", false},
				{3, "c", "C", 0, inf, true, false, "#222222", false},
			}
		}, false},
		{"single-point band", func(s *Scheme) {
			s.Bands = []Band{
				{1, "a", "A", -inf, 0, false, false, "#000000", false},
				{2, "b", "B", 0, 0, true, true, "#111111", false},
				{3, "c", "C", 0, inf, false, false, "#222222", false},
			}
		}, true},
		{"no bands", func(s *Scheme) { s.Bands = nil }, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s := Default()
			c.edit(s)
			err := s.Validate()
			if c.ok && err != nil {
				t.Fatalf("rejected: %v", err)
			}
			if !c.ok {
				if err == nil {
					t.Fatal("accepted")
				}
				if !strings.Contains(err.Error(), s.Name) {
					t.Errorf("error %q does not name the scheme", err)
				}
			}
		})
	}
}

// A scheme that validates classifies -Inf, +Inf and every cut into exactly
// one band (the infinite ends are closed, see Band.Contains).
func TestValidSchemeCoversInfinities(t *testing.T) {
	s := Default()
	for _, z := range []float64{math.Inf(-1), math.Inf(1)} {
		n := 0
		for _, b := range s.Bands {
			if b.Contains(z) {
				n++
			}
		}
		if n != 1 {
			t.Errorf("%v in %d bands", z, n)
		}
	}
}
