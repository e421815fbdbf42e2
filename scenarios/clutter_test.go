package scenarios

import (
	"context"
	"math"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/dsp"
)

// rainScene is a C-band radar with a fixed threshold looking at a rain
// band and an aircraft inside it; role and detector are filled in.
const rainScene = `{"version": 1, "seed": 3,
 "radar": {"carrier_hz": 5.6e9, "peak_power_w": 2000, "antenna_gain_dbi": 34, "pri_s": 2e-4, "window_start_m": 3000, "window_stop_m": 14000},
 "waveform": {"kind": "lfm", "pulse_width_s": 1e-5, "bandwidth_hz": 2e6},
 "receiver": {"detector": %DET%},
 "targets": [
  {"id": "rain", "kind": "volume", "range_start_m": 8000, "range_stop_m": 10000, "reflectivity_dbz": 40 %ROLE%},
  {"id": "plane", "kind": "point", "range_m": 9000, "rcs_dbsm": 20}
 ]}`

func rain(t *testing.T, det, role string) *Result {
	t.Helper()
	doc := strings.ReplaceAll(rainScene, "%DET%", det)
	doc = strings.ReplaceAll(doc, "%ROLE%", role)
	return mustEvaluate(t, mustDecode(t, doc))
}

func TestClutterRole(t *testing.T) {
	res := rain(t, `{"kind": "fixed"}`, "")
	r := target(res, "rain")
	if r.Status != StatusClutter || r.Role != RoleClutter || r.MarginDB != nil || r.MaskedBy != "" {
		t.Errorf("default role: status %s, role %q, margin %v, masked_by %q; want clutter, no margin", r.Status, r.Role, r.MarginDB, r.MaskedBy)
	}
	if !strings.Contains(r.Reason, "false alarm") {
		t.Errorf("reason does not call its crossings false alarms: %s", r.Reason)
	}
	// As a target, the same rain is judged like one: a fixed threshold
	// 11.4 dB over noise lets a 40 dBZ band through.
	rt := target(rain(t, `{"kind": "fixed"}`, `, "role": "target"`), "rain")
	if rt.Status != StatusDetected || rt.Role != RoleTarget || rt.Breakthrough != nil {
		t.Errorf("role target: status %s, role %q, breakthrough %v; want detected", rt.Status, rt.Role, rt.Breakthrough)
	}
}

func TestClutterBreakthrough(t *testing.T) {
	res := rain(t, `{"kind": "fixed", "pfa": 1e-6}`, "")
	r := target(res, "rain")
	b := r.Breakthrough
	if b == nil || b.Cells == 0 || len(b.Spans) == 0 {
		t.Fatalf("no breakthrough under a fixed threshold: %+v", b)
	}
	// Independent count from plotted series: gates where the scene's
	// noise-free profile reaches the (fixed) threshold and the rain alone
	// puts more power than the aircraft alone (its main lobe and range
	// sidelobes are its own, not clutter's).
	s := res.Series
	doc := strings.ReplaceAll(strings.ReplaceAll(rainScene, "%DET%", `{"kind": "fixed", "pfa": 1e-6}`), "%ROLE%", "")
	only := func(i int) Series {
		sc := mustDecode(t, doc)
		sc.Targets = sc.Targets[i : i+1]
		return mustEvaluate(t, sc).Series
	}
	rs, ps := only(0), only(1)
	want := 0
	for k, c := range s.CleanDB {
		if c >= s.ThresholdDB[k] && c > dbFloor && rs.CleanDB[k] > ps.CleanDB[k] {
			want++
		}
	}
	if b.Cells != want {
		t.Errorf("breakthrough cells %d, the plotted profiles give %d", b.Cells, want)
	}
	for _, sp := range b.Spans {
		if sp.StartM < 8000-C*1e-5/2 || sp.StopM > 10000+C*1e-5/2 || sp.StopM < sp.StartM {
			t.Errorf("span %+v outside the rain's extent plus a pulse", sp)
		}
	}
	if res.Report.Clutter == nil || res.Report.Clutter.BreakthroughCells != b.Cells {
		t.Errorf("report clutter %+v, want breakthrough_cells %d", res.Report.Clutter, b.Cells)
	}
	// A CA-CFAR holds homogeneous rain: its level rises with the rain.
	ca := target(rain(t, `{"kind": "ca_cfar", "training_cells": 32}`, ""), "rain")
	if ca.Breakthrough == nil || ca.Breakthrough.Cells >= b.Cells/10 {
		t.Errorf("CA-CFAR breakthrough %+v, want far fewer than the fixed threshold's %d", ca.Breakthrough, b.Cells)
	}
}

