package scenarios

import (
	"fmt"
	"math"

	"github.com/pulsewright/pulsewright/dsp"
)

// Sea clutter by sea state (added in format version 2): an extended
// target given by sea_state takes σ⁰ from the NRL empirical sea model
// (Gregers-Hansen & Mital, IEEE TAES 48(4), 2012; dsp.SeaSigma0DB) at the
// carrier frequency, the grazing angle of each range (4/3 Earth, from
// radar.antenna_height_m) and its polarisation. The inputs must lie where
// the model was fitted to Nathanson's tables: 0.5 … 35 GHz, grazing
// angles 0.1 … 60°, sea states 0 … 6 (docs/scenario-format.md, surface
// clutter).

var seaPolarisations = []string{"horizontal", "vertical"}

// surfaceModel reports whether an extended target's σ⁰ comes from the
// surface geometry (sigma0_db, gamma_db or sea_state), not per metre.
func (t Target) surfaceModel() bool {
	return t.Level == LevelSigma0 || t.Level == LevelGamma || t.Level == LevelSeaState
}

// seaState reads sea_state and polarisation (after surfaceLevel has set
// the target's level).
func (o *object) seaState(t *Target) {
	o.float(LevelSeaState, &t.SeaState)
	if t.Level == LevelSeaState {
		t.Polarisation = "horizontal"
	}
	if o.str("polarisation", &t.Polarisation) {
		if !o.has(LevelSeaState) {
			o.errs.add(o.sub("polarisation"), "given without sea_state: the polarisation chooses the NRL sea model's coefficients; set sea_state (0 … 6) too, or leave it out")
		} else {
			o.oneOf("polarisation", t.Polarisation, seaPolarisations)
		}
	}
}

// seaGrazingSpan returns the ranges (m) between which an antenna h metres
// high sees the sea at the model's grazing angles, 60° down to 0.1°.
func seaGrazingSpan(h float64) (near, far float64) {
	_, _, lo, hi, _ := dsp.SeaModelLimits()
	return dsp.GrazingRange(h, hi*math.Pi/180, dsp.EffectiveEarthRadius), dsp.GrazingRange(h, lo*math.Pi/180, dsp.EffectiveEarthRadius)
}

// validateSea checks an extended target given by sea_state; p is its
// path prefix ("targets[i].").
func (s *Scenario) validateSea(c checker, p string, t Target) {
	fLo, fHi, psiLo, psiHi, ssHi := dsp.SeaModelLimits()
	path := p + LevelSeaState
	if !c.between(path, t.SeaState, 0, ssHi) {
		return
	}
	if t.SeaState != math.Trunc(t.SeaState) {
		c.errs.add(path, "%g is not a whole sea state (valid 0, 1, … %g: the states of Nathanson's tables the NRL sea model was fitted to)", t.SeaState, ssHi)
		return
	}
	if f := s.Radar.CarrierHz / 1e9; !c.errs.has("radar.carrier_hz") && !(f >= fLo && f <= fHi) {
		c.errs.add(path, "the NRL sea model was fitted to Nathanson's tables at %g … %g GHz; radar.carrier_hz is %g GHz", fLo, fHi, f)
	}
	h := s.Radar.AntennaHeightM
	if h == 0 {
		c.errs.add(path, "needs radar.antenna_height_m (above 0, at most %g m): the sea's grazing angle comes from the antenna's height", MaxAntennaHeightM)
		return
	}
	if c.errs.has("radar.antenna_height_m") || c.errs.has(p+"range_start_m") || c.errs.has(p+"range_stop_m") {
		return
	}
	near, far := seaGrazingSpan(h)
	span := fmt.Sprintf("valid %g … %g°: %s … %s for an antenna %g m high on the 4/3 Earth", psiLo, psiHi, km(near), km(far), h)
	if t.RangeStartM < near {
		c.errs.add(p+"range_start_m", "%g m is nearer than %s, where the sea's grazing angle reaches %g°, the steepest the NRL sea model was fitted to (%s)", t.RangeStartM, km(near), psiHi, span)
	}
	if t.RangeStopM > far {
		if psi, ok := dsp.GrazingAngle(h, t.RangeStopM, dsp.EffectiveEarthRadius); ok {
			c.errs.add(p+"range_stop_m", "%g m puts the sea's grazing angle at %.3g°, below the %g° the NRL sea model was fitted down to (%s)", t.RangeStopM, psi*180/math.Pi, psiLo, span)
		} else {
			c.errs.add(p+"range_stop_m", "%g m lies at or beyond the radar horizon, where the sea is shadowed; the NRL sea model was fitted down to a grazing angle of %g° (%s)", t.RangeStopM, psiLo, span)
		}
	}
}

// seaSigma0 returns σ⁰ (linear) of a sea_state target at grazing angle
// psi (rad).
func (m *model) seaSigma0(t Target, psi float64) float64 {
	return dsp.FromDB(dsp.SeaSigma0DB(m.s.Radar.CarrierHz/1e9, t.SeaState, t.Polarisation == "vertical", psi*180/math.Pi))
}
