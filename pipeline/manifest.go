package pipeline

import (
	"math"
	"strings"
	"time"

	"drygrid/interp"
	"drygrid/layer"
	"drygrid/manifest"
	"drygrid/station"
)

// buildManifest describes the run whose files are in dir.
func buildManifest(job *Job, res *Result, dir string, start time.Time) (*manifest.Manifest, error) {
	var inputs []manifest.File
	// A stations table made in memory by the index step is an output
	// (job.Extra), not an input.
	if job.StationsData == nil {
		f, err := manifest.Input(job.Stations, "stations")
		if err != nil {
			return nil, err
		}
		inputs = append(inputs, f)
	}
	mask := job.Mask
	if mask == MaskRegions {
		mask = "" // the regions file is an input already
	}
	for _, in := range [][2]string{{job.Scheme, "scheme"}, {job.Regions, "regions"}, {mask, "mask"}} {
		if in[0] == "" {
			continue
		}
		f, err := manifest.Input(in[0], in[1])
		if err != nil {
			return nil, err
		}
		inputs = append(inputs, f)
	}
	if job.JobFile != "" {
		f, err := manifest.Input(job.JobFile, "job")
		if err != nil {
			return nil, err
		}
		inputs = append(inputs, f)
	}
	inputs = append(inputs, job.extraInputs...)
	outputs, err := manifest.Outputs(dir, nil)
	if err != nil {
		return nil, err
	}
	p := job.Params
	var bbox any
	if job.BBox != nil {
		bbox = job.BBox[:]
	}
	params := map[string]any{
		"kind": string(job.Values.Kind), "value_column": res.Values.Column,
		"res_deg": job.Res, "bbox": bbox,
		"power": p.Power, "neighbors": p.Neighbors, "radius_km": p.RadiusKm, "min_stations": p.MinStations,
		"sectors": p.Sectors, "scheme": res.Scheme.Name, "region_key": job.RegionKey,
		"layers": strings.Split(job.Layers.String(), ","), "simplify_km": job.SimplifyKm,
	}
	if job.Values.Kind != station.KindSPI {
		// The unit of index.tif and of the scheme's cuts when it is not
		// SPI's z (left out for SPI, whose manifest stays as it was).
		params["index_unit"] = job.units()
		params["scheme_unit"] = string(res.Scheme.Unit)
	}
	if job.HatchBeyondKm > 0 {
		params["hatch_beyond_km"] = job.HatchBeyondKm // left out when off, so the manifest stays as it was
	}
	if job.Mask != "" {
		params["mask"] = job.Mask
	}
	for k, v := range job.ExtraParams {
		params[k] = v
	}
	// What the layers show: the date, the window and the kind.
	if job.Date != "" {
		params["date"] = job.Date
	}
	if job.WindowDays > 0 {
		params["window_days"] = job.WindowDays
	}
	if _, ok := params["year"]; ok && job.Index != nil && job.Index.Options.Year != 0 {
		params["year"] = job.Index.Options.Year
	}
	rejected := map[string]int{}
	for reason, n := range res.Values.RejectedByReason() {
		rejected[reason] = n
	}
	covered := res.CoveredCells
	counts := map[string]any{
		"stations_read": res.Values.Read, "stations_used": len(res.Values.Stations),
		"stations_rejected": rejected, "station_warnings": len(res.Values.Warnings),
		"cells": res.Spec.Len(), "cells_covered": covered, "regions": len(res.Regions),
	}
	if res.mask != nil {
		counts["mask"] = maskFigures(res)
	}
	for k, v := range job.ExtraCounts {
		counts[k] = v
	}
	if job.CrossVal {
		cv, err := interp.CrossValidate(Points(res.Values), job.Params, res.Scheme.Classify)
		if err != nil {
			return nil, err
		}
		res.CrossVal = &cv
		counts["crossval"] = CrossValFigures(cv)
	}
	s := res.Spec
	gridInfo := map[string]any{
		"crs": "EPSG:4326", "west": s.West, "north": s.North, "east": s.East(), "south": s.South(),
		"res_deg": s.Res, "cols": s.Cols, "rows": s.Rows, "crosses_antimeridian": s.CrossesAntimeridian(),
		"geotransform": s.GeoTransform(),
	}
	timings := map[string]float64{}
	for k, v := range res.Timings {
		timings[k] = v
	}
	for k, v := range job.extraTimings {
		timings[k] = v
	}
	timings["total_s"] = seconds(job.now().Sub(start))
	command := job.Command
	if command == "" {
		command = "grid"
	}
	return &manifest.Manifest{
		Software: "drygrid", Version: job.version(), Command: command, Caution: layer.Caution,
		Parameters: params, Inputs: inputs, Outputs: outputs, Counts: counts, Grid: gridInfo, Timings: timings,
	}, nil
}

// version is the job's software version.
func (j *Job) version() string {
	if j.Version == "" {
		return "dev"
	}
	return j.Version
}

// cvNum is a figure for JSON: NaN (nothing counted) becomes null.
func cvNum(v float64) any {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return v
}

// CrossValParams are the interpolation parameters as JSON keys
// (command-line names with underscores).
func CrossValParams(p interp.Params) map[string]any {
	return map[string]any{"power": p.Power, "neighbors": p.Neighbors, "radius_km": p.RadiusKm,
		"min_stations": p.MinStations, "sectors": p.Sectors}
}

// CrossValFigures are the leave-one-out figures as a JSON object, for
// `crossval --json` and the manifest of a run with Job.CrossVal: n, rmse,
// mae, bias (mean of predicted - observed), band_agreement (0..1),
// stations, not_counted and params. Figures over no station are null.
// Spatial block cross-validation (r.BlockKm > 0) adds method "blocks",
// block_km and blocks (the number of blocks holding a station).
func CrossValFigures(r interp.CrossValResult) map[string]any {
	m := map[string]any{
		"n": r.N, "rmse": cvNum(r.RMSE), "mae": cvNum(r.MAE), "bias": cvNum(r.Bias),
		"band_agreement": cvNum(r.BandAgreement),
		"stations":       len(r.Stations), "not_counted": len(r.Stations) - r.N,
		"residual": "predicted - observed", "params": CrossValParams(r.Params),
	}
	if r.BlockKm > 0 {
		m["method"], m["block_km"], m["blocks"] = "blocks", r.BlockKm, r.Blocks
	}
	return m
}
