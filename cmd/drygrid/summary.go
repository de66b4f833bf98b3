package main

import (
	"fmt"
	"io"
	"sort"
	"strings"

	"drygrid/pipeline"
)

// printSummary writes the closing summary of a grid run.
func printSummary(w io.Writer, job pipeline.Job, r *pipeline.Result) {
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
	fmt.Fprintf(w, "grid: %s, %d cells, %.1f%% of the area covered\n", r.Spec, r.Spec.Len(), r.CoveredPct)
	fmt.Fprintf(w, "bands (share of covered area):\n")
	width := 18 // the longest range in z; percent of normal is longer
	for _, b := range r.Scheme.Bands {
		width = max(width, len(r.Scheme.RangeOf(b)))
	}
	for _, b := range r.Scheme.Bands {
		flag := ""
		if b.Drought {
			flag = "  in drought"
		}
		fmt.Fprintf(w, "  %-12s %-*s %5.1f%%%s\n", b.Label, width, r.Scheme.RangeOf(b), r.BandPct[b.Code], flag)
	}
	fmt.Fprintf(w, "in drought: %.1f%% of the covered area\n", r.InDroughtPct)
	if len(r.Files) > 0 {
		fmt.Fprintf(w, "wrote %s in %s (%.1fs)\n", strings.Join(r.Files, ", "), job.Out, r.Elapsed.Seconds())
	}
}
