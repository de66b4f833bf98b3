package station

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"
)

// Column aliases of the daily precipitation table (the station id column
// uses IDAliases).
var (
	DateAliases   = []string{"date", "day", "time"}
	PrecipAliases = []string{"precipitation", "precip", "prcp", "value", "rain", "rainfall", "total"}
	FlagAliases   = []string{"flag", "qflag", "quality", "qc"}
)

// Units of the daily precipitation values; the totals are always in mm.
const (
	UnitMM      = "mm"
	UnitTenthMM = "tenths-mm"
	UnitInch    = "inch"
)

// DefaultMinShare is the default least share of a window's days that must
// be reported for its total to exist.
const DefaultMinShare = 0.9

// MaxWindowDays is the longest window, in days.
const MaxWindowDays = 366

// MaxDailyMM is the largest daily precipitation accepted, in mm (after unit
// conversion); more is taken for a unit or data error. It also keeps the
// exact integer sums of a window far below 2^53.
const MaxDailyMM = 10000

// dailyQuantum is the number of units per mm in which daily values are
// summed: each day's value in mm is rounded to the nearest 1e-6 mm
// (floor(mm x 1e6 + 0.5)) and the window sums are exact integers, so that a
// total does not depend on the order of the rows.
const dailyQuantum = 1e6

// DailyOptions controls ReadDaily.
type DailyOptions struct {
	// Target is the target date D, YYYY-MM-DD (required). Each year's windows
	// end on its month and day; its year is the last year.
	Target string
	// Windows are the window lengths in days, each 1 to MaxWindowDays,
	// distinct; all are computed in one pass, in this order.
	Windows []int
	// MinShare is the least share of a window's days that must be reported
	// for a total, in (0, 1]; 0 means DefaultMinShare.
	MinShare float64
	// Units of the values: UnitMM (default when ""), UnitTenthMM or UnitInch.
	Units string
	// ExcludeFlags are quality flag values whose rows count as missing
	// (compared exactly, after trimming spaces). They need a flag column.
	ExcludeFlags []string
	// Exact column names (case-insensitive); "" finds them by the aliases.
	IDColumn, DateColumn, ValueColumn, FlagColumn string
}

// dailyPlan is DailyOptions checked and prepared.
type dailyPlan struct {
	target  Day
	tYear   int
	windows []int
	need    []int
	share   float64
	units   string
	flags   [][]byte
	// ends[y-MinTotalYear] and starts[(y-MinTotalYear)*len(windows)+w]
	// are the bounds of year y's windows, for every year up to tYear.
	ends   []Day
	starts []Day
}

// plan validates the options.
func (o DailyOptions) plan() (*dailyPlan, error) {
	if o.Target == "" {
		return nil, fmt.Errorf("daily: no target date")
	}
	target, tYear, err := parseDateBytes([]byte(o.Target))
	if err != nil {
		return nil, fmt.Errorf("daily: target date: %w", err)
	}
	if tYear < MinTotalYear || tYear > MaxTotalYear {
		return nil, fmt.Errorf("daily: target date %s is not in the years %d to %d", o.Target, MinTotalYear, MaxTotalYear)
	}
	if len(o.Windows) == 0 {
		return nil, fmt.Errorf("daily: no windows")
	}
	p := &dailyPlan{target: target, tYear: tYear, windows: append([]int(nil), o.Windows...), share: o.MinShare, units: o.Units}
	seen := make(map[int]bool)
	for _, n := range o.Windows {
		if n < 1 || n > MaxWindowDays {
			return nil, fmt.Errorf("daily: window of %d days is not from 1 to %d", n, MaxWindowDays)
		}
		if seen[n] {
			return nil, fmt.Errorf("daily: window of %d days given twice", n)
		}
		seen[n] = true
	}
	if p.share == 0 {
		p.share = DefaultMinShare
	}
	if !(p.share > 0 && p.share <= 1) {
		return nil, fmt.Errorf("daily: minimum share of reported days %g is not in (0, 1]", o.MinShare)
	}
	for _, n := range p.windows {
		p.need = append(p.need, NeededDays(n, p.share))
	}
	switch p.units {
	case "":
		p.units = UnitMM
	case UnitMM, UnitTenthMM, UnitInch:
	default:
		return nil, fmt.Errorf("daily: units %q are not %s, %s or %s", o.Units, UnitMM, UnitTenthMM, UnitInch)
	}
	for _, f := range o.ExcludeFlags {
		p.flags = append(p.flags, []byte(strings.TrimSpace(f)))
	}
	years := tYear - MinTotalYear + 1
	p.ends = make([]Day, years)
	p.starts = make([]Day, years*len(p.windows))
	for i := range years {
		y := MinTotalYear + i
		p.ends[i] = WindowEnd(target, y)
		for w, n := range p.windows {
			p.starts[i*len(p.windows)+w] = p.ends[i] - Day(n) + 1
		}
	}
	return p, nil
}

