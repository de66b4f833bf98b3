package pipeline

import (
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"testing"

	"drygrid/grid"
)

const exampleSPI = "../testdata/example/spi.csv"

// TestComputeShares: the band shares of a run are shares of the covered
// area, so they add up to 100 %, and the share in drought is the sum of the
// drought bands' (a property of the tally, not a reference check; it is
// worked out from the drought bands' area, so it agrees with the sum of
// their shares to rounding).
func TestComputeShares(t *testing.T) {
	res, err := Compute(context.Background(), NewJob(exampleSPI, ""))
	if err != nil {
		t.Fatal(err)
	}
	sum, drought := 0.0, 0.0
	for _, b := range res.Scheme.Bands {
		sum += res.BandPct[b.Code]
		if b.Drought {
			drought += res.BandPct[b.Code]
		}
	}
	if math.Abs(sum-100) > 1e-9 || math.Abs(drought-res.InDroughtPct) > 1e-9 {
		t.Errorf("shares add up to %g, in drought %g vs %g", sum, drought, res.InDroughtPct)
	}
	if !(res.CoveredPct > 0 && res.CoveredPct <= 100) || res.CoveredCells == 0 || res.Index == nil || res.Bands == nil {
		t.Errorf("covered %g%% (%d cells), rasters %v %v", res.CoveredPct, res.CoveredCells, res.Index != nil, res.Bands != nil)
	}
}

// TestRunCancelled: a cancelled run publishes nothing and says why.
func TestRunCancelled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	for _, layers := range []string{"index,bands", "all"} { // streamed, in memory
		out := filepath.Join(t.TempDir(), "layers")
		job := NewJob(exampleSPI, out)
		job.Layers, _ = ParseLayers(layers)
		delete(job.Layers, "regions")
		if _, err := Run(ctx, job); !errors.Is(err, context.Canceled) {
			t.Errorf("layers %s: %v, want context.Canceled", layers, err)
		}
		if _, err := os.Stat(out); !errors.Is(err, os.ErrNotExist) {
			t.Errorf("layers %s: the output directory exists: %v", layers, err)
		}
	}
}

// TestValidateUsage: each setting out of range is a usage error
// (errors.Is ErrUsage) naming the flag, with the job file's key.
func TestValidateUsage(t *testing.T) {
	cases := []struct {
		edit     func(j *Job)
		msg, key string
	}{
		{func(j *Job) { j.Res = 0 }, "--res 0: must be in (0, 10] degrees", "grid.res"},
		{func(j *Job) { j.Res = grid.MaxRes + 1 }, "--res 11: must be in (0, 10] degrees", "grid.res"},
		{func(j *Job) { j.BBox = &[4]float64{0, 10, 5, 5} }, `--bbox "0,10,5,5": south 10 must be below north 5`, "grid.bbox"},
		{func(j *Job) { j.Params.Neighbors = 0 }, "interp: neighbors 0 must be at least 1", "interpolation.neighbors"},
		{func(j *Job) { j.Layers = LayerSet{"regions": true} }, "--layers regions needs --regions FILE.geojson", "output.layers"},
		{func(j *Job) { j.History = "h.csv" }, "--history needs --regions FILE.geojson", "history.file"},
		{func(j *Job) { j.Date = "2025-13-01" }, `--date "2025-13-01" is not a calendar date YYYY-MM-DD`, "date"},
		{func(j *Job) { j.SimplifyKm = -1 }, "--simplify-km -1: must be 0 or more", "output.simplify_km"},
		{func(j *Job) { j.Out = "" }, "--out DIR is required", ""},
	}
	for _, c := range cases {
		j := NewJob(exampleSPI, "out")
		c.edit(&j)
		err := j.Validate()
		var ue *UsageError
		if !errors.Is(err, ErrUsage) || !errors.As(err, &ue) || err.Error() != c.msg || ue.Key != c.key {
			t.Errorf("%v (key %q), want %q (key %q)", err, ue.Key, c.msg, c.key)
		}
	}
	j := NewJob(exampleSPI, "out")
	if err := j.Validate(); err != nil {
		t.Errorf("defaults: %v", err)
	}
}

// TestGridTooLarge: a grid over grid.MaxCells is a usage error before
// anything is allocated or written.
func TestGridTooLarge(t *testing.T) {
	out := filepath.Join(t.TempDir(), "layers")
	job := NewJob(exampleSPI, out)
	job.Res, job.BBox = 0.01, &[4]float64{-180, -90, 180, 90}
	if _, err := Run(context.Background(), job); !errors.Is(err, ErrUsage) || !errors.Is(err, grid.ErrTooLarge) {
		t.Errorf("%v, want a usage error wrapping grid.ErrTooLarge", err)
	}
}
