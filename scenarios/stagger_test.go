package scenarios

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"slices"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/dsp"
)

// staggerScene is an X-band staggered train of our own: PRIs of 100 and
// 125 µs (Δ = 25 µs), 24 pulses, a two-pulse canceller. "fast" closes at
// 157.8 m/s, the blind speed of the 100 µs PRI alone; "blind" at
// 631.14 m/s, the stagger's first true blind speed λ/(2Δ); "mid" at
// 80 m/s.
func staggerScene(radar map[string]any, targets ...map[string]any) []byte {
	r := map[string]any{"carrier_hz": 9.5e9, "peak_power_w": 5000, "antenna_gain_dbi": 33, "noise_figure_db": 4, "system_loss_db": 6,
		"pulses": 24, "pri_stagger_s": []any{100e-6, 125e-6}, "window_start_m": 2000}
	for k, v := range radar {
		if v == nil {
			delete(r, k)
		} else {
			r[k] = v
		}
	}
	if targets == nil {
		targets = []map[string]any{
			{"id": "fast", "kind": "point", "range_m": 9000, "rcs_dbsm": 5, "range_rate_mps": -157.8},
			{"id": "blind", "kind": "point", "range_m": 12000, "rcs_dbsm": 5, "range_rate_mps": -631.14},
			{"id": "mid", "kind": "point", "range_m": 7000, "rcs_dbsm": 5, "range_rate_mps": -80},
		}
	}
	b, _ := json.Marshal(map[string]any{"version": 2, "name": "stagger test", "seed": 5, "radar": r,
		"waveform": map[string]any{"kind": "barker", "length": 13, "chip_s": 1e-6}, "receiver": map[string]any{"mti": "two_pulse"}, "targets": targets})
	return b
}

func TestStaggerDecodeErrors(t *testing.T) {
	for _, c := range []struct {
		radar map[string]any
		path  string
		words string
	}{
		{map[string]any{"pri_stagger_s": []any{100e-6}}, "radar.pri_stagger_s", "1 PRIs; give 2 … 16"},
		{map[string]any{"pri_stagger_s": make([]any, 17)}, "radar.pri_stagger_s", "17 PRIs; give 2 … 16"},
		{map[string]any{"pri_stagger_s": "1e-4"}, "radar.pri_stagger_s", "not an array"},
		{map[string]any{"pri_stagger_s": []any{100e-6, "x"}}, "radar.pri_stagger_s[1]", "not a number"},
		{map[string]any{"pri_stagger_s": []any{100e-6, 10e-6}, "window_start_m": 0}, "radar.pri_stagger_s[1]", "1e-05 must be above 1.3e-05 (valid range: above 1.3e-05, at most 1)"},
		{map[string]any{"pri_stagger_s": []any{100e-6, 2}}, "radar.pri_stagger_s[1]", "2 is above the maximum 1"},
		{map[string]any{"pri_s": 125e-6}, "radar.pri_s", "1.25e-04 s is not the shortest PRI of pri_stagger_s (0.0001 s)"},
		{map[string]any{"pulses": 1}, "radar.pri_stagger_s", "a stagger needs a pulse train; this CPI has 1 pulse"},
		{map[string]any{"window_stop_m": 16000}, "radar.pri_stagger_s", "before window_stop_m 16000 m"},
		{map[string]any{"pri_stagger_s": []any{100e-6, 100e-6 * math.Sqrt2}}, "radar.pri_stagger_s", "no common step"},
	} {
		_, err := Decode(staggerScene(c.radar))
		wantFieldError(t, c.radar, err, c.path, strings.ReplaceAll(c.words, "1.25e-04", "0.000125"))
	}
	// A CPI of a schedule: pri_s is not required with a stagger, and the
	// same checks name the CPI's field.
	for _, c := range []struct {
		cpi   map[string]any
		path  string
		words string
	}{
		{map[string]any{"pri_stagger_s": []any{100e-6}}, "radar.schedule.cpis[0].pri_stagger_s", "1 PRIs"},
		{map[string]any{"pri_stagger_s": []any{100e-6, 125e-6}, "pulses": 1}, "radar.schedule.cpis[0].pri_stagger_s", "needs a pulse train"},
		{map[string]any{"pri_s": 1e-4, "pri_stagger_s": []any{110e-6, 125e-6}}, "radar.schedule.cpis[0].pri_s", "not the shortest"},
	} {
		_, err := Decode(staggerScene(map[string]any{"pri_stagger_s": nil, "pri_s": 1e-4, "schedule": map[string]any{"cpis": []any{c.cpi}}}))
		wantFieldError(t, c.cpi, err, c.path, c.words)
	}
}

