package pipeline

import (
	"bufio"
	"encoding/csv"
	"strconv"

	"drygrid/bands"
	"drygrid/interp"
	"drygrid/publish"
	"drygrid/station"
)

// WriteResiduals writes the cross-validation residuals to path (atomically), one row per station: id, position, observed and
// predicted z, residual, stations used, counted, and both bands' keys.
func WriteResiduals(path string, v *station.Values, r interp.CrossValResult, scheme *bands.Scheme) error {
	key := func(code uint8) string {
		if b, ok := scheme.Band(code); ok {
			return b.Key
		}
		return ""
	}
	num := func(x float64) string { return strconv.FormatFloat(x, 'f', 6, 64) }
	return publish.WriteFile(path, func(bw *bufio.Writer) error {
		cw := csv.NewWriter(bw)
		if err := cw.Write([]string{"station", "latitude", "longitude", "observed", "predicted", "residual",
			"n_used", "counted", "observed_band", "predicted_band"}); err != nil {
			return err
		}
		for i, s := range v.Stations {
			x := r.Stations[i]
			row := []string{s.ID, num(s.Lat), num(s.Lon), num(x.Observed), "", "", strconv.Itoa(x.N), strconv.FormatBool(x.Counted), "", ""}
			if x.Counted {
				row[4], row[5] = num(x.Predicted), num(x.Predicted-x.Observed)
				row[8], row[9] = key(x.ObservedBand), key(x.PredictedBand)
			}
			if err := cw.Write(row); err != nil {
				return err
			}
		}
		cw.Flush()
		return cw.Error()
	})
}
