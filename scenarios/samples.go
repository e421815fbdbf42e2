package scenarios

import (
	"encoding/json"
	"fmt"

	"github.com/pulsewright/pulsewright/dsp"
)

// Imported waveforms and filters (an extension of the format).
//
// A waveform of kind "samples" is a pulse given by its complex samples:
// a measured pulse, or one designed elsewhere. A receiver filter
// "custom" is a compression filter given by its taps. Both are written
// inline in the scenario, so that a scenario file and its share link stay
// self-contained; `pulsewright import` reads a SigMF recording or a CSV
// file and writes them in. Samples are given either as "i" and "q"
// arrays or as "amplitude" and "phase_deg" arrays of equal length.

// MaxImportSamples bounds the samples of an imported waveform and the
// taps of a custom filter.
const MaxImportSamples = 65536

// How a "samples" waveform is read between its samples.
const (
	InterpBandLimited = "band_limited" // Kaiser-windowed sinc (dsp.NewSampled)
	InterpHold        = "hold"         // each sample held for 1/rate (dsp.NewHeldSamples)
)

var interpolations = []string{InterpBandLimited, InterpHold}

// iqFields are the fields of a sample sequence, in format order.
var iqFields = []string{"i", "q", "amplitude", "phase_deg"}

// tapsFields are the fields of receiver.taps.
var tapsFields = iqFields

// decodeSamples reads the fields of a "samples" waveform.
func (o *object) decodeSamples(w *Waveform) {
	o.require("sample_rate_hz", "the rate of the samples in Hz")
	o.float("sample_rate_hz", &w.SampleRateHz)
	o.require("bandwidth_hz", "the pulse's nominal bandwidth in Hz")
	o.float("bandwidth_hz", &w.BandwidthHz)
	w.Interpolation = InterpBandLimited
	if o.str("interpolation", &w.Interpolation) {
		o.oneOf("interpolation", w.Interpolation, interpolations)
	}
	o.iq(&w.Samples)
}

// decodeTaps reads receiver.taps.
func (o *object) decodeTaps(dst **IQ) {
	var v IQ
	o.iq(&v)
	o.finish(tapsFields...)
	*dst = &v
}

// iq reads a sample sequence: i and q, or amplitude and phase_deg.
func (o *object) iq(v *IQ) {
	hasIQ := o.has("i") || o.has("q")
	hasAP := o.has("amplitude") || o.has("phase_deg")
	switch {
	case hasIQ && hasAP:
		o.errs.add(o.sub("amplitude"), "give either i and q or amplitude and phase_deg, not both")
		for _, f := range iqFields {
			o.get(f)
		}
		return
	case hasAP:
		if !o.require("amplitude", "the amplitude of each sample") || !o.require("phase_deg", "the phase of each sample in degrees") {
			o.get("amplitude")
			o.get("phase_deg")
			return
		}
		a, aok := o.numbers("amplitude", MaxImportSamples)
		p, pok := o.numbers("phase_deg", MaxImportSamples)
		if aok && pok && o.sameLength("phase_deg", len(p), "amplitude", len(a)) {
			v.Amplitude, v.PhaseDeg = a, p
		}
	default:
		if !o.require("i", "the in-phase part of each sample (with q), or amplitude and phase_deg") || !o.require("q", "the quadrature part of each sample") {
			o.get("i")
			o.get("q")
			return
		}
		i, iok := o.numbers("i", MaxImportSamples)
		q, qok := o.numbers("q", MaxImportSamples)
		if iok && qok && o.sameLength("q", len(q), "i", len(i)) {
			v.I, v.Q = i, q
		}
	}
}

func (o *object) sameLength(name string, n int, other string, m int) bool {
	if n != m {
		o.errs.add(o.sub(name), "%d values, but %s has %d: one per sample in each", n, other, m)
		return false
	}
	return true
}

// numbers reads an array of numbers of 1 … limit elements, counting them
// before it allocates.
func (o *object) numbers(name string, limit int) ([]float64, bool) {
	path := o.sub(name)
	raw := o.get(name)
	if raw == nil {
		return nil, false
	}
	if raw[0] != '[' {
		o.errs.add(path, "%s is not an array of numbers", describe(raw))
		return nil, false
	}
	n := countElements(raw)
	if n == 0 || n > limit {
		o.errs.add(path, "%d values; valid: 1 … %d", n, limit)
		return nil, false
	}
	out := make([]float64, 0, n)
	if err := json.Unmarshal(raw, &out); err != nil {
		for i, v := range rawElements(raw) {
			var f float64
			if json.Unmarshal(v, &f) != nil {
				o.errs.add(fmt.Sprintf("%s[%d]", path, i), "%s is not a number", describe(v))
				o.errs.mark(path)
				return nil, false
			}
		}
		o.errs.add(path, "not an array of numbers")
		return nil, false
	}
	return out, true
}