// TestStaggerCanonical: pri_s is filled with the shortest PRI, the
// canonical form keeps the pattern and leaves pri_s out, and reads back
// the same.
func TestStaggerCanonical(t *testing.T) {
	s, err := Decode(staggerScene(map[string]any{"pri_stagger_s": []any{125e-6, 100e-6, 150e-6},
		"schedule": map[string]any{"cpis": []any{map[string]any{"pri_stagger_s": []any{110e-6, 130e-6}}, map[string]any{"pri_s": 1.2e-4}}}}))
	if err != nil {
		t.Fatal(err)
	}
	if s.Radar.PRIS != 100e-6 || s.Radar.WindowStopM != C*100e-6/2 || s.Radar.Schedule.CPIs[0].PRIS != 110e-6 {
		t.Errorf("pri_s %g, window_stop_m %g, CPI 2 pri_s %g; want the shortest PRIs 1e-4, c·1e-4/2, 1.1e-4", s.Radar.PRIS, s.Radar.WindowStopM, s.Radar.Schedule.CPIs[0].PRIS)
	}
	b, err := Canonical(s)
	if err != nil {
		t.Fatal(err)
	}
	if strings.Contains(string(b), `"pri_s":0.0001,`) || !strings.Contains(string(b), `"pri_stagger_s":[0.000125,0.0001,0.00015]`) {
		t.Errorf("canonical radar: %s", b)
	}
	s2, err := Decode(b)
	if err != nil {
		t.Fatal(err)
	}
	b2, _ := Canonical(s2)
	if string(b) != string(b2) {
		t.Errorf("canonical form does not read back:\n%s\n%s", b, b2)
	}
	if got := s2.Radar.pulseTime(4); math.Abs(got-(125e-6+100e-6+150e-6+125e-6)) > 1e-15 {
		t.Errorf("pulse 4 at %g s", got)
	}
	if got := s2.Radar.pulseTime(-1); math.Abs(got+150e-6) > 1e-15 {
		t.Errorf("pulse −1 at %g s, want −150 µs (the pattern continues backwards)", got)
	}
}

