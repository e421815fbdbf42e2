package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/pulsewright/pulsewright/scenarios"
)

// trialScene is a Barker-13 scene with one steady target at about 13 dB
// and a Swerling 1 one; sampled once per chip, it runs thousands of
// trials per second.
const trialScene = `{"version":1,"name":"trial scene","seed":5,"radar":{"carrier_hz":9.5e9,"peak_power_w":5000,"antenna_gain_dbi":33,
	"noise_figure_db":4,"system_loss_db":6,"pri_s":5e-4,"sample_rate_hz":1e6,"window_start_m":5000,"window_stop_m":40000},
	"waveform":{"kind":"barker","length":13,"chip_s":1e-6},"receiver":{"detector":{"kind":"fixed","pfa":1e-3}},
	"targets":[{"id":"steady","kind":"point","range_m":30000,"rcs_dbsm":3},{"id":"fluct","kind":"point","range_m":20000,"rcs_dbsm":3,"fluctuation":"swerling1"}]}`

func TestTrialsCommandFormats(t *testing.T) {
	code, out, errs := runCmd(t, trialScene, "trials", "-", "-n", "400", "-j", "2", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var sum scenarios.TrialSummary
	if err := json.Unmarshal([]byte(out), &sum); err != nil {
		t.Fatal(err)
	}
	if sum.Trials != 400 || !sum.Complete || len(sum.Targets) != 2 || sum.Interval != "clopper-pearson" || sum.Engine == nil {
		t.Fatalf("summary %+v", sum)
	}
	for _, tg := range sum.Targets {
		if tg.Pd == nil || tg.PdLow == nil || tg.PdHigh == nil || tg.PdAnalytic == nil || !(*tg.PdLow <= *tg.Pd && *tg.Pd <= *tg.PdHigh) {
			t.Errorf("target %s: %+v", tg.ID, tg)
		}
	}
	if fa := sum.FalseAlarms; fa.Cells == 0 || fa.Count == 0 || fa.Expected != 1e-3*float64(fa.Cells) {
		t.Errorf("false alarms %+v", fa)
	}
	if !strings.Contains(errs, "400 trials in") || !strings.Contains(errs, "trials/s") {
		t.Errorf("stderr %q", errs)
	}
	// The same trials, one worker, as CSV and text: same counts.
	code, out, errs = runCmd(t, trialScene, "trials", "-", "-n", "400", "-j", "1", "--format", "csv")
	if code != 0 {
		t.Fatalf("csv exit %d: %s", code, errs)
	}
	if !strings.HasPrefix(out, "# pulsewright ") {
		t.Errorf("csv lacks the engine comment: %.60q", out)
	}
	rows, err := csv.NewReader(strings.NewReader(out[strings.Index(out, "\n")+1:])).ReadAll()
	if err != nil || len(rows) != 4 || rows[0][0] != "what" || rows[3][0] != "false_alarms" {
		t.Fatalf("csv rows %v, %v", rows, err)
	}
	if rows[1][5] != itoa(sum.Targets[0].Detections) || rows[3][5] != itoa(sum.FalseAlarms.Count) {
		t.Errorf("csv counts %v differ from the json run's %+v", rows, sum)
	}
	code, out, _ = runCmd(t, trialScene, "trials", "-", "-n", "400")
	if code != 0 || !strings.Contains(out, "Clopper–Pearson") || !strings.Contains(out, itoa(sum.Targets[1].Detections)+"/400") || !strings.Contains(out, "false alarms: "+itoa(sum.FalseAlarms.Count)) {
		t.Errorf("text output:\n%s", out)
	}
	// -o writes a file.
	f := filepath.Join(t.TempDir(), "t.json")
	if code, _, errs := runCmd(t, trialScene, "trials", "-", "-n", "10", "--format", "json", "-o", f); code != 0 {
		t.Fatalf("-o: exit %d %s", code, errs)
	}
	if b, err := os.ReadFile(f); err != nil || !bytes.Contains(b, []byte(`"trials": 10`)) {
		t.Errorf("-o file: %v %.200s", err, b)
	}
}

func itoa(v int64) string { return strconv.FormatInt(v, 10) }

func TestTrialsCommandErrors(t *testing.T) {
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"-n", "0"}, "-n 0 out of range: want 1 … 10000000 trials"},
		{[]string{"-n", "20000000"}, "-n 20000000 out of range"},
		{[]string{"-j", "-1"}, "-j -1 out of range"},
		{[]string{"--format", "xml"}, `--format "xml" is not text, json or csv`},
		{[]string{"--time-limit", "-1s"}, "--time-limit -1s out of range"},
		{[]string{"--first", "-3"}, "--first -3 out of range"},
	} {
		code, out, errs := runCmd(t, trialScene, append([]string{"trials", "-"}, c.args...)...)
		if code != exitInvalid || out != "" || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, stdout %q, stderr %q; want %d and %q", c.args, code, out, errs, exitInvalid, c.want)
		}
	}
	train := strings.Replace(trialScene, `"pri_s":5e-4`, `"pri_s":5e-4,"pulses":4`, 1)
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--random-phase"}, "random phase: radar.pulses is 4; it applies to single pulses"},
	} {
		code, out, errs := runCmd(t, train, append([]string{"trials", "-"}, c.args...)...)
		if code != exitInvalid || out != "" || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, stdout %q, stderr %q; want %d and %q", c.args, code, out, errs, exitInvalid, c.want)
		}
	}
}

