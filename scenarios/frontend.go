package scenarios

import (
	"math"
	"strconv"

	"github.com/pulsewright/pulsewright/dsp"
)

// FrontEnd holds the receiver's and oscillator's impairments (added in
// format version 2, all optional): each is off when its fields are absent,
// so a scenario without front_end keeps its meaning. Docs:
// docs/scenario-format.md, "front_end"; docs/detection.md §12.
type FrontEnd struct {
	// Phase noise of the one oscillator that drives the transmitter and
	// serves as the receiver's local oscillator: single-sideband L(f) in
	// dBc/Hz at offsets in Hz (ascending), linear in log-frequency between
	// points and flat beyond them. Empty: none.
	PhaseNoiseOffsetsHz []float64 `json:"phase_noise_offsets_hz,omitempty"`
	PhaseNoiseDBcHz     []float64 `json:"phase_noise_dbc_hz,omitempty"`
	// ADC on I and Q: bits per channel (0: none) and the power of a
	// full-scale complex tone re the thermal noise power per sample, dB.
	ADCBits        int     `json:"adc_bits,omitempty"`
	ADCFullScaleDB float64 `json:"adc_full_scale_db,omitempty"`
	// Quadrature error: Q's gain re I, dB, and its phase off 90°, degrees.
	IQGainDB   float64 `json:"iq_gain_db,omitempty"`
	IQPhaseDeg float64 `json:"iq_phase_deg,omitempty"`
	// DC offset: power of a constant added to every sample re the thermal
	// noise power per sample, dB; nil: none.
	DCOffsetDB *float64 `json:"dc_offset_db,omitempty"`
	// Sensitivity time control: power gain (R/stop)^exponent from start
	// to stop (m), its start value nearer; 0: none.
	STCStartM   float64 `json:"stc_start_m,omitempty"`
	STCStopM    float64 `json:"stc_stop_m,omitempty"`
	STCExponent float64 `json:"stc_exponent,omitempty"`
}

var frontEndFields = []string{"phase_noise_offsets_hz", "phase_noise_dbc_hz", "adc_bits", "adc_full_scale_db",
	"iq_gain_db", "iq_phase_deg", "dc_offset_db", "stc_start_m", "stc_stop_m", "stc_exponent"}

// Limits of the front-end fields.
const (
	maxPhaseNoisePoints = 32
	// maxEchoPhaseVar is the largest phase variance (rad²) the
	// small-angle skirt model is used for: about −10 dBc.
	maxEchoPhaseVar    = 0.1
	defaultSTCExponent = 4
)

// PhaseNoise reports whether a phase-noise profile is given.
func (f FrontEnd) PhaseNoise() bool { return len(f.PhaseNoiseOffsetsHz) > 0 }

// IQ reports whether a quadrature error is given.
func (f FrontEnd) IQ() bool { return f.IQGainDB != 0 || f.IQPhaseDeg != 0 }

// STC reports whether a sensitivity time control is given.
func (f FrontEnd) STC() bool { return f.STCStopM > 0 }

// Any reports whether any impairment is on.
func (f FrontEnd) Any() bool {
	return f.PhaseNoise() || f.ADCBits > 0 || f.IQ() || f.DCOffsetDB != nil || f.STC()
}

func (f FrontEnd) profile() dsp.PhaseNoise {
	return dsp.PhaseNoise{OffsetHz: f.PhaseNoiseOffsetsHz, DBcHz: f.PhaseNoiseDBcHz}
}

func (o *object) decodeFrontEnd(f *FrontEnd) {
	f.PhaseNoiseOffsetsHz, _ = o.numbers("phase_noise_offsets_hz", maxPhaseNoisePoints)
	f.PhaseNoiseDBcHz, _ = o.numbers("phase_noise_dbc_hz", maxPhaseNoisePoints)
	o.int("adc_bits", &f.ADCBits)
	if o.float("adc_full_scale_db", &f.ADCFullScaleDB) && f.ADCBits == 0 && !o.errs.has(o.sub("adc_bits")) {
		o.errs.add(o.sub("adc_full_scale_db"), "given without adc_bits: set the ADC's bits (1 … 24) too, or leave both out")
	}
	if f.ADCBits != 0 && !o.has("adc_full_scale_db") {
		o.errs.add(o.sub("adc_full_scale_db"), "required with adc_bits: the power of a full-scale complex tone re the thermal noise power per sample, dB (0 … 150)")
	}
	o.float("iq_gain_db", &f.IQGainDB)
	o.float("iq_phase_deg", &f.IQPhaseDeg)
	var dc float64
	if o.float("dc_offset_db", &dc) {
		f.DCOffsetDB = &dc
	}
	o.float("stc_start_m", &f.STCStartM)
	o.float("stc_stop_m", &f.STCStopM)
	if o.float("stc_exponent", &f.STCExponent) && !o.has("stc_stop_m") {
		o.errs.add(o.sub("stc_exponent"), "given without stc_start_m and stc_stop_m")
	}
	if f.STCExponent == 0 && (o.has("stc_start_m") || o.has("stc_stop_m")) {
		f.STCExponent = defaultSTCExponent
	}
	o.finish(frontEndFields...)
}

