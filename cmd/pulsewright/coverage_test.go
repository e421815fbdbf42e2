package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestCoverageCommand(t *testing.T) {
	code, out, errs := runCmd(t, trialScene, "coverage", "-", "--target", "steady", "--points", "40")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"target steady at 30000 m", "detection range for its RCS (R⁴ law):", "RANGE m  SNR dB"} {
		if !strings.Contains(out, want) {
			t.Errorf("table lacks %q:\n%s", want, out)
		}
	}
	code, out, _ = runCmd(t, trialScene, "coverage", "-", "--target", "fluct", "--by", "snr", "--format", "csv")
	if code != 0 || !strings.HasPrefix(out, "# pulsewright ") || !strings.Contains(out, "\nsnr_db,pd\n") {
		t.Errorf("csv: exit %d\n%.200s", code, out)
	}
	f := filepath.Join(t.TempDir(), "c.html")
	if code, _, errs := runCmd(t, trialScene, "coverage", "-", "--target", "steady", "--format", "html", "-o", f); code != 0 {
		t.Fatalf("html: exit %d %s", code, errs)
	}
	if b, err := os.ReadFile(f); err != nil || !strings.Contains(string(b), `"pd-range"`) || !strings.Contains(string(b), "Caution") {
		t.Errorf("html page: %v, %d bytes", err, len(b))
	}
	// The text report names each target's detection range.
	if code, out, _ := runCmd(t, trialScene, "eval", "-", "--format", "text"); code != 0 || !strings.Contains(out, "steady: detection range for its RCS ") {
		t.Errorf("eval text: exit %d\n%s", code, out)
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{nil, "coverage needs --target ID (point targets: steady, fluct)"},
		{[]string{"--target", "nope"}, `target "nope" is not in the scenario`},
		{[]string{"--target", "steady", "--by", "doppler"}, `--by "doppler" is not range or snr`},
		{[]string{"--target", "steady", "--points", "1"}, "--points 1 out of range: want 2 … 2000"},
		{[]string{"--target", "steady", "--from", "9000", "--to", "8000"}, "--from 9000 --to 8000 out of range"},
		{[]string{"--target", "steady", "--format", "png"}, `--format "png" is not table, csv or html`},
	} {
		code, _, errs := runCmd(t, trialScene, append([]string{"coverage", "-"}, c.args...)...)
		if code != exitInvalid || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, stderr %q; want %q", c.args, code, errs, c.want)
		}
	}
}
