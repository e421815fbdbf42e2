package scenarios

import (
	"context"
	"math"
	"reflect"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/dsp"
)

// withFrontEnd adds a front_end object to a scenario document.
func withFrontEnd(doc, fe string) string {
	return strings.Replace(doc, `"targets":[`, `"front_end":`+fe+`,"targets":[`, 1)
}

// pnScene is a 32-pulse train (PRF 10 kHz, Blackman-Harris Doppler
// window) with a strong "tanker" at zero Doppler and a weak "skiff" 55 dB
// below it in the same range gate, 8 Doppler bins away.
func pnScene(fe string) string {
	lambda := C / 9.5e9
	rate := -lambda / 2 * 8 / (32 * 1e-4)
	doc := trainScene(`{"kind":"blackman_harris"}`, "none",
		movingJSON("tanker", 6000, rcsFor(70, 6000), 0), movingJSON("skiff", 6000, rcsFor(15, 6000), rate))
	if fe == "" {
		return doc
	}
	return withFrontEnd(doc, fe)
}

// TestPhaseNoiseSkirtMasks: a phase-noise floor that integrates to about
// −50 dBc over the skiff's Doppler cell (L(f)·4sin²(πfT) over the cell, T
// the round trip: the range-correlation law of Budge & Burt, "Range
// correlation effects on phase and amplitude noise", Proc. IEEE
// Southeastcon 1993, formula from memory) masks a target 55 dB below its
// strong neighbour, which the ideal receiver detects; the reason names the
// skirt.
func TestPhaseNoiseSkirtMasks(t *testing.T) {
	const fe = `{"phase_noise_offsets_hz":[100,3000,30000],"phase_noise_dbc_hz":[-70.5,-70.5,-130]}`
	s := mustDecode(t, pnScene(fe))
	p := s.FrontEnd.profile()
	bin := 1e4 / 32
	floor := dsp.DB(p.EchoBand(8*bin-bin/2, 8*bin+bin/2, 2*6000/C))
	if math.Abs(floor+50) > 0.5 {
		t.Fatalf("test set-up: the profile's power over the skiff's cell is %.2f dBc, want about −50", floor)
	}
	ideal := mustEvaluate(t, mustDecode(t, pnScene("")))
	if st := target(ideal, "skiff").Status; st != StatusDetected {
		t.Fatalf("ideal receiver: skiff %s, want detected (%s)", st, target(ideal, "skiff").Reason)
	}
	res := mustEvaluate(t, s)
	sk := target(res, "skiff")
	if sk.Status != StatusMasked || sk.MaskedBy != "tanker" || !strings.Contains(sk.Reason, "tanker's phase-noise skirt") {
		t.Errorf("with phase noise: skiff %s by %q: %s", sk.Status, sk.MaskedBy, sk.Reason)
	}
	if st := target(res, "tanker").Status; st != StatusDetected {
		t.Errorf("tanker %s", st)
	}
}