func (s *Scenario) validateFrontEnd(c checker) {
	f := s.FrontEnd
	const p = "front_end."
	no, nl := len(f.PhaseNoiseOffsetsHz), len(f.PhaseNoiseDBcHz)
	switch {
	case c.errs.has(p+"phase_noise_offsets_hz") || c.errs.has(p+"phase_noise_dbc_hz"):
	case no != nl:
		c.errs.add(p+"phase_noise_dbc_hz", "%d levels for %d offsets: give one level in dBc/Hz per offset", nl, no)
	case no > 0:
		for i, v := range f.PhaseNoiseOffsetsHz {
			path := p + "phase_noise_offsets_hz[" + strconv.Itoa(i) + "]"
			if !c.between(path, v, 1e-3, 1e11) {
				c.errs.mark(p + "phase_noise_offsets_hz")
				break
			}
			if i > 0 && !(v > f.PhaseNoiseOffsetsHz[i-1]) {
				c.errs.add(path, "%g Hz is not above the offset before it (%g Hz): offsets must ascend", v, f.PhaseNoiseOffsetsHz[i-1])
				c.errs.mark(p + "phase_noise_offsets_hz")
				break
			}
		}
		for i, v := range f.PhaseNoiseDBcHz {
			if !c.between(p+"phase_noise_dbc_hz["+strconv.Itoa(i)+"]", v, -250, -20) {
				c.errs.mark(p + "phase_noise_dbc_hz")
				break
			}
		}
		if !c.errs.has(p+"phase_noise_offsets_hz") && !c.errs.has(p+"phase_noise_dbc_hz") && s.Radar.SampleRateHz > 0 {
			// The echo's phase error over the receiver band, at the far
			// offsets where transmitter and local oscillator add (×2).
			if v := 2 * f.profile().Variance(0, s.Radar.SampleRateHz/2); v > maxEchoPhaseVar {
				c.errs.add(p+"phase_noise_dbc_hz", "the profile integrates to %.3g rad² of echo phase error over the receiver band ±%s (%.1f dBc); the skirt model holds for small errors, at most %g rad² (%.0f dBc)",
					v, hz(s.Radar.SampleRateHz/2), dsp.DB(v), maxEchoPhaseVar, dsp.DB(maxEchoPhaseVar))
			}
		}
	}
	if f.ADCBits != 0 || c.errs.has(p+"adc_bits") {
		c.intBetween(p+"adc_bits", f.ADCBits, 1, 24)
		c.between(p+"adc_full_scale_db", f.ADCFullScaleDB, 0, 150)
	}
	c.between(p+"iq_gain_db", f.IQGainDB, -6, 6)
	c.between(p+"iq_phase_deg", f.IQPhaseDeg, -45, 45)
	if f.DCOffsetDB != nil {
		c.between(p+"dc_offset_db", *f.DCOffsetDB, -100, 100)
	}
	if f.STC() || f.STCStartM != 0 {
		if c.between(p+"stc_start_m", f.STCStartM, 1, 1e8) {
			c.above(p+"stc_stop_m", f.STCStopM, f.STCStartM, 1e8)
		}
		c.between(p+"stc_exponent", f.STCExponent, 1, 8)
	}
}

func canonicalFrontEnd(f FrontEnd) ordered {
	var o ordered
	if len(f.PhaseNoiseOffsetsHz) > 0 {
		o = append(o, member{"phase_noise_offsets_hz", f.PhaseNoiseOffsetsHz}, member{"phase_noise_dbc_hz", f.PhaseNoiseDBcHz})
	}
	o.put("adc_bits", f.ADCBits, 0)
	if f.ADCBits != 0 {
		o = append(o, member{"adc_full_scale_db", f.ADCFullScaleDB})
	}
	o.put("iq_gain_db", f.IQGainDB, 0.0)
	o.put("iq_phase_deg", f.IQPhaseDeg, 0.0)
	if f.DCOffsetDB != nil {
		o = append(o, member{"dc_offset_db", *f.DCOffsetDB})
	}
	if f.STC() {
		o = append(o, member{"stc_start_m", f.STCStartM}, member{"stc_stop_m", f.STCStopM})
		o.put("stc_exponent", f.STCExponent, float64(defaultSTCExponent))
	}
	return o
}

// stcGain returns the STC's power gain at range r, m (1 without STC).
func (f FrontEnd) stcGain(r float64) float64 {
	if !f.STC() {
		return 1
	}
	return dsp.STCGain(r, f.STCStartM, f.STCStopM, f.STCExponent)
}

// adc returns the ADC in noise units (thermal noise power 1 per sample).
func (f FrontEnd) adc() dsp.ADC {
	// A full-scale complex tone A·exp(jωt) has power A², each channel
	// reaching ±A.
	return dsp.ADC{Bits: f.ADCBits, FullScale: math.Sqrt(dsp.FromDB(f.ADCFullScaleDB))}
}
