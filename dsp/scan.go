package dsp

import (
	"fmt"
	"math"
)

// Antenna scan: the beam's shape in the plane it scans, the two-way gain
// of the pulses a moving beam puts on a point target, and the losses of
// integrating them against as many pulses at the beam's peak.
//
// Angles are in units of the one-way 3-dB (half-power) beamwidth θ₃:
// u = θ/θ₃, the beam's peak at u = 0, its half-power points at u = ±½.
// f(u) is the one-way VOLTAGE pattern, f(0) = 1 and f(±½)² = ½. The echo
// of a point target at u has the two-way voltage gain a = f(u)² and the
// two-way power gain a² = f(u)⁴.

// BeamShape is the one-way pattern of an antenna's beam in one plane.
type BeamShape int

const (
	// GaussianBeam: one-way power exp(−4·ln2·u²), voltage
	// exp(−2·ln2·u²). The usual model of a pencil beam's main lobe.
	GaussianBeam BeamShape = iota + 1
	// SincBeam: one-way voltage sin(πku)/(πku), the pattern of a uniformly
	// lit line aperture, with k = 0.885893 so that f(½)² = ½ (the
	// half-power width of sinc², 0.885893). Its sidelobes are included.
	SincBeam
)

// sincBeamK is x with sinc(x)² = ½ times 2: the half-power width of
// (sin πx/πx)², 0.8858929413 (the root of sinc(k/2)² = ½).
const sincBeamK = 0.8858929413789046

// String returns "gaussian" or "sinc".
func (b BeamShape) String() string {
	switch b {
	case GaussianBeam:
		return "gaussian"
	case SincBeam:
		return "sinc"
	}
	return fmt.Sprintf("BeamShape(%d)", int(b))
}

// Voltage returns the one-way voltage gain f(u) at u beamwidths from the
// peak (f(0) = 1). It panics for an unknown shape.
func (b BeamShape) Voltage(u float64) float64 {
	switch b {
	case GaussianBeam:
		return math.Exp(-2 * math.Ln2 * u * u)
	case SincBeam:
		x := math.Pi * sincBeamK * u
		if math.Abs(x) < 1e-8 {
			return 1 - x*x/6
		}
		return math.Sin(x) / x
	}
	panic("dsp: unknown beam shape")
}

// TwoWayWidth returns ∫ f(u)⁴ du over every angle, in beamwidths: the
// width of the rectangular beam, of the two-way peak gain, that collects
// as much power from scatterers spread uniformly in angle (the
// pattern-weighted width of a surface clutter patch, θ_eff = this × θ₃).
// Closed forms: Gaussian √(π/(8·ln2)) = 0.752692; sinc, with
// ∫ (sin πx/πx)⁴ dx = 2/3, 2/(3k) = 0.752539.
//
// Its reciprocal is the beam-shape loss of Barton & Leonov, Radar
// Technology Encyclopedia, Artech House 1997, "loss, beamshape" (p. 249):
// the integrated two-way power of scatterers uniform in angle against an
// ideal rectangular beam matched to the one-way half-power beamwidth,
// 1.234 dB per plane for a Gaussian beam.
func (b BeamShape) TwoWayWidth() float64 {
	switch b {
	case GaussianBeam:
		return math.Sqrt(math.Pi / (8 * math.Ln2))
	case SincBeam:
		return 2 / (3 * sincBeamK)
	}
	panic("dsp: unknown beam shape")
}

// ScanGains fills dst (nil allocates) with the two-way voltage gains
// a_k = f(u_k)² of len(dst) pulses (n when dst is nil) spaced step
// beamwidths apart and centred on the beam's peak, u_k = (k − (n−1)/2)·step:
// the pulses of a beam that moves step beamwidths per pulse past a point
// target, the middle of the train on the target. It returns dst. It panics
// if step is negative or not finite.
func (b BeamShape) ScanGains(dst []float64, n int, step float64) []float64 {
	if !(step >= 0) || math.IsInf(step, 0) {
		panic("dsp: scan step must be finite and non-negative")
	}
	if dst == nil {
		dst = make([]float64, n)
	}
	return b.ScanGainsFrom(dst, -float64(len(dst)-1)/2*step, step)
}

