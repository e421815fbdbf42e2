package scenarios

import (
	"bytes"
	"context"
	"errors"
	"math"
	"os"
	"strings"
	"testing"
)

// TestReadsVersion1 keeps a version 1 file and its share link, as a user
// saved them, readable by every later engine: both decode, to the same
// scenario, whose canonical form (written in the current version) is the
// committed one, and the verdicts are the ones the scene was built for.
// The canonical file is written in version 2, so this test checks the
// upgrade path (upgrade1); the kayak, below_noise in version 1, is
// too_weak in version 2, the same verdict under its new name, so no
// verdict change is reported.
func TestReadsVersion1(t *testing.T) {
	dir := "testdata/formats/v1/"
	file, err := os.ReadFile(dir + "estuary.json")
	if err != nil {
		t.Fatal(err)
	}
	link, err := os.ReadFile(dir + "estuary.link")
	if err != nil {
		t.Fatal(err)
	}
	want, err := os.ReadFile(dir + "estuary.canonical.json")
	if err != nil {
		t.Fatal(err)
	}
	fromFile, err := Decode(file)
	if err != nil {
		t.Fatalf("version 1 file: %v", err)
	}
	fromLink, err := ParseLink(strings.TrimSpace(string(link)))
	if err != nil {
		t.Fatalf("version 1 link: %v", err)
	}
	for name, s := range map[string]*Scenario{"file": fromFile, "link": fromLink} {
		if s.ReadVersion != 1 || len(s.Upgraded) != 1 || !strings.Contains(s.Upgraded[0], "pd_required (0.9, the default)") {
			t.Errorf("%s: read version %d, notes %q", name, s.ReadVersion, s.Upgraded)
		}
		got, err := Canonical(s)
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got, bytes.TrimSpace(want)) {
			t.Errorf("%s: canonical form\n%s\nwant\n%s", name, got, want)
		}
	}
	res, err := Evaluate(context.Background(), fromLink)
	if err != nil {
		t.Fatal(err)
	}
	statuses := map[string]string{"ferry": StatusDetected, "buoy": StatusOutOfWindow, "kayak": StatusTooWeak}
	for _, tr := range res.Report.Targets {
		if tr.Status != statuses[tr.ID] {
			t.Errorf("%s: %s, want %s (%s)", tr.ID, tr.Status, statuses[tr.ID], tr.Reason)
		}
	}
	for _, w := range res.Report.Warnings {
		if strings.Contains(w, v1Marker) {
			t.Errorf("a verdict change where none is: %s", w)
		}
	}
}

// TestUpgradeChain runs the machinery that reads older versions with a
// made-up version 0 whose receive window ended at "window_end_m", below
// the real version 1 (read through upgrade1).
func TestUpgradeChain(t *testing.T) {
	ups := map[int]upgrade{0: func(doc map[string]any) ([]string, error) {
		r, _ := doc["radar"].(map[string]any)
		if v, ok := r["window_end_m"]; ok {
			delete(r, "window_end_m")
			r["window_stop_m"] = v
			return []string{"radar.window_end_m is now radar.window_stop_m"}, nil
		}
		return nil, nil
	}, 1: upgrade1, 2: upgrade2}
	old := []byte(`{"version":0,"radar":{"window_end_m":9000},"waveform":{"kind":"rect","pulse_width_s":1e-6}}`)
	s, err := decodeWith(old, ups)
	if err != nil {
		t.Fatalf("version 0 with an upgrade: %v", err)
	}
	if s.Version != Version || s.ReadVersion != 0 || s.Radar.WindowStopM != 9000 || len(s.Upgraded) != 2 {
		t.Errorf("upgraded: version %d, read %d, window_stop_m %g, notes %q", s.Version, s.ReadVersion, s.Radar.WindowStopM, s.Upgraded)
	}
	// Errors in an upgraded document name the current fields.
	bad := []byte(`{"version":0,"radar":{"window_end_m":-5},"waveform":{"kind":"rect","pulse_width_s":1e-6}}`)
	if _, err := decodeWith(bad, ups); err == nil || !strings.Contains(err.Error(), "radar.window_stop_m") {
		t.Errorf("bad version 0 document: %v", err)
	}
	// Without the upgrade, version 0 is refused with the list of versions.
	_, err = Decode(old)
	var verr *ValidationError
	if !errors.As(err, &verr) || !strings.Contains(err.Error(), "0 is not supported (supported versions: 1, 2, 3)") {
		t.Errorf("version 0 without an upgrade: %v", err)
	}
	if got := joinInts(supportedVersions(ups)); got != "0, 1, 2, 3" {
		t.Errorf("supported versions %q, want \"0, 1, 2, 3\"", got)
	}
	// A current document is not marked as upgraded.
	cur, err := decodeWith([]byte(`{"version":3,"waveform":{"kind":"rect","pulse_width_s":1e-6}}`), ups)
	if err != nil || cur.ReadVersion != 0 || cur.Upgraded != nil {
		t.Errorf("current document: %v, read %d, notes %q", err, cur.ReadVersion, cur.Upgraded)
	}
}

