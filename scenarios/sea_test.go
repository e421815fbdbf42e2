package scenarios

import (
	"math"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/dsp"
)

// seaDoc is surface's X-band radar (1° beam, 15 m cell) at 10 GHz with
// an antenna 20 m high over a sea given by level from start to stop.
func seaDoc(level string, start, stop float64) string {
	B := C / 30
	return `{"version": 2, "radar": {"carrier_hz": 1e10, "antenna_height_m": 20, "beamwidth_az_deg": 1, "pri_s": 2e-4, "sample_rate_hz": ` + ftoa(2*B) + `, "window_start_m": 1000, "window_stop_m": 9000},
	 "waveform": {"kind": "rect", "pulse_width_s": ` + ftoa(1/B) + `},
	 "targets": [{"id": "sea", "kind": "extended", "range_start_m": ` + ftoa(start) + `, "range_stop_m": ` + ftoa(stop) + `, ` + level + `}]}`
}

// TestSeaStateClutter: a sea given by sea_state takes σ⁰ of the NRL model
// (dsp.SeaSigma0DB, checked against its published formula and Nathanson's
// tables in package dsp) at each range's grazing angle: the report's σ⁰
// is the model's at the reported angle, and from 2 to 4 km the clutter
// power changes by the model's σ⁰ change plus the patch's R⁻³ (σ_c ∝
// σ⁰·R·sec ψ over R⁴; Skolnik, low-grazing-angle surface clutter).
// Vertical polarisation is stronger at these angles.
func TestSeaStateClutter(t *testing.T) {
	res := mustEvaluate(t, mustDecode(t, seaDoc(`"sea_state": 3`, 1500, 8000)))
	r := target(res, "sea")
	if r.Sigma0DB == nil || r.GrazingDeg == nil {
		t.Fatalf("no σ⁰ or grazing angle in the report: %+v", r.ClutterFigures)
	}
	if want := dsp.SeaSigma0DB(10, 3, false, *r.GrazingDeg); math.Abs(*r.Sigma0DB-want) > 1e-9 {
		t.Errorf("σ⁰ %.6f dB at %.4f°, the model gives %.6f", *r.Sigma0DB, *r.GrazingDeg, want)
	}
	d, r1, r2 := fallOff(res)
	psi := func(r float64) float64 {
		p, _ := dsp.GrazingAngle(20, r, dsp.EffectiveEarthRadius)
		return p
	}
	s0 := func(r float64) float64 { return dsp.SeaSigma0DB(10, 3, false, psi(r)*180/math.Pi) }
	want := s0(r2) - s0(r1) - 30*math.Log10(r2/r1) + 10*math.Log10(math.Cos(psi(r1))/math.Cos(psi(r2)))
	if math.Abs(d-want) > 0.02 {
		t.Errorf("sea state 3: %.3f dB from %.0f to %.0f m, want %.3f (σ⁰ %.2f → %.2f dB and R⁻³)", d, r1, r2, want, s0(r1), s0(r2))
	}
	v := target(mustEvaluate(t, mustDecode(t, seaDoc(`"sea_state": 3, "polarisation": "vertical"`, 1500, 8000))), "sea")
	if v.Sigma0DB == nil || !(*v.Sigma0DB > *r.Sigma0DB) {
		t.Errorf("vertical σ⁰ %v not above horizontal %.2f dB", v.Sigma0DB, *r.Sigma0DB)
	}
	c, err := Canonical(mustDecode(t, seaDoc(`"sea_state": 3, "polarisation": "vertical"`, 1500, 8000)))
	if err != nil || !strings.Contains(string(c), `"sea_state":3,"polarisation":"vertical"`) {
		t.Errorf("canonical: %s (%v)", c, err)
	}
	if c, _ := Canonical(mustDecode(t, seaDoc(`"sea_state": 3, "polarisation": "horizontal"`, 1500, 8000))); strings.Contains(string(c), "polarisation") {
		t.Errorf("canonical keeps the default polarisation: %s", c)
	}
}

// TestSeaStateErrors: the model's limits (0.5 … 35 GHz, 0.1 … 60° grazing,
// sea states 0 … 6; for an antenna 20 m high, 0.1° falls at 8.83 km on
// the 4/3 Earth and 60° at 23 m, and 12 km is seen at 0.055°: sin ψ =
// h/r + h²/(2·a_e·r) − r/(2·a_e), a_e = 8494.7 km) are stated with the
// field, the value and the valid range.
func TestSeaStateErrors(t *testing.T) {
	if _, far := seaGrazingSpan(20); math.Abs(far-8830) > 1 {
		t.Fatalf("0.1° at %.1f m", far)
	}
	for _, c := range []struct{ doc, want string }{
		{seaDoc(`"sea_state": 7`, 1500, 8000), "targets[0].sea_state: 7 is above the maximum 6 (valid range 0 … 6)"},
		{seaDoc(`"sea_state": 2.5`, 1500, 8000), "targets[0].sea_state: 2.5 is not a whole sea state"},
		{seaDoc(`"sea_state": 3`, 1500, 12000), "targets[0].range_stop_m: 12000 m puts the sea's grazing angle at 0.055°, below the 0.1° the NRL sea model was fitted down to (valid 0.1 … 60°: 23 m … 8.83 km for an antenna 20 m high on the 4/3 Earth)"},
		{seaDoc(`"sea_state": 3`, 1500, 30000), "targets[0].range_stop_m: 30000 m lies at or beyond the radar horizon"},
		{seaDoc(`"sea_state": 3`, 10, 8000), "targets[0].range_start_m: 10 m is nearer than 23 m, where the sea's grazing angle reaches 60°"},
		{strings.Replace(seaDoc(`"sea_state": 3`, 1500, 8000), `"carrier_hz": 1e10`, `"carrier_hz": 4e10`, 1), "targets[0].sea_state: the NRL sea model was fitted to Nathanson's tables at 0.5 … 35 GHz; radar.carrier_hz is 40 GHz"},
		{strings.Replace(seaDoc(`"sea_state": 3`, 1500, 8000), `"antenna_height_m": 20, `, ``, 1), "targets[0].sea_state: needs radar.antenna_height_m"},
		{seaDoc(`"sigma0_db": -30, "polarisation": "vertical"`, 1500, 8000), "targets[0].polarisation: given without sea_state"},
		{seaDoc(`"sea_state": 3, "polarisation": "circular"`, 1500, 8000), `targets[0].polarisation: "circular" is not one of horizontal, vertical`},
		{seaDoc(`"sea_state": 3, "gamma_db": -10`, 1500, 8000), "give one of rcs_dbsm_per_m, sigma0_db, gamma_db and sea_state, not gamma_db and sea_state"},
	} {
		_, err := Decode([]byte(c.doc))
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%v, want %q", err, c.want)
		}
	}
}
