package scenarios

import (
	"fmt"
	"math"

	"github.com/pulsewright/pulsewright/dsp"
)

// Antenna scan (radar.scan, added in format version 2; docs/detection.md
// §14). A beam that moves past a target puts N = θ·PRF/θ̇ pulses on it
// within its 3-dB width. The engine places each CPI's pulses about the
// beam's peak on the target (the CPI that sees it best) and weights pulse
// p's echo by the two-way voltage gain f(u_p)², u_p = (p − (P−1)/2)·δ, δ
// the beam's motion per pulse in beamwidths: the map and its Pd then carry
// the scan loss of the CPI as the Doppler processing integrates it. A
// single pulse sits at the peak: no loss. Surface clutter's patch takes
// the pattern-weighted width ∫f⁴ instead of the rectangular θ_az.
// Without radar.scan the beam stares, as before.

// Scan is radar.scan: the beam's motion and shape.
type Scan struct {
	RateDegS float64 `json:"rate_deg_s"` // the beam's angular rate, deg/s
	Plane    string  `json:"plane"`      // azimuth or elevation: the plane it scans in
	Pattern  string  `json:"pattern"`    // the one-way pattern: gaussian or sinc
}

// Planes and patterns of radar.scan.
const (
	PlaneAzimuth    = "azimuth"
	PlaneElevation  = "elevation"
	PatternGaussian = "gaussian"
	PatternSinc     = "sinc"
	MaxScanRateDegS = 36000 // 100 turns per second
)

var (
	scanFields   = []string{"rate_deg_s", "plane", "pattern"}
	scanPlanes   = []string{PlaneAzimuth, PlaneElevation}
	scanPatterns = []string{PatternGaussian, PatternSinc}
)

func (s *Scan) clone() *Scan {
	if s == nil {
		return nil
	}
	t := *s
	return &t
}

// decodeScan reads radar.scan.
func (o *object) decodeScan(r *Radar) {
	s := &Scan{Plane: PlaneAzimuth, Pattern: PatternGaussian}
	o.require("rate_deg_s", "the beam's scan rate in deg/s (6 for one turn a minute)")
	o.float("rate_deg_s", &s.RateDegS)
	if o.str("plane", &s.Plane) {
		o.oneOf("plane", s.Plane, scanPlanes)
	}
	if o.str("pattern", &s.Pattern) {
		o.oneOf("pattern", s.Pattern, scanPatterns)
	}
	o.finish(scanFields...)
	r.Scan = s
}

// validateScan checks radar.scan.
func (s *Scenario) validateScan(c checker) {
	sc := s.Radar.Scan
	if sc == nil || c.errs.has("radar.scan") {
		return
	}
	if !c.errs.has("radar.scan.rate_deg_s") {
		c.above("radar.scan.rate_deg_s", sc.RateDegS, 0, MaxScanRateDegS)
	}
}

func canonicalScan(sc *Scan) ordered {
	o := ordered{{"rate_deg_s", sc.RateDegS}}
	o.put("plane", sc.Plane, PlaneAzimuth)
	o.put("pattern", sc.Pattern, PatternGaussian)
	return o
}

// beamShape returns the dsp shape of a pattern name.
func beamShape(p string) dsp.BeamShape {
	if p == PatternSinc {
		return dsp.SincBeam
	}
	return dsp.GaussianBeam
}

// scanBeamwidthDeg returns the 3-dB beamwidth in the plane the beam scans,
// degrees.
func (r Radar) scanBeamwidthDeg() float64 {
	if r.Scan != nil && r.Scan.Plane == PlaneElevation {
		return r.BeamwidthElDeg
	}
	return r.BeamwidthAzDeg
}

// scanStep returns the beam's motion per pulse in beamwidths, θ̇·PRI/θ.
func (r Radar) scanStep() float64 {
	return r.Scan.RateDegS * r.PRIS / r.scanBeamwidthDeg()
}

