package pipeline

import (
	"math"
	"testing"
)

// FuzzParseBBox: no --bbox value panics, and an accepted one is four finite
// numbers with south below north, inside the documented ranges.
func FuzzParseBBox(f *testing.F) {
	for _, s := range []string{"170,-50,-170,-30", "1,2,3", "a,b,c,d", "0,-90,360,90", "NaN,1,2,3", " 1 , 2 , 3 , 4 "} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		b, err := ParseBBox(s)
		if err != nil {
			return
		}
		for _, v := range b {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("accepted %q as %v", s, b)
			}
		}
		if b[1] >= b[3] || b[1] < -90 || b[3] > 90 || b[0] == b[2] {
			t.Fatalf("accepted %q as %v", s, b)
		}
	})
}
