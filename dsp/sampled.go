package dsp

import (
	"fmt"
	"math"
)

// SampledHalfWidth is the number of samples on each side of t that
// Sampled's interpolation kernel spans, and SampledKaiserBeta the shape of
// its Kaiser taper. With 16 samples each side and β = 8.6, the kernel
// reconstructs a signal whose spectrum lies within ±0.4 of the sample rate
// (80 % of the band) to about −75 dB (relative error ≈ 2e-4), which is
// what TestSampledInterpolation holds it to.
const (
	SampledHalfWidth  = 16
	SampledKaiserBeta = 8.6
)

// Sampled is a pulse given by its complex samples: a measured or
// externally designed waveform. Sample n holds u(n/Rate), n = 0 … N−1,
// from the leading edge; the pulse lasts τ = N/Rate.
//
// Between samples, u(t) is reconstructed by band-limited interpolation
// with a Kaiser-windowed sinc kernel,
//
//	u(t) = Σ_n x[n]·sinc(r − n)·w((r − n)/H),  r = t·Rate,
//
// over the 2H samples nearest r (H = SampledHalfWidth; samples outside
// 0 … N−1 are zero), where sinc(z) = sin(πz)/(πz) and w is the Kaiser
// taper I0(β√(1 − z²))/I0(β). At a sample instant it returns that sample
// exactly. Band-limited rather than linear interpolation: a radar pulse is
// recorded at a rate only a little above its bandwidth (2 samples per 1/B
// is common), where linear interpolation between samples would lose
// about 1 dB at mid-sample and add spectral images that read as false
// sidelobes; the sinc kernel is exact for a band-limited signal, and the
// taper keeps its cost at 2H products per point. Edges: the pulse is
// zero outside [0, τ), as the Waveform contract asks, so the kernel sees
// zeros beyond the recording.
//
// NewSampled scales the samples to unit mean power, Σ|x[n]|²/N = 1, so
// that the pulse energy is τ, as it is for the constant-envelope pulses
// of this package: a radar-equation SNR computed with τ and the peak power
// then holds, with "peak power" read as the mean power over the pulse.
type Sampled struct {
	hold   bool // zero-order hold instead of interpolation (NewHeldSamples)
	x      []complex128
	rate   float64   // Hz
	band   float64   // Hz
	scale  float64   // applied to x: √(N / Σ|x|²)
	kaiser []float64 // the taper w(q) at q = j/kaiserSteps, j = 0 … kaiserSteps
}

// kaiserSteps is the resolution of Sampled's tabulated taper. Linear
// interpolation in it errs by at most max|d²w/dq²|/(8·kaiserSteps²), about
// 2e-7 for β = 8.6 (the second derivative stays below 30), far below the
// kernel's own 2e-4.
const kaiserSteps = 4096

// NewSampled returns the pulse whose samples at rate Hz are x, with
// nominal bandwidth band Hz (what Bandwidth reports: it sets the
// compression ratio B·τ; it does not filter the samples). x is copied and
// scaled to unit mean power. It returns an error when x is empty or has no
// energy, a sample is not finite, rate or band is not positive and
// finite, or band exceeds rate (the samples cannot hold it).
func NewSampled(x []complex128, rate, band float64) (*Sampled, error) {
	if len(x) == 0 {
		return nil, fmt.Errorf("dsp: sampled pulse: no samples")
	}
	if !(rate > 0) || math.IsInf(rate, 0) {
		return nil, fmt.Errorf("dsp: sampled pulse: rate %g Hz is not positive and finite", rate)
	}
	if !(band > 0) || band > rate {
		return nil, fmt.Errorf("dsp: sampled pulse: bandwidth %g Hz must be above 0 and at most the rate %g Hz", band, rate)
	}
	e := 0.0
	for i, v := range x {
		if math.IsNaN(real(v)) || math.IsNaN(imag(v)) || math.IsInf(real(v), 0) || math.IsInf(imag(v), 0) {
			return nil, fmt.Errorf("dsp: sampled pulse: sample %d is not finite", i)
		}
		e += real(v)*real(v) + imag(v)*imag(v)
	}
	if !(e > 0) || math.IsInf(e, 0) {
		return nil, fmt.Errorf("dsp: sampled pulse: the samples have no energy")
	}
	s := &Sampled{x: make([]complex128, len(x)), rate: rate, band: band, kaiser: make([]float64, kaiserSteps+2)}
	i0b := besselI0(SampledKaiserBeta)
	for j := range kaiserSteps + 1 {
		q := float64(j) / kaiserSteps
		s.kaiser[j] = besselI0(SampledKaiserBeta*math.Sqrt(max(0, 1-q*q))) / i0b
	}
	s.scale = math.Sqrt(float64(len(x)) / e)
	for i, v := range x {
		s.x[i] = v * complex(s.scale, 0)
	}
	return s, nil
}

