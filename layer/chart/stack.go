package chart

import (
	"drygrid/bands"
	"drygrid/history"
	"fmt"
	"math"
	"strings"
	"time"
)

// Stack is one region's band shares over time, ready to be drawn as a
// stacked area chart: the scheme's bands from the bottom up, driest first.
type Stack struct {
	Region string
	Dates  []time.Time
	Bands  []bands.Band // the scheme's bands, driest first: the bottom layer first
	// Share[d][b] is band b's share on Dates[d] (the history's
	// <key>_pct: percent of the region's covered area). A date whose row
	// is missing, or has an empty share, has every share NaN.
	Share [][]float64
	// Top[d][b] is the top of band b's layer on Dates[d]: the sum of
	// Share[d][0..b]. Its bottom is Top[d][b-1], or 0 for the first band.
	// Top[d][len(Bands)-1] is 100 within the file's rounding.
	Top [][]float64
	// InDrought[d] is the history's in_drought_pct on Dates[d]: the
	// drought bands' total, drawn as a line over the stack.
	InDrought []float64
}

// StackRegion turns the history rows of one region into its stacked band
// shares, one entry per date of h. The history's band columns must be the
// scheme's bands in the scheme's order (a column may carry a band's former
// key, bands.OldKeys); a history from another scheme, or without band
// columns, is an error that says so.
func StackRegion(h *history.History, region string, s *bands.Scheme) (*Stack, error) {
	if h == nil || len(h.Dates) == 0 {
		return nil, fmt.Errorf("chart: the history has no rows")
	}
	r := -1
	for i, name := range h.Regions {
		if name == region {
			r = i
			break
		}
	}
	if r < 0 {
		return nil, fmt.Errorf("chart: no region %q in the history (regions: %s)", region, chartList(h.Regions, 12))
	}
	if len(h.Bands) == 0 || h.BandPct == nil {
		return nil, fmt.Errorf("chart: the history has no band columns (<key>_pct), so the shares by band of region %q cannot be drawn; histories written by drygrid have them", region)
	}
	keys := make([]string, len(s.Bands))
	for i, b := range s.Bands {
		keys[i] = b.Key
	}
	same := len(h.Bands) == len(s.Bands)
	for i := 0; same && i < len(h.Bands); i++ {
		k := h.Bands[i]
		if nk, ok := bands.OldKeys[k]; ok {
			k = nk
		}
		same = k == strings.ToLower(s.Bands[i].Key)
	}
	if !same {
		return nil, fmt.Errorf("chart: the history's bands (%s) are not the scheme %q's (%s): give the scheme the history was written with (--scheme)", strings.Join(h.Bands, ","), s.Name, strings.Join(keys, ","))
	}
	st := &Stack{Region: region, Dates: h.Dates, Bands: s.Bands, InDrought: h.InDroughtPct[r]}
	nb := len(s.Bands)
	for d := range h.Dates {
		share := make([]float64, nb)
		top := make([]float64, nb)
		src := h.BandPct[r][d]
		missing := false
		for _, v := range src {
			missing = missing || math.IsNaN(v)
		}
		sum := 0.0
		for b := range share {
			if missing {
				share[b], top[b] = math.NaN(), math.NaN()
				continue
			}
			share[b] = src[b]
			sum += src[b]
			top[b] = sum
		}
		st.Share = append(st.Share, share)
		st.Top = append(st.Top, top)
	}
	return st, nil
}

// chartList is names joined with commas, at most n of them.
func chartList(names []string, n int) string {
	if len(names) <= n {
		return strings.Join(names, ", ")
	}
	return strings.Join(names[:n], ", ") + fmt.Sprintf(" and %d more", len(names)-n)
}
