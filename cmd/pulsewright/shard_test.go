package main

import (
	"bytes"
	"context"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/pulsewright/pulsewright/scenarios"
)

// shardGrid is 5 × 2 = 10 points of the harbour scene (two axes, so the
// round-robin partition cuts across rows of the grid).
var shardGrid = []string{"demo:harbour-skiff", "--set", "receiver.window.kind=taylor", "--set", "receiver.window.sidelobe_db=-20:-40:-5", "--set", "targets[skiff].rcs_dbsm=-3,0"}

// runShards runs deploy/local/run-shards.sh with this test binary as the
// program (TestMain runs it as pulsewright under PULSEWRIGHT_TEST_ARGV).
func runShards(t *testing.T, args ...string) (int, string) {
	t.Helper()
	if _, err := exec.LookPath("bash"); err != nil {
		t.Skip("bash is not installed")
	}
	script, err := filepath.Abs("../../deploy/local/run-shards.sh")
	if err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command("bash", append([]string{script}, args...)...)
	cmd.Env = append(os.Environ(), "PULSEWRIGHT="+os.Args[0], "PULSEWRIGHT_TEST_ARGV=1")
	var errb bytes.Buffer
	cmd.Stderr = &errb
	cmd.Stdout = &errb
	err = cmd.Run()
	if ee, ok := err.(*exec.ExitError); ok {
		return ee.ExitCode(), errb.String()
	}
	if err != nil {
		t.Fatal(err)
	}
	return 0, errb.String()
}

// wholeSweep runs the unsharded sweep in-process and returns its file.
func wholeSweep(t *testing.T, dir string, grid []string) []byte {
	t.Helper()
	out := filepath.Join(dir, "whole.csv")
	code, _, errs := runCmd(t, "", append(append([]string{"sweep"}, grid...), "--out", out)...)
	if code != exitOK {
		t.Fatalf("unsharded sweep: exit %d: %s", code, errs)
	}
	data, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	return data
}

// TestShardsMergeToWhole: the N shards of a sweep, run as N processes by
// the local runner and merged, are byte for byte the unsharded sweep's
// file, for N = 1, 2, 3, 7 and 13 (more shards than the 10 points: three
// shards own none).
func TestShardsMergeToWhole(t *testing.T) {
	dir := t.TempDir()
	whole := wholeSweep(t, dir, shardGrid)
	if rows := strings.Count(string(whole), "\n") - 2; rows != 10 {
		t.Fatalf("the unsharded sweep has %d rows, want 10", rows)
	}
	for _, n := range []int{1, 2, 3, 7, 13} {
		t.Run(fmt.Sprintf("N=%d", n), func(t *testing.T) {
			d := filepath.Join(dir, strconv.Itoa(n))
			merged := filepath.Join(d, "merged.csv")
			code, errs := runShards(t, append([]string{"-n", strconv.Itoa(n), "-d", d, "--", "sweep"}, shardGrid...)...)
			if code != 0 {
				t.Fatalf("run-shards: exit %d: %s", code, errs)
			}
			got, err := os.ReadFile(merged)
			if err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(got, whole) {
				t.Fatalf("merged differs from the unsharded sweep:\n%s\nwant\n%s", got, whole)
			}
			// Each shard holds exactly its points: i mod N = K.
			for k := range n {
				data, err := os.ReadFile(filepath.Join(d, fmt.Sprintf("shard-%d-of-%d.csv", k, n)))
				if err != nil {
					t.Fatal(err)
				}
				lines := strings.Split(strings.TrimSuffix(string(data), "\n"), "\n")
				want := (scenarios.Shard{K: k, N: n}).Len(10)
				if len(lines)-3 != want || !strings.HasPrefix(lines[1], fmt.Sprintf("# shard %d/%d of sweep · 10 points · scenario sha256:", k, n)) {
					t.Errorf("shard %d/%d: %d rows, want %d; shard line %q", k, n, len(lines)-3, want, lines[1])
				}
			}
		})
	}
}

