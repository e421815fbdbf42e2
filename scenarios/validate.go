package scenarios

import (
	"fmt"

	"github.com/pulsewright/pulsewright/dsp"
	"math"
	"strings"
	"unicode/utf8"
)

// Validate checks every field of a scenario whose defaults are filled in,
// as Decode leaves it, and reports all problems together as a
// *ValidationError. Use it after changing a decoded scenario in code.
func (s *Scenario) Validate() error {
	var errs errList
	if s.Version != Version {
		errs.add("version", "%d is not supported (supported versions: %d)", s.Version, Version)
		return errs.err()
	}
	s.validate(&errs)
	return errs.err()
}

// rangeCheck reports a value outside [lo, hi] (or outside (lo, hi] when
// openLo), naming the path, the value and the range.
type checker struct{ errs *errList }

func (c checker) between(path string, v, lo, hi float64) bool {
	if c.errs.has(path) {
		return false
	}
	switch {
	case math.IsNaN(v):
		c.errs.add(path, "NaN is not a number; valid range %g … %g", lo, hi)
	case v < lo:
		c.errs.add(path, "%g is below the minimum %g (valid range %g … %g)", v, lo, lo, hi)
	case v > hi:
		c.errs.add(path, "%g is above the maximum %g (valid range %g … %g)", v, hi, lo, hi)
	default:
		return true
	}
	return false
}

func (c checker) above(path string, v, lo, hi float64) bool {
	if c.errs.has(path) {
		return false
	}
	switch {
	case !(v > lo):
		c.errs.add(path, "%g must be above %g (valid range: above %g, at most %g)", v, lo, lo, hi)
	case v > hi:
		c.errs.add(path, "%g is above the maximum %g (valid range: above %g, at most %g)", v, hi, lo, hi)
	default:
		return true
	}
	return false
}

func (c checker) intBetween(path string, v, lo, hi int) bool {
	if c.errs.has(path) {
		return false
	}
	if v < lo || v > hi {
		c.errs.add(path, "%d is outside the valid range %d … %d", v, lo, hi)
		return false
	}
	return true
}

func (s *Scenario) validate(errs *errList) {
	c := checker{errs}
	if n := utf8.RuneCountInString(s.Name); n > MaxNameLen {
		errs.add("name", "%d characters exceed the limit of %d", n, MaxNameLen)
	}
	if n := utf8.RuneCountInString(s.Notes); n > MaxNotesLen {
		errs.add("notes", "%d characters exceed the limit of %d", n, MaxNotesLen)
	}
	c.intBetween("seed", int(s.Seed), 0, MaxSeed)
	if len(s.View) > MaxViewBytes {
		errs.add("view", "%d bytes exceed the limit of %d bytes", len(s.View), MaxViewBytes)
	}
	waveOK := s.validateWaveform(c)
	s.validateRadar(c, waveOK)
	s.validateSchedule(c, waveOK)
	s.validateScan(c)
	s.validateReceiver(c)
	s.validateTaps(c)
	s.validateTargets(c)
	s.validateFrontEnd(c)
	s.validatePropagation(c)
}

