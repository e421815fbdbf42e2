package scenarios

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"math"
	"strconv"
	"strings"
	"testing"
)

// roundTripScene is a scene of our own for the import round trip: a strong
// and a weak point target and a moving one, on range gates (integer sample
// delays) so that the echoes are the recorded samples themselves.
func roundTripScene(t *testing.T, waveform string, fs float64) *Scenario {
	t.Helper()
	gate := func(k int) float64 { return float64(k) * C / (2 * fs) }
	doc := fmt.Sprintf(`{"version":2,"name":"import round trip","radar":{"sample_rate_hz":%g,"pri_s":3.2e-3,"window_stop_m":%g},
		"waveform":%s,
		"targets":[{"id":"hull","kind":"point","range_m":%g,"rcs_dbsm":30},
		           {"id":"dinghy","kind":"point","range_m":%g,"rcs_dbsm":-12},
		           {"id":"drone","kind":"point","range_m":%g,"rcs_dbsm":-5,"range_rate_mps":-40}]}`,
		fs, gate(3000), waveform, gate(1200), gate(1213), gate(2100))
	return mustDecode(t, doc)
}

// TestImportRoundTrip exports built-in waveforms as SigMF (the pulse at
// the scenario's rate, cf32_le), imports each as a "samples" waveform at
// the same rate, and compares every field of the two reports.
//
// Codes, held (export marks a code at a whole number of samples per chip
// "hold"): within 1e-4 dB and 1e-6 relative. The held samples are the
// rectangular-chip code itself, up to the rounding of each sample to
// float32 in the cf32 file (relative error ≤ 2⁻²⁴ ≈ 6e-8, ≤ 5e-7 dB on any
// power) and the unit-mean-power scaling, which restores the rounded
// samples' energy to τ (a factor within 1e-7 of 1).
//
// FM waveforms, read band-limited: the same 1e-4 dB holds wherever figures
// are read on the samples (the measured differences, logged, are ~1e-6
// dB). Figures computed in continuous time between the samples (issue 12)
// compare the band-limited reading of 2 or 3 samples per 1/B with the
// analytic FM, which differ in the pulse's edge transients (the FM is not
// band-limited): 0.05 dB and 0.5 % for the LFM, 0.5 dB for the NLFM
// (measured 0.02 dB and 0.3 dB), 2 cm of range shift.
//
// The echoes lie on range gates, so the scene samples the imported pulse
// at its own instants; the Doppler echo is the same samples times the same
// Doppler phasor.
func TestImportRoundTrip(t *testing.T) {
	exact := cmpTol{db: 1e-4, rel: 1e-6, shiftM: 1e-3}
	for _, c := range []struct {
		name, waveform string
		fs             float64
		interp         string
		tol            cmpTol
	}{
		{"lfm at 2B", `{"kind":"lfm","pulse_width_s":10e-6,"bandwidth_hz":10e6}`, 20e6, InterpBandLimited, cmpTol{0.05, 5e-3, 0.02}},
		{"nlfm at 3B", `{"kind":"nlfm","pulse_width_s":20e-6,"bandwidth_hz":5e6}`, 15e6, InterpBandLimited, cmpTol{0.5, 5e-3, 0.02}},
		{"barker 13 at 2/chip", `{"kind":"barker","length":13,"chip_s":1e-6}`, 2e6, InterpHold, exact},
		{"p4 64 at 3/chip", `{"kind":"p4","length":64,"chip_s":2e-7}`, 15e6, InterpHold, exact},
	} {
		t.Run(c.name, func(t *testing.T) {
			orig := roundTripScene(t, c.waveform, c.fs)
			var meta, data bytes.Buffer
			if err := WritePulseSigMF(&meta, &data, orig); err != nil {
				t.Fatal(err)
			}
			rec, err := ReadSigMF(meta.Bytes(), &data)
			if err != nil {
				t.Fatal(err)
			}
			imp, err := WithSamplesWaveform(orig, rec, 0, 0)
			if err != nil {
				t.Fatal(err)
			}
			if imp.Waveform.Kind != KindSamples || imp.Radar.SampleRateHz != c.fs || imp.Waveform.Interpolation != c.interp {
				t.Fatalf("imported kind %s at %g Hz, %s", imp.Waveform.Kind, imp.Radar.SampleRateHz, imp.Waveform.Interpolation)
			}
			// Without suggestions: the built-in kinds have candidates
			// (twice an FM's bandwidth) that an imported pulse has not.
			a, err := Analyse(context.Background(), orig)
			if err != nil {
				t.Fatal(err)
			}
			b, err := Analyse(context.Background(), imp)
			if err != nil {
				t.Fatal(err)
			}
			if c.interp == InterpHold {
				// The scene samples a built-in code's echo at t = n/fs − delay;
				// where a sample instant falls on a chip edge or the pulse's
				// ends, the rounding of that difference decides the chip, and
				// the recording has no such ambiguity. So margins of codes
				// move until the engine decides chips exactly (issue 12);
				// figures, SNRs and statuses must agree now (the reasons quote
				// the margins, so they are left out too).
				for i := range a.Targets {
					if a.Targets[i].ThresholdMarginDB != nil && b.Targets[i].ThresholdMarginDB != nil {
						t.Logf("%s margin %.4f dB built in, %.4f dB imported", a.Targets[i].ID, *a.Targets[i].ThresholdMarginDB, *b.Targets[i].ThresholdMarginDB)
					}
					a.Targets[i].ThresholdMarginDB, b.Targets[i].ThresholdMarginDB = nil, nil
					a.Targets[i].Reason, b.Targets[i].Reason = "", ""
				}
			}
			worst := compareReports(t, *a, *b, c.tol)
			t.Logf("largest difference %.2g dB", worst)
		})
	}
}