// validateSamples checks a "samples" waveform and returns whether its
// pulse width and bandwidth can be relied on.
func (s *Scenario) validateSamples(c checker) bool {
	w := s.Waveform
	ok := c.between("waveform.sample_rate_hz", w.SampleRateHz, 1e3, 20e9)
	if c.errs.has("waveform.sample_rate_hz") || c.errs.has("waveform.bandwidth_hz") {
		ok = false
	} else if c.above("waveform.bandwidth_hz", w.BandwidthHz, 0, w.SampleRateHz) {
		// The bound names the recording's rate: samples at fs hold at most fs of band.
	} else {
		ok = false
	}
	if !validateIQ(c, "waveform", w.Samples) {
		return false
	}
	if ok && w.PulseWidth() > 0.1 {
		c.errs.add("waveform.sample_rate_hz", "%d samples at %g Hz last %g s; the limit is 0.1 s", w.Samples.Len(), w.SampleRateHz, w.PulseWidth())
		ok = false
	}
	return ok
}

// validateIQ checks the values of a sample sequence at path (its arrays
// are path.i, path.q or path.amplitude, path.phase_deg).
func validateIQ(c checker, path string, v IQ) bool {
	if v.Len() == 0 {
		if !c.errs.has(path+".i") && !c.errs.has(path+".q") && !c.errs.has(path+".amplitude") && !c.errs.has(path+".phase_deg") {
			c.errs.add(path+".i", "required: i and q, or amplitude and phase_deg")
		}
		return false
	}
	check := func(name string, vals []float64, lo, hi float64) bool {
		for k, x := range vals {
			if !c.between(fmt.Sprintf("%s.%s[%d]", path, name, k), x, lo, hi) {
				return false
			}
		}
		return true
	}
	var ok bool
	if v.Amplitude != nil {
		ok = check("amplitude", v.Amplitude, 0, 1e6)
		ok = check("phase_deg", v.PhaseDeg, -1e6, 1e6) && ok
	} else {
		ok = check("i", v.I, -1e6, 1e6)
		ok = check("q", v.Q, -1e6, 1e6) && ok
	}
	if !ok {
		return false
	}
	e := 0.0
	for _, x := range v.Complex() {
		e += real(x)*real(x) + imag(x)*imag(x)
	}
	if !(e > 0) {
		name := "i"
		if v.Amplitude != nil {
			name = "amplitude"
		}
		c.errs.add(path+"."+name, "every sample is 0: the sequence has no energy")
		return false
	}
	return true
}

// validateTaps checks receiver.filter "custom" and receiver.taps.
func (s *Scenario) validateTaps(c checker) {
	r := s.Receiver
	switch {
	case r.Filter == FilterCustom && r.Taps == nil:
		if !c.errs.has("receiver.taps") {
			c.errs.add("receiver.taps", "required with filter \"custom\": the filter's taps as i and q, or amplitude and phase_deg, at radar.sample_rate_hz")
		}
	case r.Filter != FilterCustom && r.Taps != nil:
		c.errs.add("receiver.taps", "taps apply to filter \"custom\"; filter is %q", r.Filter)
	case r.Taps != nil:
		validateIQ(c, "receiver.taps", *r.Taps)
	}
}

// canonicalIQ appends the fields of a sample sequence.
func canonicalIQ(o ordered, v IQ) ordered {
	if v.Amplitude != nil {
		return append(o, member{"amplitude", v.Amplitude}, member{"phase_deg", v.PhaseDeg})
	}
	return append(o, member{"i", v.I}, member{"q", v.Q})
}

// sampledWaveform builds the dsp pulse of a "samples" waveform.
func sampledWaveform(w Waveform) (dsp.Waveform, error) {
	if w.Interpolation == InterpHold {
		return dsp.NewHeldSamples(w.Samples.Complex(), w.SampleRateHz, w.BandwidthHz)
	}
	return dsp.NewSampled(w.Samples.Complex(), w.SampleRateHz, w.BandwidthHz)
}

// customReference returns the receive reference of a custom filter and
// its lead: the number of reference samples before the echo's leading
// edge, chosen so that the filter's response to the pulse peaks at the
// echo's own delay. The taps are correlated as given (y[k] =
// Σ x[k+i]·conj(h[i])); when the response to the pulse would peak m > 0
// samples late, m zero taps are put in front.
func customReference(pulse []complex128, taps IQ) ([]complex128, int) {
	h := taps.Complex()
	// c[m] = Σ_i p[i+m]·conj(h[i]) for m = −(L−1) … Np−1, by the FFT
	// correlator on the pulse with L−1 zeros in front: output k is lag
	// m = k − (L−1).
	x := make([]complex128, len(h)-1+len(pulse))
	copy(x[len(h)-1:], pulse)
	y := dsp.NewCorrelator(h, len(x)).Apply(nil, x)
	best, bestM := -1.0, 0
	for k, v := range y {
		if a := real(v)*real(v) + imag(v)*imag(v); a > best*(1+1e-12) {
			best, bestM = a, k-(len(h)-1)
		}
	}
	if bestM > 0 {
		return append(make([]complex128, bestM), h...), 0
	}
	return h, -bestM
}

// sameTaps reports whether two custom filters' taps are the same.
func sameTaps(a, b *IQ) bool {
	if a == nil || b == nil {
		return a == b
	}
	return a.Equal(*b)
}

// describeSamples describes a "samples" waveform for people.
func describeSamples(w Waveform) string {
	how := ""
	if w.Interpolation == InterpHold {
		how = ", held"
	}
	return fmt.Sprintf("imported pulse, %d samples at %s%s (τ %s), B %s", w.Samples.Len(), SI(w.SampleRateHz, "Hz"), how, SI(w.PulseWidth(), "s"), SI(w.BandwidthHz, "Hz"))
}
