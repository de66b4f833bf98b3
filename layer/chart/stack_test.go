package chart

import (
	"bytes"
	"drygrid/bands"
	"drygrid/history"
	"drygrid/region"
	"encoding/csv"
	"fmt"
	"math"
	"strconv"
	"testing"
	"time"
)

// chartDailyCSV is an invented daily history file: regions named by letter,
// days from 2026-01-01, each region's covered area split over the default
// bands on smooth invented curves, written by history.Encode (the same bytes
// as a run's appends). Region b covers nothing on days 40-44 (its shares are
// empty there) and has no row at all on days 100-102.
func chartDailyCSV(t testing.TB, regions, days int) []byte {
	t.Helper()
	s := bands.Default()
	t0 := time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC)
	var hd []history.Day
	for d := 0; d < days; d++ {
		day := history.Day{Date: t0.AddDate(0, 0, d).Format("2006-01-02")}
		for r := 0; r < regions; r++ {
			if r == 1 && d >= 100 && d <= 102 {
				continue
			}
			z := region.ZonalStats{Key: "district-" + string(rune('a'+r))}
			z.AreaKm2 = 1000 + 250*float64(r)
			z.CoveredKm2 = z.AreaKm2 * (0.9 + 0.1*math.Cos(float64(d)/17))
			if r == 1 && d >= 40 && d <= 44 {
				z.CoveredKm2 = 0
			}
			// Weights of the nine bands: a bump that drifts from the wet
			// end to the dry end and back over the days.
			centre := 4 + 3.5*math.Sin(float64(d)/50+float64(r))
			var w [10]float64
			sum := 0.0
			for b := 1; b <= 9; b++ {
				w[b] = math.Exp(-math.Pow(float64(b)-centre, 2) / 3)
				sum += w[b]
			}
			for b := 1; b <= 9; b++ {
				z.CodeKm2[b] = z.CoveredKm2 * w[b] / sum
			}
			day.Stats = append(day.Stats, z)
		}
		hd = append(hd, day)
	}
	var buf bytes.Buffer
	if err := history.Encode(&buf, hd, s); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

func chartDailyHistory(t testing.TB, regions, days int) *history.History {
	t.Helper()
	h, err := history.Parse("daily.csv", bytes.NewReader(chartDailyCSV(t, regions, days)))
	if err != nil {
		t.Fatal(err)
	}
	return h
}

