package pipeline

import (
	"math"
	"strings"
	"testing"
	"time"
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

// FuzzParseWindows: no --windows value panics, and an accepted one is at
// least one window, each 1 to 366 days, none twice.
func FuzzParseWindows(f *testing.F) {
	for _, s := range []string{"30,90,180,365", "30", "", "0", "30,30", "367", "30d, 90d", "-1", "1e3"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		ws, err := ParseWindows(s)
		if err != nil {
			return
		}
		seen := map[int]bool{}
		for _, n := range ws {
			if n < 1 || n > 366 || seen[n] {
				t.Fatalf("accepted %q as %v", s, ws)
			}
			seen[n] = true
		}
		if len(ws) == 0 {
			t.Fatalf("accepted %q as no window", s)
		}
	})
}

// FuzzResolveDate: no date or time zone panics, and an accepted date is a
// calendar date YYYY-MM-DD.
func FuzzResolveDate(f *testing.F) {
	for _, c := range [][2]string{{"yesterday", ""}, {"today", "Pacific/Auckland"}, {"2026-02-29", ""}, {"tomorrow", ""}, {"today", "Mars/Base"}, {"today", "../../etc/passwd"}} {
		f.Add(c[0], c[1])
	}
	now := time.Date(2026, 3, 1, 0, 30, 0, 0, time.UTC)
	f.Fuzz(func(t *testing.T, date, tz string) {
		d, err := ResolveDate(date, tz, now)
		if err != nil {
			return
		}
		if CheckDate(d) != nil {
			t.Fatalf("ResolveDate(%q, %q) = %q", date, tz, d)
		}
	})
}

// Relative dates on the calendar (common practice: the day before
// 1 March is 28 February in a common year, 29 February in a leap year), in
// UTC and in a zone ahead of UTC (Pacific/Auckland is UTC+13 in summer).
func TestResolveDate(t *testing.T) {
	cases := []struct {
		date, tz, now, want string
	}{
		{"yesterday", "", "2026-03-01T00:30:00Z", "2026-02-28"},
		{"yesterday", "", "2024-03-01T23:59:00Z", "2024-02-29"},
		{"today", "", "2026-01-01T00:00:00Z", "2026-01-01"},
		{"yesterday", "", "2026-01-01T00:00:00Z", "2025-12-31"},
		{"today", "Pacific/Auckland", "2026-12-31T11:30:00Z", "2027-01-01"},
		{"Yesterday", "Pacific/Auckland", "2026-12-31T11:30:00Z", "2026-12-31"},
		{"2026-11-30", "Mars/Base", "2026-12-31T11:30:00Z", "2026-11-30"},
	}
	for _, c := range cases {
		now, _ := time.Parse(time.RFC3339, c.now)
		got, err := ResolveDate(c.date, c.tz, now)
		if err != nil || got != c.want {
			t.Errorf("ResolveDate(%q, %q, %s) = %q, %v; want %q", c.date, c.tz, c.now, got, err, c.want)
		}
	}
	if _, err := ResolveDate("today", "Mars/Base", time.Now()); err == nil || !strings.Contains(err.Error(), `"Mars/Base" is not a time zone`) {
		t.Errorf("unknown zone: %v", err)
	}
}