func (s *Scenario) validateRadar(c checker, waveOK bool) {
	r := s.Radar
	c.between("radar.carrier_hz", r.CarrierHz, 1e6, 300e9)
	c.above("radar.peak_power_w", r.PeakPowerW, 0, 1e9)
	c.between("radar.antenna_gain_dbi", r.AntennaGainDBi, -10, 70)
	c.between("radar.noise_figure_db", r.NoiseFigureDB, 0, 30)
	c.between("radar.system_loss_db", r.SystemLossDB, 0, 60)
	c.intBetween("radar.pulses", r.Pulses, 1, 1024)
	c.between("radar.beamwidth_az_deg", r.BeamwidthAzDeg, 0.1, 90)
	c.between("radar.beamwidth_el_deg", r.BeamwidthElDeg, 0.1, 90)
	if r.AntennaHeightM != 0 {
		c.above("radar.antenna_height_m", r.AntennaHeightM, 0, MaxAntennaHeightM)
	}
	c.between("radar.window_start_m", r.WindowStartM, 0, 1e8)
	if !c.errs.has("radar.window_start_m") {
		c.above("radar.window_stop_m", r.WindowStopM, r.WindowStartM, 1e8)
	}
	if !waveOK {
		return
	}
	B, tau := s.Waveform.Bandwidth(), s.Waveform.PulseWidth()
	if c.between("radar.sample_rate_hz", r.SampleRateHz, B, 20e9) {
		if n := tau * r.SampleRateHz; n > MaxPulseSamples {
			c.errs.add("radar.sample_rate_hz", "%g Hz gives %.0f samples in the pulse; the limit is %d (lower the rate or shorten the pulse)", r.SampleRateHz, n, MaxPulseSamples)
		}
	}
	if !r.Staggered() { // a stagger's PRIs are checked one by one
		c.above("radar.pri_s", r.PRIS, tau, 1)
	}
	if !c.errs.has("radar.pulses") && !c.errs.has("radar.window_stop_m") {
		c.validateStagger("radar.pri_stagger_s", r.PRIStaggerS, tau, r.Pulses, r.WindowStopM, true)
	}
	if c.errs.has("radar.sample_rate_hz") || c.errs.has("radar.window_stop_m") || c.errs.has("radar.window_start_m") || c.errs.has("radar.pulses") {
		return
	}
	n := s.WindowSamples()
	switch {
	case n > MaxWindowSamples:
		c.errs.add("radar.window_stop_m", "%g m gives a receive window of %d samples; the limit is %d (narrow the window or lower the sample rate)", r.WindowStopM, n, MaxWindowSamples)
	case n*r.Pulses > MaxCPISamples:
		c.errs.add("radar.pulses", "%d pulses × %d window samples exceed the limit of %d samples", r.Pulses, n, MaxCPISamples)
	}
}