// TestShardInterruptedRerun: a shard interrupted after its first row
// keeps that row; merge refuses it, naming it and the --shard that re-runs
// it; the runner re-runs that shard alone, and the merge is then the
// unsharded file.
func TestShardInterruptedRerun(t *testing.T) {
	dir := t.TempDir()
	whole := wholeSweep(t, dir, shardGrid)
	d := filepath.Join(dir, "shards")
	// Shards 0 and 2 only: the runner's merge reports shard 1 missing.
	code, errs := runShards(t, append([]string{"-n", "3", "-d", d, "--only", "0,2", "--", "sweep"}, shardGrid...)...)
	if code != 1 || !strings.Contains(errs, "shard 1 of 0…2 is missing; run it with --shard 1/3") {
		t.Fatalf("exit %d, %s; want 1 and shard 1 missing", code, errs)
	}
	// Shard 1, interrupted (as Ctrl-C does) once its first row is out.
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	out := &cancelAfter{n: 4, cancel: cancel} // engine, shard line, header, one row
	var errb bytes.Buffer
	args := append(append([]string{"sweep"}, shardGrid...), "--jobs", "1", "--shard", "1/3")
	if code := run(ctx, args, strings.NewReader(""), out, &errb); code != exitInterrupted {
		t.Fatalf("exit %d, %s; want %d", code, errb.String(), exitInterrupted)
	}
	one := filepath.Join(d, "shard-1-of-3.csv")
	if err := os.WriteFile(one, out.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	shards := []string{filepath.Join(d, "shard-0-of-3.csv"), one, filepath.Join(d, "shard-2-of-3.csv")}
	code, _, errs = runCmd(t, "", append([]string{"merge"}, shards...)...)
	if want := one + " (shard 1/3) holds 1 of its 3 points (interrupted?); re-run it with --shard 1/3"; code != exitInvalid || !strings.Contains(errs, want) {
		t.Fatalf("merge with the interrupted shard: exit %d, %q; want %d and %q", code, errs, exitInvalid, want)
	}
	code, errs = runShards(t, append([]string{"-n", "3", "-d", d, "--only", "1", "--", "sweep"}, shardGrid...)...)
	if code != 0 {
		t.Fatalf("re-run of shard 1: exit %d: %s", code, errs)
	}
	got, err := os.ReadFile(filepath.Join(d, "merged.csv"))
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, whole) {
		t.Fatalf("merged after the re-run differs from the unsharded sweep:\n%s\nwant\n%s", got, whole)
	}
}

// shardOut runs one shard in-process and returns its file.
func shardOut(t *testing.T, dir, name string, grid []string, shard string) string {
	t.Helper()
	out := filepath.Join(dir, name)
	code, _, errs := runCmd(t, "", append(append([]string{"sweep"}, grid...), "--shard", shard, "--out", out)...)
	if code != exitOK {
		t.Fatalf("shard %s: exit %d: %s", shard, code, errs)
	}
	return out
}