// TestPhaseNoiseAnalysisMatchesSimulation: the noise-free analysis's skirt
// (the second-order formula ∫S(f)|χ(t, f)|²df, docs/detection.md §12)
// against the simulated echo, whose samples are multiplied by
// exp(jψ(t)) with ψ drawn from the same spectrum: the mean over seeds of
// the simulated power, noise included, next to a strong target equals
// 1 + the analysis there, within 0.5 dB. Single pulse (range skirt) and
// pulse train (Doppler skirt).
func TestPhaseNoiseAnalysisMatchesSimulation(t *testing.T) {
	if testing.Short() {
		t.Skip("Monte Carlo")
	}
	t.Run("range", func(t *testing.T) {
		doc := withFrontEnd(lfmScene(`{"kind":"none"}`, `{"kind":"fixed","pfa":1e-6}`, pointJSON("big", 6000, rcsFor(90, 6000))),
			`{"phase_noise_offsets_hz":[1000,10000000],"phase_noise_dbc_hz":[-120,-120]}`)
		s := mustDecode(t, doc)
		const seeds = 24
		var sim, clean []float64
		var k0 int
		for seed := range seeds {
			s.Seed = int64(seed + 1)
			res := mustEvaluate(t, s)
			if sim == nil {
				sim = make([]float64, len(res.Series.ProfileDB))
				clean = res.Series.CleanDB
				for k, v := range clean {
					if v > clean[k0] {
						k0 = k
					}
				}
			}
			for k, v := range res.Series.ProfileDB {
				sim[k] += dsp.FromDB(v) / seeds
			}
		}
		// Bands of range gates beside the peak, outside the sinc's
		// near sidelobes and inside the 400-sample pulse.
		for _, band := range [][2]int{{40, 120}, {120, 300}, {-300, -120}} {
			var a, b float64
			for k := k0 + band[0]; k < k0+band[1]; k++ {
				a += sim[k]
				b += 1 + dsp.FromDB(clean[k])
			}
			t.Logf("gates %v: simulated %.2f dB, analysis %.2f dB", band, dsp.DB(a/float64(band[1]-band[0])), dsp.DB(b/float64(band[1]-band[0])))
			if d := dsp.DB(a / b); math.Abs(d) > 0.5 {
				t.Errorf("gates %v from the peak: simulated %.2f dB, analysis %.2f dB", band, dsp.DB(a/float64(band[1]-band[0])), dsp.DB(b/float64(band[1]-band[0])))
			}
		}
	})
	t.Run("doppler", func(t *testing.T) {
		s := mustDecode(t, pnScene(`{"phase_noise_offsets_hz":[100,3000,30000],"phase_noise_dbc_hz":[-70.5,-70.5,-130]}`))
		s.Targets = s.Targets[:1] // the tanker alone
		const seeds = 48
		var sim [][]float64
		var clean [][]float32
		var k0 int
		for seed := range seeds {
			s.Seed = int64(seed + 1)
			res := mustEvaluate(t, s)
			rd := res.Series.RangeDoppler
			if sim == nil {
				clean = rd.CleanDB
				sim = make([][]float64, len(rd.DB))
				for d := range sim {
					sim[d] = make([]float64, len(rd.DB[d]))
				}
				for k, v := range res.Series.CleanDB {
					if v > res.Series.CleanDB[k0] {
						k0 = k
					}
				}
			}
			for d := range rd.DB {
				for k, v := range rd.DB[d] {
					sim[d][k] += dsp.FromDB(float64(v)) / seeds
				}
			}
		}
		// Bins 5 to 12 from zero Doppler over the tanker's range gate.
		// A real phase error puts equal power at ±f in each record, so
		// only one side is independent: 48 records × 8 bins leave the
		// mean within about ±0.2 dB (one standard deviation).
		nb := len(sim)
		var a, b float64
		for off := 5; off <= 12; off++ {
			d := nb/2 + off
			a += sim[d][k0]
			b += 1 + dsp.FromDB(float64(clean[d][k0]))
		}
		t.Logf("bins 5…12: simulated %.2f dB, analysis %.2f dB", dsp.DB(a/8), dsp.DB(b/8))
		if e := dsp.DB(a / b); math.Abs(e) > 0.6 {
			t.Errorf("bins 5…12: simulated %.2f dB, analysis %.2f dB", dsp.DB(a/8), dsp.DB(b/8))
		}
	})
}