func TestClutterCNRSCR(t *testing.T) {
	// SCR and CNR at the aircraft's cell against two separate
	// evaluations: the aircraft alone (its peak) and the rain alone (the
	// noise-free power at that gate).
	res := rain(t, `{"kind": "fixed"}`, "")
	p := target(res, "plane")
	if p.CNRDB == nil || p.SCRDB == nil {
		t.Fatalf("no CNR/SCR at the aircraft: %+v", p.ClutterFigures)
	}
	doc := strings.ReplaceAll(strings.ReplaceAll(rainScene, "%DET%", `{"kind": "fixed"}`), "%ROLE%", "")
	alone := mustDecode(t, doc)
	alone.Targets = alone.Targets[1:]
	ra := mustEvaluate(t, alone)
	s := ra.Series
	k := int(math.Round((p.RangeM - s.RangeM0) / s.RangeStepM))
	kPeak := k
	for i := k - 3; i <= k+3; i++ { // its peak gate
		if s.CleanDB[i] > s.CleanDB[kPeak] {
			kPeak = i
		}
	}
	clutterOnly := mustDecode(t, doc)
	clutterOnly.Targets = clutterOnly.Targets[:1]
	rc := mustEvaluate(t, clutterOnly)
	if d := *p.CNRDB - rc.Series.CleanDB[kPeak]; math.Abs(d) > 1e-6 {
		t.Errorf("CNR %.4f dB, the rain alone gives %.4f dB at the aircraft's peak gate", *p.CNRDB, rc.Series.CleanDB[kPeak])
	}
	if d := *p.SCRDB - (s.CleanDB[kPeak] - rc.Series.CleanDB[kPeak]); math.Abs(d) > 1e-6 {
		t.Errorf("SCR %.4f dB, want %.4f (alone peak − clutter)", *p.SCRDB, s.CleanDB[kPeak]-rc.Series.CleanDB[kPeak])
	}
	cl := res.Report.Clutter
	if cl == nil || cl.CNRPeakDB == nil || *cl.CNRPeakDB < *p.CNRDB {
		t.Errorf("peak CNR %+v below the CNR at the aircraft %.1f", cl, *p.CNRDB)
	}
}

// surface returns an X-band radar with a 1° beam, a 15 m range cell
// (c/2B) and no noise-relevant detail, over one extended target.
func surface(t *testing.T, radarExtra, level string, start, stop float64) *Result {
	t.Helper()
	B := C / 30 // c/(2B) = 15 m
	doc := `{"version": 1, "radar": {"beamwidth_az_deg": 1, "pri_s": 2e-4, "sample_rate_hz": ` + ftoa(2*B) + `, "window_start_m": 1000, "window_stop_m": 29000` + radarExtra + `},
	 "waveform": {"kind": "rect", "pulse_width_s": ` + ftoa(1/B) + `},
	 "targets": [{"id": "sea", "kind": "extended", "range_start_m": ` + ftoa(start) + `, "range_stop_m": ` + ftoa(stop) + `, ` + level + `}]}`
	return mustEvaluate(t, mustDecode(t, doc))
}

func TestSurfacePatchInReport(t *testing.T) {
	// σ⁰ = −20 dB, θ = 1°, c/2B = 15 m: σ_c = 14.18 dBsm at 10 km
	// (Skolnik, Introduction to Radar Systems, low-grazing-angle surface
	// clutter); ψ = 0 without an antenna height, and σ_c ∝ R.
	r := target(surface(t, "", `"sigma0_db": -20`, 10000, 10300), "sea")
	if r.CellRCSDBsm == nil {
		t.Fatal("no cell_rcs_dbsm")
	}
	got := *r.CellRCSDBsm - 10*math.Log10(r.RangeM/1e4)
	if math.Abs(got-14.18) > 0.005 {
		t.Errorf("σ_c at 10 km: %.4f dBsm (at %.1f m: %.4f), want 14.18", got, r.RangeM, *r.CellRCSDBsm)
	}
	if r.GrazingDeg == nil || *r.GrazingDeg != 0 || r.Sigma0DB == nil || math.Abs(*r.Sigma0DB+20) > 1e-9 {
		t.Errorf("grazing %v, σ⁰ %v; want 0° and −20 dB", r.GrazingDeg, r.Sigma0DB)
	}
}

