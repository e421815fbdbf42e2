package main

import (
	"encoding/json"
	"os"
	"path/filepath"
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
