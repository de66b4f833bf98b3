// Package bands holds band schemes: named severity bands over z (SPI units),
// the default scheme, scheme files (TOML), and the classification of z into
// band codes. In the data flow it turns the index raster into the band
// raster, and it gives every layer the band's key, label, colour and whether
// it counts as "in drought".
//
// A scheme's bands, driest first, tile the whole real line with no gap or
// overlap, meeting at finite cut points each included in exactly one band.
// Codes run from 1 to 255; code 0 is no data in band rasters. The default
// scheme (Default) has nine bands; dry bands include their upper bound and
// wet bands their lower bound:
//
//	code  key           label         z range
//	1     parched       Parched       z <= -2.0
//	2     very-dry      Very dry      -2.0 < z <= -1.5
//	3     dry           Dry           -1.5 < z <= -1.0
//	4     slightly-dry  Slightly dry  -1.0 < z <= -0.5
//	5     normal        Near normal   -0.5 < z < 0.5
//	6     slightly-wet  Slightly wet   0.5 <= z < 1.0
//	7     wet           Wet            1.0 <= z < 1.5
//	8     very-wet      Very wet       1.5 <= z < 2.0
//	9     soaked        Soaked         z >= 2.0
//
// The +/-1.0, 1.5 and 2.0 cut points follow McKee et al. (1993) and WMO-No.
// 1090 (2012); +/-0.5 is drygrid's own. "In drought" means codes 1-3
// (z <= -1.0). Colours are ColorBrewer's 9-class BrBG (Brewer, Penn State;
// Apache-2.0), colour-blind safe.
//
// A scheme's cuts are in a Unit: z (the default), percentiles (turned into
// z when read) or percent of normal (DefaultPctOfNormal, our own cuts).
// Scheme.For binds a scheme to a run's unit and refuses another; RangeOf
// gives a band's range in the run's unit for legends.
//
// See docs/design.md for the data flow and the other layers.
package bands