// cellPower returns the noise-free power (dB) at the gate nearest range r.
func cellPower(res *Result, r float64) float64 {
	p, _ := gatePower(res, r)
	return p
}

// gatePower returns the noise-free power (dB) at the gate nearest range
// r and that gate's range.
func gatePower(res *Result, r float64) (float64, float64) {
	s := res.Series
	k := int(math.Round((r - s.RangeM0) / s.RangeStepM))
	return s.CleanDB[k], s.RangeM0 + float64(k)*s.RangeStepM
}

// fallOff returns the noise-free power at the gate nearest 4 km less
// that at the gate nearest 2 km, and the two gates' ranges.
func fallOff(res *Result) (d, r1, r2 float64) {
	p1, r1 := gatePower(res, 2000)
	p2, r2 := gatePower(res, 4000)
	return p2 - p1, r1, r2
}

func TestSurfaceClutterFallOff(t *testing.T) {
	// Constant σ⁰: the cell's clutter power falls as R⁻³ (σ_c ∝ R over
	// R⁴): −9.03 dB per doubling of range (Skolnik, surface clutter at
	// low grazing angles). Antenna 100 m high: sec ψ moves it by
	// 10·log10(cos ψ(2 km)/cos ψ(4 km)) = −0.016 dB.
	res := surface(t, `, "antenna_height_m": 100`, `"sigma0_db": -20`, 1500, 5000)
	d, r1, r2 := fallOff(res)
	if want := -30 * math.Log10(r2/r1); math.Abs(d-want) > 0.02 {
		t.Errorf("σ⁰ constant: %.3f dB from 2 to 4 km, want %.3f (R⁻³)", d, want)
	}
	// Constant γ: σ⁰ = γ·sin ψ, so σ_c ∝ R·tan ψ ≈ h: nearly constant,
	// and the power falls about as R⁻⁴ (−12.04 dB per doubling). Exactly,
	// 10·log10(tan ψ(4 km)/tan ψ(2 km)) − 9.03 dB with ψ on the 4/3
	// Earth (the Earth's curvature lowers ψ by 0.9 % at 4 km).
	res = surface(t, `, "antenna_height_m": 100`, `"gamma_db": -10`, 1500, 5000)
	d, r1, r2 = fallOff(res)
	tanPsi := func(r float64) float64 {
		a, h := 4.0/3*6371e3, 100.0
		s := h/r + h*h/(2*a*r) - r/(2*a)
		return s / math.Sqrt(1-s*s)
	}
	if want := 10*math.Log10(tanPsi(r2)/tanPsi(r1)) - 30*math.Log10(r2/r1); math.Abs(d-want) > 0.01 || math.Abs(d+40*math.Log10(2)) > 0.1 {
		t.Errorf("γ constant: %.3f dB from 2 to 4 km, want %.3f (about R⁻⁴, −12.04)", d, want)
	}
	// The per-metre form keeps the format's old meaning: R⁻⁴.
	res = surface(t, "", `"rcs_dbsm_per_m": -10`, 1500, 5000)
	d, r1, r2 = fallOff(res)
	if want := -40 * math.Log10(r2/r1); math.Abs(d-want) > 0.01 {
		t.Errorf("rcs_dbsm_per_m: %.3f dB from 2 to 4 km, want %.3f (R⁻⁴)", d, want)
	}
}

func TestSurfaceHorizon(t *testing.T) {
	// Antenna 10 m high: horizon √(2·a_e·h) ≈ 13.03 km on the 4/3 Earth
	// (4.12·√h km, common practice). Clutter stops there.
	res := surface(t, `, "antenna_height_m": 10`, `"sigma0_db": -20`, 10000, 20000)
	h := math.Sqrt(2*dsp.EffectiveEarthRadius*10 + 100)
	if p := cellPower(res, h-200); p <= dbFloor {
		t.Errorf("no clutter 200 m inside the horizon (%.0f m)", h)
	}
	if p := cellPower(res, h+200); p > dbFloor {
		t.Errorf("clutter %.1f dB 200 m beyond the horizon (%.0f m)", p, h)
	}
	warned := false
	for _, w := range res.Report.Warnings {
		warned = warned || strings.Contains(w, "horizon")
	}
	if !warned {
		t.Errorf("no horizon warning: %q", res.Report.Warnings)
	}
}

