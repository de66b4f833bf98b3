// Package layertest holds test support for the layer encoders: an invented
// scenario (two fictitious islands, no real place or data) and helpers that
// keep files for a person to look at. In the data flow (index raster -> band
// raster -> layers) it stands in for the steps before the layers in the
// tests of the picture and the page (layer/picture, layer/page): NewFixture
// gives a grid, an analytic z field that passes through every default band,
// the band raster of that field on the islands, stations on the islands and
// three regions. BrewerBrBG9 holds the published colours of ColorBrewer's
// 9-class brown/blue-green diverging scheme (BrBG; Cynthia Brewer, Penn
// State, Apache-2.0), the reference the default bands' colours are checked
// against. LookDir keeps the files a test writes in the directory an
// environment variable names, for a person or a headless browser to look
// at. Only tests import it.
package layertest