// dwellS returns the time a point target spends inside the 3-dB beam,
// θ/θ̇, s.
func (r Radar) dwellS() float64 { return r.scanBeamwidthDeg() / r.Scan.RateDegS }

// scanGains returns the two-way voltage gain of each pulse of the CPI on a
// point target (the CPI centred on the beam's peak), or nil without a scan
// or with one pulse (at the peak: gain 1). Pulse p is transmitted at
// p·PRI; the beam points at the target midway between the first pulse and
// the last, and at t from then it is θ̇·t/θ beamwidths off.
func (m *model) scanGains() []float64 {
	r := m.s.Radar
	if r.Scan == nil || r.Pulses < 2 {
		return nil
	}
	shape := beamShape(r.Scan.Pattern)
	times := make([]float64, r.Pulses)
	for p := range times {
		times[p] = float64(p) * r.PRIS
		if r.Staggered() {
			times[p] = r.pulseTime(p) // a stagger's true pulse times
		}
	}
	mid := (times[0] + times[len(times)-1]) / 2
	per := r.Scan.RateDegS / r.scanBeamwidthDeg() // beamwidths per second
	a := make([]float64, len(times))
	for p, t := range times {
		f := shape.Voltage((t - mid) * per)
		a[p] = f * f
	}
	return a
}

// clutterWidth returns the azimuth width (rad) of the surface clutter
// patch: θ_az without a scan (the rectangular beam of version 1), the
// pattern-weighted ∫f⁴ dθ = TwoWayWidth·θ_az with one.
func (m *model) clutterWidth() float64 {
	r := m.s.Radar
	az := r.BeamwidthAzDeg * math.Pi / 180
	if r.Scan == nil {
		return az
	}
	return az * beamShape(r.Scan.Pattern).TwoWayWidth()
}

// ScanReport holds the scan figures (report format version 2): present
// with radar.scan.
type ScanReport struct {
	Pattern string `json:"pattern"`
	Plane   string `json:"plane"`
	// DwellS is the time a point target stays inside the 3-dB beam, θ/θ̇;
	// HitsPerScan the pulses it gets there, N = θ·PRF/θ̇ (not rounded).
	DwellS      float64 `json:"dwell_s"`
	HitsPerScan float64 `json:"hits_per_scan"`
	// ScanPeriodS is one turn, 360°/θ̇: azimuth scans only.
	ScanPeriodS *float64 `json:"scan_period_s,omitempty"`
	// CPIS is the CPI's length, pulses × PRI, and CPIBeamwidths how far
	// the beam moves during it, in 3-dB beamwidths. CPIExceedsDwell: the
	// CPI is longer than the dwell, so its pulses reach beyond the beam's
	// half-power points and the target is modulated within it.
	CPIS            float64 `json:"cpi_s"`
	CPIBeamwidths   float64 `json:"cpi_beamwidths"`
	CPIExceedsDwell bool    `json:"cpi_exceeds_dwell"`
	// CPILossDB is the scan loss the engine applies to a point target of
	// a pulse train: the CPI's pulses centred on the peak, weighted by the
	// Doppler window, at a bin centre without MTI (the per-target
	// scan_loss_db is read off its own map). Omitted for a single pulse.
	CPILossDB *float64 `json:"cpi_loss_db,omitempty"`
	// CPILossOffsetDB is the same CPI's loss with its centre half a CPI
	// (P·δ/2) off the beam's peak: back-to-back CPIs, the target midway
	// between two CPIs' centres, the better of the two at its worst.
	// Reported, not applied. Omitted for a single pulse.
	CPILossOffsetDB *float64 `json:"cpi_loss_offset_db,omitempty"`
	// BeamShapeLoss…DB: the loss of integrating the hits per scan (rounded,
	// at least 1) inside the 3-dB beamwidth against as many at the peak,
	// coherently with uniform weights and noncoherently (exact for steady
	// and scan-to-scan targets); reference figures for a processor that
	// integrates the whole dwell.
	BeamShapeLossCoherentDB    float64 `json:"beam_shape_loss_coherent_db"`
	BeamShapeLossNoncoherentDB float64 `json:"beam_shape_loss_noncoherent_db"`
	// ClutterWidthFactor is ∫f⁴ over the beamwidth: the surface clutter
	// patch's width is this × θ_az.
	ClutterWidthFactor float64 `json:"clutter_width_factor"`
	// CPIs: with radar.schedule, each CPI's hits per scan and loss, and
	// ScheduleS the whole schedule's length.
	CPIs      []ScanCPI `json:"cpis,omitempty"`
	ScheduleS *float64  `json:"schedule_s,omitempty"`
}

