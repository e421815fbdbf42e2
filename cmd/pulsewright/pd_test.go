package main

import (
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// TestPdCommandTable: the text table states the SNR a steady target needs
// for Pd 0.9 at Pfa 1e-6 (13.18 dB, non-central chi-square; Albersheim
// 1981 gives 13.11 dB) and the Pd at 13 dB.
func TestPdCommandTable(t *testing.T) {
	code, out, errOut := runCmd(t, "", "pd", "--from", "12", "--to", "14")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	for _, want := range []string{"Pd of a steady target, 1 pulse, Pfa 1e-06, known noise level",
		"SNR per pulse for Pd 0.9: 13.18 dB", "Albersheim's equation (linear detector): 13.11 dB",
		"Shnidman's equation: 13.12 dB", "13.00", "0.8744"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
}

// TestPdCommandCSV: Swerling 1 behind a 16-cell CA-CFAR reaches Pd 0.9 at
// 23.15 dB (Richards, Fundamentals of Radar Signal Processing 2nd ed., eq.
// 6.137), so the CSV crosses 0.9 between 23 and 24 dB.
func TestPdCommandCSV(t *testing.T) {
	code, out, errOut := runCmd(t, "", "pd", "--swerling", "1", "--cfar-cells", "16", "--csv", "--from", "20", "--to", "26")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	rows := readCSV(t, out)
	if len(rows) != 7 {
		t.Fatalf("%d rows, want 7:\n%s", len(rows), out)
	}
	pd := func(i int) float64 {
		v, err := strconv.ParseFloat(rows[i]["pd"], 64)
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
	if rows[3]["snr_db"] != "23" || !(pd(3) < 0.9 && pd(4) > 0.9) {
		t.Errorf("Pd at 23 / 24 dB = %g / %g, want either side of 0.9", pd(3), pd(4))
	}
	for i := 1; i < len(rows); i++ {
		if pd(i) <= pd(i-1) {
			t.Errorf("Pd falls from %g to %g", pd(i-1), pd(i))
		}
	}
}

// TestPdCommandRange: a steady target with 17.02 dB at 5 km reaches the
// 13.18 dB it needs for Pd 0.9 (Pfa 1e-6) at 6.24 km by the R⁴ law (with
// the unrounded 13.1835 dB: 6236 m); the HTML page carries the chart.
func TestPdCommandRange(t *testing.T) {
	html := filepath.Join(t.TempDir(), "pd.html")
	code, out, errOut := runCmd(t, "", "pd", "--ref-range-m", "5000", "--ref-snr-db", "17.02", "--html", html)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	if !strings.Contains(out, "Pd ≥ 0.9 out to 6236 m") {
		t.Errorf("no coverage line:\n%s", out)
	}
	b, err := os.ReadFile(html)
	if err != nil {
		t.Fatal(err)
	}
	page := string(b)
	for _, want := range []string{"<title>Detection probability", `id="pd"`, "coverage 6236 m", "range (m)", "Caution"} {
		if !strings.Contains(page, want) {
			t.Errorf("page lacks %q", want)
		}
	}
	for _, bad := range []string{"NaN", "Inf"} {
		if strings.Contains(out, bad) || strings.Contains(page, `"`+bad) {
			t.Errorf("%s in the output", bad)
		}
	}
}

// TestPdCommandErrors: every bad flag is named with its value and range.
func TestPdCommandErrors(t *testing.T) {
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--pfa", "2"}, "--pfa 2 out of range: want 0 < pfa < 1"},
		{[]string{"--pfa", "0"}, "--pfa 0 out of range"},
		{[]string{"--swerling", "5"}, "--swerling 5 out of range: want 0 (steady) … 4"},
		{[]string{"--pulses", "0"}, "--pulses 0 out of range: want 1 … 100000"},
		{[]string{"--integration", "optimal"}, `--integration "optimal" out of range: want noncoherent or coherent`},
		{[]string{"--cfar-cells", "-3"}, "--cfar-cells -3 out of range"},
		{[]string{"--cfar-cells", "1"}, "--cfar-cells 1 too few for --pfa 1e-06"},
		{[]string{"--pd-required", "1"}, "--pd-required 1 out of range: want pfa (1e-06) < pd-required < 1"},
		{[]string{"--swerling", "4", "--pulses", "3", "--integration", "coherent"}, "use --integration noncoherent or --pulses 1"},
		{[]string{"--step", "0"}, "--step 0 out of range: want a finite value > 0"},
		{[]string{"--from", "10", "--to", "5"}, "--to 5 out of range: want a finite value ≥ --from (10)"},
		{[]string{"--step", "1e-9"}, "at most 100000 rows"},
		{[]string{"--ref-range-m", "-1", "--ref-snr-db", "10"}, "--ref-range-m -1 out of range"},
		{[]string{"--ref-range-m", "5000"}, "--ref-snr-db NaN out of range: want -300 … 300 dB (with --ref-range-m)"},
		{[]string{"extra"}, `pd takes no arguments, got "extra"`},
		{[]string{"--cfar-cells", "16", "--os-rank", "17"}, "--os-rank 17 out of range: want 0 (cell averaging) or 1 … --cfar-cells (16)"},
		{[]string{"--cfar-cells", "16", "--os-rank", "12", "--pulses", "4"}, "want --pulses 1 or --integration coherent"},
	} {
		code, out, errOut := runCmd(t, "", append([]string{"pd"}, c.args...)...)
		if code != exitInvalid || out != "" || !strings.Contains(errOut, c.want) {
			t.Errorf("pd %v: exit %d, stdout %q, stderr %q; want exit 2 and %q", c.args, code, out, errOut, c.want)
		}
	}
}

// TestPdCommandOS: an ordered-statistic CFAR (rank 12 of 16) against a
// Swerling 1 target needs 24.08 dB for Pd 0.9 at Pfa 1e-6, from Rohling's
// closed form (IEEE TAES 19(4), 1983) at α/(1+SNR).
func TestPdCommandOS(t *testing.T) {
	code, out, errOut := runCmd(t, "", "pd", "--swerling", "1", "--cfar-cells", "16", "--os-rank", "12", "--from", "23", "--to", "25")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	for _, want := range []string{"ordered-statistic CFAR, rank 12 of 16 cells", "SNR per pulse for Pd 0.9: 24.08 dB", "CFAR loss at Pd 0.9: 2.93 dB"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
}
