package scenarios

import (
	"context"
	"encoding/json"
	"math"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mathext"

	"github.com/pulsewright/pulsewright/dsp"
)

// nciScene is lfmScene's radar with a train of pulses integrated
// non-coherently (receiver.integration noncoherent) and the given
// detector and targets.
func nciScene(pulses int, window, detector string, targets ...string) string {
	b, _ := json.Marshal(pulses)
	return `{"version":3,"radar":{"peak_power_w":1000,"sample_rate_hz":4e7,"pri_s":2e-4,"pulses":` + string(b) + `,"window_start_m":3000,"window_stop_m":12000},
		"waveform":{"kind":"lfm","pulse_width_s":1e-5,"bandwidth_hz":1e7},
		"receiver":{"window":` + window + `,"detector":` + detector + `,"integration":"noncoherent"},
		"targets":[` + strings.Join(targets, ",") + `]}`
}

// nciPdScene places one point target of fluctuation fluct at 6 km in
// nciScene so that the per-pulse SNR its test sees is snrDB (two
// evaluations tune its RCS), and returns its report.
func nciPdScene(t *testing.T, pulses int, window, detector, fluct string, snrDB float64) TargetReport {
	t.Helper()
	rcs := rcsFor(snrDB, 6000)
	var tr TargetReport
	for range 2 {
		b, _ := json.Marshal(map[string]any{"id": "a", "kind": "point", "range_m": 6000, "rcs_dbsm": rcs, "fluctuation": fluct})
		tr = target(mustEvaluate(t, mustDecode(t, nciScene(pulses, window, detector, string(b)))), "a")
		if tr.SNRRequiredDB == nil || tr.MarginDB == nil || tr.Pd == nil || tr.PdAlone == nil {
			t.Fatalf("%s %s: Pd fields missing: %+v", detector, fluct, tr)
		}
		rcs += snrDB - (*tr.SNRRequiredDB + *tr.MarginDB)
	}
	return tr
}

// swerling2NCI is the closed form of a Swerling 2 target's Pd after
// non-coherent integration of n pulses with a known noise level:
// Pd = Q(n, T/(1 + SNR)), Q the upper regularized incomplete gamma
// function and T the threshold with Q(n, T) = Pfa (Richards,
// Fundamentals of Radar Signal Processing, 2nd ed., eq. 6.107; Mahafza,
// Radar Systems Analysis and Design Using MATLAB, eq. 2.83). Computed
// with gonum's incomplete gamma, not dsp's series.
func swerling2NCI(pfa float64, n int, snr float64) float64 {
	T := mathext.GammaIncRegCompInv(float64(n), pfa)
	return mathext.GammaIncRegComp(float64(n), T/(1+snr))
}

