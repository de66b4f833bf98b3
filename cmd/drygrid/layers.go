package main

import (
	"strings"
)

// Layer names accepted by --layers, in the order they are written.
var allLayers = []string{"index", "bands", "geojson", "stations", "regions", "map", "page"}

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

// layerSet is the set of layers a run writes.
type layerSet map[string]bool

// parseLayers reads a comma-separated --layers value; "" or "all" means
// every layer.
func parseLayers(s string) (layerSet, error) {
	set := layerSet{}
	s = strings.TrimSpace(s)
	if s == "" || s == "all" {
		for _, l := range allLayers {
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
			return nil, usagef("--layers: unknown layer %q (choose from %s)", name, strings.Join(allLayers, ","))
		}
		set[name] = true
	}
	if len(set) == 0 {
		return nil, usagef("--layers: no layer named (choose from %s)", strings.Join(allLayers, ","))
	}
	return set, nil
}

// String lists the layers in writing order.
func (l layerSet) String() string {
	var out []string
	for _, name := range allLayers {
		if l[name] {
			out = append(out, name)
		}
	}
	return strings.Join(out, ",")
}
