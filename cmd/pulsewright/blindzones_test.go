package main

import (
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/scenarios"
)

// TestBlindZonesCommand: the schedule of 100 and 125 µs at 9.5 GHz reports
// the staggered first blind speed, 631.1 m/s (λ/(2·25 µs); Skolnik,
// Introduction to Radar Systems, ch. 3, staggered PRFs), and each output
// format; bad flags name the flag and the value.
func TestBlindZonesCommand(t *testing.T) {
	code, out, errs := runCmd(t, "", "blindzones", "--pri", "100e-6,125e-6", "--tau", "1e-6", "--carrier", "9.5e9", "--m", "1", "--range", "0:40e3", "--rate", "700")
	if code != 0 || !strings.Contains(out, "first speed blind in every CPI 631.1 m/s") || !strings.Contains(out, "combined unambiguous range 74.95 km") {
		t.Fatalf("exit %d, stderr %q, out:\n%s", code, errs, out)
	}
	code, out, _ = runCmd(t, "", "blindzones", "--pri", "1e-3,1.1e-3", "--tau", "1e-5", "--carrier", "3e9", "--cells", "10x4", "--format", "csv")
	if code != 0 || !strings.HasPrefix(out, scenarios.CSVComment()+"range_m,range_rate_mps,cpis_seen,eclipsed_in,blind_in,detected\n") || strings.Count(out, "\n") != 42 {
		t.Errorf("csv: exit %d:\n%s", code, out)
	}
	code, out, _ = runCmd(t, "", "blindzones", "--pri", "1e-3", "--tau", "1e-5", "--carrier", "3e9", "--format", "html")
	if code != 0 || !strings.Contains(out, "<table") {
		t.Errorf("html: exit %d", code)
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--tau", "1e-5", "--carrier", "3e9"}, "--pri is required"},
		{[]string{"--pri", "1e-3,x", "--tau", "1e-5", "--carrier", "3e9"}, `--pri: "x" is not a number`},
		{[]string{"--pri", "1e-3", "--tau", "1e-5", "--carrier", "3e9", "--pulses", "2.5"}, "--pulses: 2.5 is not a whole number"},
		{[]string{"--pri", "1e-3", "--tau", "1e-5", "--carrier", "3e9", "--m", "3"}, "m: 3 is outside the valid range 0 … 1"},
		{[]string{"--pri", "1e-3", "--tau", "1e-3", "--carrier", "3e9"}, "pri[0]: 0.001 s must be above twice the pulse width"},
		{[]string{"--pri", "1e-3", "--tau", "1e-5", "--carrier", "3e9", "--format", "png"}, `--format "png" is not table, csv or html`},
	} {
		code, _, errs := runCmd(t, "", append([]string{"blindzones"}, c.args...)...)
		if code != 2 || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, stderr %q, want %q", c.args, code, errs, c.want)
		}
	}
}

// TestBlindZonesOfScenario: a scenario gives the schedule, pulse and
// carrier (the hill demo: 100, 125 and 85 µs, 2-of-3, a 5 µs grid, so
// λ/(2·5 µs) = 3155.7 m/s at 9.5 GHz); its flags are refused beside it.
func TestBlindZonesOfScenario(t *testing.T) {
	code, out, errs := runCmd(t, "", "blindzones", "--cells", "20x8", "demo:hill-clutter-doppler")
	for _, want := range []string{"CPI 3: PRI 85 µs, 32 pulses", "first speed blind in every CPI 3155.7 m/s", "2-of-3 sees"} {
		if code != 0 || !strings.Contains(out, want) {
			t.Errorf("exit %d, stderr %q: output lacks %q:\n%s", code, errs, want, out)
		}
	}
	code, _, errs = runCmd(t, "", "blindzones", "--m", "1", "demo:hill-clutter-doppler")
	if code != 2 || !strings.Contains(errs, "--m is taken from the scenario") {
		t.Errorf("exit %d, stderr %q", code, errs)
	}
}