// TestVersion1VerdictChange: a version 1 file and link whose Swerling 1
// dinghy clears the fixed threshold by 4 dB (version 1: detected) but has
// Pd = Pfa^(1/(1+SNR)) = 0.679 < 0.9 (DiFranco & Rubin; Richards §6.3),
// so version 2 calls it too_weak. Both read, and the change is named in
// the report's warnings and in UpgradeNotes: target, old and new verdict;
// the wall, detected under both rules, is not named.
func TestVersion1VerdictChange(t *testing.T) {
	dir := "testdata/formats/v1/"
	file, err := os.ReadFile(dir + "marina.json")
	if err != nil {
		t.Fatal(err)
	}
	link, err := os.ReadFile(dir + "marina.link")
	if err != nil {
		t.Fatal(err)
	}
	want, err := os.ReadFile(dir + "marina.canonical.json")
	if err != nil {
		t.Fatal(err)
	}
	fromFile, err := Decode(file)
	if err != nil {
		t.Fatal(err)
	}
	fromLink, err := ParseLink(strings.TrimSpace(string(link)))
	if err != nil {
		t.Fatal(err)
	}
	for name, s := range map[string]*Scenario{"file": fromFile, "link": fromLink} {
		if got, _ := Canonical(s); !bytes.Equal(got, bytes.TrimSpace(want)) {
			t.Errorf("%s: canonical form\n%s\nwant\n%s", name, got, want)
		}
		notes, err := UpgradeNotes(context.Background(), s)
		if err != nil {
			t.Fatal(err)
		}
		const change = "target dinghy: read from a format version 1 document, whose rules called it detected; version 2 calls it too_weak: Pd 0.679 in the scene against the required 0.9"
		if len(notes) != 2 || !strings.Contains(notes[1], change) {
			t.Errorf("%s: upgrade notes %q", name, notes)
		}
		rep, err := Analyse(context.Background(), s)
		if err != nil {
			t.Fatal(err)
		}
		var changes []string
		for _, w := range rep.Warnings {
			if strings.Contains(w, v1Marker) {
				changes = append(changes, w)
			}
		}
		if len(changes) != 1 || !strings.Contains(changes[0], change) {
			t.Errorf("%s: verdict changes %q", name, changes)
		}
		d := target(&Result{Report: *rep}, "dinghy")
		if d.Status != StatusTooWeak || d.ThresholdMarginDB == nil || math.Abs(*d.ThresholdMarginDB-4) > 0.05 {
			t.Errorf("%s: dinghy %s, threshold margin %v", name, d.Status, d.ThresholdMarginDB)
		}
	}
	// The same scenario written in version 2 carries no such warning.
	canon, _ := Canonical(fromFile)
	cur, err := Decode(canon)
	if err != nil {
		t.Fatal(err)
	}
	if notes, _ := UpgradeNotes(context.Background(), cur); notes != nil {
		t.Errorf("a version 2 document has upgrade notes: %q", notes)
	}
}

// TestReadsVersion2 keeps a version 2 file and its share link readable:
// both decode to the same scenario, with no upgrade note (version 3 only
// added receiver.integration, coherent by default, which is what a
// version 2 train did), whose canonical form is the committed version 3
// one, and whose report equals that of the same scenario written as
// version 3.
func TestReadsVersion2(t *testing.T) {
	dir := "testdata/formats/v2/"
	file, err := os.ReadFile(dir + "jet.json")
	if err != nil {
		t.Fatal(err)
	}
	link, err := os.ReadFile(dir + "jet.link")
	if err != nil {
		t.Fatal(err)
	}
	want, err := os.ReadFile(dir + "jet.canonical.json")
	if err != nil {
		t.Fatal(err)
	}
	fromFile, err := Decode(file)
	if err != nil {
		t.Fatalf("version 2 file: %v", err)
	}
	fromLink, err := ParseLink(strings.TrimSpace(string(link)))
	if err != nil {
		t.Fatalf("version 2 link: %v", err)
	}
	for name, s := range map[string]*Scenario{"file": fromFile, "link": fromLink} {
		if s.ReadVersion != 2 || len(s.Upgraded) != 0 || s.Receiver.Integration != IntegrationCoherent {
			t.Errorf("%s: read version %d, notes %q, integration %q", name, s.ReadVersion, s.Upgraded, s.Receiver.Integration)
		}
		got, err := Canonical(s)
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got, bytes.TrimSpace(want)) {
			t.Errorf("%s: canonical form\n%s\nwant\n%s", name, got, want)
		}
	}
	cur := mustDecode(t, string(want))
	a, b := mustEvaluate(t, fromFile), mustEvaluate(t, cur)
	for i := range a.Report.Targets {
		if a.Report.Targets[i].Status != b.Report.Targets[i].Status || *a.Report.Targets[i].Pd != *b.Report.Targets[i].Pd {
			t.Errorf("target %s: version 2 %s, version 3 %s", a.Report.Targets[i].ID, a.Report.Targets[i].Status, b.Report.Targets[i].Status)
		}
	}
	// A version 2 document cannot use the version 3 field.
	bad := strings.Replace(string(file), `"receiver": {`, `"receiver": {"integration": "noncoherent", `, 1)
	if !strings.Contains(bad, "integration") {
		bad = strings.Replace(string(file), `"targets"`, `"receiver": {"integration": "coherent"}, "targets"`, 1)
	}
	if _, err := Decode([]byte(bad)); err == nil || !strings.Contains(err.Error(), "receiver.integration: added in format version 3") {
		t.Errorf("version 2 document with receiver.integration: %v", err)
	}
}