// validateWaveform returns whether the waveform is sound enough for the
// checks that depend on its bandwidth and pulse width.
func (s *Scenario) validateWaveform(c checker) bool {
	w := s.Waveform
	errs := c.errs
	if errs.has("waveform") || errs.has("waveform.kind") {
		return false
	}
	ok := true
	switch w.Kind {
	case KindSamples:
		return s.validateSamples(c)
	case KindRect, KindLFM, KindNLFM:
		ok = c.above("waveform.pulse_width_s", w.PulseWidthS, 0, 0.1)
		if w.Kind != KindRect {
			ok = c.between("waveform.bandwidth_hz", w.BandwidthHz, 1e3, 10e9) && ok
			if ok && w.BandwidthHz*w.PulseWidthS < 1 {
				errs.add("waveform.bandwidth_hz", "%g Hz gives a time-bandwidth product of %.3g; it must be at least 1", w.BandwidthHz, w.BandwidthHz*w.PulseWidthS)
				ok = false
			}
		}
		if w.Kind == KindNLFM {
			c.between("waveform.design_sidelobe_db", w.DesignSidelobeDB, -70, -15)
		}
		return ok
	}
	ok = c.above("waveform.chip_s", w.ChipS, 0, 0.01)
	switch w.Kind {
	case KindBarker:
		switch w.Length {
		case 2, 3, 4, 5, 7, 11, 13:
		default:
			if !errs.has("waveform.length") {
				errs.add("waveform.length", "%d is not a Barker length (valid: 2, 3, 4, 5, 7, 11, 13)", w.Length)
			}
			ok = false
		}
	case KindMPS:
		ok = c.intBetween("waveform.length", w.Length, 2, dsp.MPSMaxLen()) && ok
	case KindMLS:
		ok = c.intBetween("waveform.degree", w.Degree, 2, 16) && ok
	case KindFrank, KindP1, KindP2:
		if !c.intBetween("waveform.length", w.Length, 4, MaxChips) {
			return false
		}
		m := int(math.Round(math.Sqrt(float64(w.Length))))
		if m*m != w.Length {
			errs.add("waveform.length", "%d is not a perfect square (%s needs M² chips, e.g. %d or %d)", w.Length, w.Kind, (m-1)*(m-1), m*m)
			return false
		}
		if w.Kind == KindP2 && m%2 != 0 {
			errs.add("waveform.length", "%d = %d²: P2 needs an even root (e.g. %d or %d)", w.Length, m, (m-1)*(m-1), (m+1)*(m+1))
			return false
		}
	case KindP3, KindP4:
		ok = c.intBetween("waveform.length", w.Length, 2, MaxChips) && ok
	case KindZadoffChu:
		if !c.intBetween("waveform.length", w.Length, 2, MaxChips) {
			return false
		}
		if c.intBetween("waveform.root", w.Root, 1, w.Length-1) && gcd(w.Root, w.Length) != 1 {
			errs.add("waveform.root", "%d shares the factor %d with length %d; the root must be coprime to the length", w.Root, gcd(w.Root, w.Length), w.Length)
		}
	case KindCostas:
		if !c.intBetween("waveform.length", w.Length, 2, 1024) {
			return false
		}
		if !isPrime(w.Length + 1) {
			errs.add("waveform.length", "%d is not p−1 for a prime p (Welch construction); nearby valid lengths: %s", w.Length, nearbyWelch(w.Length))
			return false
		}
	case KindPhaseCode:
		if w.Binary != "" {
			if i := strings.IndexFunc(w.Binary, func(r rune) bool { return r != '+' && r != '-' }); i >= 0 {
				errs.add("waveform.binary", "character %d is %q; a binary code is a string of + and -", i+1, w.Binary[i:i+1])
				ok = false
			}
		} else if len(w.PhasesDeg) == 0 && !errs.has("waveform.phases_deg") {
			errs.add("waveform.phases_deg", "empty: give at least one phase")
			ok = false
		}
		for i, p := range w.PhasesDeg {
			if !c.between(fmt.Sprintf("waveform.phases_deg[%d]", i), p, -1e6, 1e6) {
				ok = false
				break
			}
		}
	}
	if ok && w.Chips() > MaxChips {
		errs.add("waveform", "%d chips exceed the limit of %d", w.Chips(), MaxChips)
		ok = false
	}
	if ok && w.PulseWidth() > 0.1 {
		errs.add("waveform.chip_s", "%g s gives a pulse of %g s; the limit is 0.1 s", w.ChipS, w.PulseWidth())
		ok = false
	}
	return ok
}

