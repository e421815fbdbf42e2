package scenarios

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/dsp"
)

// radarScene builds a scenario from its radar, waveform and receiver
// objects and its targets (JSON).
func radarScene(radar, waveform, receiver string, targets ...string) string {
	return `{"version":2,"radar":` + radar + `,"waveform":` + waveform + `,"receiver":` + receiver + `,"targets":[` + strings.Join(targets, ",") + `]}`
}

func pointRate(id string, r, rcs, rate float64) string {
	return fmt.Sprintf(`{"id":%q,"kind":"point","range_m":%g,"rcs_dbsm":%g,"range_rate_mps":%g}`, id, r, rcs, rate)
}

// rcsAt returns the RCS (dBsm) for a single-pulse SNR (dB) at range r for
// a radar of peak power pw (W), pulse tau (s), 30 dBi, 3 dB noise figure,
// 3 dB losses, 9.5 GHz (the format's defaults).
func rcsAt(snrDB, r, pw, tau float64) float64 {
	unit := dsp.RadarSNR(pw, tau, dsp.FromDB(30), C/9.5e9, 1, r, dsp.FromDB(3), dsp.FromDB(3))
	return snrDB - dsp.DB(unit)
}

// TestWindowEndNotTruncated reproduces issue 12 item 5 (first bullet): a
// 37 dB target whose echo runs past window_stop_m was cut off without a
// word and became below_noise. The raw record now covers every gate in
// full: it is detected with the margin it has mid-window.
func TestWindowEndNotTruncated(t *testing.T) {
	det := `{"window":{"kind":"taylor"},"detector":{"kind":"ca_cfar","pfa":1e-6,"guard_cells":6,"training_cells":16}}`
	radar := `{"peak_power_w":1000,"sample_rate_hz":4e7,"pri_s":2e-4,"window_start_m":3000,"window_stop_m":12000}`
	wave := `{"kind":"lfm","pulse_width_s":1e-5,"bandwidth_hz":1e7}`
	res := mustEvaluate(t, mustDecode(t, radarScene(radar, wave, det, pointJSON("a", 11995, rcsFor(37, 11995)))))
	edge := target(res, "a")
	if edge.Status != StatusDetected || edge.ThresholdMarginDB == nil || *edge.ThresholdMarginDB < 3 {
		t.Fatalf("at the window's end: %s (%v): %s", edge.Status, edge.ThresholdMarginDB, edge.Reason)
	}
	// Its noise-free peak is its SNR less the Taylor window's mismatch
	// loss (about 0.9 dB) and at most 0.3 dB of straddle at 4 samples
	// per 1/B: nothing is cut off.
	peak := -1e9
	for _, v := range res.Series.CleanDB[len(res.Series.CleanDB)-8:] {
		peak = max(peak, v)
	}
	if peak < 37-1.5 {
		t.Errorf("peak %.1f dB for a 37 dB target at the window's end", peak)
	}
	if edge.EclipsingLossDB != nil {
		t.Errorf("eclipsing loss %v at the window's end", *edge.EclipsingLossDB)
	}
}