// cmpTol is how closely two reports must agree: dB figures within db,
// range_shift_m within shiftM metres, other numbers within rel relative.
type cmpTol struct{ db, rel, shiftM float64 }

// compareReports compares every field of two reports through their JSON,
// so that it covers fields added later: the same fields present, strings
// equal, numbers within tol. Warnings are left out: some speak of the
// built-in kind (an NLFM short of its design level), which the imported
// samples no longer are. It returns the largest dB difference.
func compareReports(t *testing.T, a, b Report, tol cmpTol) float64 {
	t.Helper()
	ja, jb := reportJSON(t, a), reportJSON(t, b)
	for _, k := range []string{"engine", "warnings"} {
		delete(ja, k)
		delete(jb, k)
	}
	worst := 0.0
	compareJSON(t, "", ja, jb, tol, &worst)
	return worst
}

func reportJSON(t *testing.T, r Report) map[string]any {
	t.Helper()
	data, err := json.Marshal(r)
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(data, &m); err != nil {
		t.Fatal(err)
	}
	return m
}

func compareJSON(t *testing.T, path string, a, b any, tol cmpTol, worst *float64) {
	t.Helper()
	switch x := a.(type) {
	case map[string]any:
		y, _ := b.(map[string]any)
		for k := range x {
			if _, ok := y[k]; !ok {
				t.Errorf("%s%s: built in only", path, k)
			}
		}
		for k, v := range y {
			if _, ok := x[k]; !ok {
				t.Errorf("%s%s: imported only (%v)", path, k, v)
				continue
			}
			compareJSON(t, path+k+".", x[k], v, tol, worst)
		}
	case []any:
		y, _ := b.([]any)
		if len(x) != len(y) {
			t.Errorf("%s: %d entries built in, %d imported", path, len(x), len(y))
			return
		}
		for i := range x {
			compareJSON(t, fmt.Sprintf("%s[%d].", strings.TrimSuffix(path, "."), i), x[i], y[i], tol, worst)
		}
	case float64:
		y, _ := b.(float64)
		name := strings.TrimSuffix(path, ".")
		switch {
		case strings.HasSuffix(name, "_db"):
			*worst = math.Max(*worst, math.Abs(x-y))
			if math.Abs(x-y) > tol.db {
				t.Errorf("%s: %.6f dB built in, %.6f dB imported", name, x, y)
			}
		case strings.HasSuffix(name, "range_shift_m"):
			if math.Abs(x-y) > tol.shiftM {
				t.Errorf("%s: %g m built in, %g m imported", name, x, y)
			}
		default:
			if math.Abs(x-y) > tol.rel*math.Max(math.Abs(x), 1e-30) {
				t.Errorf("%s: %g built in, %g imported", name, x, y)
			}
		}
	default:
		if a != b && strings.TrimSuffix(path, ".") != "waveform.kind" {
			t.Errorf("%s: %v built in, %v imported", strings.TrimSuffix(path, "."), a, b)
		}
	}
}

