package main

import (
	"encoding/json"
	"math"
	"strconv"
	"strings"
	"testing"
)

// --units on the commands that print text. Expected numbers come from
// the exact definitions 1 nmi = 1852 m and 1 kt = 1852/3600 m/s
// (International Hydrographic Conference 1929; BIPM SI Brochure, 9th
// ed., Table 8), 1 km/h = 1000/3600 m/s.

func TestEvalTextUnits(t *testing.T) {
	code, out, errs := runCmd(t, "", "eval", "demo:harbour-skiff", "--format", "text", "--units", "nautical,closing")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	// The skiff at 6300 m: 6300/1852 = 3.401727… nmi; the blind range
	// c·τ/2 = 2997.92458 m = 1.6187 nmi; the unambiguous velocity
	// λ·PRF/4 = (c/9.41 GHz)·5 kHz/4 = 39.8236 m/s = 77.41 kt.
	for _, want := range []string{"RANGE nmi", "SHIFT nmi", "   3.40173  ", "blind 1.6187 nmi", "unambiguous velocity ±77.41 kt"} {
		if !strings.Contains(out, want) {
			t.Errorf("eval --units nautical lacks %q:\n%s", want, out)
		}
	}
	if !strings.Contains(out, "units       ranges in nmi, speeds in kt, range rates positive when closing") {
		t.Errorf("eval --units nautical,closing does not say its units:\n%s", out)
	}
	// Reasons restated: the helicopter closes at 25 m/s (−25 m/s in the
	// file), 25·3600/1852 = 48.596 kt, positive when closing.
	code, out, errs = runCmd(t, "", "eval", "demo:hill-clutter-doppler", "--format", "text", "--units", "nautical,closing")
	if code != 0 || !strings.Contains(out, "Doppler saves it: at +48.6 kt it sits") || strings.Count(out, "m/s") != 1 { // only in the units line
		t.Errorf("hill-clutter in knots: exit %d, %s\n%s", code, errs, out)
	}
	// SI by default: the same report as before --units existed.
	_, si, _ := runCmd(t, "", "eval", "demo:harbour-skiff", "--format", "text")
	for _, want := range []string{"RANGE m", "6300.0", "unambiguous velocity ±39.82 m/s"} {
		if !strings.Contains(si, want) {
			t.Errorf("eval text in SI lacks %q:\n%s", want, si)
		}
	}
	// JSON stays SI: --units other than SI is refused with it, and the
	// report is byte for byte the same with --units si.
	code, _, errs = runCmd(t, "", "eval", "demo:harbour-skiff", "--units", "km")
	if code != 2 || !strings.Contains(errs, `--units "km": it applies to --format text; the JSON report keeps SI`) {
		t.Errorf("eval json --units km: exit %d, stderr %q", code, errs)
	}
	_, j1, _ := runCmd(t, "", "eval", "demo:harbour-skiff")
	_, j2, _ := runCmd(t, "", "eval", "demo:harbour-skiff", "--units", "si")
	var r map[string]any
	if j1 != j2 || json.Unmarshal([]byte(j1), &r) != nil {
		t.Errorf("eval JSON differs with --units si, or is not JSON")
	}
}

func TestUnitsFlagErrors(t *testing.T) {
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"eval", "demo:harbour-skiff", "--format", "text", "--units", "furlongs"}, `--units "furlongs": "furlongs" is not a unit or system; valid: a system (si, metric, nautical)`},
		{[]string{"eval", "demo:harbour-skiff", "--format", "text", "--units", "km,nmi"}, `--units "km,nmi": "nmi" gives the range unit as nmi after km`},
		{[]string{"check", "demo:harbour-skiff", "--units", "range=mi"}, `--units "range=mi": "range=mi": range unit "mi" is not one of m, km, nmi`},
		{[]string{"pd", "--csv", "--units", "nmi"}, `--units "nmi": it applies to the table; --csv keeps SI`},
		{[]string{"blindzones", "--pri", "1e-3", "--tau", "1e-5", "--carrier", "3e9", "--format", "csv", "--units", "kt"}, `--units "kt": it applies to --format table; csv and html keep SI`},
		{[]string{"blindzones", "--pri", "1e-3", "--tau", "1e-5", "--carrier", "3e9", "--units", "nmi", "--range", "0:12x"}, `--range "0:12x" is not MIN:MAX in nmi`},
		{[]string{"blindzones", "--pri", "1e-3", "--tau", "1e-5", "--carrier", "3e9", "--units", "kt", "--rate", "fast"}, `--rate: "fast" is not a number in kt`},
	} {
		code, _, errs := runCmd(t, "", c.args...)
		if code != 2 || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, stderr %q, want %q", c.args, code, errs, c.want)
		}
	}
}