// TestSTCAttenuation: an R⁻⁴ STC from 1 to 10 km attenuates by
// 40·log10(10/1) = 40 dB at 1 km (arithmetic). Over a 10 µs echo the
// gain rises with the range of each sample, so the matched filter's peak
// falls by −20·log10 of the amplitude gain averaged over the echo,
// mean((R + c·t/2)²)/stop² for t in [0, τ). snr_db and the compressed
// peak fall by that much and the reason says so.
func TestSTCAttenuation(t *testing.T) {
	loss := func(r float64) float64 {
		var s float64
		const n = 10000
		for i := range n {
			ri := r + C*(float64(i)+0.5)/n*1e-5/2
			s += math.Min(ri*ri/1e8, 1)
		}
		return -20 * math.Log10(s/n)
	}
	for _, c := range []struct{ r, want float64 }{{4000, loss(4000)}, {9000, loss(9000)}} {
		doc := lfmScene(`{"kind":"none"}`, `{"kind":"fixed","pfa":1e-6}`, pointJSON("a", c.r, rcsFor(60, c.r)))
		base := mustEvaluate(t, mustDecode(t, doc))
		res := mustEvaluate(t, mustDecode(t, withFrontEnd(doc, `{"stc_start_m":1000,"stc_stop_m":10000}`)))
		a0, a := target(base, "a"), target(res, "a")
		t.Logf("R = %g m: STC loss %.3f dB, snr_db falls %.3f dB", c.r, c.want, a0.SNRDB-a.SNRDB)
		if d := a0.SNRDB - a.SNRDB; math.Abs(d-c.want) > 0.05 {
			t.Errorf("R = %g m: snr_db falls %.3f dB, want %.3f", c.r, d, c.want)
		}
		peak := func(r *Result) float64 {
			p := -1e9
			for _, v := range r.Series.CleanDB {
				p = math.Max(p, v)
			}
			return p
		}
		if d := peak(base) - peak(res); math.Abs(d-c.want) > 0.05 {
			t.Errorf("R = %g m: compressed peak falls %.3f dB, want about %.3f", c.r, d, c.want)
		}
		if !strings.Contains(a.Reason, "STC attenuates") {
			t.Errorf("reason does not name the STC: %s", a.Reason)
		}
	}
	if g := dsp.DB(dsp.STCGain(1000, 1000, 10000, 4)); math.Abs(g+40) > 1e-9 {
		t.Errorf("STC at 1 km: %.3f dB, want −40", g)
	}
}

// TestADCQuantisationMasks: an 8-bit converter with full scale 60 dB over
// the thermal noise has a step Δ = 2·10³/2⁸ = 7.8 noise units, far
// coarser than the noise (rms 0.71 per channel): every noise sample lands
// on ±Δ/2, a sign detector, and the quantisation noise seen through the
// quantiser's gain is π/2 − 1 of the thermal noise (+1.96 dB, the
// hard-limiting loss 2/π; exact sum in dsp.ADC.GaussianNoise, checked
// against scipy quad), not the uniform model's Δ²/6, which holds only when
// the noise spans several steps (Kester, Analog Devices MT-001). A CA-CFAR
// rises with it and a target about 1 dB over its threshold is masked, the
// reason naming the quantisation noise. The simulated record's noise floor
// rises by the same amount: mean |x|² of the raw samples 1 + ratio within
// 0.1 dB.
func TestADCQuantisationMasks(t *testing.T) {
	ca := `{"kind":"ca_cfar","pfa":1e-6,"guard_cells":8,"training_cells":32}`
	doc := lfmScene(`{"kind":"none"}`, ca, pointJSON("far", 8000, rcsFor(16.0, 8000)))
	if f := target(mustEvaluate(t, mustDecode(t, doc)), "far"); f.Status != StatusDetected || *f.MarginDB > 1.9 {
		t.Fatalf("without the ADC: %s, margin %.2f dB (want detected under 1.9 dB)", f.Status, *f.MarginDB)
	}
	res := mustEvaluate(t, mustDecode(t, withFrontEnd(doc, `{"adc_bits":8,"adc_full_scale_db":60}`)))
	f := target(res, "far")
	if f.Status != StatusMasked || !strings.Contains(f.Reason, "quantisation noise") {
		t.Errorf("with the ADC: %s: %s", f.Status, f.Reason)
	}
	_, q := dsp.ADC{Bits: 8, FullScale: 1e3}.GaussianNoise(math.Sqrt(0.5))
	if math.Abs(q-(math.Pi/2-1)) > 1e-6 {
		t.Fatalf("ratio %.6f, want π/2 − 1", q)
	}
	var p float64
	for _, v := range res.Series.Echo {
		p += real(v)*real(v) + imag(v)*imag(v)
	}
	p /= float64(len(res.Series.Echo))
	t.Logf("raw power %.3f dB, 1 + ratio %.3f dB", dsp.DB(p), dsp.DB(1+q))
	if e := dsp.DB(p) - dsp.DB(1+q); math.Abs(e) > 0.1 {
		t.Errorf("simulated raw power %.2f dB, 1 + ratio = %.2f dB", dsp.DB(p), dsp.DB(1+q))
	}
}