// TestNextPulseEclipsing reproduces issue 12 item 5 (second bullet): a
// target just inside the unambiguous range is eclipsed by the next
// transmit pulse. With the window reaching past c·PRI/2, 80 % heard costs
// 20·log10(0.8) = 1.9 dB (a coherent sum of 80 % of an unweighted pulse)
// and is stated; 7 % heard loses detection (eclipsed).
func TestNextPulseEclipsing(t *testing.T) {
	ru := C * 2e-4 / 2
	det := `{"window":{"kind":"none"},"detector":{"kind":"ca_cfar","pfa":1e-6,"guard_cells":4,"training_cells":16}}`
	radar := `{"peak_power_w":1000,"sample_rate_hz":4e7,"pri_s":2e-4,"window_start_m":20000,"window_stop_m":35000}`
	wave := `{"kind":"lfm","pulse_width_s":1e-5,"bandwidth_hz":1e7}`
	res := mustEvaluate(t, mustDecode(t, radarScene(radar, wave, det,
		pointJSON("a", ru-1200, rcsAt(40, ru-1200, 1000, 1e-5)), pointJSON("b", ru-100, rcsAt(30, ru-100, 1000, 1e-5)))))
	a, b := target(res, "a"), target(res, "b")
	if a.Status != StatusDetected || a.EclipsingLossDB == nil || math.Abs(*a.EclipsingLossDB-1.94) > 0.1 || !strings.Contains(a.Reason, "next pulse") {
		t.Errorf("a (80 %% heard): %s, loss %v: %s", a.Status, a.EclipsingLossDB, a.Reason)
	}
	if b.Status != StatusEclipsed || !strings.Contains(b.Reason, "next pulse") || b.ThresholdMarginDB != nil {
		t.Errorf("b (7 %% heard): %s: %s", b.Status, b.Reason)
	}
	// snr_db states the loss.
	if a.EclipsingLossDB != nil {
		alone := dsp.DB(dsp.RadarSNR(1000, 1e-5, dsp.FromDB(30), C/9.5e9, dsp.FromDB(rcsAt(40, ru-1200, 1000, 1e-5)), ru-1200, dsp.FromDB(3), dsp.FromDB(3)))
		if math.Abs(a.SNRDB-(alone-*a.EclipsingLossDB)) > 0.01 {
			t.Errorf("a: snr_db %.2f, want %.2f less the %.2f dB eclipsing loss", a.SNRDB, alone, *a.EclipsingLossDB)
		}
	}
}

// TestPartialEclipseDetected reproduces issue 12 item 5 (fourth bullet):
// a target nearer than c·τ/2 with 99 % of its echo heard was eclipsed.
// At 10 samples per 1/B (τ = 20 µs, 200 samples) 2 samples are blanked and
// its peak on the processed gates is the first one, 0.2/B from its true
// peak: about 1 dB lost (mostly that offset), stated; it is detected and the reason names the
// loss. Half heard, the first processed gate lies τ/2 from its peak: the
// eclipsing loss decides (eclipsed).
func TestPartialEclipseDetected(t *testing.T) {
	// 64 training cells a side: at 10 samples per 1/B neighbouring gates
	// share noise, and the first processed gate trains on one side only.
	det := `{"window":{"kind":"taylor"},"detector":{"kind":"ca_cfar","pfa":1e-6,"guard_cells":16,"training_cells":128}}`
	radar := `{"peak_power_w":1000,"sample_rate_hz":1e7,"pri_s":1e-3,"window_start_m":0,"window_stop_m":20000}`
	wave := `{"kind":"lfm","pulse_width_s":2e-5,"bandwidth_hz":1e6}`
	r99, r50 := 0.99*C*2e-5/2, 0.5*C*2e-5/2
	res := mustEvaluate(t, mustDecode(t, radarScene(radar, wave, det,
		pointJSON("near", r99, rcsAt(40, r99, 1000, 2e-5)), pointJSON("half", r50, rcsAt(30, r50, 1000, 2e-5)))))
	near, half := target(res, "near"), target(res, "half")
	if near.Status != StatusDetected || near.EclipsingLossDB == nil || *near.EclipsingLossDB <= 0 || *near.EclipsingLossDB > 1.5 || !strings.Contains(near.Reason, "Eclipsing costs") {
		t.Errorf("99 %% heard: %s, loss %v: %s", near.Status, near.EclipsingLossDB, near.Reason)
	}
	if half.Status != StatusEclipsed || half.EclipsingLossDB == nil || !strings.Contains(half.Reason, "without that loss") {
		t.Errorf("50 %% heard: %s: %s", half.Status, half.Reason)
	}
}