func TestFalseAlarmRate(t *testing.T) {
	// One tap per gate (a rect pulse sampled once per width): every gate
	// is independent, so the rate is pfa × gates / PRI.
	res := mustEvaluate(t, mustDecode(t, `{"version": 1, "radar": {"pri_s": 1e-4, "sample_rate_hz": 1e6, "window_start_m": 1000, "window_stop_m": 11000},
	 "waveform": {"kind": "rect", "pulse_width_s": 1e-6}, "receiver": {"detector": {"kind": "fixed", "pfa": 1e-6}}}`))
	fa := res.Report.FalseAlarms
	gates := len(res.Series.CleanDB) // the window starts beyond the blind range: every gate is processed
	if fa == nil || fa.TestedCells != gates || math.Abs(fa.IndependentCells-float64(gates)) > 1e-9 {
		t.Fatalf("false alarms %+v, want %d independent gates", fa, gates)
	}
	if want := 1e-6 * float64(gates) / 1e-4; math.Abs(fa.RatePerS-want) > 1e-9*want || math.Abs(fa.MeanIntervalS*want-1) > 1e-9 {
		t.Errorf("rate %g/s, want %g", fa.RatePerS, want)
	}
	// An LFM sampled at 2B: about two gates per independent cell (Σ|ρ|² of
	// a sinc at half band is 2; the LFM's is close to it).
	res = mustEvaluate(t, mustDecode(t, `{"version": 1, "radar": {"pri_s": 1e-4, "window_start_m": 2000, "window_stop_m": 12000},
	 "waveform": {"kind": "lfm", "pulse_width_s": 1e-5, "bandwidth_hz": 5e6}}`))
	fa = res.Report.FalseAlarms
	if r := float64(fa.TestedCells) / fa.IndependentCells; math.Abs(r-2) > 0.1 {
		t.Errorf("LFM at 2B: %.3f gates per independent cell, want about 2", r)
	}
	// A range–Doppler map multiplies by the Doppler bins' effective
	// number: 16 bins with no window are independent.
	res = mustEvaluate(t, mustDecode(t, `{"version": 1, "radar": {"pri_s": 1e-4, "pulses": 16, "sample_rate_hz": 1e6, "window_start_m": 1000, "window_stop_m": 11000},
	 "waveform": {"kind": "rect", "pulse_width_s": 1e-6}, "receiver": {"doppler_window": {"kind": "none"}}}`))
	fa = res.Report.FalseAlarms
	if math.Abs(fa.IndependentCells-16*float64(gates)) > 1e-6 || fa.LookS != 16e-4 || fa.TestedCells != 16*gates {
		t.Errorf("map: %+v, want %d independent cells per 1.6 ms", fa, 16*gates)
	}
}

func TestClutterInputErrors(t *testing.T) {
	cases := []struct{ doc, path, words string }{
		{`"radar": {"antenna_height_m": 0}, "targets": []`, "radar.antenna_height_m", "0 is not valid"},
		{`"radar": {"antenna_height_m": 2e5}, "targets": []`, "radar.antenna_height_m", "above the maximum 100000"},
		{`"targets": [{"id": "s", "kind": "extended", "range_start_m": 1, "range_stop_m": 2, "gamma_db": -10}]`, "targets[0].gamma_db", "needs radar.antenna_height_m"},
		{`"targets": [{"id": "s", "kind": "extended", "range_start_m": 1, "range_stop_m": 2, "sigma0_db": -10, "gamma_db": -10}]`, "targets[0].gamma_db", "not sigma0_db and gamma_db"},
		{`"targets": [{"id": "s", "kind": "extended", "range_start_m": 1, "range_stop_m": 2}]`, "targets[0].rcs_dbsm_per_m", "required: one of"},
		{`"targets": [{"id": "s", "kind": "extended", "range_start_m": 1, "range_stop_m": 2, "sigma0_db": 40}]`, "targets[0].sigma0_db", "40 is above the maximum 30"},
		{`"targets": [{"id": "s", "kind": "volume", "range_start_m": 1, "range_stop_m": 2, "reflectivity_dbz": 10, "role": "decoy"}]`, "targets[0].role", `"decoy" is not one of clutter, target`},
		{`"targets": [{"id": "s", "kind": "point", "range_m": 1, "rcs_dbsm": 1, "role": "target"}]`, "targets[0].role", "not a field of kind"},
	}
	for _, c := range cases {
		_, err := Decode([]byte(`{"version": 1, "waveform": {"kind": "rect", "pulse_width_s": 1e-6}, ` + c.doc + `}`))
		if err == nil || !strings.Contains(err.Error(), c.path) || !strings.Contains(err.Error(), c.words) {
			t.Errorf("%s: error %v, want %s: …%s…", c.doc, err, c.path, c.words)
		}
	}
}