// TestCustomFilterMatchesMatched: the pulse's own samples as custom taps
// make the matched filter, so the report is the matched filter's; the same
// taps behind 7 leading zeros are aligned back (lead 7), so ranges and
// statuses do not move.
func TestCustomFilterMatchesMatched(t *testing.T) {
	s := roundTripScene(t, `{"kind":"lfm","pulse_width_s":10e-6,"bandwidth_hz":10e6}`, 20e6)
	var meta, data bytes.Buffer
	if err := WritePulseSigMF(&meta, &data, s); err != nil {
		t.Fatal(err)
	}
	rec, err := ReadSigMF(meta.Bytes(), &data)
	if err != nil {
		t.Fatal(err)
	}
	want := mustEvaluate(t, s).Report
	custom, err := WithCustomFilter(s, rec, 0)
	if err != nil {
		t.Fatal(err)
	}
	// The matched filter's figures come from the analytic LFM in continuous
	// time (docs/figures.md §4); custom taps are known only at fs = 2B and
	// read band-limited, which differs at the FM's edge transients, as in
	// TestImportRoundTrip's LFM case (measured 0.035 dB ISLR, 5 mm shift).
	compareReports(t, want, mustEvaluate(t, custom).Report, cmpTol{0.05, 5e-3, 0.02})

	shifted := *rec
	shifted.Samples.I = append(make([]float64, 7), rec.Samples.I...)
	shifted.Samples.Q = append(make([]float64, 7), rec.Samples.Q...)
	custom, err = WithCustomFilter(s, &shifted, 0)
	if err != nil {
		t.Fatal(err)
	}
	got := mustEvaluate(t, custom).Report
	for i, ta := range want.Targets {
		tb := got.Targets[i]
		// SNRs carry the mismatch loss, continuous-time for the matched
		// filter and read at fs for the taps: within 1e-3 dB.
		if ta.Status != tb.Status || ta.RangeM != tb.RangeM || math.Abs(ta.SNRDB-tb.SNRDB) > 1e-3 {
			t.Errorf("%s behind leading zeros: %s at %g m, SNR %.4f dB; matched: %s at %g m, %.4f dB", ta.ID, tb.Status, tb.RangeM, tb.SNRDB, ta.Status, ta.RangeM, ta.SNRDB)
		}
		// The margins move by up to 0.04 dB here: the scene's noise-free
		// levels handle a reference with a lead differently near some
		// gates (a matter for the level computation, not for the filter's
		// alignment, which the statuses and ranges above check).
		t.Logf("%s margin %.4f dB matched, %.4f dB behind 7 zeros", ta.ID, *ta.ThresholdMarginDB, *tb.ThresholdMarginDB)
	}

	if _, err := WithCustomFilter(s, rec, 10e6); err == nil || !strings.Contains(err.Error(), "radar.sample_rate_hz is 2e+07 Hz") {
		t.Errorf("taps at another rate: %v", err)
	}
}