// ScanGainsFrom fills dst with the two-way voltage gains f(u_k)² of pulses
// at u_k = u0 + k·step beamwidths and returns it: a train placed anywhere
// on the beam (ScanGains centres it). It panics if u0 or step is not
// finite.
func (b BeamShape) ScanGainsFrom(dst []float64, u0, step float64) []float64 {
	if math.IsInf(u0, 0) || math.IsNaN(u0) || math.IsInf(step, 0) || math.IsNaN(step) {
		panic("dsp: scan offsets must be finite")
	}
	for k := range dst {
		f := b.Voltage(u0 + float64(k)*step)
		dst[k] = f * f
	}
	return dst
}

// CoherentScanLoss returns the loss (power ratio, ≥ 1 when every |a_k| ≤ 1)
// of summing pulses of two-way voltage gains a with real weights w (nil:
// uniform) against the same pulses all at the beam's peak (a_k = 1):
//
//	L = (Σ w_k)² / (Σ w_k·a_k)²
//
// the SNR of a coherent sum, (Σ w·a)²/Σ w², over its value at the peak.
// It returns +Inf when the weighted sum of a is 0. It panics if w is not
// nil and its length differs from a's, or a is empty.
func CoherentScanLoss(a, w []float64) float64 {
	if len(a) == 0 || (w != nil && len(w) != len(a)) {
		panic("dsp: coherent scan loss needs as many weights as gains, at least one")
	}
	var sw, swa float64
	for k, v := range a {
		wk := 1.0
		if w != nil {
			wk = w[k]
		}
		sw += wk
		swa += wk * v
	}
	if swa == 0 {
		return math.Inf(1)
	}
	return sw * sw / (swa * swa)
}

// NoncoherentScanLoss returns the loss (power ratio) of summing the
// square-law detected pulses of two-way voltage gains a against the same
// number at the beam's peak:
//
//	L = n / Σ a_k²
//
// exact for a steady target and for scan-to-scan fluctuation (Swerling 1
// and 3): their detection statistic depends on the pulses' SNRs only
// through the sum (the non-central chi-square's non-centrality), so a
// train of SNRs a_k²·χ detects exactly as n pulses of SNR χ/L. It is also
// the loss of a coherent sum whose weights are matched to a (w = a). It
// returns +Inf when every gain is 0 and panics when a is empty.
func NoncoherentScanLoss(a []float64) float64 {
	if len(a) == 0 {
		panic("dsp: noncoherent scan loss needs at least one gain")
	}
	s := 0.0
	for _, v := range a {
		s += v * v
	}
	if s == 0 {
		return math.Inf(1)
	}
	return float64(len(a)) / s
}

// HitsPerScan returns the pulses N = θ·PRF/θ̇ that a beam of width theta
// scanning at rate (both in the same angular unit, rate per second) puts
// within its 3-dB width on a point target, at pulse repetition interval
// pri (s): the dwell θ/θ̇ over the PRI. Not rounded: the fraction says
// how the pulses fall. It panics unless theta, rate and pri are positive.
func HitsPerScan(theta, rate, pri float64) float64 {
	if !(theta > 0) || !(rate > 0) || !(pri > 0) {
		panic("dsp: hits per scan needs a positive beamwidth, rate and PRI")
	}
	return theta / rate / pri
}

// BeamShapeLoss returns the coherent (uniform weights) and noncoherent
// losses (power ratios) of integrating the n pulses that fall inside the
// 3-dB beamwidth, one every 1/n beamwidths and centred on the peak,
// against n pulses at the peak: the beam-shape loss of a scanning radar
// that integrates its hits per scan. As n grows they approach, for a
// Gaussian beam, 1/(√(π/(8 ln 2))·erf(√(2 ln 2))) = 1.672 dB
// (noncoherent) and 1/(√(π/(4 ln 2))·erf(√(ln 2)))² = 1.830 dB
// (coherent). Blake's "1.6 dB" for a beam scanning in one plane (Radar
// Handbook, ch. 2; from memory) is the noncoherent value rounded. It
// panics if n < 1.
func (b BeamShape) BeamShapeLoss(n int) (coherent, noncoherent float64) {
	if n < 1 {
		panic("dsp: beam-shape loss needs at least one pulse")
	}
	a := b.ScanGains(nil, n, 1/float64(n))
	return CoherentScanLoss(a, nil), NoncoherentScanLoss(a)
}
