package station

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
	"testing"
)

// TestSignedDecimalMatchesStrconv: the fast decimal paths of the readers
// (idxDecimal, signedDecimal) give exactly strconv.ParseFloat's value,
// the reference (correctly rounded, Go's standard library), for the forms
// they accept, and refuse the rest, on random decimals of up to 16
// characters and on hand-picked edge cases.
func TestSignedDecimalMatchesStrconv(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	cases := []string{"0", "-0", "0.0", "-0.000", "1", "-1", "12.5", "-179.99999999", "89.999999999999", "0.1",
		"999999999999999", "9999999999999999", "1.000000000000001", ".5", "5.", "-", "", ".", "-.", "1e3", "+1",
		"1.2.3", "--1", "1-", " 1", "NaN", "inf", "0x10", "1_0"}
	for range 200000 {
		n := 1 + r.IntN(15)
		b := make([]byte, 0, 17)
		if r.IntN(2) == 0 {
			b = append(b, '-')
		}
		dot := r.IntN(n + 2)
		for i := range n {
			if i == dot {
				b = append(b, '.')
			}
			b = append(b, byte('0'+r.IntN(10)))
		}
		cases = append(cases, string(b))
	}
	for _, s := range cases {
		got, ok := signedDecimal([]byte(s))
		want, err := strconv.ParseFloat(s, 64)
		if !ok {
			if err == nil && isPlainDecimal(s) {
				t.Errorf("%q: refused, strconv reads %v", s, want)
			}
			continue
		}
		if err != nil || math.Float64bits(got) != math.Float64bits(want) {
			t.Fatalf("%q: %v (%x), strconv %v (%x) %v", s, got, math.Float64bits(got), want, math.Float64bits(want), err)
		}
	}
}

// isPlainDecimal: an optional minus, digits with at most one point, at
// least one and at most 15 digits — the forms signedDecimal must accept.
func isPlainDecimal(s string) bool {
	if len(s) > 0 && s[0] == '-' {
		s = s[1:]
	}
	digits, dots := 0, 0
	for _, c := range s {
		switch {
		case c >= '0' && c <= '9':
			digits++
		case c == '.':
			dots++
		default:
			return false
		}
	}
	return digits >= 1 && digits <= 15 && dots <= 1 && len(s) <= 16
}

// FuzzSignedDecimal: whatever signedDecimal accepts, strconv.ParseFloat
// reads to the same bits.
func FuzzSignedDecimal(f *testing.F) {
	for _, s := range []string{"0", "-0", "12.25", "-179.5", "1e5", fmt.Sprint(math.Pi)} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, b []byte) {
		got, ok := signedDecimal(b)
		if !ok {
			return
		}
		want, err := strconv.ParseFloat(string(b), 64)
		if err != nil || math.Float64bits(got) != math.Float64bits(want) {
			t.Fatalf("%q: %v, strconv %v %v", b, got, want, err)
		}
	})
}