// TestNCICheckValues reaches published values for non-coherent
// integration of 10 pulses at Pd 0.9 through whole scenarios
// (receiver.integration noncoherent, radar.pulses 10, fixed threshold):
//   - steady target, Pfa 1e-8: 6.1 dB per pulse (Richards, Fundamentals
//     of Radar Signal Processing, 2nd ed., p. 479, exact square-law
//     detector);
//   - steady target, Pfa 1e-6: 5.27 dB per pulse (the same exact
//     square-law result; Albersheim's equation, Albersheim 1981, gives
//     4.99 dB, its stated accuracy being about 0.2 dB for a linear
//     detector, so the check is 5.27 ± 0.01 with Albersheim within 0.3);
//   - Swerling 2, Pfa 1e-6: the closed form Q(10, T/(1+SNR)) (Richards
//     eq. 6.107, Mahafza eq. 2.83), solved here for Pd 0.9 by bisection.
//
// Each target is placed so that its per-pulse SNR is the check value:
// snr_required_db must be it and Pd 0.9.
func TestNCICheckValues(t *testing.T) {
	// Swerling 2's per-pulse SNR for Pd 0.9 from the closed form.
	lo, hi := 0.0, 20.0
	for hi-lo > 1e-9 {
		mid := (lo + hi) / 2
		if swerling2NCI(1e-6, 10, dsp.FromDB(mid)) < 0.9 {
			lo = mid
		} else {
			hi = mid
		}
	}
	sw2 := (lo + hi) / 2
	for _, c := range []struct {
		name, det, fluct string
		snr, tol         float64
	}{
		{"steady Pfa 1e-8 (Richards p. 479)", `{"kind":"fixed","pfa":1e-8}`, "none", 6.1, 0.05},
		{"steady Pfa 1e-6", `{"kind":"fixed","pfa":1e-6}`, "none", 5.27, 0.01},
		{"swerling2 Pfa 1e-6 (closed form)", `{"kind":"fixed","pfa":1e-6}`, "swerling2", sw2, 0.002},
	} {
		tr := nciPdScene(t, 10, `{"kind":"none"}`, c.det, c.fluct, c.snr)
		if math.Abs(*tr.SNRRequiredDB-c.snr) > c.tol {
			t.Errorf("%s: snr_required_db %.4f, want %.3f ± %g", c.name, *tr.SNRRequiredDB, c.snr, c.tol)
		}
		if c.tol <= 0.01 && (math.Abs(*tr.Pd-0.9) > 0.003 || math.Abs(*tr.PdAlone-0.9) > 0.003) {
			t.Errorf("%s at %.3f dB: pd %.4f, pd_alone %.4f, want 0.9", c.name, c.snr, *tr.Pd, *tr.PdAlone)
		}
		if tr.Status != StatusDetected && *tr.Pd >= 0.9 {
			t.Errorf("%s: status %s with pd %.4f ≥ 0.9", c.name, tr.Status, *tr.Pd)
		}
	}
	if a := dsp.Albersheim(0.9, 1e-6, 10); math.Abs(a-4.99) > 0.005 || math.Abs(a-5.27) > 0.3 {
		t.Errorf("Albersheim, 10 pulses, Pfa 1e-6: %.3f dB, want 4.99 and within 0.3 dB of the exact 5.27", a)
	}
	// Swerling 2 at 8 dB per pulse: the scene's Pd is the closed form's.
	tr := nciPdScene(t, 10, `{"kind":"none"}`, `{"kind":"fixed","pfa":1e-6}`, "swerling2", 8)
	if want := swerling2NCI(1e-6, 10, dsp.FromDB(8)); math.Abs(*tr.Pd-want) > 2e-3 {
		t.Errorf("Swerling 2, 10 pulses, 8 dB: pd %.5f, want %.5f (Richards eq. 6.107)", *tr.Pd, want)
	}
}

// TestNCIGain: the same target at a per-pulse SNR of 8 dB is too weak on
// one pulse (13.18 dB needed for Pd 0.9 at Pfa 1e-6) and detected after
// integrating 10 pulses (5.27 dB needed); the report says how the pulses
// were combined and that no range–Doppler map was formed.
func TestNCIGain(t *testing.T) {
	rcs := rcsFor(8, 6000)
	tj := pointJSON("a", 6000, rcs)
	one := target(mustEvaluate(t, mustDecode(t, lfmScene(`{"kind":"none"}`, `{"kind":"fixed","pfa":1e-6}`, tj))), "a")
	res := mustEvaluate(t, mustDecode(t, nciScene(10, `{"kind":"none"}`, `{"kind":"fixed","pfa":1e-6}`, tj)))
	ten := target(res, "a")
	if one.Status != StatusTooWeak || ten.Status != StatusDetected {
		t.Errorf("one pulse %s (pd %v), ten pulses %s (pd %v); want too_weak then detected", one.Status, ptrVal(one.Pd), ten.Status, ptrVal(ten.Pd))
	}
	ir := res.Report.Integration
	if ir == nil || ir.Mode != IntegrationNonCoherent || ir.Pulses != 10 || !strings.Contains(ir.Note, "no range–Doppler map") {
		t.Errorf("report integration %+v", ir)
	}
	if res.Series.RangeDoppler != nil {
		t.Errorf("a non-coherent train formed a range–Doppler map")
	}
	// Noise alone averages to 1 (0 dB) per gate: the mean of the quiet
	// gates' integrated profile over 20 seeds (about 20 000 independent
	// gates, each Gamma(10)/10 with standard deviation 0.32) is 1 within
	// 0.015 (7 standard deviations of the mean).
	tot, cnt := 0.0, 0
	for seed := 1; seed <= 20; seed++ {
		doc := strings.Replace(nciScene(10, `{"kind":"none"}`, `{"kind":"fixed","pfa":1e-6}`, tj), `"radar"`, `"seed":`+strconv.Itoa(seed)+`,"radar"`, 1)
		r := mustEvaluate(t, mustDecode(t, doc))
		for k, db := range r.Series.ProfileDB {
			if r.Series.CleanDB[k] < -30 && db > -300 {
				tot += dsp.FromDB(db)
				cnt++
			}
		}
	}
	if mean := tot / float64(cnt); cnt < 20000 || math.Abs(mean-1) > 0.015 {
		t.Errorf("mean of %d quiet gates of the integrated profile %.4f, want 1 ± 0.015", cnt, mean)
	}
	// The fixed threshold is T/10 with Q(10, T) = 1e-6.
	if th, w := res.Series.ThresholdDB[100], dsp.DB(mathext.GammaIncRegCompInv(10, 1e-6)/10); math.Abs(th-w) > 1e-9 {
		t.Errorf("threshold %.4f dB, want %.4f dB", th, w)
	}
}