func TestClutterOnMap(t *testing.T) {
	// A ridge alone under a fixed threshold, 32 pulses: the map's
	// breakthrough cells are the cells of the expected map at or above
	// −ln(pfa) (the plotted noise-free map, float32 dB: ±0.001 dB).
	doc := `{"version": 1, "seed": 29,
	 "radar": {"carrier_hz": 9.5e9, "peak_power_w": 400, "antenna_gain_dbi": 32, "system_loss_db": 5, "pri_s": 1e-4, "pulses": 32, "window_start_m": 3000, "window_stop_m": 12000},
	 "waveform": {"kind": "lfm", "pulse_width_s": 1e-5, "bandwidth_hz": 5e6},
	 "receiver": {"window": {"kind": "taylor"}, "doppler_window": {"kind": "chebyshev", "sidelobe_db": -60}, "detector": {"kind": "fixed", "pfa": 1e-6}},
	 "targets": [{"id": "ridge", "kind": "extended", "range_start_m": 6000, "range_stop_m": 8000, "rcs_dbsm_per_m": -12, "velocity_spread_mps": 0.3}]}`
	res := mustEvaluate(t, mustDecode(t, doc))
	r := target(res, "ridge")
	if r.Status != StatusClutter || r.Breakthrough == nil || r.Breakthrough.Cells == 0 {
		t.Fatalf("ridge: %s %+v", r.Status, r.Breakthrough)
	}
	th := 10 * math.Log10(-math.Log(1e-6))
	lo, hi := 0, 0
	for _, row := range res.Series.RangeDoppler.CleanDB {
		for k, v := range row {
			if !(res.Series.CleanDB[k] > dbFloor) {
				continue // unprocessed gate
			}
			if float64(v) >= th+1e-3 {
				lo++
			}
			if float64(v) >= th-1e-3 {
				hi++
			}
		}
	}
	if c := r.Breakthrough.Cells; c < lo || c > hi {
		t.Errorf("map breakthrough %d cells, the expected map crosses at %d…%d", c, lo, hi)
	}
	if r.CNRIntegratedDB == nil || res.Report.Clutter.CNRPeakIntegratedDB == nil || *r.CNRIntegratedDB > *res.Report.Clutter.CNRPeakIntegratedDB+1e-9 {
		t.Errorf("map CNR %v, peak %v", r.CNRIntegratedDB, res.Report.Clutter.CNRPeakIntegratedDB)
	}
	// The hill demo: the helicopter stands clear of the ridge in Doppler
	// (map SCR far above its single-pulse SCR), the jet on a blind speed
	// does not.
	d, err := LoadDemo("hill-clutter-doppler")
	if err != nil {
		t.Fatal(err)
	}
	h := mustEvaluate(t, d.Scenario)
	heli, jet := target(h, "helicopter"), target(h, "jet")
	if *heli.SCRIntegratedDB < *heli.SCRDB+40 || *jet.SCRIntegratedDB > *jet.SCRDB+3 {
		t.Errorf("helicopter SCR %.1f → map %.1f dB; jet %.1f → %.1f dB", *heli.SCRDB, *heli.SCRIntegratedDB, *jet.SCRDB, *jet.SCRIntegratedDB)
	}
}