// TestSamplesValidation: bad imported samples get errors naming the field,
// the value and the valid range, all at once.
func TestSamplesValidation(t *testing.T) {
	for _, c := range []struct{ doc, want string }{
		{`{"kind":"samples","sample_rate_hz":1e6,"bandwidth_hz":5e5,"i":[1,0],"q":[0]}`, "waveform.q: 1 values, but i has 2"},
		{`{"kind":"samples","sample_rate_hz":1e6,"bandwidth_hz":2e6,"i":[1],"q":[0]}`, "waveform.bandwidth_hz: 2e+06 is above the maximum 1e+06"},
		{`{"kind":"samples","sample_rate_hz":10,"bandwidth_hz":5,"i":[1],"q":[0]}`, "waveform.sample_rate_hz: 10 is below the minimum 1000"},
		{`{"kind":"samples","sample_rate_hz":1e6,"bandwidth_hz":5e5,"i":[0,0],"q":[0,0]}`, "waveform.i: every sample is 0"},
		{`{"kind":"samples","sample_rate_hz":1e6,"bandwidth_hz":5e5,"amplitude":[1,-2],"phase_deg":[0,0]}`, "waveform.amplitude[1]: -2 is below the minimum 0"},
		{`{"kind":"samples","sample_rate_hz":1e6,"bandwidth_hz":5e5,"i":[1],"q":[0],"amplitude":[1]}`, "give either i and q or amplitude and phase_deg"},
		{`{"kind":"samples","sample_rate_hz":1e6,"bandwidth_hz":5e5}`, "waveform.i: required"},
		{`{"kind":"samples","sample_rate_hz":1e6,"bandwidth_hz":5e5,"i":[],"q":[]}`, "waveform.i: 0 values; valid: 1 … 65536"},
		{`{"kind":"samples","sample_rate_hz":1e6,"bandwidth_hz":5e5,"i":[1,"x"],"q":[0,0]}`, `waveform.i[1]: "x" is not a number`},
		{`{"kind":"samples","sample_rate_hz":1e6,"bandwidth_hz":5e5,"i":[1],"q":[0],"chip_s":1e-6}`, `waveform.chip_s: not a field of kind "samples"`},
	} {
		_, err := Decode([]byte(`{"version":2,"waveform":` + c.doc + `}`))
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %v, want %q", c.doc, err, c.want)
		}
	}
	for _, c := range []struct{ rx, want string }{
		{`{"filter":"custom"}`, "receiver.taps: required with filter \"custom\""},
		{`{"taps":{"i":[1],"q":[0]}}`, "receiver.taps: taps apply to filter \"custom\""},
		{`{"filter":"custom","taps":{"i":[1],"q":[0],"x":[1]}}`, "receiver.taps.x: unknown field"},
		{`{"filter":"custom","taps":{"amplitude":[0],"phase_deg":[0]}}`, "receiver.taps.amplitude: every sample is 0"},
	} {
		_, err := Decode([]byte(`{"version":2,"waveform":{"kind":"lfm","pulse_width_s":1e-5,"bandwidth_hz":1e6},"receiver":` + c.rx + `}`))
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %v, want %q", c.rx, err, c.want)
		}
	}
}

