package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/scenarios"
)

var taylorSweep = []string{"sweep", "demo:harbour-skiff",
	"--set", "receiver.window.kind=taylor",
	"--set", "receiver.window.sidelobe_db=-20:-45:-5"}

// readSweepFile reads a sweep CSV file, checks that its first line is the
// comment naming the engine, and returns the rest.
func readSweepFile(t *testing.T, path string) ([]byte, error) {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	first, rest, _ := bytes.Cut(data, []byte("\n"))
	if string(first) != "# "+scenarios.RunningEngine().String() {
		t.Errorf("the CSV does not open with the engine comment: %.80q", first)
	}
	return rest, nil
}

// readCSV parses sweep CSV text into rows keyed by the header; comment
// lines (the engine line) are skipped.
func readCSV(t *testing.T, data string) []map[string]string {
	t.Helper()
	r := csv.NewReader(strings.NewReader(data))
	r.Comment = '#'
	recs, err := r.ReadAll()
	if err != nil {
		t.Fatalf("csv: %v\n%s", err, data)
	}
	var rows []map[string]string
	for _, r := range recs[1:] {
		m := map[string]string{}
		for i, h := range recs[0] {
			m[h] = r[i]
		}
		rows = append(rows, m)
	}
	return rows
}

// TestSweepTaylorCSV: the skiff of demo:harbour-skiff is masked by the
// tanker's sidelobes with a −20 dB Taylor window and detected at −45 dB;
// the margin grows as the design level falls. The mismatch losses at −30
// and −35 dB match the Taylor window's loss (n̄ 5: 0.679 and 0.926 dB,
// computed with scipy.signal.windows.taylor at N = 4096).
func TestSweepTaylorCSV(t *testing.T) {
	dir := t.TempDir()
	out, html := filepath.Join(dir, "s.csv"), filepath.Join(dir, "s.html")
	code, stdout, stderr := runCmd(t, "", append(taylorSweep, "--out", out, "--html", html, "--fail-if-masked", "skiff")...)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if stdout != "" || stderr != "" {
		t.Errorf("stdout %q stderr %q; want both empty (no terminal, CSV in a file)", stdout, stderr)
	}
	data, err := readSweepFile(t, out)
	if err != nil {
		t.Fatal(err)
	}
	head := strings.SplitN(string(data), "\n", 2)[0]
	want := "receiver.window.kind,receiver.window.sidelobe_db,pslr_db,islr_db,mainlobe_3db_m,mismatch_loss_db,straddle_loss_max_db,straddle_loss_mean_db," +
		"tanker.status,tanker.snr_db,tanker.pd,tanker.margin_db,tanker.threshold_margin_db,skiff.status,skiff.snr_db,skiff.pd,skiff.margin_db,skiff.threshold_margin_db," +
		"pilot-boat.status,pilot-boat.snr_db,pilot-boat.pd,pilot-boat.margin_db,pilot-boat.threshold_margin_db"
	if head != want {
		t.Fatalf("header\n%s\nwant\n%s", head, want)
	}
	rows := readCSV(t, string(data))
	if len(rows) != 6 {
		t.Fatalf("%d rows, want 6", len(rows))
	}
	prev := -1e9
	for i, r := range rows {
		if got, want := r["receiver.window.sidelobe_db"], strconv.Itoa(-20-5*i); got != want {
			t.Errorf("row %d: sidelobe %s, want %s (grid order)", i, got, want)
		}
		m, _ := strconv.ParseFloat(r["skiff.threshold_margin_db"], 64)
		if m <= prev {
			t.Errorf("row %d: skiff threshold margin %v not above %v", i, m, prev)
		}
		prev = m
		if r["tanker.status"] != "detected" {
			t.Errorf("row %d: tanker %s", i, r["tanker.status"])
		}
	}
	if rows[0]["skiff.status"] != "masked" || rows[5]["skiff.status"] != "detected" {
		t.Errorf("skiff %s at −20 dB, %s at −45 dB; want masked then detected", rows[0]["skiff.status"], rows[5]["skiff.status"])
	}
	for i, loss := range map[int]float64{2: 0.679, 3: 0.926} {
		got, _ := strconv.ParseFloat(rows[i]["mismatch_loss_db"], 64)
		if got < loss-0.02 || got > loss+0.02 {
			t.Errorf("row %d: mismatch loss %v, want %v ± 0.02", i, got, loss)
		}
	}
	page, err := os.ReadFile(html)
	if err != nil || !bytes.Contains(page, []byte("const echarts={")) || !bytes.Contains(page, []byte("skiff")) {
		t.Errorf("html page: %v, %d bytes", err, len(page))
	}
}

func TestSweepFailIfMasked(t *testing.T) {
	// −20 and −25 dB: the skiff stays masked (see TestSweepTaylorCSV).
	args := []string{"sweep", "demo:harbour-skiff", "--set", "receiver.window.kind=taylor",
		"--set", "receiver.window.sidelobe_db=-20:-25:-5", "--fail-if-masked", "skiff"}
	code, stdout, stderr := runCmd(t, "", args...)
	if code != exitMasked || !strings.Contains(stderr, "skiff is not detected at any of the 2 points") {
		t.Fatalf("exit %d, stderr %q; want %d", code, stderr, exitMasked)
	}
	if n := len(readCSV(t, stdout)); n != 2 {
		t.Errorf("%d rows on stdout, want 2", n)
	}
	code, _, _ = runCmd(t, "", append(args[:len(args)-1], "tanker")...)
	if code != exitOK {
		t.Errorf("tanker: exit %d, want 0", code)
	}
}

