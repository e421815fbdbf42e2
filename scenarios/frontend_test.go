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
