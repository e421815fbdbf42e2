package dsp

import (
	"fmt"
	"math"
)

// Waveform is a transmitted pulse: its continuous-time complex envelope
// u(t), with t in seconds from the leading edge. u is zero outside
// [0, Duration()). Constant-envelope pulses (every type in this package)
// have |u(t)| = 1 inside the pulse, so the pulse energy is Duration().
type Waveform interface {
	// Duration is the pulse width τ in s.
	Duration() float64
	// Bandwidth is the nominal bandwidth B in Hz: 1/τ for Rect, the swept
	// band for LFM and NLFM, 1/chip for phase codes and the occupied band
	// n/chip for an n-hop Costas pulse. B·τ is the compression ratio.
	Bandwidth() float64
	// At returns u(t); t in s from the leading edge.
	At(t float64) complex128
}

// Rect is an unmodulated rectangular pulse: u(t) = 1 for 0 ≤ t < Width.
type Rect struct {
	Width float64 // pulse width τ, s
}

// Duration returns τ = Width in s.
func (r Rect) Duration() float64 { return r.Width }

// Bandwidth returns 1/τ in Hz (the peak-to-first-null width of the
// spectrum); +Inf for a zero width.
func (r Rect) Bandwidth() float64 { return 1 / r.Width }

// At returns 1 for 0 ≤ t < Width and 0 elsewhere.
func (r Rect) At(t float64) complex128 {
	if t >= 0 && t < r.Width {
		return 1
	}
	return 0
}

// Validate reports a non-positive or non-finite width.
func (r Rect) Validate() error { return checkPositive("rect width", r.Width, "s") }

// LFM is a linear-FM (chirp) pulse of width τ = Width sweeping the band
// B = Band:
//
//	u(t) = exp(±jπ(B/τ)(t − τ/2)²),  0 ≤ t < τ,
//
// with the + sign (up-chirp, instantaneous frequency rising from −B/2 to
// +B/2 at slope B/τ Hz/s) unless Down is set, which gives the mirror
// sweep from +B/2 to −B/2. The phase is zero at the pulse centre.
type LFM struct {
	Width float64 // pulse width τ, s
	Band  float64 // swept bandwidth B, Hz
	Down  bool    // sweep from +B/2 down to −B/2
}

// Duration returns τ = Width in s.
func (l LFM) Duration() float64 { return l.Width }

// Bandwidth returns the swept band B in Hz.
func (l LFM) Bandwidth() float64 { return l.Band }

// Slope returns the signed chirp rate in Hz/s: +B/τ (up) or −B/τ (down).
func (l LFM) Slope() float64 {
	if l.Down {
		return -l.Band / l.Width
	}
	return l.Band / l.Width
}

// At returns u(t) as defined on LFM, zero outside [0, τ).
func (l LFM) At(t float64) complex128 {
	if !(t >= 0 && t < l.Width) {
		return 0
	}
	x := t - l.Width/2
	s, c := math.Sincos(math.Pi * l.Slope() * x * x)
	return complex(c, s)
}

// Validate reports a non-positive width or band.
func (l LFM) Validate() error {
	if err := checkPositive("lfm width", l.Width, "s"); err != nil {
		return err
	}
	return checkPositive("lfm band", l.Band, "Hz")
}

// PhaseCoded is a phase-coded pulse of len(Phases) chips of length Chip:
//
//	u(t) = exp(j·Phases[⌊t/Chip⌋]),  0 ≤ t < len(Phases)·Chip,
//
// with phases in radians. Chips need not span a whole number of samples;
// the chip of a time is the exact floor of t/Chip (ChipIndex), and so is
// the end of the pulse.
type PhaseCoded struct {
	Phases []float64 // phase of each chip, rad
	Chip   float64   // chip length, s
}

// Duration returns τ = len(Phases)·Chip in s.
func (p PhaseCoded) Duration() float64 { return float64(len(p.Phases)) * p.Chip }

// Bandwidth returns 1/Chip in Hz.
func (p PhaseCoded) Bandwidth() float64 { return 1 / p.Chip }

// At returns u(t) as defined on PhaseCoded, zero outside [0, τ).
func (p PhaseCoded) At(t float64) complex128 {
	i, ok := p.chipIndex(t)
	if !ok {
		return 0
	}
	s, c := math.Sincos(p.Phases[i])
	return complex(c, s)
}

