package scenario

import (
	"bytes"
	"math"
	"testing"

	"drygrid/station"
)

// The invented daily records give back the scenario's yearly totals: read
// by station.ReadDaily with the suspect flag excluded, every 30-day total
// ending 30 November equals the scenario's total (to the 0.1 mm written),
// and a year without a total has none (too few days reported). A law of the
// generator: the days of a window share out its total exactly.
func TestDailyGivesTotals(t *testing.T) {
	s := DemoScenario()
	var buf bytes.Buffer
	if err := s.WriteDailyCSVGz(&buf); err != nil {
		t.Fatal(err)
	}
	r, err := station.ReadDailyReader("daily.csv.gz", bytes.NewReader(buf.Bytes()), station.DailyOptions{
		Target: DailyTarget, Windows: []int{DailyWindow}, ExcludeFlags: []string{DailyBadFlag}})
	if err != nil {
		t.Fatal(err)
	}
	flagged := 0
	for _, yt := range s.Totals {
		st := r.Station(yt.Station)
		if st == nil {
			t.Fatalf("station %s missing from the daily records", yt.Station)
		}
		got := r.Total(st, yt.Year, 0)
		if yt.Missing {
			if !got.Missing() {
				t.Errorf("%s %d: total %g, want missing", yt.Station, yt.Year, got.Total)
			}
			continue
		}
		if got.Missing() || math.Abs(got.Total-math.Round(yt.TotalMM*10)/10) > 1e-9 {
			t.Errorf("%s %d: total %g (%d days), want %.1f", yt.Station, yt.Year, got.Total, got.Reported, yt.TotalMM)
		}
		if got.Reported < DailyWindow {
			flagged++
		}
	}
	if flagged == 0 {
		t.Error("no window with a gap or a flagged day")
	}
	if buf.Len() > 4<<20 {
		t.Errorf("daily file of %d bytes: too large for the demo", buf.Len())
	}
	// The same bytes each time.
	var again bytes.Buffer
	if err := s.WriteDailyCSVGz(&again); err != nil || !bytes.Equal(again.Bytes(), buf.Bytes()) {
		t.Error("the daily records differ between two calls")
	}
}
