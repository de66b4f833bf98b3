package pipeline

import (
	"fmt"
	"strings"

	"drygrid/station"
)

// kindName is the index kind as titles say it.
func kindName(k station.Kind) string {
	switch k {
	case station.KindPercentile:
		return "percentile"
	case station.KindPctOfNormal:
		return "percent of normal"
	}
	return "SPI"
}

// Describe says what the job's layers show: the index kind, the window and
// the date ("SPI, 30 days ending 2026-11-30"); the parts not known are left
// out ("SPI" alone for a plain value table without a date).
func (j *Job) Describe() string {
	s := kindName(j.Values.Kind)
	switch {
	case j.WindowDays > 0 && j.Date != "":
		s += fmt.Sprintf(", %d days ending %s", j.WindowDays, j.Date)
	case j.WindowDays > 0:
		s += fmt.Sprintf(", %d days", j.WindowDays)
	case j.WindowLabel != "" && j.Date != "":
		s += ", " + j.WindowLabel + ", " + j.Date
	case j.WindowLabel != "":
		s += ", " + j.WindowLabel
	case j.Date != "":
		s += ", " + j.Date
	case j.Index != nil && j.Index.Options.Year != 0:
		s += fmt.Sprintf(", %d", j.Index.Options.Year)
	}
	return s
}

// describes reports whether Describe says more than the kind.
func (j *Job) describes() bool { return strings.Contains(j.Describe(), ",") }

// units is the unit of the index raster: SPI in its own z units, a
// percentile turned into the z of the normal distribution, or percent of
// normal itself (interpolated as it is: it has no z).
func (j *Job) units() string {
	switch j.Values.Kind {
	case station.KindPercentile:
		return "percentile -> z"
	case station.KindPctOfNormal:
		return "% of normal"
	}
	return "SPI (z)"
}
