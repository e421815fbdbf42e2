package scenarios

import (
	"math"
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
// (the second-order formula ∫S(f)|χ(t, f)|²df, docs/detection.md §10)
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