// TestStaggerFillsBlindSpeed: the 100/125 µs stagger detects a target at
// the 100 µs PRI's blind speed, which a uniform 100 µs train rejects, and
// is itself blind at λ/(2Δ) = 631.1 m/s (Skolnik, Introduction to Radar
// Systems, 3rd ed., ch. 3, staggered PRFs: 631 m/s for 100 and 125 µs at
// 9.5 GHz).
func TestStaggerFillsBlindSpeed(t *testing.T) {
	eval := func(radar map[string]any) *Result {
		s, err := Decode(staggerScene(radar))
		if err != nil {
			t.Fatal(err)
		}
		res, err := Evaluate(context.Background(), s)
		if err != nil {
			t.Fatal(err)
		}
		return res
	}
	st := eval(nil)
	uni := eval(map[string]any{"pri_stagger_s": nil, "pri_s": 100e-6})
	byID := func(r *Result, id string) TargetReport {
		for _, tr := range r.Report.Targets {
			if tr.ID == id {
				return tr
			}
		}
		t.Fatalf("no target %s", id)
		return TargetReport{}
	}
	if tr := byID(uni, "fast"); tr.Status == StatusDetected || tr.BlindSpeed == nil || !*tr.BlindSpeed {
		t.Errorf("uniform 100 µs: fast %s, blind %v; want it blind", tr.Status, tr.BlindSpeed)
	}
	if tr := byID(st, "fast"); tr.Status != StatusDetected || *tr.BlindSpeed {
		t.Errorf("stagger: fast %s (%s); want detected, not blind", tr.Status, tr.Reason)
	}
	tr := byID(st, "blind")
	if tr.Status == StatusDetected || !*tr.BlindSpeed || !strings.Contains(tr.Reason, "Blind speed of the stagger 100 µs / 125 µs") {
		t.Errorf("stagger: blind %s, blind_speed %v (%s); want it blind", tr.Status, *tr.BlindSpeed, tr.Reason)
	}
	sr := st.Report.Stagger
	if sr == nil || math.Abs(sr.FirstBlindSpeedMPS-631.142) > 0.01 || sr.StepS != 25e-6 || math.Abs(sr.FirstBlindSpeedMPS/sr.MeanPRIBlindSpeedMPS-4.5) > 1e-9 {
		t.Fatalf("stagger report %+v; want 631.14 m/s, Δ 25 µs, 4.5 × the mean PRI's", sr)
	}
	if sr.DeepestDipDB == nil || *sr.DeepestDipDB > -3 || *sr.DeepestDipDB < -30 {
		t.Errorf("deepest dip %v dB; want a dip of a few dB to tens of dB", sr.DeepestDipDB)
	}
	// The noisy map agrees with the expected one at each detected
	// target's peak: the staggered filter bank sees the synthesised
	// echoes where the analysis puts them (within 3 dB: noise and the
	// straddle of the echo's moving phase).
	rd := st.Series.RangeDoppler
	for _, id := range []string{"fast", "mid"} {
		k := int(math.Round((9000 - 2000) * 2 / C * 2e6))
		if id == "mid" {
			k = int(math.Round((7000 - 2000) * 2 / C * 2e6))
		}
		best, bd := float32(-1e9), 0
		for d := range rd.CleanDB {
			if rd.CleanDB[d][k] > best {
				best, bd = rd.CleanDB[d][k], d
			}
		}
		if got := rd.DB[bd][k]; math.Abs(float64(got-best)) > 3 {
			t.Errorf("%s: noisy map %.1f dB at its expected peak (range cell %d, bin %d), expected %.1f dB", id, got, k, bd, best)
		}
	}
}

// TestStaggerSecondTimeAround: an echo from beyond the shortest PRI's
// unambiguous range lands at a different apparent range in each sweep
// (20 km: 5.01 km after the 100 µs PRI, 1.26 km after the 125 µs one),
// so the coherent map holds at most half its pulses at one place: at
// least 6 dB below the same target's first-time-around peak (a quarter of
// the power: half the pulses, coherently), in the expected map and in
// the simulated one.
func TestStaggerSecondTimeAround(t *testing.T) {
	peak := func(rangeM float64, radar map[string]any) (float64, float64, int) {
		s, err := Decode(staggerScene(radar, map[string]any{"id": "far", "kind": "point", "range_m": rangeM, "rcs_dbsm": 30, "range_rate_mps": -50}))
		if err != nil {
			t.Fatal(err)
		}
		// No canceller: a two-pulse canceller passes a train with every
		// other pulse missing uncancelled, which is not what this checks.
		s.Receiver.MTI = MTINone
		res, err := Evaluate(context.Background(), s)
		if err != nil {
			t.Fatal(err)
		}
		rd := res.Series.RangeDoppler
		best, noisy, bk := float32(-1e9), float32(0), 0
		for d := range rd.CleanDB {
			for k, v := range rd.CleanDB[d] {
				if v > best {
					best, noisy, bk = v, rd.DB[d][k], k
				}
			}
		}
		return float64(best), float64(noisy), bk
	}
	// Same echo power: the first-time-around reference at 5.01 km with
	// the RCS scaled by (5.01/20)⁴ would differ in range; compare instead
	// with the uniform 100 µs train, where the 20 km echo folds onto
	// 5.01 km coherently in every sweep.
	fold, foldNoisy, kf := peak(20000, nil)
	uni, _, ku := peak(20000, map[string]any{"pri_stagger_s": nil, "pri_s": 100e-6})
	if kf != ku {
		t.Errorf("stagger's strongest cell at gate %d, uniform's at %d (5.01 km)", kf, ku)
	}
	if uni-fold < 6-0.5 {
		t.Errorf("folded echo %.1f dB in the stagger, %.1f dB in the uniform train; want at least 6 dB less", fold, uni)
	}
	if math.Abs(foldNoisy-fold) > 3 {
		t.Errorf("simulated map %.1f dB at the folded echo's peak, expected %.1f dB", foldNoisy, fold)
	}
}