func ptrVal(p *float64) float64 {
	if p == nil {
		return math.NaN()
	}
	return *p
}

// TestNCIValidation: each combination the non-coherent mode does not
// model is refused with the field, the value and what is valid.
func TestNCIValidation(t *testing.T) {
	tj := pointJSON("a", 6000, 0)
	for _, c := range []struct {
		name, doc, want string
	}{
		{"one pulse", nciScene(1, `{"kind":"none"}`, `{"kind":"fixed","pfa":1e-6}`, tj), "radar.pulses is 1, want 2"},
		{"os_cfar", nciScene(10, `{"kind":"none"}`, `{"kind":"os_cfar","pfa":1e-6}`, tj), `receiver.detector.kind "os_cfar" is not modelled`},
		{"go_cfar", nciScene(10, `{"kind":"none"}`, `{"kind":"go_cfar","pfa":1e-6}`, tj), `"go_cfar" is not modelled`},
		{"mti", strings.Replace(nciScene(10, `{"kind":"none"}`, `{"kind":"fixed","pfa":1e-6}`, tj), `"integration"`, `"mti":"two_pulse","integration"`, 1), `receiver.mti "two_pulse"`},
		{"stagger", strings.Replace(nciScene(10, `{"kind":"none"}`, `{"kind":"fixed","pfa":1e-6}`, tj), `"pri_s":2e-4`, `"pri_stagger_s":[2e-4,2.2e-4]`, 1), "radar.pri_stagger_s"},
		{"bad value", strings.Replace(nciScene(10, `{"kind":"none"}`, `{"kind":"fixed","pfa":1e-6}`, tj), `"noncoherent"`, `"video"`, 1), "receiver.integration"},
		{"version 2", strings.Replace(nciScene(10, `{"kind":"none"}`, `{"kind":"fixed","pfa":1e-6}`, tj), `"version":3`, `"version":2`, 1), "added in format version 3"},
	} {
		_, err := Decode([]byte(c.doc))
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
		if err != nil && c.name != "version 2" && !strings.Contains(err.Error(), "receiver.integration") {
			t.Errorf("%s: error %v does not name receiver.integration", c.name, err)
		}
	}
	// A coherent train (the default) and version 2 documents read as
	// before: integration coherent, not written in the canonical form.
	s := mustDecode(t, strings.Replace(lfmScene(`{"kind":"none"}`, "", tj), `"pri_s":2e-4`, `"pri_s":2e-4,"pulses":8`, 1))
	if s.Receiver.Integration != IntegrationCoherent || s.NonCoherent() || !s.CoherentTrain() {
		t.Errorf("version 2 train: integration %q", s.Receiver.Integration)
	}
	b, _ := Canonical(s)
	if strings.Contains(string(b), "integration") || !strings.Contains(string(b), `"version":3`) {
		t.Errorf("canonical form %s", b)
	}
	n := mustDecode(t, nciScene(10, `{"kind":"none"}`, `{"kind":"fixed","pfa":1e-6}`, tj))
	b, _ = Canonical(n)
	back := mustDecode(t, string(b))
	if !strings.Contains(string(b), `"integration":"noncoherent"`) || !back.NonCoherent() {
		t.Errorf("canonical form of a non-coherent train %s", b)
	}
}

