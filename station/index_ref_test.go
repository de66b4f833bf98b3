package station

import (
	"bytes"
	"drygrid/internal/spitest"
	"drygrid/spi"
	"fmt"
	"math"
	"strconv"
	"testing"
)

const (
	idxFixStations = "../testdata/index/stations.csv"
	idxFixTotals   = "../testdata/index/totals.csv"
)

// idxRefRow is one station as testdata/spi_ref.py computes it with SciPy.
type idxRefRow struct {
	Station     string   `json:"station"`
	Year        int      `json:"year"`
	Years       int      `json:"years"`
	Zeros       int      `json:"zeros"`
	HasIndex    bool     `json:"has_index"`
	Total       *float64 `json:"total"`
	Percentile  *float64 `json:"percentile"`
	PctOfMedian *float64 `json:"pct_of_median"`
	Shape       *float64 `json:"shape"`
	Scale       *float64 `json:"scale"`
	A2          *float64 `json:"a2"`
	SPI         *float64 `json:"spi"`
}

// The whole index against an independent SciPy implementation of its
// rules (the package doc; testdata/spi_ref.py: gamma.fit(floc=0), gamma.cdf,
// norm.ppf, percentileofscore(kind="mean"), numpy.median, A^2 after
// Stephens 1974) on the invented fixtures: zeros (ST02, ST06), ties (ST05,
// 0.1 mm rounding), a short record (ST03), a missing target (ST04), missing
// cells (ST08), a bimodal station (ST07), an empty station (ST09), unknown
// stations, and reference periods including and excluding the target year.
// A station whose gamma fit SciPy's A^2 rejects (above the 5 % critical
// value of ADCritical5; ST07, bimodal) follows the poor-fit rule: by
// default the SPI of SciPy's empirical (Gringorten) run, with keep SciPy's
// gamma SPI, with drop none.
func TestIndexSciPy(t *testing.T) {
	runs := []IndexOptions{
		{},
		{Year: 2020, RefStart: 1981, RefEnd: 2010, MinYears: 25},
		{Year: 2015, RefStart: 1991, RefEnd: 2020},
		{Distribution: DistEmpirical},
		{Year: 2020, RefStart: 1981, RefEnd: 2010, MinYears: 25, Distribution: DistEmpirical},
		{Year: 2000, RefStart: 1991},
		{PoorFit: PoorFitKeep},
		{Year: 2015, RefStart: 1991, RefEnd: 2020, PoorFit: PoorFitDrop},
		{Year: 2000, RefStart: 1991, PoorFit: PoorFitEmpirical},
	}
	refs := map[string][]idxRefRow{}
	runRef := func(opt IndexOptions, dist string) []idxRefRow {
		args := []string{"index", idxFixStations, idxFixTotals, strconv.Itoa(opt.Year),
			strconv.Itoa(opt.RefStart), strconv.Itoa(opt.RefEnd), strconv.Itoa(opt.MinYears), dist}
		key := fmt.Sprint(args)
		if r, ok := refs[key]; ok {
			return r
		}
		var ref []idxRefRow
		spitest.RunRef(t, &ref, nil, args...)
		refs[key] = ref
		return ref
	}
	rejected := 0
	for _, opt := range runs {
		res, err := ComputeIndex(idxFixStations, idxFixTotals, opt)
		if err != nil {
			t.Fatal(err)
		}
		dist := opt.Distribution
		if dist == "" {
			dist = DistGamma
		}
		ref := runRef(opt, dist)
		if len(ref) != len(res.Rows) {
			t.Fatalf("%+v: %d rows, SciPy %d", opt, len(res.Rows), len(ref))
		}
		for i, r := range res.Rows {
			w := ref[i]
			tag := func() string { return r.Station + " " + strconv.Itoa(r.Year) + " " + dist + " " + opt.PoorFit }
			if dist == DistGamma && r.FitTested && w.A2 != nil && *w.A2 > spi.ADCritical5(r.Shape) {
				rejected++
				if !r.PoorFit && opt.PoorFit != PoorFitKeep || r.PoorFit && opt.PoorFit == PoorFitKeep {
					t.Errorf("%s: poor fit %v", tag(), r.PoorFit)
				}
				switch opt.PoorFit {
				case "", PoorFitEmpirical:
					e := runRef(opt, DistEmpirical)[i]
					w.SPI, w.HasIndex = e.SPI, e.HasIndex
				case PoorFitDrop:
					w.SPI, w.HasIndex = nil, false
				}
			} else if r.PoorFit {
				t.Errorf("%s: poor fit, but SciPy's A2 %v does not reject", tag(), w.A2)
			}
			if r.Station != w.Station || r.Year != w.Year || r.Years != w.Years || r.Zeros != w.Zeros || r.HasIndex != w.HasIndex {
				t.Errorf("%s: station %s year %d years %d zeros %d index %v; SciPy %+v", tag(), r.Station, r.Year, r.Years, r.Zeros, r.HasIndex, w)
				continue
			}
			idxCheck(t, tag()+" percentile", r.Percentile, w.Percentile, 1e-9, false)
			idxCheck(t, tag()+" pct_of_median", r.PctOfMedian, w.PctOfMedian, 1e-9, true)
			idxCheck(t, tag()+" shape", r.Shape, w.Shape, 1e-6, true)
			idxCheck(t, tag()+" scale", r.Scale, w.Scale, 1e-6, true)
			idxCheck(t, tag()+" A2", r.AD, w.A2, 1e-6, true)
			idxCheck(t, tag()+" spi", r.SPI, w.SPI, 1e-6, false)
			if r.Fitted && r.FitTested && r.FitOK != (*w.A2 <= spi.ADCritical5(r.Shape)) {
				t.Errorf("%s: fit_ok %v with SciPy A2 %.4f", tag(), r.FitOK, *w.A2)
			}
		}
		if res.SkippedUnknown != 3 {
			t.Errorf("%+v: skipped %d unknown-station rows, fixture has 3", opt, res.SkippedUnknown)
		}
	}
	if rejected < 5 {
		t.Errorf("%d rejected fits over the runs, want ST07's in each gamma run", rejected)
	}
}

