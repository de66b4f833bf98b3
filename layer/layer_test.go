package layer

import "testing"

// TestGroupThousands: thousands separators as English text writes them
// (common practice).
func TestGroupThousands(t *testing.T) {
	for in, want := range map[string]string{"0": "0", "999": "999", "1000": "1,000", "1234567.5": "1,234,567.5", "-12345.25": "-12,345.25", "100000": "100,000", "NaN": "NaN",
		"-1": "-1", "-999": "-999", "-1000": "-1,000", "20000": "20,000", "1990": "1,990"} {
		if got := GroupThousands(in); got != want {
			t.Errorf("GroupThousands(%q) = %q, want %q", in, got, want)
		}
	}
}
