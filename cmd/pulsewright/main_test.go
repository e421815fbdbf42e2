package main

import (
	"bytes"
	"context"
	"encoding/json"
	"html"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/scenarios"
)

// runCmd runs the program with args and stdin and returns its exit status
// and output.
func runCmd(t *testing.T, stdin string, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(context.Background(), args, strings.NewReader(stdin), &out, &errb)
	return code, out.String(), errb.String()
}

func TestCheckForms(t *testing.T) {
	dir := t.TempDir()
	file := filepath.Join(dir, "s.json")
	doc := `{"version":3,"name":"file scene","waveform":{"kind":"p4","length":64,"chip_s":1e-7}}`
	if err := os.WriteFile(file, []byte(doc), 0o644); err != nil {
		t.Fatal(err)
	}
	code, link, _ := runCmd(t, "", "link", file)
	if code != 0 {
		t.Fatalf("link exit %d", code)
	}
	lines := strings.Split(strings.TrimSpace(link), "\n")
	last := lines[len(lines)-1]
	if !strings.HasPrefix(last, defaultBase+"/#s=") {
		t.Fatalf("link line %q", last)
	}
	frag := last[strings.Index(last, "#"):]
	for _, ref := range []string{file, "-", last, frag, "demo:closing-jet"} {
		code, out, errs := runCmd(t, doc, "check", ref)
		if code != 0 {
			t.Fatalf("check %q: exit %d, %s", ref, code, errs)
		}
		if !strings.HasPrefix(out, "valid") || !strings.Contains(out, "canonical  {\"version\":3") {
			t.Fatalf("check %q summary:\n%s", ref, out)
		}
	}
}

func TestCheckInvalid(t *testing.T) {
	code, out, errs := runCmd(t, `{"version":2,"waveform":{"kind":"lfm","pulse_width_s":-1,"bandwidth_hz":1e6},"seed":-2}`, "check", "-")
	if code != exitInvalid {
		t.Fatalf("exit %d, want %d", code, exitInvalid)
	}
	if out != "" {
		t.Errorf("stdout not empty: %q", out)
	}
	for _, want := range []string{"2 problem(s)", "waveform.pulse_width_s: -1 must be above 0", "seed: -2 is outside the valid range"} {
		if !strings.Contains(errs, want) {
			t.Errorf("stderr lacks %q:\n%s", want, errs)
		}
	}
}

func TestCheckErrors(t *testing.T) {
	tests := []struct {
		args []string
		code int
		want string
	}{
		{[]string{"check"}, exitInvalid, "check takes one SCENARIO"},
		{[]string{"check", "demo:nope"}, exitInvalid, `demo "nope": not found (known: closing-jet`},
		{[]string{"check", "/no/such/file.json"}, exitFailure, "open scenario"},
		{[]string{"check", "#s=!!"}, exitInvalid, "not base64url"},
		{[]string{"frobnicate"}, exitInvalid, `unknown command "frobnicate"`},
		{[]string{"link", "demo:rocky-coast", "--bogus"}, exitInvalid, "flag provided but not defined: -bogus"},
	}
	for _, tt := range tests {
		code, _, errs := runCmd(t, "", tt.args...)
		if code != tt.code || !strings.Contains(errs, tt.want) {
			t.Errorf("%v: exit %d stderr %q; want %d and %q", tt.args, code, errs, tt.code, tt.want)
		}
	}
}

func TestDemosList(t *testing.T) {
	code, out, _ := runCmd(t, "", "demos")
	if code != 0 || strings.Count(out, "demo:") < 4 {
		t.Fatalf("exit %d, output:\n%s", code, out)
	}
}

// TestCheckHostileInputFast feeds a stream that claims a gigabyte and a
// deeply nested document; both must be refused with bounded allocation.
func TestCheckHostileInput(t *testing.T) {
	deep := `{"version":2,"view":` + strings.Repeat("[", 200000) + strings.Repeat("]", 200000) + "}"
	for name, in := range map[string]string{
		"1 GB claim": strings.Repeat(" ", 5<<20) + "{}",
		"deep":       deep,
	} {
		allocs := testing.AllocsPerRun(1, func() {
			code, _, _ := runCmd(t, in, "check", "-")
			if code != exitInvalid {
				t.Errorf("%s: exit %d", name, code)
			}
		})
		if allocs > 2000 {
			t.Errorf("%s: %v allocations", name, allocs)
		}
	}
}

// TestVersionCommand: one line naming the engine and the formats, or the
// report's engine object as JSON.
func TestVersionCommand(t *testing.T) {
	code, out, stderr := runCmd(t, "", "version")
	if code != exitOK || !strings.HasPrefix(out, "pulsewright ") || !strings.Contains(out, "scenario format 3 · report format 3") {
		t.Errorf("version: exit %d, %q %s", code, out, stderr)
	}
	code, out, _ = runCmd(t, "", "version", "--format", "json")
	var e scenarios.EngineInfo
	if err := json.Unmarshal([]byte(out), &e); code != exitOK || err != nil || e.Version == "" || e.ReportFormat != scenarios.ReportVersion {
		t.Errorf("version --format json: exit %d, %v, %q", code, err, out)
	}
	if code, _, _ := runCmd(t, "", "version", "--format", "xml"); code != exitInvalid {
		t.Errorf("version --format xml: exit %d", code)
	}
}

