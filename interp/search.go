package interp

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"
)

// MaxSearchCombos bounds the parameter sets one search may try.
const MaxSearchCombos = 1000

// searchKeys are the keys a search term may vary, each setting one
// parameter (named as on the command line).
var searchKeys = map[string]func(p *Params, v float64){
	"power":        func(p *Params, v float64) { p.Power = v },
	"radius-km":    func(p *Params, v float64) { p.RadiusKm = v },
	"neighbors":    func(p *Params, v float64) { p.Neighbors = int(v) },
	"min-stations": func(p *Params, v float64) { p.MinStations = int(v) },
	"sectors":      func(p *Params, v float64) { p.Sectors = int(v) },
}

// SearchCombos reads search terms KEY=V1,V2,... (several terms may share
// a string, separated by spaces; KEY is power, radius-km, neighbors,
// min-stations or sectors) and lists every combination of the values, the
// first key varying slowest, each value in the order given; base fills the
// parameters not searched. Every combination must be valid (Validate), and
// there may be at most MaxSearchCombos. Errors begin with "search".
func SearchCombos(base Params, terms []string) ([]Params, error) {
	type axis struct {
		key  string
		vals []float64
	}
	var axes []axis
	seen := map[string]bool{}
	for _, t := range terms {
		for _, term := range strings.Fields(t) {
			k, list, ok := strings.Cut(term, "=")
			k = strings.ToLower(strings.TrimSpace(k))
			if !ok || list == "" {
				return nil, fmt.Errorf("search %q: want KEY=V1,V2,... with KEY one of power, radius-km, neighbors, min-stations, sectors", term)
			}
			if _, known := searchKeys[k]; !known {
				return nil, fmt.Errorf("search %q: unknown key %q (power, radius-km, neighbors, min-stations, sectors)", term, k)
			}
			if seen[k] {
				return nil, fmt.Errorf("search: key %q given twice", k)
			}
			seen[k] = true
			a := axis{key: k}
			for _, s := range strings.Split(list, ",") {
				v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
				if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
					return nil, fmt.Errorf("search %q: %q is not a number", term, s)
				}
				if k != "power" && k != "radius-km" && (v != math.Trunc(v) || math.Abs(v) > 1e9) {
					return nil, fmt.Errorf("search %q: %s takes whole numbers, not %q", term, k, s)
				}
				a.vals = append(a.vals, v)
			}
			axes = append(axes, a)
		}
	}
	if len(axes) == 0 {
		return nil, fmt.Errorf("search: give at least one KEY=V1,V2,...")
	}
	total := 1
	for _, a := range axes {
		total *= len(a.vals)
		if total > MaxSearchCombos {
			return nil, fmt.Errorf("search: more than %d combinations", MaxSearchCombos)
		}
	}
	combos := make([]Params, 0, total)
	idx := make([]int, len(axes))
	for range total {
		p := base
		var desc []string
		for j, a := range axes {
			searchKeys[a.key](&p, a.vals[idx[j]])
			desc = append(desc, fmt.Sprintf("%s=%g", a.key, a.vals[idx[j]]))
		}
		if err := p.Validate(); err != nil {
			return nil, fmt.Errorf("search combination %s: %v", strings.Join(desc, " "), err)
		}
		combos = append(combos, p)
		for j := len(axes) - 1; j >= 0; j-- { // odometer: the last key turns fastest
			idx[j]++
			if idx[j] < len(axes[j].vals) {
				break
			}
			idx[j] = 0
		}
	}
	return combos, nil
}

// Search cross-validates every parameter set (CrossValidate) and returns
// the results, in the order of combos, without their per-station rows.
func Search(pts []Point, combos []Params, classify func(z float64) uint8) ([]CrossValResult, error) {
	return SearchBlocks(pts, combos, 0, classify)
}

// SearchBlocks is Search by spatial block cross-validation
// (CrossValidateBlocks with blocks of blockKm) when blockKm > 0, by
// leave-one-out (CrossValidate) when it is 0.
func SearchBlocks(pts []Point, combos []Params, blockKm float64, classify func(z float64) uint8) ([]CrossValResult, error) {
	rs := make([]CrossValResult, len(combos))
	for i, p := range combos {
		var r CrossValResult
		var err error
		if blockKm != 0 {
			r, err = CrossValidateBlocks(pts, p, blockKm, classify)
		} else {
			r, err = CrossValidate(pts, p, classify)
		}
		if err != nil {
			return nil, err
		}
		r.Stations = nil // only the figures are kept
		rs[i] = r
	}
	return rs, nil
}

// Rank orders results by RMSE, then MAE, then their given order; sets with
// nothing counted come last. It returns the indices of rs, best first.
func Rank(rs []CrossValResult) []int {
	order := make([]int, len(rs))
	for i := range order {
		order[i] = i
	}
	key := func(v float64) float64 {
		if math.IsNaN(v) {
			return math.Inf(1)
		}
		return v
	}
	sort.SliceStable(order, func(a, b int) bool {
		ra, rb := rs[order[a]], rs[order[b]]
		if x, y := key(ra.RMSE), key(rb.RMSE); x != y {
			return x < y
		}
		return key(ra.MAE) < key(rb.MAE)
	})
	return order
}
