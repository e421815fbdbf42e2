package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// hostile holds what a scenario's name or target id could carry to a
// terminal: an OSC that retitles the window, a CSI that clears the
// screen, a C1 CSI, DEL and a right-to-left override.
const hostile = "\x1b]0;owned\x07\x1b[2J\u009b31m\x7f\u202e"

func hasControls(s string) bool {
	for _, r := range s {
		if unsafeRune(r) {
			return true
		}
	}
	return false
}

// TestTerminalOutputSanitised: check, eval (text and JSON) and error
// messages print no raw control characters, and the JSON still decodes
// to the same name.
func TestTerminalOutputSanitised(t *testing.T) {
	doc := `{"version":2,"name":` + jsonString(hostile) + `,"waveform":{"kind":"barker","length":13,"chip_s":1e-6},"targets":[{"id":"t1","kind":"point","range_m":3000,"rcs_dbsm":0}]}`
	for _, args := range [][]string{{"check", "-"}, {"eval", "-", "--format", "text"}, {"eval", "-"}} {
		code, out, errs := runCmd(t, doc, args...)
		if code != exitOK {
			t.Fatalf("%v: exit %d %s", args, code, errs)
		}
		if hasControls(out) || hasControls(errs) {
			t.Errorf("%v prints control characters: %q", args, out)
		}
		if !strings.Contains(out, `\u001b]0;owned`) {
			t.Errorf("%v: the escaped name is missing: %.300q", args, out)
		}
		if args[0] == "eval" && len(args) == 2 {
			var rep struct {
				Scenario string `json:"scenario"`
			}
			if err := json.Unmarshal([]byte(out), &rep); err != nil || rep.Scenario != hostile {
				t.Errorf("eval JSON no longer decodes to the name: %v %q", err, rep.Scenario)
			}
		}
	}
	bad := `{"version":2,` + jsonString(hostile) + `:1,"waveform":{"kind":"barker","length":13,"chip_s":1e-6}}`
	code, _, errs := runCmd(t, bad, "check", "-")
	if code != exitInvalid || hasControls(errs) || !strings.Contains(errs, "unknown field") {
		t.Errorf("error message: exit %d %q", code, errs)
	}
}

func jsonString(s string) string {
	b, _ := json.Marshal(s)
	return string(b)
}

// TestOutputIsNotInput: no command overwrites the scenario file it
// reads, and a refused or failed command leaves no file behind.
func TestOutputIsNotInput(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "s.json")
	doc := []byte(mustCanonical(t, "closing-jet"))
	os.WriteFile(in, doc, 0o644)
	for _, args := range [][]string{
		{"report", in, "-o", in},
		{"report", in, "-o", filepath.Join(dir, ".", "s.json")},
		{"sweep", in, "--set", "seed=1,2", "--out", in},
		{"sweep", in, "--set", "seed=1,2", "--html", in},
		{"export", in, "--csv", in},
		{"export", in, "--sigmf", strings.TrimSuffix(in, ".json"), "--csv", strings.TrimSuffix(in, ".json") + ".sigmf-meta"},
	} {
		code, _, errs := runCmd(t, "", args...)
		if code != exitInvalid || !(strings.Contains(errs, "is the scenario being read") || strings.Contains(errs, "both name")) {
			t.Errorf("%v: exit %d %q", args, code, errs)
		}
		if data, _ := os.ReadFile(in); string(data) != string(doc) {
			t.Fatalf("%v changed its input", args)
		}
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("files left: %v", entries)
	}
	// A failed report leaves no file: -o names a directory.
	os.Mkdir(filepath.Join(dir, "d.html"), 0o755)
	if code, _, errs := runCmd(t, "", "report", in, "-o", filepath.Join(dir, "d.html")); code == exitOK || !strings.Contains(errs, "not a regular file") {
		t.Errorf("report onto a directory: exit %d %q", code, errs)
	}
}

func mustCanonical(t *testing.T, demo string) string {
	t.Helper()
	code, out, errs := runCmd(t, "", "check", "demo:"+demo)
	if code != exitOK {
		t.Fatal(errs)
	}
	for _, line := range strings.Split(out, "\n") {
		if rest, ok := strings.CutPrefix(line, "canonical"); ok {
			return strings.TrimSpace(rest)
		}
	}
	t.Fatal("no canonical line")
	return ""
}

// TestServeShortToken: --token under 16 characters is a usage error.
func TestServeShortToken(t *testing.T) {
	code, _, errs := runCmd(t, "", "serve", "--addr", "127.0.0.1:0", "--data-dir", t.TempDir(), "--token", "a")
	if code != exitInvalid || !strings.Contains(errs, "at least 16") {
		t.Errorf("exit %d %q", code, errs)
	}
}