// TestNCITrials: the Monte Carlo trials run the integrated detector and
// agree with the analytic Pd inside their 95 % interval, for a steady
// target and a Swerling 2 one (Swerling 2 independent from pulse to
// pulse: the case non-coherent integration makes exact).
func TestNCITrials(t *testing.T) {
	if testing.Short() {
		t.Skip("Monte Carlo")
	}
	for _, c := range []struct {
		fluct string
		snr   float64
	}{{"none", 4.5}, {"swerling2", 6}} {
		b, _ := json.Marshal(map[string]any{"id": "a", "kind": "point", "range_m": 6000, "rcs_dbsm": rcsFor(c.snr, 6000), "fluctuation": c.fluct})
		for _, det := range []string{`{"kind":"fixed","pfa":1e-3}`, `{"kind":"ca_cfar","pfa":1e-3,"guard_cells":64,"training_cells":16}`} {
			s := mustDecode(t, nciScene(4, `{"kind":"taylor"}`, det, string(b)))
			tr, err := NewTrials(context.Background(), s)
			if err != nil {
				t.Fatal(err)
			}
			pd := tr.Report().Targets[0].Pd
			if pd == nil {
				t.Fatalf("%s %s: no analytic Pd", c.fluct, det)
			}
			const n = 2000
			cnt, err := tr.Run(context.Background(), 0, n, 0, nil)
			if err != nil {
				t.Fatal(err)
			}
			p := float64(cnt.Detections[0]) / n
			half := 1.96 * math.Sqrt(*pd*(1-*pd)/n)
			if math.Abs(p-*pd) > half+0.5/n {
				t.Errorf("%s %s: empirical Pd %.4f over %d trials, analytic %.4f ± %.4f (95 %%)", c.fluct, det, p, n, *pd, half)
			}
			if fa := float64(cnt.FalseAlarms) / float64(cnt.NoiseCells); cnt.NoiseCells > 0 && math.Abs(fa-1e-3) > 4*math.Sqrt(1e-3/float64(cnt.NoiseCells))+1e-4 {
				t.Errorf("%s %s: false-alarm rate %.2e over %d cells, want 1e-3", c.fluct, det, fa, cnt.NoiseCells)
			}
		}
	}
}

// TestKnownNoisePdN: the closed forms the scene uses at raised
// thresholds equal dsp's exact series at the nominal one (Swerling 1,
// DiFranco & Rubin / Mahafza eq. 2.79; Swerling 2, Richards eq. 6.107).
func TestKnownNoisePdN(t *testing.T) {
	for _, sw := range []int{dsp.Swerling1, dsp.Swerling2} {
		for _, n := range []int{2, 3, 10, 64} {
			d := dsp.Detector{Pfa: 1e-6, Pulses: n, Integration: dsp.NonCoherent, Swerling: sw}
			for _, snr := range []float64{0.1, 1, 10, 1000} {
				got, ok := knownNoisePdN(sw, n, snr, d.Threshold())
				if want := d.Pd(snr); !ok || math.Abs(got-want) > 1e-9 {
					t.Errorf("Swerling %d, %d pulses, SNR %g: %g, series %g", sw, n, snr, got, want)
				}
			}
		}
	}
}