// TestStaggerVelocityCurve: the scenario's curve is the dsp one, with
// the first blind speed at 631.1 m/s and each PRI's own blind speed.
func TestStaggerVelocityCurve(t *testing.T) {
	s, err := Decode(staggerScene(nil))
	if err != nil {
		t.Fatal(err)
	}
	c, ok := CPIVelocityCurve(s, 0, 301)
	if !ok {
		t.Fatal("no curve")
	}
	lambda := C / 9.5e9
	if math.Abs(c.FirstBlindMPS-lambda/(2*25e-6)) > 1e-9 || len(c.SinglePRIBlindMPS) != 2 || math.Abs(c.SinglePRIBlindMPS[0]-dsp.BlindSpeed(100e-6, lambda)) > 1e-9 {
		t.Errorf("curve blind speeds %v, %v", c.FirstBlindMPS, c.SinglePRIBlindMPS)
	}
	if c.DB[0] > -40 || c.DB[240] > -40 { // 0 and 1.0 × the blind speed (index 240 of 300 over 1.25×)
		t.Errorf("curve at 0 and at the blind speed: %.1f, %.1f dB; want deep nulls", c.DB[0], c.DB[240])
	}
	for i, v := range c.DB {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			t.Fatalf("curve point %d is %v", i, v)
		}
	}
}

// TestStaggerBlindZones: a staggered CPI of 100/125 µs (16 pulses, 1 µs
// pulse, 9.5 GHz) is blind near multiples of λ/(2Δ) = 631.1 m/s only, not
// at its PRIs' own blind speeds (157.8 and 126.2 m/s); a range where
// every pulse's echo meets a later transmit pulse (c·225 µs/2, two PRIs
// of the cycle) is eclipsed, and one where only the sweeps after a 100 µs
// PRI are eclipsed (c·100 µs/2) loses half of the CPI's echo energy.
func TestStaggerBlindZones(t *testing.T) {
	spec := BlindZoneSpec{PRIs: []float64{100e-6}, Pulses: []int{16}, Staggers: [][]float64{{100e-6, 125e-6}}, PulseS: 1e-6, CarrierHz: 9.5e9,
		RangeMinM: 0, RangeMaxM: 40000, RateMaxMPS: 700, RangeCells: 400, RateCells: 700}
	b, err := BlindZones(spec)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(b.FirstBlindMPS-631.142) > 0.01 {
		t.Errorf("first blind speed %.3f m/s, want 631.14", b.FirstBlindMPS)
	}
	row := func(v float64) int { return int(math.Floor((v + 700) / 2.0)) }
	col := func(r float64) int { return int(math.Floor(r / 100)) }
	for _, c := range []struct {
		v     float64
		blind bool
	}{{0, true}, {157.8, false}, {126.2, false}, {300, false}, {631.1, true}, {-631.1, true}} {
		if got := b.Blind[row(c.v)][0]&1 != 0; got != c.blind {
			t.Errorf("%.1f m/s: blind %v, want %v", c.v, got, c.blind)
		}
	}
	for _, c := range []struct {
		r        float64
		eclipsed bool
	}{{C * 225e-6 / 2, true}, {C * 100e-6 / 2, true}, {10000, false}, {C * 112.5e-6 / 2, false}} {
		if got := b.Eclipsed[row(300)][col(c.r)]&1 != 0; got != c.eclipsed {
			t.Errorf("%.0f m: eclipsed %v, want %v", c.r, got, c.eclipsed)
		}
	}
	if f := staggerEclipsedMax(C*100e-6/2, C*100e-6/2, []float64{100e-6, 125e-6}, 1e-6); math.Abs(f-0.5) > 1e-9 {
		t.Errorf("echo at c·100 µs/2: %.3f of its energy eclipsed, want 0.5 (the sweeps after the 100 µs PRI)", f)
	}
	// A pattern of equal PRIs is the uniform train: the eclipsed fraction
	// is EclipsedFraction's at every range.
	for r := 0.0; r < 50000; r += 173 {
		if a, b := staggerEclipsedMax(r, r, []float64{100e-6, 100e-6}, 7e-6), EclipsedFraction(r, 100e-6, 7e-6); math.Abs(a-b) > 1e-9 {
			t.Fatalf("%.0f m: stagger of equal PRIs eclipses %.4f, uniform %.4f", r, a, b)
		}
	}
}