// TestMergeRefuses: shards of different scenarios, grids, engines or
// shard counts, a shard given twice, missing or damaged, and files that
// are not shards are refused with a message naming the files and what
// differs, and no output is written.
func TestMergeRefuses(t *testing.T) {
	dir := t.TempDir()
	grid := []string{"demo:harbour-skiff", "--set", "receiver.window.kind=taylor", "--set", "receiver.window.sidelobe_db=-20:-30:-5"}
	a0 := shardOut(t, dir, "a0.csv", grid, "0/2")
	a1 := shardOut(t, dir, "a1.csv", grid, "1/2")

	// The same scene under another name is another scenario.
	other := mustLoad(t, "harbour-skiff")
	other.Name = "harbour, other copy"
	js, err := scenarios.Canonical(other)
	if err != nil {
		t.Fatal(err)
	}
	otherFile := filepath.Join(dir, "other.json")
	if err := os.WriteFile(otherFile, js, 0o644); err != nil {
		t.Fatal(err)
	}
	scen1 := shardOut(t, dir, "scen1.csv", append([]string{otherFile}, grid[1:]...), "1/2")
	grid1 := shardOut(t, dir, "grid1.csv", []string{"demo:harbour-skiff", "--set", "receiver.window.kind=taylor", "--set", "receiver.window.sidelobe_db=-20:-35:-5"}, "1/2")
	b0 := shardOut(t, dir, "b0.csv", grid, "0/3")
	b2 := shardOut(t, dir, "b2.csv", grid, "2/3")
	whole := filepath.Join(dir, "whole.csv")
	if code, _, errs := runCmd(t, "", append(append([]string{"sweep"}, grid...), "--out", whole)...); code != exitOK {
		t.Fatal(errs)
	}
	data, err := os.ReadFile(a1)
	if err != nil {
		t.Fatal(err)
	}
	_, rest, _ := bytes.Cut(data, []byte("\n"))
	engine1 := filepath.Join(dir, "engine1.csv")
	os.WriteFile(engine1, append([]byte("# pulsewright v9.9.9 (commit 0123456789ab) · scenario format 1 · report format 1\n"), rest...), 0o644)
	// Another executable with the same engine line (two devel builds).
	lines0 := strings.SplitAfter(string(data), "\n")
	build1 := filepath.Join(dir, "build1.csv")
	stampLine := regexp.MustCompile(`build sha256:[0-9a-f]{64}`).ReplaceAllString(lines0[1], "build sha256:"+strings.Repeat("0", 64))
	os.WriteFile(build1, []byte(lines0[0]+stampLine+strings.Join(lines0[2:], "")), 0o644)
	cut := filepath.Join(dir, "cut.csv")
	os.WriteFile(cut, data[:len(data)-5], 0o644)
	noRows := filepath.Join(dir, "norows.csv")
	lines := strings.SplitAfter(string(data), "\n")
	os.WriteFile(noRows, []byte(strings.Join(lines[:3], "")), 0o644)

	out := filepath.Join(dir, "merged.csv")
	for _, c := range []struct {
		name  string
		files []string
		want  string
	}{
		{"scenario", []string{a0, scen1}, "a0.csv and " + scen1 + " are shards of different scenarios (sha256:"},
		{"grid", []string{a0, grid1}, "are shards of different grids (sha256:"},
		{"engine", []string{a0, engine1}, "are shards of different engine versions (# pulsewright devel · scenario format"},
		{"build", []string{a0, build1}, "are shards of different builds of the program (sha256:"},
		{"shard count", []string{a0, b2}, "are shards of different shard counts (shard 0/2 and shard 2/3)"},
		{"twice", []string{a0, a1, a0}, "shard 0/2 is given 2 times (" + a0 + ", " + a0 + "); give each shard once"},
		{"missing", []string{b0}, "2 shards of 0…2 are missing (1, 2); run them with --shard 1/3, --shard 2/3"},
		{"missing one", []string{a1}, "shard 0 of 0…1 is missing; run it with --shard 0/2"},
		{"interrupted", []string{a0, noRows}, "norows.csv (shard 1/2) holds 0 of its 1 points (interrupted?); re-run it with --shard 1/2"},
		{"cut row", []string{a0, cut}, "cut.csv"},
		{"unsharded", []string{a0, whole}, "whole.csv has no shard line (# shard K/N of …) after the engine line"},
		{"not ours", []string{a0, otherFile}, "other.json does not open with the engine line"},
		{"absent", []string{a0, filepath.Join(dir, "nope.csv")}, "nope.csv: no such file"},
	} {
		t.Run(c.name, func(t *testing.T) {
			code, stdout, errs := runCmd(t, "", append([]string{"merge", "--out", out}, c.files...)...)
			if code == exitOK || !strings.Contains(errs, c.want) {
				t.Errorf("exit %d, stderr %q; want refused with %q", code, errs, c.want)
			}
			if stdout != "" {
				t.Errorf("stdout %q", stdout)
			}
			if _, err := os.Stat(out); err == nil {
				t.Errorf("%s written", out)
			}
		})
	}

	// The good pair merges; --out may not overwrite an input.
	code, _, errs := runCmd(t, "", "merge", a0, a1, "--out", a1)
	if code != exitInvalid || !strings.Contains(errs, "is one of the shard outputs") {
		t.Errorf("--out over an input: exit %d %q", code, errs)
	}
	if code, _, errs := runCmd(t, "", "merge"); code != exitInvalid || !strings.Contains(errs, "merge needs the shard outputs") {
		t.Errorf("no inputs: exit %d %q", code, errs)
	}
	code, stdout, errs := runCmd(t, "", "merge", filepath.Join(dir, "a[01].csv")) // merge expands patterns itself
	if code != exitOK {
		t.Errorf("merge a[01].csv: exit %d %q", code, errs)
	}
	if code, _, errs := runCmd(t, "", "merge", filepath.Join(dir, "zz*.csv")); code != exitInvalid || !strings.Contains(errs, "matches no file") {
		t.Errorf("merge zz*.csv: exit %d %q", code, errs)
	}
	code, stdout, errs = runCmd(t, "", "merge", a1, a0)
	wantWhole, _ := os.ReadFile(whole)
	if code != exitOK || stdout != string(wantWhole) {
		t.Errorf("merge a1 a0: exit %d %q\n%s\nwant\n%s", code, errs, stdout, wantWhole)
	}
}

