package picture

import (
	"math"
	"strconv"
)

// picSteps are the graticule spacings tried, in degrees. Whole-degree steps
// 1, 2, 5, 10, 15 and 30 are common practice on atlas maps; the sub-degree
// ones serve small study areas.
var picSteps = []float64{0.1, 0.2, 0.5, 1, 2, 5, 10, 15, 30}

// picAxisStep picks the graticule step for one axis spanning span degrees
// over px pixels: the smallest step drawing at most eight intervals whose
// lines stand at least minGap pixels apart (labels must not touch), or the
// largest step when none does.
func picAxisStep(span, px, minGap float64) float64 {
	for _, s := range picSteps {
		if span/s <= 8+1e-9 && (s/span*px >= minGap || span/s < 1) {
			return s
		}
	}
	return picSteps[len(picSteps)-1]
}

// picStepsFrom gives the multiples of step in [lo, hi], snapped to the step
// so that labels read cleanly (no 0.30000000000000004).
func picStepsFrom(lo, hi, step float64) []float64 {
	var out []float64
	k0 := math.Ceil(lo/step - 1e-9)
	k1 := math.Floor(hi/step + 1e-9)
	for k := k0; k <= k1 && len(out) < 1000; k++ {
		v := k * step
		if inv := math.Round(1 / step); math.Abs(1/step-inv) < 1e-9 {
			v = k / inv
		}
		out = append(out, v)
	}
	return out
}

// picDecimals is the number of decimals a graticule step needs.
func picDecimals(step float64) int {
	for d := 0; d < 6; d++ {
		p := math.Pow(10, float64(d))
		if math.Abs(step*p-math.Round(step*p)) < 1e-9 {
			return d
		}
	}
	return 6
}

// picLonLabel labels a meridian: longitudes past 180 (antimeridian grids)
// read as west, e.g. 190 -> "170°W"; 0 and 180 carry no letter.
func picLonLabel(lon float64, dec int) string {
	for lon > 180+1e-9 {
		lon -= 360
	}
	for lon <= -180+1e-9 {
		lon += 360
	}
	a := math.Abs(lon)
	s := strconv.FormatFloat(a, 'f', dec, 64) + "°"
	switch {
	case a < 1e-9 || math.Abs(a-180) < 1e-9:
		return s
	case lon < 0:
		return s + "W"
	}
	return s + "E"
}

// picLatLabel labels a parallel, e.g. -40 -> "40°S"; the equator is "0°".
func picLatLabel(lat float64, dec int) string {
	a := math.Abs(lat)
	s := strconv.FormatFloat(a, 'f', dec, 64) + "°"
	switch {
	case a < 1e-9:
		return s
	case lat < 0:
		return s + "S"
	}
	return s + "N"
}