// TestStaggerInSchedule: a uniform 100 µs CPI and a staggered 100/125 µs
// one, 1-of-2: the target at the 100 µs PRI's blind speed is lost in CPI 1
// and found in CPI 2, so the schedule detects it; the CPI report names
// the stagger and its blind speed λ/(2Δ); the staggered CPI is not
// unfolded.
func TestStaggerInSchedule(t *testing.T) {
	s, err := Decode(staggerScene(map[string]any{"pri_stagger_s": nil, "pri_s": 100e-6,
		"schedule": map[string]any{"cpis": []any{map[string]any{"pri_stagger_s": []any{100e-6, 125e-6}}}, "m": 1}}))
	if err != nil {
		t.Fatal(err)
	}
	rep, err := Analyse(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	sr := rep.Schedule
	c2 := sr.CPIs[1]
	if len(c2.PRIStaggerS) != 2 || c2.MeanPRIS == nil || *c2.MeanPRIS != 112.5e-6 || math.Abs(c2.BlindSpeedMPS-631.142) > 0.01 {
		t.Errorf("CPI 2: stagger %v, mean %v, blind speed %.3f; want 100/125 µs, 112.5 µs, 631.14 m/s", c2.PRIStaggerS, c2.MeanPRIS, c2.BlindSpeedMPS)
	}
	if sr.CPIs[0].PRIStaggerS != nil || sr.CPIs[0].MeanPRIS != nil {
		t.Errorf("CPI 1 is uniform, report %+v", sr.CPIs[0])
	}
	fast := sr.Targets[0]
	if fast.ID != "fast" || fast.DetectedIn != 1 || !fast.Detected || sr.CPIs[0].Targets[0].Detected || !sr.CPIs[1].Targets[0].Detected {
		t.Errorf("fast: detected in %d (%s)", fast.DetectedIn, fast.Reason)
	}
	if !strings.Contains(fast.Reason, "Staggered CPI 2 counts towards 1-of-2 but is not unfolded") {
		t.Errorf("reason %q", fast.Reason)
	}
	if sr.FirstBlindSpeedMPS == nil || math.Abs(*sr.FirstBlindSpeedMPS-631.142) > 0.01 {
		t.Errorf("schedule's first blind speed %v", sr.FirstBlindSpeedMPS)
	}
}

// TestStaggerGeometryGolden: the per-pulse geometry of staggered trains
// against testdata/stagger/gen.py, which works by brute force over long
// runs of transmit times: the eclipsed fraction of the echo over one
// pattern cycle (the blind-zones map's), and the delays at which a
// target's echoes land in each sweep's record (the simulation's).
func TestStaggerGeometryGolden(t *testing.T) {
	b, err := os.ReadFile("../testdata/stagger/cases.json")
	if err != nil {
		t.Fatal(err)
	}
	var f struct {
		Geometry []struct {
			Pattern  []float64 `json:"pattern"`
			Tau      float64   `json:"tau_s"`
			Ranges   []float64 `json:"ranges_m"`
			Eclipsed []float64 `json:"eclipsed_fraction"`
			Record   []float64 `json:"record_s"`
			Sweeps   []struct {
				RangeM float64     `json:"range_m"`
				Delays [][]float64 `json:"delays_s"`
			} `json:"sweeps"`
		} `json:"geometry"`
	}
	if err := json.Unmarshal(b, &f); err != nil {
		t.Fatal(err)
	}
	if len(f.Geometry) == 0 {
		t.Fatal("no geometry cases")
	}
	seen := 0 // echoes the golden file places in sweeps
	for _, g := range f.Geometry {
		for i, r := range g.Ranges {
			if got := staggerEclipsedMax(r, r, g.Pattern, g.Tau); math.Abs(got-g.Eclipsed[i]) > 1e-9 {
				t.Errorf("%v, τ %g, %.1f m: eclipsed %.9f, NumPy %.9f", g.Pattern, g.Tau, r, got, g.Eclipsed[i])
			}
		}
		const fs = 1e9
		m := &model{s: &Scenario{Radar: Radar{PRIS: slices.Min(g.Pattern), PRIStaggerS: g.Pattern}}, fs: fs, tau: g.Tau,
			recLen: int(math.Round(g.Record[1] * fs))}
		for _, sw := range g.Sweeps {
			for p, want := range sw.Delays {
				var got []float64
				m.sweepEchoes(p, sw.RangeM, 0, func(_ int, _, d float64) { got = append(got, d) })
				slices.Sort(got)
				seen += len(want)
				if len(got) != len(want) {
					t.Errorf("%v, %.1f m, sweep %d: delays %v, NumPy %v", g.Pattern, sw.RangeM, p, got, want)
					continue
				}
				for i := range got {
					if math.Abs(got[i]-want[i]) > 1e-12 {
						t.Errorf("%v, %.1f m, sweep %d: delay %g, NumPy %g", g.Pattern, sw.RangeM, p, got[i], want[i])
					}
				}
			}
		}
	}
	if seen < 100 {
		t.Errorf("only %d echoes in the golden sweeps", seen)
	}
}

// TestStaggerEclipsePerSweep: a target at 14.9 km, its 13 µs echo
// starting 99.4 µs after each pulse, runs into the next pulse after a
// 100 µs PRI but not after a 125 µs one: half the sweeps hear it (barely),
// half in full. The expected map holds it about 6 dB below the same
// target with the 125 µs PRIs alone (half the pulses coherently), and the
// simulated map agrees with the expected one at its peak.
func TestStaggerEclipsePerSweep(t *testing.T) {
	peak := func(radar map[string]any) (float64, float64) {
		s, err := Decode(staggerScene(radar, map[string]any{"id": "edge", "kind": "point", "range_m": 14900, "rcs_dbsm": 30, "range_rate_mps": -50}))
		if err != nil {
			t.Fatal(err)
		}
		s.Receiver.MTI = MTINone
		res, err := Evaluate(context.Background(), s)
		if err != nil {
			t.Fatal(err)
		}
		rd := res.Series.RangeDoppler
		best, noisy := float32(-1e9), float32(0)
		for d := range rd.CleanDB {
			for k, v := range rd.CleanDB[d] {
				if v > best {
					best, noisy = v, rd.DB[d][k]
				}
			}
		}
		return float64(best), float64(noisy)
	}
	st, stNoisy := peak(map[string]any{"window_stop_m": 14980})
	full, _ := peak(map[string]any{"pri_stagger_s": nil, "pri_s": 125e-6, "window_stop_m": 14980})
	if d := full - st; d < 5 || d > 7.5 {
		t.Errorf("edge: %.1f dB staggered, %.1f dB with 125 µs alone: %.1f dB apart, want about 6", st, full, d)
	}
	if math.Abs(stNoisy-st) > 3 {
		t.Errorf("simulated %.1f dB at the expected peak %.1f dB", stNoisy, st)
	}
}

// TestStaggerBlindZoneSpecErrors: bad staggers in a blind-zones spec are
// errors naming the CPI and PRI, never a panic.
func TestStaggerBlindZoneSpecErrors(t *testing.T) {
	base := BlindZoneSpec{PRIs: []float64{1e-4}, Pulses: []int{16}, PulseS: 1e-6, CarrierHz: 9.5e9, RangeMaxM: 4e4, RateMaxMPS: 700, RangeCells: 10, RateCells: 10}
	for _, c := range []struct {
		st    [][]float64
		words string
	}{
		{[][]float64{{1e-4, -1}}, "stagger[0][1]: -1 is outside the valid range"},
		{[][]float64{{1e-4}}, "stagger[0]: 1 PRIs; give 2 … 16"},
		{[][]float64{{1e-4, 1e-4 * math.Sqrt2}}, "no common step"},
		{[][]float64{{1e-4, 1.25e-4}, nil}, "2 staggers given for 1 CPIs"},
	} {
		s := base
		s.Staggers = c.st
		if _, err := BlindZones(s); err == nil || !strings.Contains(err.Error(), c.words) {
			t.Errorf("%v: error %v, want …%s…", c.st, err, c.words)
		}
	}
}
