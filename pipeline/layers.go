package pipeline

import (
	"fmt"
	"strings"
)

// AllLayers are the layer names a job may ask for, in the order they are
// written.
var AllLayers = []string{"index", "bands", "geojson", "stations", "regions", "map", "page"}

// layerFiles lists the files each layer writes in the output directory.
var layerFiles = map[string][]string{
	"index":    {"index.tif"},
	"bands":    {"bands.tif", "bands.tif.aux.xml"},
	"geojson":  {"bands.geojson"},
	"stations": {"stations.geojson"},
	"regions":  {"regions.csv", "regions.json"},
	"map":      {"map.png"},
	"page":     {"map.html"},
}

// LayerSet is the set of layers a run writes.
type LayerSet map[string]bool

// ParseLayers reads a comma-separated list of layer names; "" or "all"
// means every layer.
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
		if _, ok := layerFiles[name]; !ok {
			return nil, usageAt("--layers: ", "output.layers", "unknown layer "+strqt(name)+" (choose from "+strings.Join(AllLayers, ",")+")")
		}
		set[name] = true
	}
	if len(set) == 0 {
		return nil, usageAt("--layers: ", "output.layers", "no layer named (choose from "+strings.Join(AllLayers, ",")+")")
	}
	return set, nil
}

// String lists the layers in writing order.
func (l LayerSet) String() string {
	var out []string
	for _, name := range AllLayers {
		if l[name] {
			out = append(out, name)
		}
	}
	return strings.Join(out, ",")
}

func strqt(s string) string { return fmt.Sprintf("%q", s) }
