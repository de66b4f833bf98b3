package scenario

import (
	"bufio"
	"compress/gzip"
	"io"
	"math"
	"math/rand/v2"
	"strconv"
	"time"
)

// The invented daily records' calendar: each year's window of DailyWindow
// days ends on 30 November (DailyTarget in the target year), and rows with
// the flag DailyBadFlag are suspect (to be excluded).
const (
	DailyWindow  = 30
	DailyTarget  = "2025-11-30"
	DailyBadFlag = "X"
)

// dailySeed is the daily records' own stream, so that they do not change
// the rest of the scenario.
const dailySeed = 0x6461696c79 // "daily"

// WriteDailyCSV writes invented daily records, station,date,precipitation,flag
// (mm, one decimal), consistent with the yearly window totals: for every
// station-year with a total, the total (in tenths of mm) is shared out
// over the window's days, about 70 % of them dry, with a deterministic
// pseudo-random pattern, so that the window totals of DailyWindow days
// ending 30 November give back Totals exactly. The records have gaps
// (a day or two without a row in some windows), a few suspect rows
// flagged DailyBadFlag with an absurd value (to be excluded), a few trace
// rows flagged T, and some dry days outside the window (late October,
// early December before the target year). A year whose total is missing
// has only half of its window reported, too few for a total.
func (s *Scenario) WriteDailyCSV(w io.Writer) error {
	rng := scnRNG{rand.NewPCG(scnSeed1^dailySeed, scnSeed2)}
	bw := bufio.NewWriterSize(w, 64<<10)
	bw.WriteString("station,date,precipitation,flag\n")
	var line []byte
	row := func(id string, d time.Time, tenths int, flag string) {
		line = append(line[:0], id...)
		line = append(line, ',')
		line = d.AppendFormat(line, "2006-01-02")
		line = append(line, ',')
		line = strconv.AppendInt(line, int64(tenths/10), 10)
		line = append(line, '.', byte('0'+tenths%10), ',')
		line = append(line, flag...)
		line = append(line, '\n')
		bw.Write(line)
	}
	for _, t := range s.Totals {
		end := time.Date(t.Year, time.November, 30, 0, 0, 0, 0, time.UTC)
		start := end.AddDate(0, 0, -(DailyWindow - 1))
		// Dry days before the window.
		for k := 3; k >= 1; k-- {
			if rng.intn(4) != 0 {
				row(t.Station, start.AddDate(0, 0, -k), 0, "")
			}
		}
		if t.Missing {
			for k := 0; k < DailyWindow; k += 2 {
				row(t.Station, start.AddDate(0, 0, k), 0, "")
			}
			continue
		}
		// Days left out (gaps) and days flagged: at most three in all,
		// so that 27 of 30 days (the default share) stay reported.
		skip := map[int]string{}
		for n := rng.intn(4); n > 0; n-- {
			k := rng.intn(DailyWindow)
			switch rng.intn(5) {
			case 0:
				skip[k] = DailyBadFlag
			default:
				skip[k] = ""
			}
		}
		var days []int
		for k := 0; k < DailyWindow; k++ {
			if _, ok := skip[k]; !ok {
				days = append(days, k)
			}
		}
		tenths := make([]int, DailyWindow)
		total := int(math.Round(t.TotalMM * 10))
		if total > 0 {
			// About 30 % wet days, at least one, with gamma-like weights.
			var wet []int
			var wts []float64
			sum := 0.0
			for _, k := range days {
				if rng.u() < 0.3 || (len(wet) == 0 && k == days[len(days)-1]) {
					x := -math.Log(rng.u()) // exponential weights
					wet, wts, sum = append(wet, k), append(wts, x), sum+x
				}
			}
			// Largest remainders: the tenths add up to the total exactly.
			given := 0
			rem := make([]float64, len(wet))
			for i, k := range wet {
				share := float64(total) * wts[i] / sum
				tenths[k] = int(share)
				rem[i] = share - float64(tenths[k])
				given += tenths[k]
			}
			for ; given < total; given++ {
				best := 0
				for i := range rem {
					if rem[i] > rem[best] {
						best = i
					}
				}
				tenths[wet[best]]++
				rem[best] = -1
			}
		}
		for k := 0; k < DailyWindow; k++ {
			flag, skipped := skip[k]
			switch {
			case skipped && flag == DailyBadFlag:
				row(t.Station, start.AddDate(0, 0, k), 9999, flag)
			case skipped:
			case tenths[k] == 0 && rng.intn(40) == 0:
				row(t.Station, start.AddDate(0, 0, k), 0, "T")
			default:
				row(t.Station, start.AddDate(0, 0, k), tenths[k], "")
			}
		}
		// Dry days after the window, in years before the target's.
		if t.Year < s.TargetYear && rng.intn(3) == 0 {
			row(t.Station, end.AddDate(0, 0, 1), 0, "")
		}
	}
	return bw.Flush()
}

// WriteDailyCSVGz writes the daily records gzip-compressed.
func (s *Scenario) WriteDailyCSVGz(w io.Writer) error {
	zw, err := gzip.NewWriterLevel(w, gzip.BestSpeed)
	if err != nil {
		return err
	}
	if err := s.WriteDailyCSV(zw); err != nil {
		return err
	}
	return zw.Close()
}