// TestMergeFailIfMasked: merge decides --fail-if-masked on the whole
// grid. The skiff of the harbour scene is masked with a −20 dB Taylor
// window and detected at −45 dB (TestSweepTaylorCSV).
func TestMergeFailIfMasked(t *testing.T) {
	dir := t.TempDir()
	masked := []string{"demo:harbour-skiff", "--set", "receiver.window.kind=taylor", "--set", "receiver.window.sidelobe_db=-20,-25"}
	m0 := shardOut(t, dir, "m0.csv", masked, "0/2")
	m1 := shardOut(t, dir, "m1.csv", masked, "1/2")
	code, _, errs := runCmd(t, "", "merge", m0, m1, "--out", filepath.Join(dir, "m.csv"), "--fail-if-masked", "skiff")
	if code != exitMasked || !strings.Contains(errs, "target skiff is not detected at any of the 2 points") {
		t.Errorf("exit %d %q; want %d", code, errs, exitMasked)
	}
	s0 := shardOut(t, dir, "s0.csv", taylorSweep[1:], "0/2")
	s1 := shardOut(t, dir, "s1.csv", taylorSweep[1:], "1/2")
	if code, _, errs := runCmd(t, "", "merge", s0, s1, "--out", filepath.Join(dir, "s.csv"), "--fail-if-masked", "skiff"); code != exitOK {
		t.Errorf("exit %d %q; want 0 (detected at −45 dB)", code, errs)
	}
	if code, _, errs := runCmd(t, "", "merge", s0, s1, "--fail-if-masked", "nobody"); code != exitInvalid || !strings.Contains(errs, `"nobody" is not a target`) {
		t.Errorf("exit %d %q", code, errs)
	}
}

// TestSweepShardFlag: a bad --shard names the option, the value and the
// valid range; --html and --fail-if-masked need the whole grid.
func TestSweepShardFlag(t *testing.T) {
	for _, c := range []struct{ v, want string }{
		{"3/3", `--shard "3/3": K = 3 is outside 0…2`},
		{"-1/3", `--shard "-1/3": K = -1 is outside 0…2`},
		{"1/0", `--shard "1/0": N = 0 is outside 1…100000`},
		{"0/100001", `N = 100001 is outside 1…100000`},
		{"2", `--shard "2": want K/N`},
		{"a/4", `K "a" is not a whole number (valid: 0…3)`},
		{"1/b", `N "b" is not a whole number (valid: 1…100000)`},
	} {
		code, _, errs := runCmd(t, "", append(append([]string{"sweep"}, shardGrid...), "--shard", c.v)...)
		if code != exitInvalid || !strings.Contains(errs, c.want) {
			t.Errorf("--shard %q: exit %d %q; want %q", c.v, code, errs, c.want)
		}
	}
	for _, extra := range [][]string{{"--html", "x.html"}, {"--fail-if-masked", "skiff"}} {
		code, _, errs := runCmd(t, "", append(append([]string{"sweep"}, shardGrid...), append(extra, "--shard", "0/2")...)...)
		if code != exitInvalid || !strings.Contains(errs, "cannot be combined with --shard") {
			t.Errorf("%v with --shard: exit %d %q", extra, code, errs)
		}
	}
}