// chipIndex returns ⌊t/Chip⌋, exact (ChipIndex), and whether it is a
// chip of the code, 0 ≤ t < len(Phases)·Chip in exact arithmetic.
func (p PhaseCoded) chipIndex(t float64) (int, bool) {
	if math.IsNaN(t) || math.IsInf(t, 0) {
		return 0, false
	}
	i := ChipIndex(t, 1, 0, p.Chip)
	return i, i >= 0 && i < len(p.Phases)
}

// Validate reports an empty code, a non-positive chip or a non-finite phase.
func (p PhaseCoded) Validate() error {
	if len(p.Phases) == 0 {
		return fmt.Errorf("dsp: phase code length 0: need at least 1 chip")
	}
	for i, ph := range p.Phases {
		if math.IsNaN(ph) || math.IsInf(ph, 0) {
			return fmt.Errorf("dsp: phase code chip %d = %v rad: must be finite", i, ph)
		}
	}
	return checkPositive("phase code chip", p.Chip, "s")
}

// Held is a sequence of complex values each held over a chip of length
// Chip: u(t) = Values[⌊t/Chip⌋] for 0 ≤ t < len(Values)·Chip (exact floor,
// ChipIndex). It represents a rect-chip filter (a mismatched filter's taps
// realised in continuous time) and is sampled like a phase code. Unlike
// the pulses of this package its envelope need not be constant.
type Held struct {
	Values []complex128 // value of each chip
	Chip   float64      // chip length, s
}

// Duration returns len(Values)·Chip in s.
func (h Held) Duration() float64 { return float64(len(h.Values)) * h.Chip }

// Bandwidth returns 1/Chip in Hz.
func (h Held) Bandwidth() float64 { return 1 / h.Chip }

// At returns u(t) as defined on Held, zero outside the sequence.
func (h Held) At(t float64) complex128 {
	if math.IsNaN(t) || math.IsInf(t, 0) {
		return 0
	}
	if i := ChipIndex(t, 1, 0, h.Chip); i >= 0 && i < len(h.Values) {
		return h.Values[i]
	}
	return 0
}

// Costas is a frequency-hopped pulse of n = len(Order) hops of length
// Chip. Hop i uses the frequency
//
//	f_i = (Order[i] − (n−1)/2)/Chip  Hz,
//
// so the hops fill the band n/Chip symmetrically about zero. The phase is
// continuous across hop boundaries: u(t) = exp(j2π·f_i·t) for
// i·Chip ≤ t < (i+1)·Chip, with t from the leading edge. Because every
// f_i·Chip is a whole or half-whole number, this single expression has no
// phase jump at any boundary. Order should be a permutation of 0…n−1
// (a Costas array, e.g. from WelchCostas).
type Costas struct {
	Order []int   // hop order, a permutation of 0…n−1
	Chip  float64 // hop length, s
}

// Duration returns τ = n·Chip in s.
func (c Costas) Duration() float64 { return float64(len(c.Order)) * c.Chip }

// Bandwidth returns the occupied band n/Chip in Hz.
func (c Costas) Bandwidth() float64 { return float64(len(c.Order)) / c.Chip }

// At returns u(t) as defined on Costas, zero outside [0, τ).
func (c Costas) At(t float64) complex128 {
	if math.IsNaN(t) || math.IsInf(t, 0) {
		return 0
	}
	i := ChipIndex(t, 1, 0, c.Chip)
	if i < 0 || i >= len(c.Order) {
		return 0
	}
	return c.hop(i, t)
}

// hop returns exp(j2π·f_i·t), the envelope of hop i at time t in s.
func (c Costas) hop(i int, t float64) complex128 {
	n := len(c.Order)
	f := (float64(c.Order[i]) - float64(n-1)/2) / c.Chip
	s, co := math.Sincos(2 * math.Pi * f * t)
	return complex(co, s)
}

// Validate reports a non-positive chip or an order that is not a
// permutation of 0…n−1.
func (c Costas) Validate() error {
	n := len(c.Order)
	if n == 0 {
		return fmt.Errorf("dsp: costas order length 0: need at least 1 hop")
	}
	seen := make([]bool, n)
	for i, v := range c.Order {
		if v < 0 || v >= n || seen[v] {
			return fmt.Errorf("dsp: costas order[%d] = %d: order must be a permutation of 0…%d", i, v, n-1)
		}
		seen[v] = true
	}
	return checkPositive("costas chip", c.Chip, "s")
}

func checkPositive(name string, v float64, unit string) error {
	if !(v > 0) || math.IsInf(v, 0) {
		return fmt.Errorf("dsp: %s %v %s: must be finite and > 0", name, v, unit)
	}
	return nil
}