// TestADCClipping: an echo 6 dB over full scale is clipped in the
// analysis before compression: its compressed peak falls by what
// clipping the same samples and compressing them costs (computed here
// with dsp's ADC and correlator on the sampled chirp, checked against
// numpy in dsp's TestADCClipSidelobes), and its reason says it is clipped.
func TestADCClipping(t *testing.T) {
	step := C / (2 * 4e7)
	r := 3000 + 800*step // on a sample: no fractional delay
	doc := lfmScene(`{"kind":"none"}`, `{"kind":"fixed","pfa":1e-6}`, pointJSON("big", r, rcsFor(90, r)))
	base := mustEvaluate(t, mustDecode(t, doc))
	res := mustEvaluate(t, mustDecode(t, withFrontEnd(doc, `{"adc_bits":16,"adc_full_scale_db":58}`)))
	peak := func(r *Result) float64 {
		p := -1e9
		for _, v := range r.Series.CleanDB {
			p = math.Max(p, v)
		}
		return p
	}
	// The same echo here: per-sample power 90 dB − 10·log10(400 samples).
	ref := dsp.Sample(nil, dsp.LFM{Width: 1e-5, Band: 1e7}, 4e7, 0)
	a := math.Sqrt(dsp.FromDB(90) / float64(len(ref)))
	x := make([]complex128, 3*len(ref))
	for i, v := range ref {
		x[len(ref)+i] = v * complex(a, 0)
	}
	pk := func(y []complex128) float64 {
		m := 0.0
		for _, v := range y {
			m = math.Max(m, real(v)*real(v)+imag(v)*imag(v))
		}
		return m
	}
	lin := pk(dsp.NewCorrelator(ref, len(x)).Apply(nil, x))
	cl, _ := dsp.ADC{Bits: 16, FullScale: math.Sqrt(dsp.FromDB(58))}.Clip(nil, x)
	want := dsp.DB(lin / pk(dsp.NewCorrelator(ref, len(x)).Apply(nil, cl)))
	got := peak(base) - peak(res)
	t.Logf("clipping 6 dB over full scale costs %.3f dB of compressed peak (direct %.3f dB)", got, want)
	if math.Abs(got-want) > 0.05 {
		t.Errorf("compressed peak falls %.3f dB, clipping the samples directly gives %.3f dB", got, want)
	}
	if b := target(res, "big"); !strings.Contains(b.Reason, "clipped by the ADC") {
		t.Errorf("reason: %s", b.Reason)
	}
}

// TestIQImageMasks: with 0.1 dB and 1° of quadrature error (image
// rejection 39.6 dB by (1 + 2g·cos φ + g²)/(1 − 2g·cos φ + g²), the
// standard formula; checked against numpy in dsp's TestIQImageRejection)
// a Barker-13 train's strong echo at +8 Doppler bins puts its image on
// a target 45 dB weaker at −8 bins, which it masks; the ideal receiver
// detects it. (A real code's conjugate is itself, so its image
// compresses.)
func TestIQImageMasks(t *testing.T) {
	lambda := C / 9.5e9
	rate := -lambda / 2 * 8 / (32 * 1e-4)
	doc := trainScene(`{"kind":"blackman_harris"}`, "none", movingJSON("tanker", 6000, rcsFor(70, 6000), rate), movingJSON("skiff", 6000, rcsFor(25, 6000), -rate))
	doc = strings.Replace(doc, `"waveform":{"kind":"lfm","pulse_width_s":1e-5,"bandwidth_hz":1e7}`, `"waveform":{"kind":"barker","length":13,"chip_s":1e-7}`, 1)
	if st := target(mustEvaluate(t, mustDecode(t, doc)), "skiff").Status; st != StatusDetected {
		t.Fatalf("ideal receiver: skiff %s", st)
	}
	res := mustEvaluate(t, mustDecode(t, withFrontEnd(doc, `{"iq_gain_db":0.1,"iq_phase_deg":1}`)))
	sk := target(res, "skiff")
	if sk.Status != StatusMasked || sk.MaskedBy != "tanker" || !strings.Contains(sk.Reason, "tanker's I/Q image") || !strings.Contains(sk.Reason, "39.6 dB") {
		t.Errorf("skiff %s by %q: %s", sk.Status, sk.MaskedBy, sk.Reason)
	}
}