func (s *Scenario) validateReceiver(c checker) {
	r := s.Receiver
	c.intBetween("receiver.filter_length_factor", r.FilterLengthFactor, 1, 8)
	if taps := map[string]int{MTITwoPulse: 2, MTIThreePulse: 3}[r.MTI]; taps > 0 && !c.errs.has("radar.pulses") && s.Radar.Pulses < taps+1 {
		c.errs.add("receiver.mti", "%s needs at least %d pulses; radar.pulses is %d", r.MTI, taps+1, s.Radar.Pulses)
	}
	s.validateIntegration(c)
	if (r.Filter == FilterLeastSquares || r.Filter == FilterMinimax) && !c.errs.has("receiver.filter") && !c.errs.has("waveform.kind") {
		limit := MaxFilterTaps
		if r.Filter == FilterMinimax {
			limit = dsp.MaxMinimaxTaps
		}
		switch {
		case !s.Waveform.IsPhaseCode():
			c.errs.add("receiver.filter", "%s applies to phase codes; waveform kind %q needs filter \"matched\"", r.Filter, s.Waveform.Kind)
		case !c.errs.has("receiver.filter_length_factor"):
			// One tap per chip (docs/figures.md §2).
			nc := s.Waveform.Chips()
			taps := r.FilterLengthFactor * nc
			if taps > limit {
				c.errs.add("receiver.filter_length_factor", "%d × %d chips = %d taps exceed the %s limit of %d taps (shorten the code or lower the factor)", r.FilterLengthFactor, nc, taps, r.Filter, limit)
			}
		}
	}
	// A window zero at both ends leaves a two-sample reference no energy.
	if k := r.Window.Kind; (k == WindowHann || k == WindowBlackman) && r.Filter == FilterMatched && !c.errs.has("radar.sample_rate_hz") && s.Waveform.PulseWidth() > 0 {
		if ns := dsp.SampleLen(s.Waveform.PulseWidth(), s.Radar.SampleRateHz); ns == 2 {
			c.errs.add("receiver.window", "%s is zero at both ends of a pulse of %d samples, leaving the reference no energy; use at least 3 samples per pulse (raise radar.sample_rate_hz) or another window", k, ns)
		}
	}
	validateWindow(c, "receiver.window", r.Window)
	validateWindow(c, "receiver.doppler_window", r.DopplerWindow)
	d := r.Detector
	p := "receiver.detector."
	if c.errs.has("receiver.detector") || c.errs.has(p+"kind") {
		return
	}
	okPfa := c.between(p+"pfa", d.PFA, 1e-15, 0.1)
	if c.between(p+"pd_required", d.PdRequired, 0.01, 0.9999) && okPfa && d.PdRequired <= d.PFA {
		c.errs.add(p+"pd_required", "%g is not above pfa (%g): a required Pd must exceed the false-alarm probability; valid range max(pfa, 0.01) … 0.9999", d.PdRequired, d.PFA)
	}
	if d.Kind == DetectorFixed {
		return
	}
	c.intBetween(p+"guard_cells", d.GuardCells, 0, 64)
	if c.intBetween(p+"training_cells", d.TrainingCells, 2, 512) && d.TrainingCells%2 != 0 {
		c.errs.add(p+"training_cells", "%d is odd; training cells count both sides together, so it must be even", d.TrainingCells)
	}
	if d.Kind == DetectorOS && !c.errs.has(p+"training_cells") {
		c.intBetween(p+"rank", d.Rank, 1, d.TrainingCells)
	}
	if d.Kind == DetectorCens && !c.errs.has(p+"training_cells") {
		c.intBetween(p+"censored_cells", d.CensoredCells, 1, d.TrainingCells-1)
	}
	c.intBetween(p+"doppler_guard_cells", d.DopplerGuardCells, 0, 16)
	if c.intBetween(p+"doppler_training_cells", d.DopplerTrainingCells, 0, 64) && d.DopplerTrainingCells%2 != 0 {
		c.errs.add(p+"doppler_training_cells", "%d is odd; training bins count both sides together, so it must be even", d.DopplerTrainingCells)
	}
}

func validateWindow(c checker, path string, w Window) {
	switch w.Kind {
	case WindowTaylor:
		c.between(path+".sidelobe_db", w.SidelobeDB, -100, -15)
		c.intBetween(path+".nbar", w.NBar, 2, 20)
	case WindowChebyshev:
		c.between(path+".sidelobe_db", w.SidelobeDB, -150, -15)
	case WindowKaiser:
		c.between(path+".beta", w.Beta, 0, 40)
	case WindowGaussian:
		c.between(path+".sigma", w.Sigma, 0.05, 2)
	}
}

// idChar reports whether r may appear in a target id.
func idChar(r rune) bool {
	return r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || r == '-' || r == '_' || r == '.'
}