// TestCheckVersion1NamesVerdictChange: checking a version 1 file prints
// the upgrade note and names the target whose verdict the version 2 rules
// change (a Swerling 1 dinghy 4 dB over a fixed threshold: detected in
// version 1, too weak at Pd 0.679 < 0.9 in version 2).
func TestCheckVersion1NamesVerdictChange(t *testing.T) {
	code, out, errs := runCmd(t, "", "check", "../../scenarios/testdata/formats/v1/marina.json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"read as format version 3 from version 1", "statuses are now decided on the probability of detection",
		"target dinghy: read from a format version 1 document, whose rules called it detected; version 2 calls it too_weak: Pd 0.679"} {
		if !strings.Contains(out, want) {
			t.Errorf("check output lacks %q:\n%s", want, out)
		}
	}
	if strings.Contains(out, "target wall") {
		t.Errorf("the wall's verdict did not change:\n%s", out)
	}
}

// TestEveryOutputNamesTheEngine: every report a command writes — text for
// people, CSV, HTML and JSON — names the engine and the format versions
// that computed it (issue 18: a number must be traceable to its code).
// Text and CSV carry the line of scenarios.EngineInfo.String (CSV as a
// "# " comment first), HTML in its footer, JSON as the engine object.
func TestEveryOutputNamesTheEngine(t *testing.T) {
	eng := scenarios.RunningEngine().String()
	dir := t.TempDir()
	bz := []string{"blindzones", "--pri", "1e-3,1.1e-3", "--tau", "1e-5", "--carrier", "3e9", "--cells", "10x4"}
	cov := []string{"coverage", "demo:harbour-skiff", "--target", "skiff", "--points", "5"}
	trials := []string{"trials", "demo:harbour-skiff", "-n", "4"}
	for _, c := range []struct {
		name string
		args []string
		file string // the output, when the command writes a file
		form string // text (the line last), csv (the comment first), html, json
	}{
		{"eval text", []string{"eval", "demo:harbour-skiff", "--format", "text"}, "", "text"},
		{"eval json", []string{"eval", "demo:harbour-skiff"}, "", "json"},
		{"report html", []string{"report", "demo:harbour-skiff", "-o", filepath.Join(dir, "r.html")}, filepath.Join(dir, "r.html"), "html"},
		{"sweep csv", []string{"sweep", "demo:harbour-skiff", "--set", "seed=1:2:1"}, "", "csv"},
		{"sweep html", []string{"sweep", "demo:harbour-skiff", "--set", "seed=1:2:1", "--html", filepath.Join(dir, "s.html")}, filepath.Join(dir, "s.html"), "html"},
		{"export csv", []string{"export", "demo:harbour-skiff", "--csv", filepath.Join(dir, "p.csv")}, filepath.Join(dir, "p.csv"), "csv"},
		{"pd table", []string{"pd", "--to", "3"}, "", "text"},
		{"pd csv", []string{"pd", "--to", "3", "--csv"}, "", "csv"},
		{"pd html", []string{"pd", "--to", "3", "--html", filepath.Join(dir, "pd.html")}, filepath.Join(dir, "pd.html"), "html"},
		{"blindzones table", bz, "", "text"},
		{"blindzones csv", append(slices.Clone(bz), "--format", "csv"), "", "csv"},
		{"blindzones html", append(slices.Clone(bz), "--format", "html"), "", "html"},
		{"coverage table", cov, "", "text"},
		{"coverage table by snr", append(slices.Clone(cov), "--by", "snr"), "", "text"},
		{"coverage csv", append(slices.Clone(cov), "--format", "csv"), "", "csv"},
		{"coverage html", append(slices.Clone(cov), "--format", "html"), "", "html"},
		{"trials text", append(slices.Clone(trials), "--format", "text"), "", "text"},
		{"trials csv", append(slices.Clone(trials), "--format", "csv"), "", "csv"},
		{"trials json", append(slices.Clone(trials), "--format", "json"), "", "json"},
	} {
		t.Run(c.name, func(t *testing.T) {
			code, out, errs := runCmd(t, "", c.args...)
			if code != exitOK {
				t.Fatalf("exit %d: %s", code, errs)
			}
			if c.file != "" {
				b, err := os.ReadFile(c.file)
				if err != nil {
					t.Fatal(err)
				}
				out = string(b)
			}
			var ok bool
			switch c.form {
			case "text":
				ok = strings.HasSuffix(out, "\n"+eng+"\n")
			case "csv":
				ok = strings.HasPrefix(out, "# "+eng+"\n")
			case "html":
				ok = strings.Contains(out, `<span class="engine">`+html.EscapeString(eng)+`</span>`)
			case "json":
				var v struct{ Engine *scenarios.EngineInfo }
				ok = json.Unmarshal([]byte(out), &v) == nil && v.Engine != nil && *v.Engine == scenarios.RunningEngine()
			}
			if !ok {
				t.Errorf("the %s output does not name the engine %q:\n%.300s\n…\n%s", c.form, eng, out, tail(out, 300))
			}
		})
	}
}

func tail(s string, n int) string {
	if len(s) <= n {
		return s
	}
	return s[len(s)-n:]
}