// NewHeldSamples is NewSampled for a pulse that holds each sample for
// 1/rate: u(t) = x[⌊t·rate⌋], a value within 1e-9 of a whole number of
// samples taken as that number. It is the continuous form of a pulse
// designed as a sequence of constant pieces (a phase code given at an
// integer number of samples per chip), where band-limited interpolation
// would smooth the pieces' edges that define it.
func NewHeldSamples(x []complex128, rate, band float64) (*Sampled, error) {
	s, err := NewSampled(x, rate, band)
	if s != nil {
		s.hold = true
	}
	return s, err
}

// Held reports whether the pulse holds its samples (NewHeldSamples), and
// then returns them (scaled, not to be modified) and the hold length
// 1/rate in s: the pulse is then a sequence of constant pieces, and its
// figures can be computed exactly as for a rectangular-chip code.
func (s *Sampled) Held() (values []complex128, piece float64, ok bool) {
	if !s.hold {
		return nil, 0, false
	}
	return s.x, 1 / s.rate, true
}

// Duration returns τ = N/Rate in s.
func (s *Sampled) Duration() float64 { return float64(len(s.x)) / s.rate }

// Bandwidth returns the nominal bandwidth B in Hz given to NewSampled.
func (s *Sampled) Bandwidth() float64 { return s.band }

// Rate returns the sample rate of the samples in Hz.
func (s *Sampled) Rate() float64 { return s.rate }

// Len returns the number of samples N.
func (s *Sampled) Len() int { return len(s.x) }

// Scale returns the factor NewSampled applied to the given samples to
// bring them to unit mean power.
func (s *Sampled) Scale() float64 { return s.scale }

// At returns u(t), interpolated as described on Sampled (or held, for
// NewHeldSamples); 0 outside [0, τ). t is in s from the leading edge.
func (s *Sampled) At(t float64) complex128 {
	if !(t >= 0 && t < s.Duration()) {
		return 0
	}
	r := t * s.rate
	n0 := math.Round(r)
	if math.Abs(r-n0) <= 1e-9*math.Max(1, r) {
		if k := int(n0); k < len(s.x) {
			return s.x[k]
		}
		return 0
	}
	if s.hold {
		return s.x[min(int(r), len(s.x)-1)]
	}
	lo := int(math.Floor(r)) - SampledHalfWidth + 1
	// sin(π(r − n)) = ±sin(π(r − lo)), the sign alternating with n: one
	// sine per call.
	sn := math.Sin(math.Pi * (r - float64(lo)))
	if lo%2 != 0 {
		sn = -sn
	}
	var acc complex128
	for n := max(lo, 0); n < min(lo+2*SampledHalfWidth, len(s.x)); n++ {
		z := r - float64(n)
		sz := sn
		if n%2 != 0 {
			sz = -sn
		}
		acc += s.x[n] * complex(sz/(math.Pi*z)*s.taper(z/SampledHalfWidth), 0)
	}
	return acc
}

// taper returns the Kaiser taper w(q) for |q| < 1, 0 beyond, by linear
// interpolation in the table.
func (s *Sampled) taper(q float64) float64 {
	q = math.Abs(q) * kaiserSteps
	if q >= kaiserSteps {
		return 0
	}
	j := int(q)
	f := q - float64(j)
	return s.kaiser[j] + f*(s.kaiser[j+1]-s.kaiser[j])
}
