package main

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/scenarios"
)

// trialsRun is 12 Monte Carlo trials of the harbour scene from trial 5.
var trialsRun = []string{"demo:harbour-skiff", "-n", "12", "--first", "5"}

// TestTrialShardsMergeToWhole: the N shards of a Monte Carlo run, run as N
// processes by the local runner and merged, give byte for byte the
// unsharded run's output in each format, for N = 1, 2, 3, 7 and 13 (more
// shards than trials); the counts are summed and the intervals computed
// from the sums.
func TestTrialShardsMergeToWhole(t *testing.T) {
	dir := t.TempDir()
	whole := map[string][]byte{}
	for _, f := range []string{"text", "json", "csv"} {
		out := filepath.Join(dir, "whole."+f)
		code, _, errs := runCmd(t, "", append(append([]string{"trials"}, trialsRun...), "--format", f, "--out", out)...)
		if code != exitOK {
			t.Fatalf("unsharded trials: exit %d: %s", code, errs)
		}
		whole[f], _ = os.ReadFile(out)
	}
	if !bytes.Contains(whole["json"], []byte(`"trials": 12`)) || !bytes.Contains(whole["json"], []byte(`"first_trial": 5`)) {
		t.Fatalf("unsharded JSON: %s", whole["json"])
	}
	for _, n := range []int{1, 2, 3, 7, 13} {
		t.Run(fmt.Sprintf("N=%d", n), func(t *testing.T) {
			d := filepath.Join(dir, strconv.Itoa(n))
			code, errs := runShards(t, append([]string{"-n", strconv.Itoa(n), "-d", d, "--", "trials"}, trialsRun...)...)
			if code != 0 {
				t.Fatalf("run-shards: exit %d: %s", code, errs)
			}
			if got, _ := os.ReadFile(filepath.Join(d, "merged.csv")); !bytes.Equal(got, whole["text"]) {
				t.Fatalf("merged (text) differs from the unsharded run:\n%s\nwant\n%s", got, whole["text"])
			}
			shards, _ := filepath.Glob(filepath.Join(d, fmt.Sprintf("shard-*-of-%d.csv", n)))
			for _, f := range []string{"json", "csv"} {
				code, stdout, errs := runCmd(t, "", append([]string{"merge", "--format", f}, shards...)...)
				if code != exitOK || stdout != string(whole[f]) {
					t.Errorf("merge --format %s: exit %d %s\n%s\nwant\n%s", f, code, errs, stdout, whole[f])
				}
			}
		})
	}
	// The runner's -f passes the format to its merge.
	d := filepath.Join(dir, "csv")
	code, errs := runShards(t, append([]string{"-n", "2", "-d", d, "-f", "csv", "--", "trials"}, trialsRun...)...)
	if got, _ := os.ReadFile(filepath.Join(d, "merged.csv")); code != 0 || !bytes.Equal(got, whole["csv"]) {
		t.Errorf("run-shards -f csv: exit %d %s\n%s\nwant\n%s", code, errs, got, whole["csv"])
	}
	if code, errs := runShards(t, append([]string{"-n", "2", "-d", d, "-f", "xml", "--", "trials"}, trialsRun...)...); code != 2 || !strings.Contains(errs, "-f xml is not text, json or csv") {
		t.Errorf("run-shards -f xml: exit %d %q", code, errs)
	}
}

// TestTrialShardsRefused: merge refuses a trials shard stopped early (the
// time limit), shards of another trial range, and a sweep shard among
// trials shards; --shard with --format is a usage error.
func TestTrialShardsRefused(t *testing.T) {
	dir := t.TempDir()
	shard := func(name string, args ...string) string {
		out := filepath.Join(dir, name)
		code, _, errs := runCmd(t, "", append(append([]string{"trials"}, args...), "--out", out)...)
		if code != exitOK && code != exitFailure {
			t.Fatalf("%s: exit %d: %s", name, code, errs)
		}
		return out
	}
	a0 := shard("a0", append(trialsRun, "--shard", "0/2")...)
	a1 := shard("a1", append(trialsRun, "--shard", "1/2")...)
	stopped := shard("stopped", append(trialsRun, "--shard", "1/2", "--time-limit", "1ns")...)
	other := shard("other", "demo:harbour-skiff", "-n", "13", "--first", "5", "--shard", "1/2")
	sw := filepath.Join(dir, "sweep1")
	if code, _, errs := runCmd(t, "", "sweep", "demo:harbour-skiff", "--set", "seed=1,2", "--shard", "1/2", "--out", sw); code != exitOK {
		t.Fatal(errs)
	}
	for _, c := range []struct {
		files []string
		want  string
	}{
		{[]string{a0, stopped}, "(shard 1/2) holds"},
		{[]string{a0, other}, "are shards of different grids"},
		{[]string{a0, sw}, "are shards of different commands (trials and sweep)"},
		{[]string{a0}, "shard 1 of 0…1 is missing; run it with --shard 1/2"},
	} {
		code, _, errs := runCmd(t, "", append([]string{"merge"}, c.files...)...)
		if code != exitInvalid || !strings.Contains(errs, c.want) {
			t.Errorf("merge %v: exit %d %q; want %q", c.files, code, errs, c.want)
		}
	}
	if code, _, errs := runCmd(t, "", "merge", a0, a1, "--format", "xml"); code != exitInvalid || !strings.Contains(errs, `--format "xml"`) {
		t.Errorf("--format xml: exit %d %q", code, errs)
	}
	if code, _, errs := runCmd(t, "", append(append([]string{"trials"}, trialsRun...), "--shard", "0/2", "--format", "json")...); code != exitInvalid || !strings.Contains(errs, "give --format to merge") {
		t.Errorf("--shard with --format: exit %d %q", code, errs)
	}
	if code, _, errs := runCmd(t, "", append(append([]string{"trials"}, trialsRun...), "--shard", "2/2")...); code != exitInvalid || !strings.Contains(errs, `--shard "2/2": K = 2 is outside 0…1`) {
		t.Errorf("--shard 2/2: exit %d %q", code, errs)
	}
}

// TestMergedTrialsNameTheShardsEngine: a merged trials run is stamped with
// the engine that counted it (the shards', carried in their summaries),
// not the merging program's, in the text and CSV forms as in JSON.
func TestMergedTrialsNameTheShardsEngine(t *testing.T) {
	other := scenarios.EngineInfo{Version: "v9.8.7", Commit: "0123456789abcdef", ScenarioFormat: 2, ReportFormat: 2}
	sum := scenarios.TrialSummary{Engine: &other}
	for _, f := range []string{"text", "csv"} {
		var b strings.Builder
		if err := writeTrials(&b, f, sum, scenarios.SIUnits()); err != nil {
			t.Fatal(err)
		}
		if !strings.Contains(b.String(), other.String()) || strings.Contains(b.String(), scenarios.RunningEngine().String()) {
			t.Errorf("%s: does not name the summary's engine %q:\n%s", f, other, b.String())
		}
	}
}
