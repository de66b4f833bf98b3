package pipeline

import (
	"fmt"
	"slices"
	"strings"
)

// AllLayers are the layers "all" (the default) writes, in the order they
// are written.
var AllLayers = []string{"index", "bands", "geojson", "stations", "regions", "map", "page"}

// ExtraLayers are the layers written only when named (after AllLayers, in
// this order): "support" (support.tif, support_count.tif: the distance to
// the nearest station and the stations used, per cell) costs about one more
// pass of the interpolation, twice over (one file each), which a default
// run should not pay.
var ExtraLayers = []string{"support"}

// LayerNames are every layer a job may ask for, in writing order.
func LayerNames() []string { return append(slices.Clone(AllLayers), ExtraLayers...) }

// layerFiles lists the files each layer writes in the output directory.
var layerFiles = map[string][]string{
	"index":    {"index.tif"},
	"bands":    {"bands.tif", "bands.tif.aux.xml"},
	"geojson":  {"bands.geojson"},
	"stations": {"stations.geojson"},
	"regions":  {"regions.csv", "regions.json"},
	"map":      {"map.png"},
	"page":     {"map.html"},
	"support":  {"support.tif", "support_count.tif"},
}

// LayerSet is the set of layers a run writes.
type LayerSet map[string]bool

// ParseLayers reads a comma-separated list of layer names; "" or "all"
// means AllLayers, and "all" in a list adds them (all,support).
func ParseLayers(s string) (LayerSet, error) {
	set := LayerSet{}
	s = strings.TrimSpace(s)
	if s == "" || s == "all" {
		for _, l := range AllLayers {
			set[l] = true
		}
		return set, nil
	}
	for _, part := range strings.Split(s, ",") {
		name := strings.ToLower(strings.TrimSpace(part))
		if name == "" {
			continue
		}
		if name == "all" {
			for _, l := range AllLayers {
				set[l] = true
			}
			continue
		}
		if _, ok := layerFiles[name]; !ok {
			return nil, usageAt("--layers: ", "output.layers", "unknown layer "+strqt(name)+" (choose from "+strings.Join(LayerNames(), ",")+")")
		}
		set[name] = true
	}
	if len(set) == 0 {
		return nil, usageAt("--layers: ", "output.layers", "no layer named (choose from "+strings.Join(LayerNames(), ",")+")")
	}
	return set, nil
}

// String lists the layers in writing order.
func (l LayerSet) String() string {
	var out []string
	for _, name := range LayerNames() {
		if l[name] {
			out = append(out, name)
		}
	}
	return strings.Join(out, ",")
}

func strqt(s string) string { return fmt.Sprintf("%q", s) }