// NeededDays is the least number of reported days for a total of a window
// of n days: the smallest whole number at least share x n (share x n less
// 1e-9, rounded up, so that 0.9 x 30 needs 27 in spite of binary rounding).
func NeededDays(n int, share float64) int {
	return int(math.Ceil(share*float64(n) - 1e-9))
}

// WindowTotals holds the trailing-window totals of every station: per
// station, per year (the station's first record year to the target's), per
// window.
type WindowTotals struct {
	Target   Day
	Windows  []int   // window lengths, days
	Need     []int   // least reported days for a total, per window
	MinShare float64 // the share Need was computed from
	Units    string  // units of the input values

	Stations []StationTotals // sorted by id (byte order)

	Rows        int // data rows read
	AfterTarget int // rows dated after the target, ignored
	Warnings    []string
}

// StationTotals are one station's totals. Entry (year-FirstYear) x
// len(Windows) + w of Sum and Days is year's window w.
type StationTotals struct {
	ID                  string
	FirstYear, LastYear int // first record year; the target's year

	// Sum is the sum of the reported days in units of 1e-6 mm (exact).
	Sum []int64
	// Days is the number of reported days.
	Days []uint16
}

// WindowTotal is one station's total for one year and window.
type WindowTotal struct {
	Year     int
	Length   int     // window length, days
	Total    float64 // mm; NaN when missing
	Reported int     // days reported
	Need     int     // days needed for a total
	Share    float64 // the minimum share Need comes from
}

// Missing reports whether the total is missing (too few days reported).
func (t WindowTotal) Missing() bool { return math.IsNaN(t.Total) }

// Reason says why the total is missing, "" when it is not: for example
// "26 of 30 days reported, 27 needed (90 %)".
func (t WindowTotal) Reason() string {
	if !t.Missing() {
		return ""
	}
	pct := strconv.FormatFloat(math.Round(t.Share*1e8)/1e6, 'f', -1, 64) // 0.333 is "33.3", not "33.300000000000004"
	return fmt.Sprintf("%d of %d days reported, %d needed (%s %%)", t.Reported, t.Length, t.Need, pct)
}

// Years returns the number of years the station has totals for.
func (s *StationTotals) Years() int { return s.LastYear - s.FirstYear + 1 }

// Total returns station s's total for year and window index w (an index
// into r.Windows). A year outside the station's years has no reported days.
func (r *WindowTotals) Total(s *StationTotals, year, w int) WindowTotal {
	t := WindowTotal{Year: year, Length: r.Windows[w], Need: r.Need[w], Share: r.MinShare, Total: math.NaN()}
	if year < s.FirstYear || year > s.LastYear {
		return t
	}
	i := (year-s.FirstYear)*len(r.Windows) + w
	t.Reported = int(s.Days[i])
	if t.Reported >= t.Need {
		t.Total = float64(s.Sum[i]) / dailyQuantum
	}
	return t
}

// Station returns the station with the id, or nil.
func (r *WindowTotals) Station(id string) *StationTotals {
	i := sort.Search(len(r.Stations), func(i int) bool { return r.Stations[i].ID >= id })
	if i < len(r.Stations) && r.Stations[i].ID == id {
		return &r.Stations[i]
	}
	return nil
}

// WindowIndex returns the index in r.Windows of the window of n days, or -1.
func (r *WindowTotals) WindowIndex(n int) int {
	for i, w := range r.Windows {
		if w == n {
			return i
		}
	}
	return -1
}
