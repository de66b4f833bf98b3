package pipeline

import (
	"encoding/json"
	"fmt"
	"io"
	"math"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
)

// demoDistrictNames are the invented districts of the demo, west to east,
// north row first. They name parts of the fictitious archipelago only.
var demoDistrictNames = [2][3]string{
	{"Kelverin North-West", "Kelverin North", "Kelverin North-East"},
	{"Kelverin South-West", "Kelverin South", "Kelverin South-East"},
}

// writeDemoDistricts writes six invented districts that tile the demo bbox:
// a 3 x 2 lattice whose inner corners are moved by a fixed pattern so the
// borders do not follow the grid.
func writeDemoDistricts(w io.Writer, bbox [4]float64) error {
	west, south, east, north := bbox[0], bbox[1], bbox[2], bbox[3]
	const nx, ny = 3, 2
	var lattice [ny + 1][nx + 1]orb.Point
	for j := 0; j <= ny; j++ {
		for i := 0; i <= nx; i++ {
			x := west + (east-west)*float64(i)/nx
			y := north - (north-south)*float64(j)/ny
			if i > 0 && i < nx {
				x += 0.6 * math.Sin(float64(3*i+5*j)) // inner meridian borders wander
			}
			if j > 0 && j < ny {
				y += 0.4 * math.Cos(float64(7*i+j))
			}
			lattice[j][i] = orb.Point{round6(x), round6(y)}
		}
	}
	fc := geojson.NewFeatureCollection()
	for j := 0; j < ny; j++ {
		for i := 0; i < nx; i++ {
			// counter-clockwise: south-west, south-east, north-east, north-west
			ring := orb.Ring{lattice[j+1][i], lattice[j+1][i+1], lattice[j][i+1], lattice[j][i], lattice[j+1][i]}
			f := geojson.NewFeature(orb.Polygon{ring})
			f.Properties["name"] = demoDistrictNames[j][i]
			f.Properties["invented"] = true
			fc.Append(f)
		}
	}
	b, err := json.Marshal(fc)
	if err != nil {
		return fmt.Errorf("demo districts: %w", err)
	}
	_, err = w.Write(append(b, '\n'))
	return err
}

func round6(v float64) float64 { return math.Round(v*1e6) / 1e6 }