// TestStackRegion: the stacked series of a region equal the history file's
// rows, read here with encoding/csv by column name (not through package
// history): on every date each band's share is the row's <key>_pct, each
// layer starts where the one below it ends, driest first, and the line is
// the row's in_drought_pct. A date whose shares are empty, or that has no
// row, is missing.
func TestStackRegion(t *testing.T) {
	data := chartDailyCSV(t, 6, 330)
	h, err := history.Parse("daily.csv", bytes.NewReader(data))
	if err != nil {
		t.Fatal(err)
	}
	s := bands.Default()
	st, err := StackRegion(h, "district-b", s)
	if err != nil {
		t.Fatal(err)
	}
	if len(st.Dates) != 330 || len(st.Share) != 330 || len(st.Top) != 330 || len(st.Bands) != 9 {
		t.Fatalf("stack of %d dates, %d bands", len(st.Dates), len(st.Bands))
	}
	rows, err := csv.NewReader(bytes.NewReader(data)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	col := map[string]int{}
	for i, c := range rows[0] {
		col[c] = i
	}
	byDate := map[string][]string{}
	for _, r := range rows[1:] {
		if r[col["region"]] == "district-b" {
			byDate[r[col["date"]]] = r
		}
	}
	missing := 0
	for d, date := range st.Dates {
		row, ok := byDate[date.Format("2006-01-02")]
		if !ok || row[col["parched_pct"]] == "" {
			missing++
			for b := range st.Bands {
				if !math.IsNaN(st.Share[d][b]) || !math.IsNaN(st.Top[d][b]) {
					t.Fatalf("%s: %v, want missing", date.Format("2006-01-02"), st.Share[d])
				}
			}
			continue
		}
		bottom := 0.0
		for b, band := range st.Bands {
			want, err := strconv.ParseFloat(row[col[band.Key+"_pct"]], 64)
			if err != nil {
				t.Fatal(err)
			}
			if st.Share[d][b] != want {
				t.Errorf("%s %s: share %v, row %v", date.Format("2006-01-02"), band.Key, st.Share[d][b], want)
			}
			if math.Abs(st.Top[d][b]-(bottom+want)) > 1e-9 {
				t.Errorf("%s %s: top %v, want %v + %v", date.Format("2006-01-02"), band.Key, st.Top[d][b], bottom, want)
			}
			bottom = st.Top[d][b]
		}
		want, _ := strconv.ParseFloat(row[col["in_drought_pct"]], 64)
		if st.InDrought[d] != want {
			t.Errorf("%s: in drought %v, row %v", date.Format("2006-01-02"), st.InDrought[d], want)
		}
	}
	if missing != 8 { // 5 days with nothing covered, 3 without a row
		t.Errorf("%d missing dates, want 8", missing)
	}
}

// TestStackLaws: on every date of every region the band shares add up to
// 100 % of the covered area, within the file's rounding (nine shares of 3
// decimals: 9 x 0.0005), so the top of the stack is 100; the drought
// bands' shares add up to in_drought_pct within the same rounding (the
// definition of "in drought" in docs/design.md).
func TestStackLaws(t *testing.T) {
	h := chartDailyHistory(t, 6, 330)
	s := bands.Default()
	tol := 0.0005 * float64(len(s.Bands))
	for _, name := range h.Regions {
		st, err := StackRegion(h, name, s)
		if err != nil {
			t.Fatal(err)
		}
		for d := range st.Dates {
			if math.IsNaN(st.Top[d][0]) {
				continue
			}
			sum, dr := 0.0, 0.0
			for b, band := range st.Bands {
				if st.Share[d][b] < 0 || st.Top[d][b] < 0 || (b > 0 && st.Top[d][b] < st.Top[d][b-1]) {
					t.Fatalf("%s %d: layers out of order %v", name, d, st.Top[d])
				}
				sum += st.Share[d][b]
				if band.Drought {
					dr += st.Share[d][b]
				}
			}
			if math.Abs(sum-100) > tol || math.Abs(st.Top[d][len(st.Bands)-1]-100) > tol {
				t.Errorf("%s %s: shares add up to %v", name, st.Dates[d].Format("2006-01-02"), sum)
			}
			if math.Abs(dr-st.InDrought[d]) > tol {
				t.Errorf("%s %s: drought bands %v, in_drought_pct %v", name, st.Dates[d].Format("2006-01-02"), dr, st.InDrought[d])
			}
		}
	}
}

// TestStackRefusals: an unknown region, a history without band columns and
// a history of another scheme are refused with a message that says what to
// do; a history written with the default bands' former keys (drying,
// moist; bands.OldKeys) is still read.
func TestStackRefusals(t *testing.T) {
	h := chartDailyHistory(t, 2, 5)
	s := bands.Default()
	for _, c := range []struct {
		h      *history.History
		region string
		s      *bands.Scheme
		want   string
	}{
		{h, "nowhere", s, `chart: no region "nowhere" in the history (regions: district-a, district-b)`},
		{&history.History{Dates: h.Dates, Regions: h.Regions, InDroughtPct: h.InDroughtPct}, "district-a", s, `chart: the history has no band columns (<key>_pct), so the shares by band of region "district-a" cannot be drawn; histories written by drygrid have them`},
		{h, "district-a", &bands.Scheme{Name: "two", Bands: s.Bands[:2]}, `chart: the history's bands (parched,very-dry,dry,slightly-dry,normal,slightly-wet,wet,very-wet,soaked) are not the scheme "two"'s (parched,very-dry): give the scheme the history was written with (--scheme)`},
	} {
		if _, err := StackRegion(c.h, c.region, c.s); err == nil || err.Error() != c.want {
			t.Errorf("got %v\nwant %s", err, c.want)
		}
	}
	old := bytes.Replace(chartDailyCSV(t, 2, 5), []byte("slightly-dry_pct"), []byte("drying_pct"), 1)
	old = bytes.Replace(old, []byte("slightly-wet_pct"), []byte("moist_pct"), 1)
	ho, err := history.Parse("old.csv", bytes.NewReader(old))
	if err != nil {
		t.Fatal(err)
	}
	if _, err := StackRegion(ho, "district-a", s); err != nil {
		t.Errorf("former keys: %v", err)
	}
}

func ExampleStackRegion() {
	h, _ := history.Parse("h.csv", bytes.NewReader([]byte(
		"date,region,dry_pct,wet_pct,in_drought_pct\n2026-01-01,north,30,70,30\n2026-01-02,north,45.5,54.5,45.5\n")))
	s := &bands.Scheme{Name: "two", Bands: []bands.Band{
		{Code: 1, Key: "dry", Label: "Dry", Min: math.Inf(-1), Max: 0, MaxInclusive: true, Color: "#bf812d", Drought: true},
		{Code: 2, Key: "wet", Label: "Wet", Min: 0, Max: math.Inf(1), MinInclusive: true, Color: "#35978f"},
	}}
	st, _ := StackRegion(h, "north", s)
	for d, date := range st.Dates {
		fmt.Println(date.Format("2006-01-02"), st.Top[d], st.InDrought[d])
	}
	// Output:
	// 2026-01-01 [30 100] 30
	// 2026-01-02 [45.5 100] 45.5
}
