package interp

import (
	"fmt"
	"math"
)

// EarthRadiusKm is the mean radius of the Earth in km that distances are
// measured on: the IUGG mean radius R1 = (2a + b) / 3 of the GRS 1980
// ellipsoid (Moritz 2000, Geodetic Reference System 1980).
const EarthRadiusKm = 6371.0088

// halfCircumferenceKm is the longest great-circle distance on the sphere.
const halfCircumferenceKm = math.Pi * EarthRadiusKm

// Params are the inverse-distance-weighting settings (see the package doc
// for the rules they set).
type Params struct {
	Power       float64 // exponent of the weight d^-power; default 2
	Neighbors   int     // the k nearest stations within the radius are used; default 12
	RadiusKm    float64 // search radius in km, great-circle; default 300
	MinStations int     // fewer stations within the radius -> no data; default 3
	Workers     int     // goroutines for Grid; 0 = GOMAXPROCS. The result never depends on it.
	// Sectors, when 4 or 8, balances the neighbours by direction (Shepard
	// 1968): see sectors.go. 0 = off.
	Sectors int
}

// DefaultParams are the defaults of the command line: power 2, 12
// neighbours, 300 km, at least 3 stations, all cores, no sectors.
func DefaultParams() Params {
	return Params{Power: 2, Neighbors: 12, RadiusKm: 300, MinStations: 3}
}

// Validate reports the first setting out of range, named as on the command
// line (--power, --neighbors, --radius-km, --min-stations).
func (p Params) Validate() error {
	if math.IsNaN(p.Power) || math.IsInf(p.Power, 0) || p.Power <= 0 {
		return fmt.Errorf("interp: power %g must be a finite number greater than 0", p.Power)
	}
	if p.Neighbors < 1 {
		return fmt.Errorf("interp: neighbors %d must be at least 1", p.Neighbors)
	}
	if math.IsNaN(p.RadiusKm) || p.RadiusKm <= 0 || p.RadiusKm >= halfCircumferenceKm {
		return fmt.Errorf("interp: radius-km %g must be greater than 0 and less than half the Earth's circumference (%.1f km)",
			p.RadiusKm, halfCircumferenceKm)
	}
	if p.MinStations < 1 || p.MinStations > p.Neighbors {
		return fmt.Errorf("interp: min-stations %d must be at least 1 and at most neighbors (%d)", p.MinStations, p.Neighbors)
	}
	if err := p.validateSectors(); err != nil {
		return err
	}
	if p.Workers < 0 {
		return fmt.Errorf("interp: workers %d must be 0 (all cores) or more", p.Workers)
	}
	return nil
}