// idxCheck compares a value with the reference (nil = absent, NaN here);
// rel chooses a relative rather than absolute tolerance.
func idxCheck(t *testing.T, what string, got float64, want *float64, tol float64, rel bool) {
	t.Helper()
	switch {
	case want == nil && math.IsNaN(got):
	case want == nil || math.IsNaN(got):
		t.Errorf("%s: %v, SciPy %v", what, got, want)
	case rel && !spitest.RelClose(got, *want, tol), !rel && math.Abs(got-*want) > tol:
		t.Errorf("%s: %.10g, SciPy %.10g", what, got, *want)
	}
}

// The fixture's known outcomes, by the rules of the index step.
func TestIndexFixtureOutcomes(t *testing.T) {
	res, err := ComputeIndex(idxFixStations, idxFixTotals, IndexOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if res.Year != 2020 {
		t.Errorf("latest year %d, want 2020", res.Year)
	}
	want := map[string]string{
		"ST03": "only 12 reference years (needs 30)",
		"ST04": "no total for 2020",
		"ST06": "reference median is 0; gamma not fitted: fewer than 2 non-zero totals",
		"ST09": "no total for 2020; only 0 reference years (needs 30)",
	}
	// ST07 (bimodal) fails the fit test: its note carries the row's A2,
	// which TestIndexSciPy checks against the NumPy A2 of
	// testdata/spi_ref.py, and the 5 % critical value of ADCritical5
	// (D'Agostino and Stephens 1986, table 4.21).
	for _, r := range res.Rows {
		if r.Station == "ST07" {
			if !(r.AD > spi.ADCritical5(r.Shape)) {
				t.Errorf("ST07: A2 %v not above the critical %v", r.AD, spi.ADCritical5(r.Shape))
			}
			want["ST07"] = fmt.Sprintf("gamma rejected by Anderson-Darling at 5 %% (A2 %.3f > %.3f); spi from the empirical plotting position instead (poor fit: empirical)", r.AD, spi.ADCritical5(r.Shape))
		}
	}
	for _, r := range res.Rows {
		if r.Note != want[r.Station] {
			t.Errorf("%s note %q, want %q", r.Station, r.Note, want[r.Station])
		}
	}
	st08 := res.Rows[7]
	if st08.Lon != -159.5 || st08.Years != 30 || !st08.HasIndex {
		t.Errorf("ST08 (lon 200.5, 30 totals): %+v", st08)
	}
	s := res.Summary()
	if s.Stations != 9 || s.WithIndex != 5 || s.NoTotal != 2 || s.TooFewYears != 2 || s.FitFailed != 1 || s.FitRejected != 1 || s.SkippedUnknown != 3 ||
		s.PoorFit != 1 || s.PoorFitRule != PoorFitEmpirical || s.NoIndexOther != 1 {
		t.Errorf("summary %+v", s)
	}
}

// The written table is read back as it is by the grid path's reader
// (ParseValues, --kind spi and --kind percentile): rows with an empty value
// are "no value"; the values are those written, rounded (spi 3 decimals,
// percentile 2). The same bytes come out for 1 and 7 workers.
func TestIndexCSVRoundTrip(t *testing.T) {
	var outs [2]bytes.Buffer
	var res *IndexResult
	for i, w := range []int{1, 7} {
		var err error
		res, err = ComputeIndex(idxFixStations, idxFixTotals, IndexOptions{Workers: w})
		if err != nil {
			t.Fatal(err)
		}
		if err := WriteIndexCSV(&outs[i], res); err != nil {
			t.Fatal(err)
		}
	}
	if !bytes.Equal(outs[0].Bytes(), outs[1].Bytes()) {
		t.Fatal("output depends on the number of workers")
	}
	out := outs[0].Bytes()
	if h := string(out[:bytes.IndexByte(out, '\n')]); h != "station,latitude,longitude,year,total,years,zeros,percentile,spi,pct_of_median,gamma_shape,gamma_scale,fit_ok,note" {
		t.Errorf("header %q", h)
	}
	for _, kind := range []Kind{KindSPI, KindPercentile} {
		v, err := ParseValues("index.csv", bytes.NewReader(out), ValueOptions{Kind: kind})
		if err != nil {
			t.Fatalf("%s: %v", kind, err)
		}
		var with []IndexRow
		for _, r := range res.Rows {
			if (kind == KindSPI && !math.IsNaN(r.SPI)) || (kind == KindPercentile && !math.IsNaN(r.Percentile)) {
				with = append(with, r)
			}
		}
		if len(v.Stations) != len(with) {
			t.Fatalf("%s: grid reader took %d stations, want %d", kind, len(v.Stations), len(with))
		}
		for i, s := range v.Stations {
			r := with[i]
			want, tol := r.SPI, 0.0005
			if kind == KindPercentile {
				want, tol = r.Percentile, 0.005
			}
			if s.ID != r.Station || math.Abs(s.Value-want) > tol || s.Lat != r.Lat || s.Lon != r.Lon {
				t.Errorf("%s: read %+v, wrote %+v", kind, s, r)
			}
		}
	}
}