func TestSweepUsage(t *testing.T) {
	tests := []struct {
		args []string
		code int
		want string
	}{
		{[]string{"sweep", "demo:harbour-skiff"}, exitInvalid, "at least one --set"},
		{[]string{"sweep", "demo:harbour-skiff", "--set", "targets[9].range_m=1:2:1"}, exitInvalid, "targets has 3 element(s), so index 9 does not exist"},
		{[]string{"sweep", "demo:harbour-skiff", "--set", "radar.carrier_hz=1:2:1"}, exitInvalid, "radar.carrier_hz: 1 is below"},
		{[]string{"sweep", "demo:harbour-skiff", "--set", "x=1:2:0"}, exitInvalid, "does not lead from"},
		{[]string{"sweep", "demo:harbour-skiff", "--set", "seed=1:2:1", "--fail-if-masked", "yacht"}, exitInvalid, `"yacht" is not a target`},
	}
	for _, tt := range tests {
		code, _, errs := runCmd(t, "", tt.args...)
		if code != tt.code || !strings.Contains(errs, tt.want) {
			t.Errorf("%v: exit %d stderr %q; want %d and %q", tt.args, code, errs, tt.code, tt.want)
		}
	}
}

// cancelAfter is a writer that cancels a context once it has seen n lines,
// as Ctrl-C would in the middle of a sweep.
type cancelAfter struct {
	bytes.Buffer
	n      int
	cancel context.CancelFunc
}

func (w *cancelAfter) Write(p []byte) (int, error) {
	n, err := w.Buffer.Write(p)
	if strings.Count(w.String(), "\n") >= w.n {
		w.cancel()
	}
	return n, err
}

// TestSweepInterruptKeepsRows cancels the context after the comment line,
// the header and two rows: the rows already written stay, in grid order, and the exit status
// says interrupted.
func TestSweepInterruptKeepsRows(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	out := &cancelAfter{n: 4, cancel: cancel}
	var errb bytes.Buffer
	code := run(ctx, append(taylorSweep, "--jobs", "2"), strings.NewReader(""), out, &errb)
	if code != exitInterrupted || !strings.Contains(errb.String(), "sweep interrupted") {
		t.Fatalf("exit %d, stderr %q; want %d", code, errb.String(), exitInterrupted)
	}
	if !strings.HasPrefix(out.String(), "# pulsewright ") {
		t.Errorf("the interrupted CSV lost its engine comment: %.80q", out.String())
	}
	rows := readCSV(t, out.String())
	if len(rows) < 2 || len(rows) == 6 {
		t.Fatalf("%d rows kept, want at least 2 and not all 6", len(rows))
	}
	for i, r := range rows {
		if got, want := r["receiver.window.sidelobe_db"], strconv.Itoa(-20-5*i); got != want {
			t.Errorf("row %d: sidelobe %s, want %s", i, got, want)
		}
	}
}

// TestSweepPulsesCSV sweeps the number of pulses of the Doppler demo: the
// train columns appear, the integrated SNR of the ridge (at zero Doppler,
// so on a bin centre at every length) grows by 10·log10(2) per doubling
// (coherent integration, Richards 2014 §5.2; common practice),
// and the helicopter, masked by the ridge with 16 pulses, is detected from
// 32 on, when the Doppler bins are fine enough to separate it.
func TestSweepPulsesCSV(t *testing.T) {
	code, stdout, stderr := runCmd(t, "", "sweep", "demo:hill-clutter-doppler", "--set", "radar.pulses=16,32,64")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	rows := readCSV(t, stdout)
	if len(rows) != 3 {
		t.Fatalf("%d rows, want 3", len(rows))
	}
	var prev float64
	for i, r := range rows {
		snr, err := strconv.ParseFloat(r["ridge.snr_integrated_db"], 64)
		if err != nil {
			t.Fatalf("row %d: ridge.snr_integrated_db %q", i, r["ridge.snr_integrated_db"])
		}
		if i > 0 && math.Abs(snr-prev-10*math.Log10(2)) > 0.05 {
			t.Errorf("row %d: integrated SNR grew %.2f dB from %d pulses, want about 3.01", i, snr-prev, 16<<(i-1))
		}
		prev = snr
		if r["helicopter.apparent_range_rate_mps"] != "-25.000" {
			t.Errorf("row %d: helicopter apparent range rate %q", i, r["helicopter.apparent_range_rate_mps"])
		}
	}
	if rows[0]["helicopter.status"] != "masked" || rows[1]["helicopter.status"] != "detected" || rows[2]["helicopter.status"] != "detected" {
		t.Errorf("helicopter statuses %s, %s, %s; want masked, detected, detected", rows[0]["helicopter.status"], rows[1]["helicopter.status"], rows[2]["helicopter.status"])
	}
}