// TestSlurmScripts runs deploy/slurm/shard.sbatch as the three tasks of a
// job array would (SLURM_ARRAY_TASK_ID 0…2, run here one after the
// other with bash), then merge.sbatch: the merged file is the unsharded
// sweep's. A task id outside 0…N−1 is refused.
func TestSlurmScripts(t *testing.T) {
	if _, err := exec.LookPath("bash"); err != nil {
		t.Skip("bash is not installed")
	}
	dir := t.TempDir()
	whole := wholeSweep(t, dir, shardGrid)
	env := []string{"OUT_DIR=out"}
	sbatch := func(script string, task string, args ...string) (int, string) {
		path, err := filepath.Abs("../../deploy/slurm/" + script)
		if err != nil {
			t.Fatal(err)
		}
		cmd := exec.Command("bash", append([]string{path}, args...)...)
		cmd.Dir = dir
		cmd.Env = append(append(os.Environ(), "PULSEWRIGHT="+os.Args[0], "PULSEWRIGHT_TEST_ARGV=1", "SLURM_CPUS_PER_TASK=1"), env...)
		if task != "" {
			cmd.Env = append(cmd.Env, "SLURM_ARRAY_TASK_ID="+task)
		}
		b, err := cmd.CombinedOutput()
		if ee, ok := err.(*exec.ExitError); ok {
			return ee.ExitCode(), string(b)
		}
		if err != nil {
			t.Fatal(err)
		}
		return 0, string(b)
	}
	for k := range 3 {
		if code, out := sbatch("shard.sbatch", strconv.Itoa(k), append([]string{"3", "sweep"}, shardGrid...)...); code != 0 {
			t.Fatalf("task %d: exit %d: %s", k, code, out)
		}
	}
	if code, out := sbatch("merge.sbatch", "", "3"); code != 0 {
		t.Fatalf("merge: exit %d: %s", code, out)
	}
	got, err := os.ReadFile(filepath.Join(dir, "out", "merged.csv"))
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, whole) {
		t.Fatalf("merged differs from the unsharded sweep:\n%s\nwant\n%s", got, whole)
	}
	if code, out := sbatch("shard.sbatch", "3", append([]string{"3", "sweep"}, shardGrid...)...); code != 2 || !strings.Contains(out, "array task 3 is outside shards 0…2") {
		t.Errorf("task 3 of 3: exit %d %q", code, out)
	}
	if code, out := sbatch("shard.sbatch", "", append([]string{"3", "sweep"}, shardGrid...)...); code != 2 || !strings.Contains(out, "not a job array task") {
		t.Errorf("no task id: exit %d %q", code, out)
	}

	// A Monte Carlo run through the same scripts: three blocks of the
	// trials, merged in the format MERGE_FORMAT names, equal the
	// unsharded run's file.
	code, wantTrials, errs := runCmd(t, "", append(append([]string{"trials"}, trialsRun...), "--format", "csv")...)
	if code != 0 {
		t.Fatalf("trials: exit %d: %s", code, errs)
	}
	env = []string{"OUT_DIR=trials", "MERGE_FORMAT=csv"}
	for k := range 3 {
		if code, out := sbatch("shard.sbatch", strconv.Itoa(k), append([]string{"3", "trials"}, trialsRun...)...); code != 0 {
			t.Fatalf("trials task %d: exit %d: %s", k, code, out)
		}
	}
	if code, out := sbatch("merge.sbatch", "", "3"); code != 0 {
		t.Fatalf("trials merge: exit %d: %s", code, out)
	}
	if got, err := os.ReadFile(filepath.Join(dir, "trials", "merged.csv")); err != nil || string(got) != wantTrials {
		t.Errorf("merged trials differ from the unsharded run (%v):\n%s\nwant\n%s", err, got, wantTrials)
	}
	env = []string{"OUT_DIR=trials", "MERGE_FORMAT=xml"}
	if code, out := sbatch("merge.sbatch", "", "3"); code != 2 || !strings.Contains(out, "MERGE_FORMAT xml") {
		t.Errorf("MERGE_FORMAT=xml: exit %d %q", code, out)
	}
}

// TestShardRunnerStopped sends SIGTERM to the local runner while its three
// shards run: it stops them all and exits 130; each shard keeps the rows
// it finished, and merge names every shard as interrupted with the
// --shard that re-runs it. (TestShardInterruptedRerun re-runs one.)
func TestShardRunnerStopped(t *testing.T) {
	if _, err := exec.LookPath("bash"); err != nil {
		t.Skip("bash is not installed")
	}
	d := t.TempDir()
	script, _ := filepath.Abs("../../deploy/local/run-shards.sh")
	cmd := exec.Command("bash", script, "-n", "3", "-d", d, "--", "sweep", "demo:harbour-skiff", "--set", "seed=1:30000:1")
	cmd.Env = append(os.Environ(), "PULSEWRIGHT="+os.Args[0], "PULSEWRIGHT_TEST_ARGV=1")
	var errb bytes.Buffer
	cmd.Stderr = &errb
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	deadline := time.Now().Add(60 * time.Second)
	for {
		tmps, _ := filepath.Glob(filepath.Join(d, ".shard-*-of-3.csv.*.tmp"))
		big := 0
		for _, f := range tmps {
			if fi, err := os.Stat(f); err == nil && fi.Size() > 2000 {
				big++
			}
		}
		if big == 3 {
			break
		}
		if time.Now().After(deadline) {
			cmd.Process.Kill()
			t.Fatalf("the shards wrote no rows in 60 s; %s", errb.String())
		}
		time.Sleep(20 * time.Millisecond)
	}
	cmd.Process.Signal(syscall.SIGTERM)
	err := cmd.Wait()
	if ee, ok := err.(*exec.ExitError); !ok || ee.ExitCode() != exitInterrupted || !strings.Contains(errb.String(), "interrupted; stopping 3 shard(s)") {
		t.Fatalf("runner: %v, %q; want exit %d", err, errb.String(), exitInterrupted)
	}
	files, _ := filepath.Glob(filepath.Join(d, "shard-*-of-3.csv"))
	if len(files) != 3 {
		t.Fatalf("shard files %v", files)
	}
	code, _, errs := runCmd(t, "", append([]string{"merge"}, files...)...)
	for k := range 3 {
		want := fmt.Sprintf("of its 10000 points (interrupted?); re-run it with --shard %d/3", k)
		if code != exitInvalid || !strings.Contains(errs, want) {
			t.Errorf("merge: exit %d %q; want %q", code, errs, want)
		}
	}
}
