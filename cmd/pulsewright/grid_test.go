package main

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// TestSweepGridOverflowRefused gives grids whose point count overflows
// int (65536⁴ wraps to 0; 65536⁴·3 to a negative slice length) or is far
// over the limit: each is refused at once with exit 2 and a message
// giving the axes' lengths, and an existing --out file is left alone.
func TestSweepGridOverflowRefused(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "keep.csv")
	os.WriteFile(out, []byte("previous\n"), 0o644)
	big := "seed=0:65535:1"
	for _, sets := range [][]string{
		{big, big, big, big},
		{big, big, big, big, "targets[0].rcs_dbsm=1,2,3"},
		{"seed=0:999:1", "targets[0].rcs_dbsm=0:999:1"},
	} {
		args := []string{"sweep", "demo:harbour-skiff", "--out", out}
		for _, s := range sets {
			args = append(args, "--set", s)
		}
		start := time.Now()
		code, _, errs := runCmd(t, "", args...)
		if code != exitInvalid || !strings.Contains(errs, "over the limit of 100000") || !strings.Contains(errs, "seed: ") {
			t.Errorf("%v: exit %d, stderr %q; want 2 and the limit", sets, code, errs)
		}
		if el := time.Since(start); el > 2*time.Second {
			t.Errorf("%v: refused after %v; want at once", sets, el)
		}
	}
	if data, _ := os.ReadFile(out); string(data) != "previous\n" {
		t.Errorf("--out was changed to %q", data)
	}
}

// TestSweepFailureLeavesOutput: a point invalid only in combination
// stops the run, and the previous --out file stays whole.
func TestSweepOutputAtomic(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "keep.csv")
	os.WriteFile(out, []byte("previous\n"), 0o644)
	code, _, errs := runCmd(t, "", "sweep", "demo:harbour-skiff", "--out", out, "--set", "radar.window_start_m=1000,60000", "--set", "radar.window_stop_m=50000,70000")
	if code != exitInvalid {
		t.Fatalf("exit %d, stderr %q; want 2", code, errs)
	}
	if data, _ := os.ReadFile(out); string(data) != "previous\n" {
		t.Errorf("--out was changed to %q", data)
	}
	if left, _ := filepath.Glob(filepath.Join(dir, ".*.tmp")); len(left) != 0 {
		t.Errorf("temporary files left: %v", left)
	}
	code, _, errs = runCmd(t, "", "sweep", "demo:harbour-skiff", "--out", out, "--set", "seed=1,2")
	// The first line names the engine (docs/report-format.md); the header follows.
	if data, _ := os.ReadFile(out); code != exitOK || !strings.HasPrefix(string(data), "# pulsewright ") || !strings.Contains(string(data), "\nseed,") {
		t.Errorf("exit %d %q, --out %q", code, errs, data)
	}
}

// TestSweepSigint runs a long sweep in a process of its own, sends it
// SIGINT, and checks that it stops within seconds with exit 130, the
// rows done in --out and no temporary file left.
func TestSweepSigint(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "rows.csv")
	args := []string{"sweep", "demo:harbour-skiff", "--jobs", "1", "--out", out, "--set", "seed=1:99999:1"}
	cmd := exec.Command(os.Args[0], "-test.run=^$")
	cmd.Env = append(os.Environ(), "PULSEWRIGHT_TEST_RUN="+strings.Join(args, "\n"))
	var errb bytes.Buffer
	cmd.Stderr = &errb
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	// Wait for some rows to reach the temporary file.
	deadline := time.Now().Add(20 * time.Second)
	for {
		tmps, _ := filepath.Glob(filepath.Join(dir, ".rows.csv.*.tmp"))
		if len(tmps) == 1 {
			if fi, err := os.Stat(tmps[0]); err == nil && fi.Size() > 1000 {
				break
			}
		}
		if time.Now().After(deadline) {
			cmd.Process.Kill()
			t.Fatalf("no rows after 20 s; stderr %q", errb.String())
		}
		time.Sleep(20 * time.Millisecond)
	}
	sent := time.Now()
	cmd.Process.Signal(syscall.SIGINT)
	err := cmd.Wait()
	if el := time.Since(sent); el > 3*time.Second {
		t.Errorf("stopped %v after SIGINT", el)
	}
	if ee, ok := err.(*exec.ExitError); !ok || ee.ExitCode() != exitInterrupted {
		t.Fatalf("exit: %v, stderr %q; want %d", err, errb.String(), exitInterrupted)
	}
	data, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(data)), "\n")
	if len(lines) < 4 || !strings.HasPrefix(lines[0], "# pulsewright ") || !strings.HasPrefix(lines[1], "seed,") || !strings.HasPrefix(lines[2], "1,") {
		t.Fatalf("kept %d lines: %.200q", len(lines), data)
	}
	if left, _ := filepath.Glob(filepath.Join(dir, ".*.tmp")); len(left) != 0 {
		t.Errorf("temporary files left: %v", left)
	}
}