// ScanCPI is one CPI of a schedule under a scanning beam.
type ScanCPI struct {
	HitsPerScan     float64  `json:"hits_per_scan"`
	CPIS            float64  `json:"cpi_s"`
	CPIExceedsDwell bool     `json:"cpi_exceeds_dwell"`
	CPILossDB       *float64 `json:"cpi_loss_db,omitempty"`
}

// cpiLossDB returns the coherent scan loss of radar r's CPI as the
// Doppler processing weights it (window, no MTI, bin centre), its centre
// off beamwidths from the beam's peak, or nil for a single pulse.
func cpiLossDB(r Radar, dw Window, off float64) *float64 {
	if r.Pulses < 2 {
		return nil
	}
	step := r.scanStep()
	a := beamShape(r.Scan.Pattern).ScanGainsFrom(make([]float64, r.Pulses), off-float64(r.Pulses-1)/2*step, step)
	var w []float64
	if win := dspWindow(dw); win != nil {
		w = win.Coefficients(make([]float64, r.Pulses))
	}
	l := dsp.DB(dsp.CoherentScanLoss(a, w))
	if math.IsInf(l, 0) || math.IsNaN(l) {
		return nil
	}
	return &l
}

// scanReport returns the scan figures of scenario s, or nil without a
// scan.
func scanReport(s *Scenario) *ScanReport {
	r := s.Radar
	if r.Scan == nil {
		return nil
	}
	shape := beamShape(r.Scan.Pattern)
	rep := &ScanReport{Pattern: r.Scan.Pattern, Plane: r.Scan.Plane, DwellS: r.dwellS(),
		HitsPerScan: dsp.HitsPerScan(r.scanBeamwidthDeg(), r.Scan.RateDegS, r.PRIS),
		CPIS:        float64(r.Pulses) * r.PRIS, ClutterWidthFactor: shape.TwoWayWidth()}
	if r.Scan.Plane == PlaneAzimuth {
		p := 360 / r.Scan.RateDegS
		rep.ScanPeriodS = &p
	}
	rep.CPIBeamwidths = rep.CPIS / rep.DwellS
	rep.CPIExceedsDwell = rep.CPIS > rep.DwellS
	rep.CPILossDB = cpiLossDB(r, s.Receiver.DopplerWindow, 0)
	rep.CPILossOffsetDB = cpiLossDB(r, s.Receiver.DopplerWindow, float64(r.Pulses)*r.scanStep()/2)
	n := max(1, int(math.Round(rep.HitsPerScan)))
	n = min(n, dsp.MaxPulses)
	coh, non := shape.BeamShapeLoss(n)
	rep.BeamShapeLossCoherentDB, rep.BeamShapeLossNoncoherentDB = dsp.DB(coh), dsp.DB(non)
	if r.Schedule != nil {
		total := 0.0
		for k := range r.Schedule.N() {
			t := s.cpiScenario(k)
			cr := t.Radar
			c := ScanCPI{HitsPerScan: dsp.HitsPerScan(cr.scanBeamwidthDeg(), cr.Scan.RateDegS, cr.PRIS), CPIS: float64(cr.Pulses) * cr.PRIS}
			c.CPIExceedsDwell = c.CPIS > rep.DwellS
			c.CPILossDB = cpiLossDB(cr, s.Receiver.DopplerWindow, 0)
			total += c.CPIS
			rep.CPIs = append(rep.CPIs, c)
		}
		rep.ScheduleS = &total
	}
	return rep
}

