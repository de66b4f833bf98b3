package main

import (
	"fmt"
	"io"
	"sort"
	"strings"

	"drygrid/grid"
)

// coverageShares gives the covered share of the grid's area and each band's
// share of the covered area, both in percent, cells weighted by their
// ellipsoidal area.
func coverageShares(b *grid.Uint8) (coveredPct float64, bandPct map[uint8]float64) {
	areas := b.Spec.RowAreasKm2()
	var byCode [256]float64 // area by band code
	var seen [256]bool
	var total, covered float64
	for row := 0; row < b.Spec.Rows; row++ {
		a := areas[row]
		for _, c := range b.Data[row*b.Spec.Cols : (row+1)*b.Spec.Cols] {
			total += a
			if c != b.NoData {
				covered += a
				byCode[c] += a
				seen[c] = true
			}
		}
	}
	bandPct = map[uint8]float64{}
	for c, a := range byCode {
		if seen[c] {
			bandPct[uint8(c)] = 100 * a / covered
		}
	}
	if total > 0 {
		coveredPct = 100 * covered / total
	}
	return coveredPct, bandPct
}

// printSummary writes the closing summary of a grid run.
func printSummary(w io.Writer, job gridJob, r *gridResult) {
	v := r.Values
	fmt.Fprintf(w, "stations: %d rows read from %s, %d sites used", v.Read, job.Stations, len(v.Stations))
	if rej := v.RejectedByReason(); len(rej) > 0 {
		var parts []string
		for reason, n := range rej {
			parts = append(parts, fmt.Sprintf("%d %s", n, reason))
		}
		sort.Strings(parts)
		fmt.Fprintf(w, ", rejected: %s", strings.Join(parts, ", "))
	}
	fmt.Fprintln(w)
	var covered float64
	var bands map[uint8]float64
	if r.Bands == nil {
		covered, bands = r.Tally.shares()
	} else {
		covered, bands = coverageShares(r.Bands)
	}
	fmt.Fprintf(w, "grid: %s, %d cells, %.1f%% of the area covered\n", r.Spec, r.Spec.Len(), covered)
	fmt.Fprintf(w, "bands (share of covered area):\n")
	inDrought := 0.0
	for _, b := range r.Scheme.Bands {
		flag := ""
		if b.Drought {
			flag = "  in drought"
			inDrought += bands[b.Code]
		}
		fmt.Fprintf(w, "  %-12s %-18s %5.1f%%%s\n", b.Label, b.Range(), bands[b.Code], flag)
	}
	fmt.Fprintf(w, "in drought: %.1f%% of the covered area\n", inDrought)
	if len(r.Files) > 0 {
		fmt.Fprintf(w, "wrote %s in %s (%.1fs)\n", strings.Join(r.Files, ", "), job.Out, r.Elapsed.Seconds())
	}
}
