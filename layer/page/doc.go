// Package page writes map.html, a self-contained web page of one run. In the
// data flow (index raster -> band raster -> layers) it gathers the other
// layers into one file a person can open from disk: the band, station and
// region layers (the RFC 7946 documents of layer/geojson and the regions
// file, inlined), drawn as SVG by the page's own script with pan and zoom,
// tooltips for stations and regions, the legend of the bands with their z
// ranges, the table of regions (area, share covered, share in drought, the
// share in each band, mean z; sortable), the caution and the production
// line (Input.Produced). A station layer of more than DefaultMaxStations
// (2,000; Input.MaxStations) is thinned to a deterministic subset, one
// station per square cell of the map (the one nearest the cell's centre),
// and the page says how many it shows of how many and links the whole
// layer (Input.StationsHref, stations.geojson beside the page). A caller
// holding the stations need not hand the page the whole layer's text:
// ChooseStations makes the same choice from the positions, and the subset
// (geojson.EncodeStationsSubset) given with Input.StationsTotal makes the
// same page, byte for byte. Encode(w, in)
// error writes the page to an io.Writer and WriteFile beside it writes the
// file through a temporary name renamed at the end. With Input.FarGeoJSON
// the page draws the cells whose nearest station is farther than
// Input.FarKm over the bands with an SVG hatch pattern (assets/far.js,
// carried and hashed into the CSP only then) and the legend says "Nearest
// station over FarKm km"; without it the page is as it was.
//
// The page loads nothing from the network: its HTML, script and style are
// embedded (the assets directory) and the layers inlined, and its
// Content-Security-Policy forbids every load, allowing the script and style
// by their SHA-256 hashes. The same input gives the same bytes.
//
// The caution stands on the page: the maps are interpolated estimates from
// a station network, not official drought declarations; before acting on
// them the reader is to consult the national meteorological or
// hydrological service and follow local rules (layer.Caution, unless
// Input.Caution words it otherwise). See docs/design.md, "The job" and
// "Formats written".
package page
