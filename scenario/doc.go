// Package scenario builds drygrid's demo: an invented scenario, the Kelverin
// Islands, with some two hundred stations, 65 years (1961-2025) of 30-day
// window totals drawn from per-station gamma climatologies, and a target-year
// anomaly (a dry core in the west, a wet one in the east) imposed on them.
// It feeds the whole data flow from its first step: invented daily records
// (WriteDailyCSV: the window totals shared out over their days, with gaps
// and flagged days) give back the totals, which go through the index step and the resulting values through gridding; the
// islands (rotated ellipses) place the stations. Nothing in it is real data:
// the islands do not exist and the area (38-45 S, 128-116 W) is open ocean
// in the South Pacific. The scenario comes from a fixed seed, so every call
// to DemoScenario returns the same one.
//
// See docs/design.md for the data flow the demo runs through.
package scenario