// TestPdStrongFluct: the quadrature the scene uses for strong Swerling 3
// and 4 targets over several pulses equals dsp's exact series where both
// are cheap (energies 1e3 … 1e4, thresholds 1 … 30 times the nominal).
func TestPdStrongFluct(t *testing.T) {
	for _, sw := range []int{dsp.Swerling3, dsp.Swerling4} {
		for _, n := range []int{2, 10} {
			d := dsp.Detector{Pfa: 1e-6, Pulses: n, Integration: dsp.NonCoherent, Swerling: sw}
			for _, e := range []float64{1e3, 1e4} {
				for _, r := range []float64{1, 30} {
					chi := e / float64(n)
					got, want := pdStrongFluct(d, chi, r*d.Threshold()), d.PdAtThreshold(chi, r*d.Threshold())
					if math.Abs(got-want) > 1e-7 {
						t.Errorf("Swerling %d, %d pulses, energy %g, raise %g: %g, series %g", sw, n, e, r, got, want)
					}
				}
			}
		}
	}
}

// TestNCIManyTargetsSameVerdicts: with many targets (judged on several
// goroutines, each with its own copy of the detector) every target's
// verdict equals the one it gets alone in the same scene with the other
// targets far away: the copies integrate as the original does. Four
// identical steady targets 2 km apart at 6 dB per pulse, 10 pulses,
// CA-CFAR with 64 guard and 16 training cells at 4 samples per 1/B: the
// decorrelation lattice keeps one cell a side (its spacing exceeds the 8
// cells of a side), so each needs 8.586 dB (dsp's series for M = 2; a
// copy of the detector without the pulses would ask the single-pulse
// multiplier instead) and all have the same Pd.
func TestNCIManyTargetsSameVerdicts(t *testing.T) {
	var ts []string
	for i := range 4 {
		b, _ := json.Marshal(map[string]any{"id": "t" + strconv.Itoa(i), "kind": "point", "range_m": 4000 + 2000*i, "rcs_dbsm": rcsFor(6, 4000+2000*float64(i))})
		ts = append(ts, string(b))
	}
	res := mustEvaluate(t, mustDecode(t, nciScene(10, `{"kind":"taylor"}`, `{"kind":"ca_cfar","pfa":1e-6,"guard_cells":64,"training_cells":16}`, ts...)))
	for _, tr := range res.Report.Targets {
		if tr.SNRRequiredDB == nil || math.Abs(*tr.SNRRequiredDB-8.586) > 0.01 || tr.Pd == nil {
			t.Errorf("%s: snr_required_db %v, pd %v; want 8.586 dB (10 pulses, 2 CA cells, Pfa 1e-6) and a Pd", tr.ID, ptrVal(tr.SNRRequiredDB), ptrVal(tr.Pd))
		}
	}
	p0 := *res.Report.Targets[0].Pd
	for _, tr := range res.Report.Targets[1:] {
		if math.Abs(*tr.Pd-p0) > 0.03 { // straddle differs by range
			t.Errorf("%s: pd %.4f, t0 %.4f: want alike", tr.ID, *tr.Pd, p0)
		}
	}
}

// TestSameDetectorCopiesEverySetting: the detector copies the scene's
// judging goroutines use (sameDetector) carry every exported setting of
// the original, the integrated pulses included, so that they solve the
// same multipliers (a copy without Pulses would train on every cell with
// the single-pulse multiplier).
func TestSameDetectorCopiesEverySetting(t *testing.T) {
	orig := &dsp.CFAR{PFA: 1e-5, Guard: 3, Train: 12, Rank: 0, Rho: []complex128{1, 0.5}, Variant: dsp.CellAveraging, Censor: 2, Pulses: 10}
	c := sameDetector(orig)
	ov, cv := reflect.ValueOf(orig).Elem(), reflect.ValueOf(c).Elem()
	for i := range ov.NumField() {
		f := ov.Type().Field(i)
		if !f.IsExported() {
			continue
		}
		if !reflect.DeepEqual(ov.Field(i).Interface(), cv.Field(i).Interface()) {
			t.Errorf("sameDetector: field %s is %v, the original's %v", f.Name, cv.Field(i).Interface(), ov.Field(i).Interface())
		}
	}
	if a, b := c.Multiplier(6), orig.Multiplier(6); a != b {
		t.Errorf("multiplier for 6 cells: copy %g, original %g", a, b)
	}
}