func (s *Scenario) validateTargets(c checker) {
	seen := make(map[string]int, len(s.Targets))
	for i, t := range s.Targets {
		p := fmt.Sprintf("targets[%d].", i)
		if !c.errs.has(p + "id") {
			switch {
			case t.ID == "" || len(t.ID) > MaxIDLen:
				c.errs.add(p+"id", "%s must have 1 to %d characters", clipQ(t.ID), MaxIDLen)
			case strings.IndexFunc(t.ID, func(r rune) bool { return !idChar(r) }) >= 0:
				c.errs.add(p+"id", "%q may hold only letters, digits, '-', '_' and '.'", t.ID)
			default:
				if j, dup := seen[t.ID]; dup {
					c.errs.add(p+"id", "%q is already the id of targets[%d]; ids must be unique", t.ID, j)
				}
				seen[t.ID] = i
			}
		}
		if c.errs.has(p + "kind") {
			continue
		}
		c.between(p+"range_rate_mps", t.RangeRateMPS, -1e4, 1e4)
		switch t.Kind {
		case TargetPoint:
			c.between(p+"range_m", t.RangeM, 0, 1e8)
			c.between(p+"rcs_dbsm", t.RCSDBsm, -100, 100)
			c.between(p+"height_m", t.HeightM, 0, maxHeightM)
		default:
			c.between(p+"range_start_m", t.RangeStartM, 0, 1e8)
			if !c.errs.has(p + "range_start_m") {
				c.above(p+"range_stop_m", t.RangeStopM, t.RangeStartM, 1e8)
			}
			c.between(p+"velocity_spread_mps", t.VelocitySpreadMPS, 0, 1000)
			s.validateDistributed(c, p, t)
		}
	}
}

func gcd(a, b int) int {
	for b != 0 {
		a, b = b, a%b
	}
	if a < 0 {
		return -a
	}
	return a
}

func isPrime(n int) bool {
	if n < 2 {
		return false
	}
	for d := 2; d*d <= n; d++ {
		if n%d == 0 {
			return false
		}
	}
	return true
}

func nearbyWelch(n int) string {
	lo, hi := n-1, n+1
	for lo >= 2 && !isPrime(lo+1) {
		lo--
	}
	for !isPrime(hi + 1) {
		hi++
	}
	if lo < 2 {
		return fmt.Sprint(hi)
	}
	return fmt.Sprintf("%d or %d", lo, hi)
}

// validateIntegration checks receiver.integration noncoherent against the
// rest of the scenario (docs/detection.md §17): it needs a train of at
// least 2 pulses, a detector whose Pd after the integration dsp computes
// exactly (fixed or ca_cfar), and a uniform, single-CPI, staring,
// uncancelled train; the other combinations are refused, each naming the
// field that conflicts.
func (s *Scenario) validateIntegration(c checker) {
	r := s.Receiver
	if r.Integration != IntegrationNonCoherent || c.errs.has("receiver.integration") {
		return
	}
	const f = "receiver.integration"
	if !c.errs.has("radar.pulses") && s.Radar.Pulses < 2 {
		c.errs.add(f, "noncoherent sums the detected samples of several pulses; radar.pulses is %d, want 2 … %d (or integration \"coherent\" for one pulse)", s.Radar.Pulses, dsp.MaxPulses)
	}
	if !c.errs.has("radar.pulses") && s.Radar.Pulses > dsp.MaxPulses {
		c.errs.add(f, "noncoherent over radar.pulses %d pulses: want 2 … %d", s.Radar.Pulses, dsp.MaxPulses)
	}
	switch k := r.Detector.Kind; k {
	case DetectorFixed, DetectorCA:
	case DetectorOS, DetectorGO, DetectorSO, DetectorCens:
		c.errs.add(f, "noncoherent with receiver.detector.kind %q is not modelled (no exact Pd for %s after integrating several pulses); want kind \"fixed\" or \"ca_cfar\", or integration \"coherent\"", k, k)
	}
	if r.MTI != MTINone {
		c.errs.add(f, "noncoherent with receiver.mti %q is not modelled (a canceller works on the pulses' phases before a Doppler filter); want mti \"none\" or integration \"coherent\"", r.MTI)
	}
	if s.Radar.Staggered() {
		c.errs.add(f, "noncoherent with radar.pri_stagger_s is not modelled (each PRI eclipses and folds differently); want a uniform train (radar.pri_s) or integration \"coherent\"")
	}
	if s.Radar.Schedule != nil {
		c.errs.add(f, "noncoherent with radar.schedule is not modelled; want a single CPI or integration \"coherent\"")
	}
	if s.Radar.Scan != nil {
		c.errs.add(f, "noncoherent with radar.scan is not modelled (the beam's gain would change from pulse to pulse); want a staring beam or integration \"coherent\"")
	}
}