// blindzones takes --range and --rate in the --units units: 20 nmi and
// 300 kt map exactly the cells of 37040 m and 300·1852/3600 m/s; 12 rows
// of 50 kt have their centres at ±25, ±75 … ±275 kt.
func TestBlindZonesUnits(t *testing.T) {
	common := []string{"blindzones", "--pri", "100e-6,125e-6", "--tau", "1e-6", "--carrier", "9.5e9", "--m", "1", "--cells", "60x12"}
	code, nm, errs := runCmd(t, "", append(common, "--range", "0:20", "--rate", "300", "--units", "nautical")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	code, si, errs := runCmd(t, "", append(common, "--range", "0:37040", "--rate", "154.33333333333334")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	cells := func(out string) []string {
		var rows []string
		for _, l := range strings.Split(out, "\n") {
			if _, row, ok := strings.Cut(l, "|"); ok {
				rows = append(rows, row)
			}
		}
		return rows
	}
	if a, b := cells(nm), cells(si); len(a) != 12 || strings.Join(a, "\n") != strings.Join(b, "\n") {
		t.Errorf("maps differ:\n%s\n---\n%s", nm, si)
	}
	// Staggered first blind speed 631.1 m/s (λ/(2·25 µs); Skolnik,
	// Introduction to Radar Systems, ch. 3) = 1226.8 kt; the combined
	// unambiguous range 74.95 km = 40.4687 nmi.
	for _, want := range []string{"first speed blind in every CPI 1226.8 kt", "combined unambiguous range 40.4687 nmi", "columns: range 0 nmi … 20 nmi", "rows: range rate 275 … -275 kt, opening +", "   225.0 |"} {
		if !strings.Contains(nm, want) {
			t.Errorf("blindzones --units nautical lacks %q:\n%s", want, nm)
		}
	}
}

func TestPdAndCheckUnits(t *testing.T) {
	code, out, errs := runCmd(t, "", "pd", "--ref-range-m", "18520", "--ref-snr-db", "20", "--step", "1852", "--from", "1852", "--to", "5556", "--units", "nmi")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	// 18520 m = 10 nmi; rows at 1, 2, 3 nmi.
	for _, want := range []string{"reference: 20.00 dB at 10.0000 nmi", "range (nmi)", "1.00000", "2.00000", "3.00000"} {
		if !strings.Contains(out, want) {
			t.Errorf("pd --units nmi lacks %q:\n%s", want, out)
		}
	}
	code, out, errs = runCmd(t, "", "check", "demo:harbour-skiff", "--units", "km")
	if code != 0 || !strings.Contains(out, "window 3.5–9 km") || !strings.Contains(out, `"window_start_m":3500`) {
		t.Errorf("check --units km: exit %d, %s\n%s", code, errs, out)
	}
}

// coverage and trials print their ranges in --units like the others:
// 30000 m = 30000/1852 = 16.198704… nmi (1 nmi = 1852 m, as above).
func TestCoverageAndTrialsUnits(t *testing.T) {
	code, nm, errs := runCmd(t, trialScene, "coverage", "-", "--target", "steady", "--from", "18520", "--to", "37040", "--points", "3", "--units", "nmi")
	if code != 0 {
		t.Fatalf("coverage --units nmi: exit %d: %s", code, errs)
	}
	for _, want := range []string{"target steady at 16.1987 nmi", "RANGE nmi"} {
		if !strings.Contains(nm, want) {
			t.Errorf("coverage --units nmi lacks %q:\n%s", want, nm)
		}
	}
	_, si, _ := runCmd(t, trialScene, "coverage", "-", "--target", "steady", "--from", "18520", "--to", "37040", "--points", "3")
	for _, want := range []string{"target steady at 30000 m", "RANGE m"} {
		if !strings.Contains(si, want) {
			t.Errorf("coverage in SI lacks %q:\n%s", want, si)
		}
	}
	// The same rows (--from and --to stay in metres): the range column
	// converted, the SNR, Pd and status columns unchanged.
	rows := func(out string) (r [][]string) {
		for _, l := range strings.Split(out, "\n") {
			if f := strings.Fields(l); len(f) == 5 && f[4] != "STATUS" {
				r = append(r, f)
			}
		}
		return r
	}
	a, b := rows(nm), rows(si)
	if len(a) == 0 || len(a) != len(b) {
		t.Fatalf("coverage rows: %d in nmi, %d in m", len(a), len(b))
	}
	for i := range a {
		x, err1 := strconv.ParseFloat(a[i][0], 64)
		y, err2 := strconv.ParseFloat(b[i][0], 64)
		if err1 != nil || err2 != nil || math.Abs(x*1852-y) > 0.1 || strings.Join(a[i][1:], " ") != strings.Join(b[i][1:], " ") {
			t.Errorf("row %d: %v in nmi, %v in m", i, a[i], b[i])
		}
	}

	code, out, errs := runCmd(t, trialScene, "trials", "-", "-n", "20", "-j", "1", "--units", "km")
	if code != 0 || !strings.Contains(out, "TESTED AT km") || !strings.Contains(out, "95 % INTERVAL") {
		t.Fatalf("trials --units km: exit %d, %s\n%s", code, errs, out)
	}
	_, outSI, _ := runCmd(t, trialScene, "trials", "-", "-n", "20", "-j", "1")
	// The tested cell of the same trials, in m and in km.
	tested := func(out, id string) string {
		for _, l := range strings.Split(out, "\n") {
			if f := strings.Fields(l); len(f) > 2 && f[0] == id {
				return f[2]
			}
		}
		return ""
	}
	m, err1 := strconv.ParseFloat(tested(outSI, "steady"), 64)
	k, err2 := strconv.ParseFloat(tested(out, "steady"), 64)
	if err1 != nil || err2 != nil || math.Abs(m/1000-k) > 1e-4 {
		t.Errorf("tested range %q m vs %q km", tested(outSI, "steady"), tested(out, "steady"))
	}

	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"coverage", "-", "--target", "steady", "--format", "csv", "--units", "nmi"}, `--units "nmi": it applies to --format table; csv and html keep SI`},
		{[]string{"coverage", "-", "--target", "steady", "--units", "leagues"}, `--units "leagues": "leagues" is not a unit or system`},
		{[]string{"trials", "-", "-n", "5", "--format", "json", "--units", "km"}, `--units "km": it applies to --format text; json, csv and shard files keep SI`},
		{[]string{"trials", "-", "-n", "5", "--shard", "1/2", "--units", "km"}, `--units "km": it applies to --format text; json, csv and shard files keep SI`},
	} {
		code, _, errs := runCmd(t, trialScene, c.args...)
		if code != 2 || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, stderr %q, want %q", c.args, code, errs, c.want)
		}
	}
	// --units si is accepted everywhere, and JSON is unchanged by it.
	_, j1, _ := runCmd(t, trialScene, "trials", "-", "-n", "5", "-j", "1", "--format", "json")
	_, j2, _ := runCmd(t, trialScene, "trials", "-", "-n", "5", "-j", "1", "--format", "json", "--units", "si")
	if j1 == "" || j1 != j2 {
		t.Errorf("trials JSON differs with --units si")
	}
}
