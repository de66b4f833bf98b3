package main

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// `drygrid index` end to end on the invented fixtures: the file is written
// (atomically: no temporary left), the summary names the outcomes, and
// usage and data errors are told apart (exit codes 2 and 1, main.go); a
// failed run leaves the earlier output untouched.
func TestIndexCommand(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "spi.csv")
	root := newRootCmd()
	var stderr bytes.Buffer
	root.SetErr(&stderr)
	root.SetArgs([]string{"index", "--totals", "../../testdata/index/totals.csv",
		"--stations", "../../testdata/index/stations.csv", "--out", out})
	if _, err := root.ExecuteC(); err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(string(b), "station,latitude,longitude,year,total,years,zeros,percentile,spi,pct_of_median,gamma_shape,gamma_scale,fit_ok,note\n") {
		t.Errorf("output starts %q", b[:min(len(b), 80)])
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 1 {
		t.Errorf("files left in the output directory: %v", ents)
	}
	for _, want := range []string{"warning: ../../testdata/index/totals.csv: skipped 3 rows of 2 stations",
		"index 2020 (gamma SPI, reference all years, at least 30 years): 9 stations, 5 with index, 4 without",
		"1 rejected by Anderson-Darling at 5 %", "wrote " + out} {
		if !strings.Contains(stderr.String(), want) {
			t.Errorf("summary lacks %q:\n%s", want, stderr.String())
		}
	}

	cases := []struct {
		args  []string
		usage bool
		want  string
	}{
		{[]string{"index", "--stations", "s.csv", "--out", out}, true, "--totals FILE is required"},
		{[]string{"index", "--totals", "t.csv", "--stations", "s.csv", "--out", out, "--distribution", "normal"}, true, `distribution "normal" is not gamma or empirical`},
		{[]string{"index", "--totals", "t.csv", "--stations", "s.csv", "--out", out, "--min-years", "0"}, true, "--min-years 0: must be 1 or more"},
		{[]string{"index", "--totals", "../../testdata/index/totals.csv", "--stations", "../../testdata/index/totals.csv", "--out", out}, false,
			"../../testdata/index/totals.csv line 1: no latitude column"},
	}
	before, _ := os.ReadFile(out)
	for _, c := range cases {
		root := newRootCmd()
		root.SetErr(&bytes.Buffer{})
		root.SetArgs(c.args)
		_, err := root.ExecuteC()
		var ue usageError
		if err == nil || !strings.Contains(err.Error(), c.want) || errors.As(err, &ue) != c.usage {
			t.Errorf("%v: err %v (usage %v), want %q (usage %v)", c.args, err, errors.As(err, &ue), c.want, c.usage)
		}
	}
	if after, _ := os.ReadFile(out); !bytes.Equal(before, after) {
		t.Error("a failed run changed the earlier output")
	}
}

// TestIndexPoorFit: --poor-fit sets what a station whose gamma fit
// Anderson-Darling rejects gets (the fixtures have one): the empirical SPI
// by default, the gamma SPI with keep, none with drop; the summary says how
// many stations the rule touched, and a rule not known is a usage error.
func TestIndexPoorFit(t *testing.T) {
	dir := t.TempDir()
	run1 := func(rule string) (string, string, error) {
		out := filepath.Join(dir, "spi-"+rule+".csv")
		root := newRootCmd()
		var stderr bytes.Buffer
		root.SetErr(&stderr)
		args := []string{"index", "--totals", "../../testdata/index/totals.csv",
			"--stations", "../../testdata/index/stations.csv", "--out", out}
		if rule != "" {
			args = append(args, "--poor-fit", rule)
		}
		root.SetArgs(args)
		_, err := root.ExecuteC()
		b, _ := os.ReadFile(out)
		return string(b), stderr.String(), err
	}
	def, defMsg, err := run1("")
	if err != nil {
		t.Fatal(err)
	}
	emp, _, _ := run1("empirical")
	keep, keepMsg, _ := run1("keep")
	drop, dropMsg, _ := run1("drop")
	if def != emp {
		t.Error("the default is not --poor-fit empirical")
	}
	for msg, want := range map[string]string{
		defMsg:  "poor fits (--poor-fit empirical): 1 stations given the empirical (Gringorten) SPI instead of the gamma SPI",
		keepMsg: "poor fits (--poor-fit keep): 1 stations keep their gamma SPI",
		dropMsg: "poor fits (--poor-fit drop): 1 stations without SPI",
	} {
		if !strings.Contains(msg, want) {
			t.Errorf("summary lacks %q:\n%s", want, msg)
		}
	}
	if !strings.Contains(dropMsg, "9 stations, 4 with index, 5 without") {
		t.Errorf("drop: %s", dropMsg)
	}
	// One row differs between the rules: the rejected station's.
	diff := func(a, b string) int {
		la, lb := strings.Split(a, "\n"), strings.Split(b, "\n")
		n := 0
		for i := range la {
			if i >= len(lb) || la[i] != lb[i] {
				n++
			}
		}
		return n
	}
	if diff(emp, keep) != 1 || diff(emp, drop) != 1 || !strings.Contains(drop, "poor fit: drop") || !strings.Contains(emp, "poor fit: empirical") {
		t.Errorf("rows differing: empirical/keep %d, empirical/drop %d", diff(emp, keep), diff(emp, drop))
	}
	_, _, err = run1("toss")
	var ue usageError
	if err == nil || !errors.As(err, &ue) || !strings.Contains(err.Error(), `--poor-fit "toss" is not empirical, keep or drop`) {
		t.Errorf("--poor-fit toss: %v", err)
	}
}