// TestFrontEndErrors: bad front_end values are rejected with the field,
// the value and the valid range.
func TestFrontEndErrors(t *testing.T) {
	base := lfmScene(`{"kind":"none"}`, "", pointJSON("a", 6000, 0))
	for _, c := range []struct{ fe, path, words string }{
		{`{"adc_bits":30,"adc_full_scale_db":40}`, "front_end.adc_bits", "30 is outside the valid range 1 … 24"},
		{`{"adc_bits":12}`, "front_end.adc_full_scale_db", "required with adc_bits"},
		{`{"adc_full_scale_db":40}`, "front_end.adc_full_scale_db", "given without adc_bits"},
		{`{"iq_phase_deg":60}`, "front_end.iq_phase_deg", "60 is above the maximum 45"},
		{`{"phase_noise_offsets_hz":[1000,100],"phase_noise_dbc_hz":[-80,-90]}`, "front_end.phase_noise_offsets_hz[1]", "not above the offset before it"},
		{`{"phase_noise_offsets_hz":[1000],"phase_noise_dbc_hz":[-80,-90]}`, "front_end.phase_noise_dbc_hz", "2 levels for 1 offsets"},
		{`{"phase_noise_offsets_hz":[1000],"phase_noise_dbc_hz":[-60]}`, "front_end.phase_noise_dbc_hz", "at most 0.1 rad²"},
		{`{"stc_start_m":5000,"stc_stop_m":1000}`, "front_end.stc_stop_m", "must be above 5000"},
		{`{"stc_exponent":4}`, "front_end.stc_exponent", "given without"},
		{`{"stc_start_m":1000,"stc_stop_m":9000,"stc_exponent":12}`, "front_end.stc_exponent", "12 is above the maximum 8"},
		{`{"bits":12}`, "front_end.bits", "unknown field"},
	} {
		_, err := Decode([]byte(withFrontEnd(base, c.fe)))
		wantFieldError(t, c.fe, err, c.path, c.words)
	}
}

// TestFrontEndCanonicalRoundTrip: a scenario with every impairment
// survives Canonical and Decode unchanged, and the defaults stay out.
func TestFrontEndCanonicalRoundTrip(t *testing.T) {
	doc := withFrontEnd(lfmScene(`{"kind":"none"}`, "", pointJSON("a", 6000, 0)),
		`{"phase_noise_offsets_hz":[1000,100000],"phase_noise_dbc_hz":[-90,-130],"adc_bits":12,"adc_full_scale_db":50,"iq_gain_db":0.1,"iq_phase_deg":1,"dc_offset_db":-3,"stc_start_m":1000,"stc_stop_m":9000}`)
	s := mustDecode(t, doc)
	b, err := Canonical(s)
	if err != nil {
		t.Fatal(err)
	}
	if strings.Contains(string(b), "stc_exponent") {
		t.Errorf("the default exponent is written: %s", b)
	}
	s2 := mustDecode(t, string(b))
	b2, _ := Canonical(s2)
	if string(b) != string(b2) || !reflect.DeepEqual(s.FrontEnd, s2.FrontEnd) {
		t.Errorf("round trip:\n%s\n%s", b, b2)
	}
	// Without front_end nothing is written.
	b, _ = Canonical(mustDecode(t, lfmScene(`{"kind":"none"}`, "", pointJSON("a", 6000, 0))))
	if strings.Contains(string(b), "front_end") {
		t.Errorf("an ideal receiver writes front_end: %s", b)
	}
}

