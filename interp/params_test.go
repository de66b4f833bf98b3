package interp

import (
	"math"
	"strings"
	"testing"
)

// TestDefaultParams: the command-line defaults (power 2, 12 neighbours,
// 300 km, 3 stations, all cores).
func TestDefaultParams(t *testing.T) {
	p := DefaultParams()
	if p.Power != 2 || p.Neighbors != 12 || p.RadiusKm != 300 || p.MinStations != 3 || p.Workers != 0 {
		t.Fatalf("DefaultParams() = %+v", p)
	}
	if err := p.Validate(); err != nil {
		t.Fatal(err)
	}
}

// TestValidateMessages: each bad setting is named as on the command line,
// with its value and the rule it breaks. Half the circumference is
// pi * 6371.0088 = 20015.114 km.
func TestValidateMessages(t *testing.T) {
	ok := DefaultParams()
	cases := []struct {
		name   string
		change func(*Params)
		want   []string // all must appear in the message
	}{
		{"zero power", func(p *Params) { p.Power = 0 }, []string{"power 0", "greater than 0"}},
		{"negative power", func(p *Params) { p.Power = -1 }, []string{"power -1"}},
		{"NaN power", func(p *Params) { p.Power = math.NaN() }, []string{"power NaN", "finite"}},
		{"infinite power", func(p *Params) { p.Power = math.Inf(1) }, []string{"power +Inf"}},
		{"no neighbours", func(p *Params) { p.Neighbors = 0 }, []string{"neighbors 0", "at least 1"}},
		{"zero radius", func(p *Params) { p.RadiusKm = 0 }, []string{"radius-km 0", "greater than 0"}},
		{"NaN radius", func(p *Params) { p.RadiusKm = math.NaN() }, []string{"radius-km NaN"}},
		{"radius of half the circumference", func(p *Params) { p.RadiusKm = 20015.2 }, []string{"radius-km 20015.2", "half the Earth's circumference (20015.1 km)"}},
		{"min stations 0", func(p *Params) { p.MinStations = 0 }, []string{"min-stations 0", "at least 1"}},
		{"min stations above neighbours", func(p *Params) { p.Neighbors, p.MinStations = 4, 5 }, []string{"min-stations 5", "at most neighbors (4)"}},
		{"negative workers", func(p *Params) { p.Workers = -2 }, []string{"workers -2"}},
	}
	for _, c := range cases {
		p := ok
		c.change(&p)
		err := p.Validate()
		if err == nil {
			t.Errorf("%s: %+v accepted", c.name, p)
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: message %q lacks %q", c.name, err, w)
			}
		}
		if _, err2 := New([]Point{{0, 0, 0}}, p); err2 == nil || err2.Error() != err.Error() {
			t.Errorf("%s: New gives %v, Validate %v", c.name, err2, err)
		}
	}
	// Edges that are allowed.
	for _, p := range []Params{
		{Power: 0.01, Neighbors: 1, RadiusKm: 0.001, MinStations: 1},
		{Power: 50, Neighbors: 100, RadiusKm: 20015, MinStations: 100, Workers: 64},
	} {
		if err := p.Validate(); err != nil {
			t.Errorf("%+v: %v", p, err)
		}
	}
}

// TestNewRejectsBadPoints: stations with impossible coordinates or values
// are errors naming the station, not panics.
func TestNewRejectsBadPoints(t *testing.T) {
	for _, c := range []struct {
		pt   Point
		want string
	}{
		{Point{math.NaN(), 0, 0}, "station 1: longitude NaN"},
		{Point{math.Inf(-1), 0, 0}, "station 1: longitude -Inf"},
		{Point{0, 90.5, 0}, "station 1: latitude 90.5 is outside [-90, 90]"},
		{Point{0, math.NaN(), 0}, "station 1: latitude NaN"},
		{Point{0, 0, math.Inf(1)}, "station 1: value +Inf"},
	} {
		_, err := New([]Point{{1, 1, 1}, c.pt}, DefaultParams())
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%+v: error %v, want %q", c.pt, err, c.want)
		}
	}
	if _, err := New(nil, DefaultParams()); err == nil || !strings.Contains(err.Error(), "no stations") {
		t.Errorf("no points: %v", err)
	}
}

// TestHugeNeighbors: more neighbours than stations is allowed and means
// "all within the radius"; it must not size buffers by the setting.
func TestHugeNeighbors(t *testing.T) {
	p := Params{Power: 2, Neighbors: 1 << 40, RadiusKm: 500, MinStations: 2}
	ip, err := New([]Point{{0, 0, 1}, {1, 0, 3}, {0, 1, 5}}, p)
	if err != nil {
		t.Fatal(err)
	}
	// At (0.5, 0) all three are within 500 km: the value is their Shepard
	// mean, written out here with DistanceKm.
	z, n, ok := ip.At(0.5, 0)
	if !ok || n != 3 {
		t.Fatalf("At = %v, %d, %v; want all 3 stations", z, n, ok)
	}
	d := []float64{DistanceKm(0.5, 0, 0, 0), DistanceKm(0.5, 0, 1, 0), DistanceKm(0.5, 0, 0, 1)}
	w0, w2 := 1/(d[0]*d[0]), 1/(d[2]*d[2])
	if want := (w0*1 + w0*3 + w2*5) / (2*w0 + w2); math.Abs(z-want) > 1e-12 {
		t.Fatalf("At = %.17g, Shepard mean %.17g", z, want)
	}
}