// TestSeaDemoStory checks the sea-clutter demo's notes: under the fixed
// threshold the sea breaks through out to about 3.3 km and the kayak
// stands about 13 dB above it; under a CA-CFAR nothing breaks through,
// the kayak is masked by the sea and the trawler is still detected; the
// sea sinks below the noise beyond about 6 km.
func TestSeaDemoStory(t *testing.T) {
	d, err := LoadDemo("sea-clutter-mast")
	if err != nil {
		t.Fatal(err)
	}
	res := mustEvaluate(t, d.Scenario)
	sea, kayak := target(res, "sea"), target(res, "kayak")
	b := sea.Breakthrough
	if b == nil || b.Cells < 250 || b.Cells > 350 || b.Spans[len(b.Spans)-1].StopM < 3000 || b.Spans[len(b.Spans)-1].StopM > 3600 {
		t.Errorf("fixed threshold: breakthrough %+v, want some 300 gates out to about 3.3 km", b)
	}
	if kayak.SCRDB == nil || math.Abs(*kayak.SCRDB-13) > 1 {
		t.Errorf("kayak SCR %v, want about 13 dB", kayak.SCRDB)
	}
	for _, r := range []float64{5800, 7000} {
		p := cellPower(res, r) // the sea alone there: no target near
		if (r < 6000) != (p > 0) {
			t.Errorf("sea at %.0f m: %.1f dB re noise; the notes say it sinks below the noise beyond about 6 km", r, p)
		}
	}
	d.Scenario.Receiver.Detector = defaultDetector(DetectorCA)
	res = mustEvaluate(t, d.Scenario)
	sea, kayak, trawler := target(res, "sea"), target(res, "kayak"), target(res, "trawler")
	if sea.Breakthrough == nil || sea.Breakthrough.Cells != 0 || kayak.Status != StatusMasked || kayak.MaskedBy != "sea" || trawler.Status != StatusDetected {
		t.Errorf("ca_cfar: sea %d cells, kayak %s by %q, trawler %s; want 0, masked by sea, detected", sea.Breakthrough.Cells, kayak.Status, kayak.MaskedBy, trawler.Status)
	}
}

// TestSquallDemoRainBreaksThroughFixed checks the squall-line demo's
// notes: the CFAR holds the rain, a fixed threshold lets it break through.
func TestSquallDemoRainBreaksThroughFixed(t *testing.T) {
	d, err := LoadDemo("squall-line")
	if err != nil {
		t.Fatal(err)
	}
	if b := target(mustEvaluate(t, d.Scenario), "rain-band").Breakthrough; b == nil || b.Cells != 0 {
		t.Errorf("CFAR: rain breakthrough %+v, want none", b)
	}
	d.Scenario.Receiver.Detector = defaultDetector(DetectorFixed)
	if b := target(mustEvaluate(t, d.Scenario), "rain-band").Breakthrough; b == nil || b.Cells == 0 {
		t.Errorf("fixed threshold: rain breakthrough %+v, want some", b)
	}
}

// TestUpgradeRoleNote: a version 1 document's extended and volume targets
// read as clutter; the upgrade names them and the evaluation says, for
// each whose verdict changes, that it is now clutter and why.
func TestUpgradeRoleNote(t *testing.T) {
	doc := `{"version": 1, "waveform": {"kind": "lfm", "pulse_width_s": 1e-5, "bandwidth_hz": 2e6},
	 "radar": {"carrier_hz": 5.6e9, "peak_power_w": 2000, "antenna_gain_dbi": 34, "pri_s": 2e-4, "window_start_m": 3000, "window_stop_m": 14000},
	 "receiver": {"detector": {"kind": "fixed"}},
	 "targets": [{"id": "rain", "kind": "volume", "range_start_m": 8000, "range_stop_m": 10000, "reflectivity_dbz": 40},
	  {"id": "chaff", "kind": "extended", "range_start_m": 11000, "range_stop_m": 11500, "rcs_dbsm_per_m": -10, "role": "target"}]}`
	s := mustDecode(t, doc)
	if s.Targets[0].Role != RoleClutter || s.Targets[1].Role != RoleTarget {
		t.Fatalf("roles %q %q, want clutter (the new default) and target", s.Targets[0].Role, s.Targets[1].Role)
	}
	notes, err := UpgradeNotes(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	all := strings.Join(notes, "\n")
	if !strings.Contains(all, "clutter by default: rain read as clutter") || strings.Contains(all, "chaff read") {
		t.Errorf("upgrade notes do not name rain alone:\n%s", all)
	}
	// Version 1 rules called the rain detected (a fixed threshold); now it
	// is clutter, and the warning says why.
	if !strings.Contains(all, "target rain: read from a format version 1 document, whose rules called it detected; version 2 calls it clutter: extended and volume targets are clutter by default") {
		t.Errorf("no verdict-change note for the rain:\n%s", all)
	}
}