// TestRadarHorizon: on the 4/3 Earth the radar horizon of a 10 m antenna
// and a 5 m target is 4.12·(√10 + √5) = 22.24 km (the rule of thumb
// d = 4.12·√h km, h in m; common practice, e.g. Skolnik, Introduction to
// Radar Systems, from memory); the exact sum of √(2·a_e·h + h²) with
// a_e = 4/3 · 6371 km agrees within 0.1 %. A target just beyond it is
// below_horizon with no echo, just inside it is detected; without
// radar.antenna_height_m there is no horizon.
func TestRadarHorizon(t *testing.T) {
	d := dsp.RadarHorizon(10, 5, dsp.EffectiveEarthRadius)
	if want := 4.12 * (math.Sqrt(10) + math.Sqrt(5)) * 1e3; math.Abs(d/want-1) > 1e-3 {
		t.Errorf("horizon %.1f m, rule of thumb %.1f m", d, want)
	}
	if math.Abs(d-22.2e3) > 100 { // the issue rounds to 22.2 km
		t.Errorf("horizon %.1f m, want 22.2 km", d)
	}
	scene := func(radar string, r float64) *Result {
		doc := `{"version":2,"radar":{` + radar + `"peak_power_w":1e5,"sample_rate_hz":2e6,"pri_s":3e-4,"window_start_m":15000,"window_stop_m":30000},
			"waveform":{"kind":"lfm","pulse_width_s":1e-5,"bandwidth_hz":1e6},
			"targets":[{"id":"boat","kind":"point","range_m":` + fmtFloat(r) + `,"rcs_dbsm":20,"height_m":5}]}`
		return mustEvaluate(t, mustDecode(t, doc))
	}
	near := target(scene(`"antenna_height_m":10,`, d-200), "boat")
	if near.Status != StatusDetected {
		t.Errorf("200 m inside the horizon: %s (%s)", near.Status, near.Reason)
	}
	far := scene(`"antenna_height_m":10,`, d+200)
	b := target(far, "boat")
	if b.Status != StatusBelowHorizon || !strings.Contains(b.Reason, "22.2") {
		t.Errorf("200 m beyond the horizon: %s (%s)", b.Status, b.Reason)
	}
	peak := -1e9
	for _, v := range far.Series.CleanDB {
		peak = math.Max(peak, v)
	}
	if peak > dbFloor {
		t.Errorf("a target below the horizon leaves %.1f dB in the noise-free profile", peak)
	}
	if st := target(scene("", d+200), "boat").Status; st != StatusDetected {
		t.Errorf("without an antenna height: %s", st)
	}
}

// TestRainAttenuation: 10 mm/h of rain at 10 GHz (ITU-R P.838-2 Table 1,
// horizontal: k = 0.01006, α = 1.2747, γ = 0.1894 dB/km) over 4 km of a
// target's 8 km path costs 2·0.1894·4 = 1.515 dB two-way: snr_db and the
// compressed peak fall by it and the reason names the rain; outside the
// table's 1 … 50 GHz the rain is refused with the range.
func TestRainAttenuation(t *testing.T) {
	doc := strings.Replace(lfmScene(`{"kind":"none"}`, `{"kind":"fixed","pfa":1e-6}`, pointJSON("a", 8000, rcsFor(20, 8000))),
		`"radar":{`, `"radar":{"carrier_hz":1e10,`, 1)
	base := mustEvaluate(t, mustDecode(t, doc))
	rain := strings.Replace(doc, `"targets":[`, `"propagation":{"rain_rate_mm_h":10,"rain_start_m":2000,"rain_stop_m":6000},"targets":[`, 1)
	res := mustEvaluate(t, mustDecode(t, rain))
	want := 2 * 0.01006 * math.Pow(10, 1.2747) * 4
	if math.Abs(want-1.515) > 0.001 {
		t.Fatalf("two-way loss %.4f dB", want)
	}
	a0, a := target(base, "a"), target(res, "a")
	if d := a0.SNRDB - a.SNRDB; math.Abs(d-want) > 1e-6 {
		t.Errorf("snr_db falls %.4f dB, want %.4f", d, want)
	}
	peak := func(r *Result) float64 {
		p := -1e9
		for _, v := range r.Series.CleanDB {
			p = math.Max(p, v)
		}
		return p
	}
	if d := peak(base) - peak(res); math.Abs(d-want) > 1e-6 {
		t.Errorf("compressed peak falls %.4f dB, want %.4f", d, want)
	}
	if !strings.Contains(a.Reason, "Rain of 10 mm/h attenuates its echo by 1.5 dB") {
		t.Errorf("reason: %s", a.Reason)
	}
	_, err := Decode([]byte(strings.Replace(rain, `"carrier_hz":1e10`, `"carrier_hz":9e10`, 1)))
	if err == nil || !strings.Contains(err.Error(), "propagation.rain_rate_mm_h: the rain coefficients (ITU-R P.838-2 Table 1) cover 1 … 50 GHz; radar.carrier_hz is 90 GHz") {
		t.Errorf("90 GHz: %v", err)
	}
	_, err = Decode([]byte(strings.Replace(doc, `"targets":[`, `"propagation":{"rain_stop_m":5000},"targets":[`, 1)))
	if err == nil || !strings.Contains(err.Error(), "given without rain_rate_mm_h") {
		t.Errorf("stop without rate: %v", err)
	}
}