// TestSamplesAtAnotherRate: a pulse recorded at 4B and evaluated at 2B is
// resampled by the band-limited interpolation; its figures stay those of
// the LFM it came from within the interpolation's accuracy (the LFM's
// edges are not band-limited, so a few hundredths of a dB: PSLR within
// 0.05 dB, mismatch loss within 0.01 dB).
func TestSamplesAtAnotherRate(t *testing.T) {
	hi := roundTripScene(t, `{"kind":"lfm","pulse_width_s":10e-6,"bandwidth_hz":10e6}`, 40e6)
	var meta, data bytes.Buffer
	if err := WritePulseSigMF(&meta, &data, hi); err != nil {
		t.Fatal(err)
	}
	rec, err := ReadSigMF(meta.Bytes(), &data)
	if err != nil {
		t.Fatal(err)
	}
	lo := roundTripScene(t, `{"kind":"lfm","pulse_width_s":10e-6,"bandwidth_hz":10e6}`, 20e6)
	imp, err := WithSamplesWaveform(lo, rec, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	if imp.Radar.SampleRateHz != 20e6 || imp.Waveform.SampleRateHz != 40e6 {
		t.Fatalf("rates: radar %g, samples %g", imp.Radar.SampleRateHz, imp.Waveform.SampleRateHz)
	}
	wa := reportJSON(t, mustEvaluate(t, lo).Report)["waveform"].(map[string]any)
	wb := reportJSON(t, mustEvaluate(t, imp).Report)["waveform"].(map[string]any)
	for _, c := range []struct {
		field string
		tol   float64
	}{{"pslr_db", 0.05}, {"islr_db", 0.05}, {"mismatch_loss_db", 0.01}, {"mainlobe_3db_m", 0.01 * wa["mainlobe_3db_m"].(float64)}} {
		x, y := wa[c.field].(float64), wb[c.field].(float64)
		t.Logf("%s %.4f built in, %.4f resampled", c.field, x, y)
		if math.Abs(x-y) > c.tol {
			t.Errorf("%s: %.4f built in, %.4f from the pulse recorded at 4B", c.field, x, y)
		}
	}
}

func TestReadSamplesCSV(t *testing.T) {
	rec, err := ReadSamplesCSV(strings.NewReader("# made by hand\nI, Q\n1,0\n0,-1\n# a comment\n0.5,0.5\n"))
	if err != nil || rec.Samples.Len() != 3 || rec.Samples.Q[1] != -1 || rec.RateHz != 0 {
		t.Fatalf("i,q: %v %+v", err, rec)
	}
	rec, err = ReadSamplesCSV(strings.NewReader("amplitude,phase_deg\n1,90\n2,-45\n"))
	if err != nil || rec.Samples.Amplitude[1] != 2 || rec.Samples.PhaseDeg[0] != 90 {
		t.Fatalf("amplitude,phase_deg: %v %+v", err, rec)
	}
	for _, c := range []struct{ csv, want string }{
		{"re,im\n1,0\n", "want i,q or amplitude,phase_deg"},
		{"i,q\n1,x\n", "line 2"},
		{"i,q\n1,NaN\n", "not two finite numbers"},
		{"i,q\n", "no samples"},
		{"i,q\n1,2,3\n", "wrong number of fields"},
	} {
		if _, err := ReadSamplesCSV(strings.NewReader(c.csv)); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%q: %v, want %q", c.csv, err, c.want)
		}
	}
	s := roundTripScene(t, `{"kind":"rect","pulse_width_s":1e-6}`, 2e6)
	rec, _ = ReadSamplesCSV(strings.NewReader("i,q\n1,0\n1,0\n"))
	if _, err := WithSamplesWaveform(s, rec, 0, 1e6); err == nil || !strings.Contains(err.Error(), "--rate") {
		t.Errorf("no rate: %v", err)
	}
	if _, err := WithSamplesWaveform(s, rec, 2e6, 0); err == nil || !strings.Contains(err.Error(), "--bandwidth") {
		t.Errorf("no bandwidth: %v", err)
	}
}

func TestReadSigMFErrors(t *testing.T) {
	s := roundTripScene(t, `{"kind":"barker","length":7,"chip_s":1e-6}`, 2e6)
	var meta, data bytes.Buffer
	if err := WritePulseSigMF(&meta, &data, s); err != nil {
		t.Fatal(err)
	}
	bad := bytes.Clone(data.Bytes())
	bad[3] ^= 1
	if _, err := ReadSigMF(meta.Bytes(), bytes.NewReader(bad)); err == nil || !strings.Contains(err.Error(), "core:sha512") {
		t.Errorf("damaged data: %v", err)
	}
	if _, err := ReadSigMF(meta.Bytes(), bytes.NewReader(data.Bytes()[:13])); err == nil || !strings.Contains(err.Error(), "whole") {
		t.Errorf("truncated data: %v", err)
	}
	ci16 := bytes.Replace(meta.Bytes(), []byte(`"cf32_le"`), []byte(`"ci16_le"`), 1)
	if _, err := ReadSigMF(ci16, bytes.NewReader(data.Bytes())); err == nil || !strings.Contains(err.Error(), "supported: cf32_le") {
		t.Errorf("ci16: %v", err)
	}
	big := bytes.NewReader(make([]byte, 8*(MaxImportSamples+1)))
	noSum := bytes.Replace(meta.Bytes(), []byte(`"core:sha512"`), []byte(`"core:sha512_"`), 1)
	if _, err := ReadSigMF(noSum, big); err == nil || !strings.Contains(err.Error(), "limit") {
		t.Errorf("too long: %v", err)
	}
}