// TestTrialsCommandStops: an interrupt and the time limit both stop the
// run, write the trials done and say how many.
func TestTrialsCommandStops(t *testing.T) {
	ctx, cancel := context.WithTimeout(context.Background(), 300*time.Millisecond)
	defer cancel()
	var out, errb bytes.Buffer
	code := run(ctx, []string{"trials", "-", "-n", "10000000", "--format", "json"}, strings.NewReader(trialScene), &out, &errb)
	if code != exitInterrupted || !strings.Contains(errb.String(), "trials interrupted: ") || !strings.Contains(errb.String(), "of 10000000 trials (trials 0 … ") {
		t.Fatalf("exit %d, stderr %q", code, errb.String())
	}
	var sum scenarios.TrialSummary
	if err := json.Unmarshal(out.Bytes(), &sum); err != nil || sum.Complete || sum.Trials < 1 || sum.Requested != 10000000 {
		t.Fatalf("interrupted summary %+v, %v", sum, err)
	}
	code, outS, errs := runCmd(t, trialScene, "trials", "-", "-n", "10000000", "--time-limit", "300ms")
	if code != exitFailure || !strings.Contains(errs, "stopped at the time limit of 300ms") || !strings.Contains(outS, "stopped early") {
		t.Fatalf("time limit: exit %d, stderr %q, out %q", code, errs, outS)
	}
}

// TestTrialsSigint runs a long Monte Carlo run in a process of its own,
// sends it SIGINT, and checks that it stops within seconds with exit 130,
// writes the trials done and says how many.
func TestTrialsSigint(t *testing.T) {
	out := filepath.Join(t.TempDir(), "trials.json")
	args := []string{"trials", "-", "-n", "10000000", "--format", "json", "-o", out}
	cmd := exec.Command(os.Args[0], "-test.run=^$")
	cmd.Env = append(os.Environ(), "PULSEWRIGHT_TEST_RUN="+strings.Join(args, "\n"))
	cmd.Stdin = strings.NewReader(trialScene)
	var errb bytes.Buffer
	cmd.Stderr = &errb
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	time.Sleep(1500 * time.Millisecond)
	sent := time.Now()
	cmd.Process.Signal(syscall.SIGINT)
	err := cmd.Wait()
	if el := time.Since(sent); el > 3*time.Second {
		t.Errorf("stopped %v after SIGINT", el)
	}
	if ee, ok := err.(*exec.ExitError); !ok || ee.ExitCode() != exitInterrupted {
		t.Fatalf("exit: %v, stderr %q; want %d", err, errb.String(), exitInterrupted)
	}
	b, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	var sum scenarios.TrialSummary
	if err := json.Unmarshal(b, &sum); err != nil || sum.Complete || sum.Trials < 1 {
		t.Fatalf("summary %+v, %v", sum, err)
	}
	if want := "trials interrupted: " + strconv.Itoa(sum.Trials) + " of 10000000 trials (trials 0 … "; !strings.Contains(errb.String(), want) {
		t.Errorf("stderr %q, want %q", errb.String(), want)
	}
}
