package scenarios

import (
	"encoding/json"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"
)

// defaultAirGamma returns γo + γw (dB/km) of the scenario's default air
// (15 °C, 1013.25 hPa total, 7.5 g/m³) at f GHz, from the independent
// Python model of ITU-R P.676-13 Annex 1 (testdata/golden/propagation.py,
// whose model reproduces the ITU's validation examples).
func defaultAirGamma(t *testing.T, f float64) float64 {
	t.Helper()
	b, err := os.ReadFile("../testdata/golden/propagation.json")
	if err != nil {
		t.Fatal(err)
	}
	var g struct {
		Air []struct {
			F     float64 `json:"f_ghz"`
			Gamma float64 `json:"gamma_db_km"`
		} `json:"default_air"`
	}
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	for _, a := range g.Air {
		if a.F == f {
			return a.Gamma
		}
	}
	t.Fatalf("no default air at %g GHz in the golden file", f)
	return 0
}

// gasScene is lfmScene at another carrier (Hz) with one point target at
// 8 km whose free-space SNR is snrDB (rcsFor's 9.5 GHz RCS less the λ²
// gain of the shorter wavelength).
func gasScene(carrier string, snrDB float64, prop string) string {
	f, _ := strconv.ParseFloat(carrier, 64)
	rcs := rcsFor(snrDB, 8000) + 20*math.Log10(f/9.5e9)
	doc := strings.Replace(lfmScene(`{"kind":"none"}`, `{"kind":"fixed","pfa":1e-6}`, pointJSON("a", 8000, rcs)),
		`"radar":{`, `"radar":{"carrier_hz":`+carrier+`,`, 1)
	if prop != "" {
		doc = strings.Replace(doc, `"targets":[`, `"propagation":`+prop+`,"targets":[`, 1)
	}
	return doc
}

// TestGasAttenuation: at 35 GHz the default air attenuates 0.1003 dB/km
// (P.676-13 Annex 1, golden file), so a target at 8 km loses
// 2·0.1003·8 = 1.60 dB: snr_db and the compressed peak fall by it and
// the reason says so. At 94 GHz (0.404 dB/km, 6.47 dB two-way) a target
// detected in free space is too weak, and its reason names the air.
func TestGasAttenuation(t *testing.T) {
	doc := gasScene("3.5e10", 20, "")
	base := mustEvaluate(t, mustDecode(t, doc))
	res := mustEvaluate(t, mustDecode(t, gasScene("3.5e10", 20, `{"gas":"itu_p676"}`)))
	want := 2 * defaultAirGamma(t, 35) * 8
	if math.Abs(want-1.604) > 0.001 {
		t.Fatalf("two-way loss %.4f dB", want)
	}
	a0, a := target(base, "a"), target(res, "a")
	if d := a0.SNRDB - a.SNRDB; math.Abs(d-want) > 1e-6 {
		t.Errorf("snr_db falls %.6f dB, want %.6f", d, want)
	}
	peak := func(r *Result) float64 {
		p := -1e9
		for _, v := range r.Series.CleanDB {
			p = math.Max(p, v)
		}
		return p
	}
	if d := peak(base) - peak(res); math.Abs(d-want) > 1e-6 {
		t.Errorf("compressed peak falls %.6f dB, want %.6f", d, want)
	}
	if !strings.Contains(a.Reason, "The atmosphere attenuates its echo by 1.6 dB two-way: oxygen and water vapour, 0.1003 dB/km at 35 GHz (ITU-R P.676-13; air at 15 °C, 1013.25 hPa, 7.5 g/m³).") {
		t.Errorf("reason: %s", a.Reason)
	}

	// 94 GHz: 17 dB in free space is detected (Pd 0.9 at Pfa 1e-6 needs
	// about 13.2 dB), 17 − 6.47 dB is not.
	if g := 2 * defaultAirGamma(t, 94) * 8; math.Abs(g-6.471) > 0.001 {
		t.Fatalf("94 GHz two-way loss %.4f dB", g)
	}
	free := target(mustEvaluate(t, mustDecode(t, gasScene("9.4e10", 17, ""))), "a")
	air := target(mustEvaluate(t, mustDecode(t, gasScene("9.4e10", 17, `{"gas":"itu_p676","air_temperature_c":15}`))), "a")
	if free.Status != StatusDetected || air.Status != StatusTooWeak || !strings.Contains(air.Reason, "The atmosphere attenuates its echo by 6.5 dB two-way") {
		t.Errorf("94 GHz: free space %s, with the air %s: %s", free.Status, air.Status, air.Reason)
	}

	// Other air: dry (no water vapour) loses less at 35 GHz; the reason
	// states the air given.
	dry := target(mustEvaluate(t, mustDecode(t, gasScene("3.5e10", 20, `{"gas":"itu_p676","water_vapour_g_m3":0,"air_temperature_c":-5,"air_pressure_hpa":900}`))), "a")
	if !(dry.SNRDB > a.SNRDB) || !strings.Contains(dry.Reason, "air at -5 °C, 900 hPa, 0 g/m³") {
		t.Errorf("dry air: snr %.3f (default air %.3f): %s", dry.SNRDB, a.SNRDB, dry.Reason)
	}
}