// TestDopplerOutsideBand reproduces issue 12 item 5 (third bullet): an
// LFM at 4·B Doppler (= 2·fs) aliased onto zero and reported 0.01 dB.
// Its echo lies outside the receiver's band: a stated loss, a warning,
// and no detection. A Doppler inside the band states none.
func TestDopplerOutsideBand(t *testing.T) {
	det := `{"window":{"kind":"taylor"}}`
	radar := `{"peak_power_w":1000,"sample_rate_hz":3e5,"pri_s":2e-3,"window_start_m":40000,"window_stop_m":100000}`
	wave := `{"kind":"lfm","pulse_width_s":2e-4,"bandwidth_hz":1.5e5}`
	lambda := C / 9.5e9
	far := -4 * 1.5e5 * lambda / 2 // closing: f_d = +4·B
	in := -1e4 * lambda / 2
	res := mustEvaluate(t, mustDecode(t, radarScene(radar, wave, det,
		pointRate("fast", 60000, rcsAt(30, 60000, 1000, 2e-4), far), pointRate("slow", 80000, rcsAt(30, 80000, 1000, 2e-4), in))))
	fast, slow := target(res, "fast"), target(res, "slow")
	if fast.Status == StatusDetected || (fast.BandLossDB == nil || *fast.BandLossDB < 10) && !strings.Contains(fast.Reason, "rejects its echo") {
		t.Errorf("at 4·B: %s, band loss %v: %s", fast.Status, fast.BandLossDB, fast.Reason)
	}
	warned := false
	for _, w := range res.Report.Warnings {
		warned = warned || strings.Contains(w, "fast") && strings.Contains(w, "outside the receiver's band")
	}
	if !warned {
		t.Errorf("no warning: %q", res.Report.Warnings)
	}
	if slow.BandLossDB != nil || slow.Status != StatusDetected {
		t.Errorf("inside the band: %s, band loss %v: %s", slow.Status, slow.BandLossDB, slow.Reason)
	}
}

// TestBlankedGatesDoNotTrain reproduces issue 12 item 5 (fifth bullet):
// gates inside the transmit blanking held an eclipsed target's power and
// fed a neighbour's CFAR training cells. A neighbour just past the blind
// range now keeps the margin it has alone (its training cells are the
// processed gates only), and the plot shows blanked gates as no data.
func TestBlankedGatesDoNotTrain(t *testing.T) {
	det := `{"window":{"kind":"blackman_harris"},"detector":{"kind":"ca_cfar","pfa":1e-6,"guard_cells":17,"training_cells":64}}`
	radar := `{"peak_power_w":1000,"sample_rate_hz":4e7,"pri_s":2e-4,"window_start_m":0,"window_stop_m":12000}`
	wave := `{"kind":"lfm","pulse_width_s":1e-5,"bandwidth_hz":1e7}`
	blind := C * 1e-5 / 2
	nb := pointJSON("neighbour", blind+90, rcsAt(45, blind+90, 1000, 1e-5))
	ecl := pointJSON("eclipsed", blind-100, rcsAt(55, blind-100, 1000, 1e-5))
	alone := target(mustEvaluate(t, mustDecode(t, radarScene(radar, wave, det, nb))), "neighbour")
	res := mustEvaluate(t, mustDecode(t, radarScene(radar, wave, det, nb, ecl)))
	with := target(res, "neighbour")
	if e := target(res, "eclipsed"); e.Status != StatusEclipsed {
		t.Fatalf("eclipsed target: %s: %s", e.Status, e.Reason)
	}
	if alone.Status != StatusDetected || with.Status != StatusDetected || math.Abs(*with.ThresholdMarginDB-*alone.ThresholdMarginDB) > 3 {
		t.Fatalf("neighbour alone %s (%v dB), beside the eclipsed target %s (%v dB): %s", alone.Status, *alone.ThresholdMarginDB, with.Status, *with.ThresholdMarginDB, with.Reason)
	}
	end := int(math.Ceil(1e-5 * 4e7))
	for k := 0; k < end; k++ {
		if res.Series.ThresholdDB[k] != dbFloor || res.Series.CleanDB[k] != dbFloor || res.Series.ProfileDB[k] != dbFloor {
			t.Fatalf("blanked gate %d plotted as data: threshold %v, clean %v, profile %v", k, res.Series.ThresholdDB[k], res.Series.CleanDB[k], res.Series.ProfileDB[k])
		}
	}
}

