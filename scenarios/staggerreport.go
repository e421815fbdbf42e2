package scenarios

import (
	"math"

	"github.com/pulsewright/pulsewright/dsp"
)

// StaggerReport describes a staggered CPI's PRIs and its velocity
// response (docs/report-format.md, "Staggered PRI trains"; added in
// version 2).
type StaggerReport struct {
	PRIS     []float64 `json:"pri_s"`      // the PRIs the pulses use in turn, s
	MeanPRIS float64   `json:"mean_pri_s"` // their mean T̄, s: the Doppler bins span 1/T̄
	StepS    float64   `json:"step_s"`     // Δ: each PRI is a whole multiple of it, s
	// FirstBlindSpeedMPS is λ/(2Δ), the first range rate > 0 every pulse
	// sees at zero Doppler's phase; MeanPRIBlindSpeedMPS λ/(2·T̄), the
	// blind speed of a uniform train at the mean PRI.
	FirstBlindSpeedMPS   float64 `json:"first_blind_speed_mps"`
	MeanPRIBlindSpeedMPS float64 `json:"mean_pri_blind_speed_mps"`
	// DeepestDipDB is the velocity response's lowest point between the
	// notches at 0 and at the first blind speed (dB re its mean over one
	// period; detection.md §16), at DeepestDipMPS. Both are left out for
	// CPIs of more than maxCurveBins Doppler bins.
	DeepestDipDB  *float64 `json:"deepest_dip_db,omitempty"`
	DeepestDipMPS *float64 `json:"deepest_dip_mps,omitempty"`
}

// maxCurveBins bounds the CPIs whose velocity response the report
// evaluates: its cost is about 8000 · bins² multiply-adds.
const maxCurveBins = 256

// VelocityCurve is a CPI's velocity response for the page's chart.
type VelocityCurve struct {
	dsp.VelocityResponse
	// SinglePRIBlindMPS: the blind speeds λ/(2·T_i) of each PRI of the
	// pattern alone, m/s (one value for a uniform train).
	SinglePRIBlindMPS []float64
}

// curvePlan returns the slow-time plan of a scenario's own CPI and its
// slow-time unit, or nil for a single pulse.
func curvePlan(s *Scenario) (*dsp.SlowTimePlan, float64) {
	r := s.Radar
	if r.Pulses <= 1 {
		return nil, 0
	}
	tr := &train{m: &model{s: s}, T: r.slowPRI(), times: staggerTimes(r)}
	p := tr.newPlan()
	if p.Bins() > maxCurveBins {
		return nil, 0
	}
	return p, tr.T
}

// CPIVelocityCurve returns the velocity response of CPI k of a valid
// scenario (0: the radar's own) from 0 to 1.25 times its first blind
// speed (the stagger's λ/(2Δ), or λ/(2·PRI)) at points range rates; ok
// is false for a CPI of one pulse or more than maxCurveBins Doppler
// bins.
func CPIVelocityCurve(s *Scenario, k, points int) (VelocityCurve, bool) {
	t := s
	if k > 0 {
		t = s.cpiScenario(k)
	}
	p, unit := curvePlan(t)
	if p == nil {
		return VelocityCurve{}, false
	}
	lambda := t.Radar.Wavelength()
	pat := t.Radar.pattern()
	vb := staggerBlindSpeed(pat, lambda)
	if vb == 0 {
		return VelocityCurve{}, false
	}
	c := VelocityCurve{VelocityResponse: p.NewVelocityResponse(pat, unit, lambda, 1.25*vb, points)}
	for _, T := range pat {
		c.SinglePRIBlindMPS = append(c.SinglePRIBlindMPS, dsp.BlindSpeed(T, lambda))
	}
	return c, true
}

// staggerReport returns the stagger figures of a scenario's own CPI, or
// nil for a uniform train.
func staggerReport(s *Scenario) *StaggerReport {
	r := s.Radar
	if !r.Staggered() {
		return nil
	}
	lambda := r.Wavelength()
	sch := dsp.NewSchedule(r.PRIStaggerS...)
	rep := &StaggerReport{PRIS: r.PRIStaggerS, MeanPRIS: r.slowPRI(), StepS: sch.Delta,
		FirstBlindSpeedMPS: staggerBlindSpeed(r.PRIStaggerS, lambda), MeanPRIBlindSpeedMPS: dsp.BlindSpeed(r.slowPRI(), lambda)}
	if p, unit := curvePlan(s); p != nil {
		vr := p.NewVelocityResponse(r.PRIStaggerS, unit, lambda, rep.FirstBlindSpeedMPS, 2)
		if !math.IsInf(vr.DipDB, 0) && !math.IsNaN(vr.DipDB) {
			d, v := vr.DipDB, vr.DipMPS
			rep.DeepestDipDB, rep.DeepestDipMPS = &d, &v
		}
	}
	return rep
}