// TestImportRoundTripIdentical: a pulse that came in as samples goes out
// and comes back in bit for bit. An imported waveform exported again as
// SigMF (cf32_le) and imported again gives the same scenario and a
// byte-identical report; so does the same pulse written as a CSV of I,Q
// (shortest decimal of each float64, which reads back exactly) and read
// with ReadSamplesCSV. (The first import from a built-in kind is compared
// within tolerances in TestImportRoundTrip: the cf32 file rounds each
// sample to float32 once.)
func TestImportRoundTripIdentical(t *testing.T) {
	for _, c := range []struct {
		name, waveform string
		fs             float64
	}{
		{"lfm at 2B", `{"kind":"lfm","pulse_width_s":10e-6,"bandwidth_hz":10e6}`, 20e6},
		{"barker 13 at 2/chip", `{"kind":"barker","length":13,"chip_s":1e-6}`, 2e6},
	} {
		t.Run(c.name, func(t *testing.T) {
			viaSigMF := func(s *Scenario) *Scenario {
				t.Helper()
				var meta, data bytes.Buffer
				if err := WritePulseSigMF(&meta, &data, s); err != nil {
					t.Fatal(err)
				}
				rec, err := ReadSigMF(meta.Bytes(), &data)
				if err != nil {
					t.Fatal(err)
				}
				out, err := WithSamplesWaveform(s, rec, 0, 0)
				if err != nil {
					t.Fatal(err)
				}
				return out
			}
			report := func(s *Scenario) string {
				t.Helper()
				r, err := Analyse(context.Background(), s)
				if err != nil {
					t.Fatal(err)
				}
				b, err := json.Marshal(r)
				if err != nil {
					t.Fatal(err)
				}
				return string(b)
			}
			canon := func(s *Scenario) string {
				t.Helper()
				b, err := Canonical(s)
				if err != nil {
					t.Fatal(err)
				}
				return string(b)
			}
			first := viaSigMF(roundTripScene(t, c.waveform, c.fs))
			second := viaSigMF(first)
			if canon(first) != canon(second) {
				t.Errorf("SigMF: the scenario changed on a second round trip")
			}
			want := report(first)
			if got := report(second); got != want {
				t.Errorf("SigMF: the report changed on a second round trip:\n%.400s\nwant\n%.400s", got, want)
			}

			var csv strings.Builder
			csv.WriteString("i,q\n")
			for k := range first.Waveform.Samples.I {
				fmt.Fprintf(&csv, "%s,%s\n", strconv.FormatFloat(first.Waveform.Samples.I[k], 'g', -1, 64), strconv.FormatFloat(first.Waveform.Samples.Q[k], 'g', -1, 64))
			}
			rec, err := ReadSamplesCSV(strings.NewReader(csv.String()))
			if err != nil {
				t.Fatal(err)
			}
			fromCSV, err := WithSamplesWaveform(first, rec, first.Waveform.SampleRateHz, first.Waveform.BandwidthHz)
			if err != nil {
				t.Fatal(err)
			}
			fromCSV.Waveform.Interpolation = first.Waveform.Interpolation // a CSV does not say; the SigMF file did
			if canon(fromCSV) != canon(first) {
				t.Errorf("CSV I,Q: the scenario differs from the SigMF import")
			}
			if got := report(fromCSV); got != want {
				t.Errorf("CSV I,Q: the report differs from the SigMF import's")
			}
		})
	}
}