// TestOneCFARComputation reproduces issue 12 item 6: the harbour demo's
// tanker was reported +37.3 dB while the plot's threshold put it at
// +6.7 dB. The report's margin is now the plotted threshold's at its peak
// cell (the cell term, the skiff's sidelobe there, is far below).
func TestOneCFARComputation(t *testing.T) {
	d, err := LoadDemo("harbour-skiff")
	if err != nil {
		t.Fatal(err)
	}
	res := mustEvaluate(t, d.Scenario)
	tk := target(res, "tanker")
	s := res.Series
	k := int(math.Round((tk.RangeM - s.RangeM0) / s.RangeStepM))
	best := k
	for i := k - 3; i <= k+3; i++ {
		if s.CleanDB[i] > s.CleanDB[best] {
			best = i
		}
	}
	plotted := s.CleanDB[best] - s.ThresholdDB[best]
	if tk.ThresholdMarginDB == nil || math.Abs(*tk.ThresholdMarginDB-plotted) > 0.05 {
		t.Fatalf("tanker: reported threshold margin %v, plotted %.2f dB", tk.ThresholdMarginDB, plotted)
	}
}

// TestSelfMasking: at 4 samples per 1/B a CA-CFAR with no guard cells
// trains on the target's own main lobe: the target masks itself, the
// reason says so and masked_by names it. The model warns about the guard
// cells.
func TestSelfMasking(t *testing.T) {
	res := mustEvaluate(t, mustDecode(t, lfmScene(`{"kind":"none"}`, `{"kind":"ca_cfar","pfa":1e-6,"guard_cells":0,"training_cells":16}`, pointJSON("a", 6000, rcsFor(25, 6000)))))
	a := target(res, "a")
	if a.Status != StatusMasked || a.MaskedBy != "a" || !strings.Contains(a.Reason, "its own range sidelobes") {
		t.Fatalf("%s by %q: %s", a.Status, a.MaskedBy, a.Reason)
	}
	warned := false
	for _, w := range res.Report.Warnings {
		warned = warned || strings.Contains(w, "self-masking")
	}
	if !warned {
		t.Errorf("no guard-cell warning: %q", res.Report.Warnings)
	}
}

// TestMaskedByCFARChoosesLargestContribution (docs/detection.md §7): of two
// targets in a weak target's training cells, the one that puts more power
// there is named, whatever their order in the scenario.
func TestMaskedByCFARChoosesLargestContribution(t *testing.T) {
	step := C / (2 * 4e7)
	w := 6000.0
	det := `{"kind":"ca_cfar","pfa":1e-6,"guard_cells":6,"training_cells":40}`
	for _, order := range [][]string{{"p", "q"}, {"q", "p"}} {
		ts := map[string]string{
			"p": pointJSON("p", w-14*step, rcsFor(55, w-14*step)),
			"q": pointJSON("q", w+16*step, rcsFor(60, w+16*step)),
		}
		res := mustEvaluate(t, mustDecode(t, lfmScene(`{"kind":"taylor"}`, det, pointJSON("w", w, rcsFor(28, w)), ts[order[0]], ts[order[1]])))
		if got := target(res, "w"); got.Status != StatusMasked || got.MaskedBy != "q" || !strings.Contains(got.Reason, "through the CA-CFAR") {
			t.Errorf("order %v: %s by %q: %s", order, got.Status, got.MaskedBy, got.Reason)
		}
	}
}

// TestFalseAlarmsOversampledScene is a seeded Monte Carlo of the scene's
// real noise path at 4 samples per 1/B (LFM, Hamming): a target-free
// window is synthesised and compressed as the plot's noisy profile shows
// it, then the scenario's own detector (the plan the statuses use, with
// its noise correlation and processed gates) thresholds it; the false
// alarms counted at every 6th processed gate (nearly independent of each
// other) over 6 seeds must fall inside the 99 % binomial interval of
// Pfa = 1e-3, for CA- and OS-CFAR.
func TestFalseAlarmsOversampledScene(t *testing.T) {
	checkOversampledFalseAlarms(t, 1, []string{
		`{"kind":"ca_cfar","pfa":1e-3,"guard_cells":4,"training_cells":24}`,
		`{"kind":"os_cfar","pfa":1e-3,"guard_cells":4,"training_cells":32,"rank":24}`,
	})
}