// scanWarnings warns when the scan and the CPI do not fit: fewer than one
// pulse per beamwidth, a CPI longer than the dwell, a schedule longer than
// the dwell.
func (m *model) scanWarnings() {
	r := m.s.Radar
	if r.Scan == nil {
		return
	}
	n := dsp.HitsPerScan(r.scanBeamwidthDeg(), r.Scan.RateDegS, r.PRIS)
	dwell := r.dwellS()
	if n < 1 {
		m.warn("radar.scan: the beam moves %.2f beamwidths between pulses (%.2f hits per scan): a target can fall between two pulses and be missed", r.scanStep(), n)
	}
	if cpi := float64(r.Pulses) * r.PRIS; r.Pulses > 1 && cpi > dwell {
		m.warn("radar.scan: the %d-pulse CPI lasts %s, longer than the %s the beam dwells on a target (%.1f hits per scan): the CPI sees the target modulated by the beam, its pulses beyond the half-power points add little, and the map spreads it over Doppler; the scan loss is applied", r.Pulses, seconds(cpi), seconds(dwell), n)
	}
	if sc := r.Schedule; sc != nil {
		total := float64(r.Pulses) * r.PRIS
		for _, c := range sc.CPIs {
			total += float64(c.Pulses) * c.PRIS
		}
		if total > dwell {
			m.warn("radar.scan: the schedule's %d CPIs last %s, longer than the %s dwell: they cannot all see a target at the beam's peak, as each CPI is evaluated", sc.N(), seconds(total), seconds(dwell))
		}
	}
}

// seconds formats a duration for a sentence.
func seconds(t float64) string {
	switch {
	case t >= 1:
		return fmt.Sprintf("%.3g s", t)
	case t >= 1e-3:
		return fmt.Sprintf("%.3g ms", t*1e3)
	}
	return fmt.Sprintf("%.3g µs", t*1e6)
}

// scanWords is the sentence naming a point target's scan loss on a pulse
// train, and whether it decides: not detected, and the loss larger than
// the shortfall of its margin.
func (tr *train) scanWords(j int, out *TargetReport) string {
	if tr.scanLoss == nil || !(tr.scanLoss[j] >= 0.05) {
		return ""
	}
	r := tr.m.s.Radar
	l := tr.scanLoss[j]
	s := fmt.Sprintf(" The scan costs %.1f dB: the beam moves %.2f beamwidths during the %d-pulse CPI (%.1f hits per scan), so the CPI sees the target off the beam's peak.",
		l, float64(r.Pulses)*r.scanStep(), r.Pulses, dsp.HitsPerScan(r.scanBeamwidthDeg(), r.Scan.RateDegS, r.PRIS))
	if float64(r.Pulses)*r.PRIS > r.dwellS() {
		s += fmt.Sprintf(" The CPI is longer than the %s dwell: its outer pulses fall beyond the beam's half-power points.", seconds(r.dwellS()))
	}
	if out.Status != StatusDetected && out.Status != StatusClutter {
		switch {
		case out.MarginDB != nil && *out.MarginDB < 0 && *out.MarginDB+l >= 0:
			s += fmt.Sprintf(" The scan loss decides: without it its margin would be %+.1f dB.", *out.MarginDB+l)
		case out.MarginDB == nil && out.ThresholdMarginDB != nil && *out.ThresholdMarginDB < 0 && *out.ThresholdMarginDB+l >= 0:
			s += fmt.Sprintf(" The scan loss decides: without it its peak would clear the threshold by %.1f dB.", *out.ThresholdMarginDB+l)
		}
	}
	return s
}