// TestFlatSeaMultipath: over a flat sea (reflection coefficient −1) the
// one-way factor is F = 2·|sin(2π·h1·h2/(λ·R))| (the flat-earth two-ray
// model, from memory): at the first lobe peak R = 4·h1·h2/λ the echo
// gains F⁴ = 16 (+12.04 dB), at the null R = 2·h1·h2/λ it vanishes.
func TestFlatSeaMultipath(t *testing.T) {
	lambda := C / 9.5e9
	h1, h2 := 10.0, 5.0
	peakR, nullR := 4*h1*h2/lambda, 2*h1*h2/lambda
	if f := dsp.FlatSeaFactor(h1, h2, peakR, lambda); math.Abs(f-2) > 1e-12 {
		t.Fatalf("F at the lobe peak %.6f", f)
	}
	scene := func(prop string, r float64) TargetReport {
		doc := `{"version":2,"radar":{"antenna_height_m":10,"peak_power_w":1e4,"sample_rate_hz":2e6,"pri_s":1e-4,"window_start_m":2000,"window_stop_m":14000},
			"waveform":{"kind":"lfm","pulse_width_s":1e-5,"bandwidth_hz":1e6},` + prop + `
			"targets":[{"id":"mast","kind":"point","range_m":` + fmtFloat(r) + `,"rcs_dbsm":10,"height_m":5}]}`
		return target(mustEvaluate(t, mustDecode(t, doc)), "mast")
	}
	free, sea := scene("", peakR), scene(`"propagation":{"multipath":"flat_sea"},`, peakR)
	if d := sea.SNRDB - free.SNRDB; math.Abs(d-40*math.Log10(2)) > 1e-6 {
		t.Errorf("lobe peak: snr_db gains %.4f dB, want 12.04", d)
	}
	if !strings.Contains(sea.Reason, "gains 12.0 dB") {
		t.Errorf("reason: %s", sea.Reason)
	}
	null := scene(`"propagation":{"multipath":"flat_sea"},`, nullR)
	if null.Status == StatusDetected || !strings.Contains(null.Reason, "cancels its echo") {
		t.Errorf("null: %s: %s", null.Status, null.Reason)
	}
	_, err := Decode([]byte(`{"version":2,"waveform":{"kind":"rect","pulse_width_s":1e-6},"propagation":{"multipath":"flat_sea"}}`))
	if err == nil || !strings.Contains(err.Error(), "propagation.multipath: flat_sea needs radar.antenna_height_m") {
		t.Errorf("without antenna height: %v", err)
	}
}

// BenchmarkEvaluateFrontEnd: the 32-pulse two-target scene with and
// without a phase-noise profile and an ADC (the skirts' cost).
func BenchmarkEvaluateFrontEnd(b *testing.B) {
	for _, c := range []struct{ name, fe string }{
		{"ideal", ""},
		{"phase-noise+adc", `{"phase_noise_offsets_hz":[100,3000,30000],"phase_noise_dbc_hz":[-70.5,-70.5,-130],"adc_bits":12,"adc_full_scale_db":50}`},
	} {
		b.Run(c.name, func(b *testing.B) {
			s := mustDecode(b, pnScene(c.fe))
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Evaluate(context.Background(), s); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