// TestGasCanonicalAndErrors: the option's canonical form keeps only what
// differs from the defaults; every bad input names the field, the value
// and the valid range.
func TestGasCanonicalAndErrors(t *testing.T) {
	s := mustDecode(t, gasScene("1e10", 20, `{"gas":"itu_p676","air_pressure_hpa":1013.25,"water_vapour_g_m3":12}`))
	c, err := Canonical(s)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(c), `"propagation":{"gas":"itu_p676","water_vapour_g_m3":12}`) {
		t.Errorf("canonical: %s", c)
	}
	if c0, _ := Canonical(mustDecode(t, gasScene("1e10", 20, ""))); strings.Contains(string(c0), "propagation") {
		t.Errorf("free space canonical: %s", c0)
	}
	for _, c := range []struct{ carrier, prop, want string }{
		{"5e8", `{"gas":"itu_p676"}`, "propagation.gas: the line-by-line model of ITU-R P.676-13 covers 1 … 1000 GHz; radar.carrier_hz is 0.5 GHz"},
		{"1e10", `{"gas":"on"}`, `propagation.gas: "on" is not one of none, itu_p676`},
		{"1e10", `{"air_temperature_c":20}`, "propagation.air_temperature_c: given without gas: set gas to itu_p676"},
		{"1e10", `{"gas":"itu_p676","air_temperature_c":80}`, "propagation.air_temperature_c: 80 is above the maximum 60 (valid range -100 … 60)"},
		{"1e10", `{"gas":"itu_p676","air_pressure_hpa":5}`, "propagation.air_pressure_hpa: 5 is below the minimum 10 (valid range 10 … 1100)"},
		{"1e10", `{"gas":"itu_p676","water_vapour_g_m3":-1}`, "propagation.water_vapour_g_m3: -1 is below the minimum 0 (valid range 0 … 100)"},
		{"1e10", `{"gas":"itu_p676","water_vapour_g_m3":90,"air_temperature_c":60,"air_pressure_hpa":100}`, "propagation.water_vapour_g_m3: 90 g/m³ at 60 °C has a partial pressure of 138.4 hPa (e = ρ·T/216.7), not below air_pressure_hpa 100"},
	} {
		_, err := Decode([]byte(gasScene(c.carrier, 20, c.prop)))
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s at %s Hz: %v, want %q", c.prop, c.carrier, err, c.want)
		}
	}
}

// TestGasOnClutter: the air attenuates distributed echoes per range
// sample: a sea's clutter power at 2 km and 4 km falls by 2·γ·r, γ =
// 0.01399 dB/km at 10 GHz in the default air (golden file).
func TestGasOnClutter(t *testing.T) {
	doc := seaDoc(`"sea_state": 3`, 1500, 8000)
	free := mustEvaluate(t, mustDecode(t, doc))
	air := mustEvaluate(t, mustDecode(t, strings.Replace(doc, `"targets":`, `"propagation": {"gas": "itu_p676"}, "targets":`, 1)))
	g := defaultAirGamma(t, 10)
	for _, r := range []float64{2000, 4000} {
		p0, at := gatePower(free, r)
		p1, _ := gatePower(air, r)
		if want := 2 * g * at / 1000; math.Abs(p0-p1-want) > 0.002 {
			t.Errorf("clutter at %.0f m falls %.4f dB, want %.4f", at, p0-p1, want)
		}
	}
}
