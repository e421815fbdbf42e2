package main

import (
	"context"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/scenarios"
)

// TestExportFiles: export writes BASE.sigmf-meta, BASE.sigmf-data of
// samples × 8 bytes (cf32_le, SigMF "Dataset Format") and the profile CSV
// with one row per window sample. The metadata rules themselves are
// checked in scenarios (TestSigMFHarbour).
func TestExportFiles(t *testing.T) {
	dir := t.TempDir()
	base, csvPath := filepath.Join(dir, "harbour"), filepath.Join(dir, "profile.csv")
	code, _, stderr := runCmd(t, "", "export", "demo:harbour-skiff", "--sigmf", base, "--csv", csvPath)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	d, _ := scenarios.LoadDemo("harbour-skiff")
	n := d.Scenario.WindowSamples()
	st, err := os.Stat(base + ".sigmf-data")
	if err != nil || st.Size() != int64(8*n) {
		t.Fatalf("data %v, size %d, want %d", err, st.Size(), 8*n)
	}
	meta, err := os.ReadFile(base + ".sigmf-meta")
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Global      map[string]any   `json:"global"`
		Annotations []map[string]any `json:"annotations"`
	}
	if err := json.Unmarshal(meta, &doc); err != nil || doc.Global["core:datatype"] != "cf32_le" || len(doc.Annotations) != 3 {
		t.Fatalf("meta %v: %s", err, meta[:200])
	}
	csv, err := os.ReadFile(csvPath)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(csv)), "\n")
	if !strings.HasPrefix(lines[0], "# pulsewright ") || lines[1] != "range_m,profile_db,clean_db,threshold_db" || len(lines) != n+2 {
		t.Errorf("csv comment %q, header %q, %d lines, want %d", lines[0], lines[1], len(lines), n+2)
	}
	var global map[string]any
	json.Unmarshal(meta, &struct {
		G *map[string]any `json:"global"`
	}{&global})
	if e, _ := global["pulsewright:engine"].(map[string]any); e == nil || e["version"] == "" {
		t.Errorf("sigmf global has no pulsewright:engine: %v", global["pulsewright:engine"])
	}
	if code, _, _ := runCmd(t, "", "export", "demo:harbour-skiff"); code != exitInvalid {
		t.Errorf("export without outputs: exit %d", code)
	}
}

// TestExportImportPulse: the rocky-coast demo's NLFM pulse exported with
// --pulse-sigmf and imported back with import --into gives a scenario of
// kind samples that checks and evaluates to the same statuses; a CSV of
// amplitude and phase needs --rate and --bandwidth; taps at another rate
// than the scenario's are refused.
func TestExportImportPulse(t *testing.T) {
	dir := t.TempDir()
	base := filepath.Join(dir, "pulse")
	if code, _, stderr := runCmd(t, "", "export", "demo:rocky-coast", "--pulse-sigmf", base); code != exitOK {
		t.Fatalf("export: exit %d: %s", code, stderr)
	}
	code, out, stderr := runCmd(t, "", "import", base+".sigmf-meta", "--into", "demo:rocky-coast")
	if code != exitOK {
		t.Fatalf("import: exit %d: %s", code, stderr)
	}
	s, err := scenarios.Decode([]byte(out))
	if err != nil || s.Waveform.Kind != scenarios.KindSamples {
		t.Fatalf("imported scenario: %v, kind %q", err, s.Waveform.Kind)
	}
	d, _ := scenarios.LoadDemo("rocky-coast")
	want := map[string]string{}
	for _, tr := range mustReport(t, d.Scenario).Targets {
		want[tr.ID] = tr.Status
	}
	for _, tr := range mustReport(t, s).Targets {
		if tr.Status != want[tr.ID] {
			t.Errorf("%s: %s after import, %s before", tr.ID, tr.Status, want[tr.ID])
		}
	}

	csv := filepath.Join(dir, "pulse.csv")
	os.WriteFile(csv, []byte("amplitude,phase_deg\n1,0\n1,90\n1,180\n1,270\n"), 0o644)
	if code, _, stderr := runCmd(t, "", "import", csv, "--into", "demo:rocky-coast"); code != exitInvalid || !strings.Contains(stderr, "--rate") {
		t.Errorf("csv without a rate: exit %d: %s", code, stderr)
	}
	// A bad rate or bandwidth names the flag, the value and the range.
	for _, c := range [][2]string{{"--rate", "-5"}, {"--bandwidth", "NaN"}, {"--rate", "+Inf"}} {
		code, _, stderr := runCmd(t, "", "import", csv, c[0], c[1], "--into", "demo:rocky-coast")
		if v, _ := strconv.ParseFloat(c[1], 64); code != exitInvalid || !strings.Contains(stderr, fmt.Sprintf("%s %g out of range: want a finite value > 0 Hz", c[0], v)) {
			t.Errorf("%s %s: exit %d: %s", c[0], c[1], code, stderr)
		}
	}
	code, out, stderr = runCmd(t, "", "import", csv, "--rate", "4e6", "--bandwidth", "1e6", "--into", "demo:rocky-coast")
	if code != exitOK || !strings.Contains(out, `"amplitude": [`) {
		t.Errorf("csv import: exit %d: %s %.200s", code, stderr, out)
	}
	if code, _, stderr := runCmd(t, "", "import", csv, "--as", "filter", "--rate", "4e6", "--into", "demo:rocky-coast"); code != exitInvalid || !strings.Contains(stderr, "radar.sample_rate_hz") {
		t.Errorf("taps at another rate: exit %d: %s", code, stderr)
	}
}

func mustReport(t *testing.T, s *scenarios.Scenario) *scenarios.Report {
	t.Helper()
	res, err := scenarios.Evaluate(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	return &res.Report
}
