package interp

import (
	"math"
	"strings"
	"testing"
)

// FuzzSearchTerms: the search-term parser never panics, and every
// combination it accepts is a valid parameter set.
func FuzzSearchTerms(f *testing.F) {
	for _, s := range []string{"power=1,2,3", "radius-km=200,300,500 neighbors=4,8", "sectors=0,4,8", "min-stations=1,2", "power=", "=1", "power=1e309"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		combos, err := SearchCombos(DefaultParams(), []string{s})
		if err != nil {
			if !strings.HasPrefix(err.Error(), "search") {
				t.Fatalf("%q: error %q does not begin with search", s, err)
			}
			return
		}
		if len(combos) == 0 || len(combos) > MaxSearchCombos {
			t.Fatalf("%q: %d combinations", s, len(combos))
		}
		for _, p := range combos {
			if err := p.Validate(); err != nil {
				t.Fatalf("%q: accepted %+v: %v", s, p, err)
			}
		}
	})
}

// TestSearchCombosOrder: the first key varies slowest, values in the order
// given (an odometer), and the base fills the keys not searched.
func TestSearchCombosOrder(t *testing.T) {
	base := DefaultParams()
	combos, err := SearchCombos(base, []string{"power=1,3", "radius-km=100,200,50"})
	if err != nil {
		t.Fatal(err)
	}
	want := [][2]float64{{1, 100}, {1, 200}, {1, 50}, {3, 100}, {3, 200}, {3, 50}}
	if len(combos) != len(want) {
		t.Fatalf("%d combinations, want %d", len(combos), len(want))
	}
	for i, w := range want {
		p := combos[i]
		if p.Power != w[0] || p.RadiusKm != w[1] || p.Neighbors != base.Neighbors || p.MinStations != base.MinStations {
			t.Errorf("combination %d: %+v, want power %g radius %g", i, p, w[0], w[1])
		}
	}
	for _, bad := range []string{"power=1 power=2", "neighbors=2.5", "speed=1", "power=1,x"} {
		if _, err := SearchCombos(base, strings.Fields(bad)); err == nil {
			t.Errorf("%q accepted", bad)
		}
	}
}

// TestRank: by RMSE, ties by MAE, then the order given; nothing counted
// (NaN) last.
func TestRank(t *testing.T) {
	nan := math.NaN()
	rs := []CrossValResult{{RMSE: nan, MAE: nan}, {RMSE: 2, MAE: 1}, {RMSE: 1, MAE: 3}, {RMSE: 1, MAE: 2}, {RMSE: 2, MAE: 1}}
	got := Rank(rs)
	want := []int{3, 2, 1, 4, 0}
	for i := range want {
		if got[i] != want[i] {
			t.Fatalf("order %v, want %v", got, want)
		}
	}
}