// checkOversampledFalseAlarms runs TestFalseAlarmsOversampledScene's
// Monte Carlo for each detector (receiver.detector JSON), over the six
// seeds seed0 … seed0+5.
func checkOversampledFalseAlarms(t *testing.T, seed0 int, dets []string) {
	t.Helper()
	for _, det := range dets {
		alarms, trials := 0, 0
		for seed := range 6 {
			doc := fmt.Sprintf(`{"version":2,"seed":%d,"radar":{"peak_power_w":1000,"sample_rate_hz":4e7,"pri_s":2e-3,"window_start_m":3000,"window_stop_m":240000},
				"waveform":{"kind":"lfm","pulse_width_s":1e-5,"bandwidth_hz":1e7},"receiver":{"window":{"kind":"hamming"},"detector":%s},"targets":[]}`, seed0+seed, det)
			sc := mustDecode(t, doc)
			s := mustEvaluate(t, sc).Series
			m, err := newModel(sc, nil)
			if err != nil {
				t.Fatal(err)
			}
			p := make([]float64, len(s.ProfileDB))
			for k, v := range s.ProfileDB {
				p[k] = dsp.FromDB(v)
			}
			th := m.detector().ThresholdsValid(nil, p, m.processed)
			for k := 0; k < len(p); k += 6 {
				if !m.processed[k] {
					continue
				}
				trials++
				if p[k] > th[k] {
					alarms++
				}
			}
		}
		mean := 1e-3 * float64(trials)
		half := 2.576 * math.Sqrt(mean*(1-1e-3))
		if math.Abs(float64(alarms)-mean) > half {
			t.Errorf("%s: %d false alarms in %d gates, 99%% interval %.0f ± %.0f", det, alarms, trials, mean, half)
		} else {
			t.Logf("%s: %d false alarms in %d gates (expected %.0f ± %.0f)", det, alarms, trials, mean, half)
		}
	}
}

// TestMaskedByCellChoosesLargestContribution (docs/detection.md §7): with
// a fixed threshold a target can only be masked at its own cell; of two
// targets whose responses reach that cell, masked_by names the one that
// puts more power there, measured here by evaluating each alone.
func TestMaskedByCellChoosesLargestContribution(t *testing.T) {
	step := C / (2 * 4e7)
	w := 6000.0
	det := `{"kind":"fixed","pfa":1e-6}`
	wj := pointJSON("w", w, rcsFor(20, w))
	pj := pointJSON("p", w-10*step, rcsFor(55, w-10*step))
	qj := pointJSON("q", w+25*step, rcsFor(62, w+25*step))
	scene := func(ts ...string) *Result {
		return mustEvaluate(t, mustDecode(t, lfmScene(`{"kind":"none"}`, det, ts...)))
	}
	alone := scene(wj).Series
	k := int(math.Round((w - alone.RangeM0) / alone.RangeStepM))
	for i := k - 2; i <= k+2; i++ {
		if alone.CleanDB[i] > alone.CleanDB[k] {
			k = i
		}
	}
	atP, atQ := scene(pj).Series.CleanDB[k], scene(qj).Series.CleanDB[k]
	want := "p"
	if atQ > atP {
		want = "q"
	}
	got := target(scene(wj, pj, qj), "w")
	if got.Status != StatusMasked || got.MaskedBy != want {
		t.Fatalf("w: %s by %q, want by %q (p puts %.1f dB at its cell, q %.1f dB): %s", got.Status, got.MaskedBy, want, atP, atQ, got.Reason)
	}
	t.Logf("p %.1f dB, q %.1f dB at w's cell: masked by %s", atP, atQ, got.MaskedBy)
}
