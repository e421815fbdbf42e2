package dsp

import (
	"errors"
	"fmt"
	"math"
)

// Pd of a cell that holds several echoes (docs/detection-probability.md
// §7, "Echoes sharing the tested cell").
//
// The tested cell holds unit complex Gaussian noise plus the echoes
// e_i = a_i·exp(jφ_i). Each carrier phase φ_i is uniform on [0, 2π) and
// independent of the others: the relative phase of two echoes changes by
// 2π when their range difference changes by half a wavelength, so a
// report whose Pd hinged on one phase would hinge on sub-wavelength range
// choices. The cell crosses the threshold when |Σ e_i + n|² > s·T, T the
// detector's threshold and s a scale; the detector's threshold may be
// random (a CFAR's), independent of the cell.
//
// The laws of the amplitudes:
//   - SwerlingNone: |a|² constant (a steady phasor).
//   - Swerling1, Swerling2: a complex Gaussian (|a|² exponential). Their
//     sum with the noise is complex Gaussian of variance v = 1 + Σ|a|²,
//     so they widen the noise; dividing the statistic by v, the steady
//     part of SNR P is tested at SNR P/v against the threshold scaled by
//     1/v (derived here; for one Gaussian echo with one steady phasor this
//     is the Rician law of Rice, "Mathematical analysis of random noise",
//     Bell Syst. Tech. J. 24, 1945, §3.10, and Marcum's Q function).
//     One test per dwell: Swerling 2 is Swerling 1 and Swerling 4 is
//     Swerling 3.
//   - Swerling3, Swerling4: |a|² chi-square with four degrees of freedom
//     (Gamma(2, mean/2)), uniform phase.
//
// Conditioned on the steady phasors' relative phases and the Swerling 3/4
// powers, the cell holds a steady echo of power |Σ a_i e^{jφ_i}|², so
//
//	Pd = E_{φ, |a|²}[ pdSteady(|Σ a_i e^{jφ_i}|²/v, 1/v) ]
//
// where pdSteady(x, s) is the detector's Pd for a steady echo of SNR x
// against its threshold times s. The phase of the strongest phasor is the
// reference; each further phasor's phase is integrated by the trapezoid
// rule over [0, π] (the integrand is even and 2π-periodic in it, so the
// rule converges geometrically), doubling until two estimates agree to
// CellTolerance; a Swerling 3/4 power q (in units of half its mean, of
// density q·e^−q) by the trapezoid rule in t = ln q, halving the step
// until two estimates agree. At most MaxCellDims such integrals are nested; the
// weakest phasors beyond that are treated as Gaussian (their power added
// to v), which the central limit theorem makes the right limit for many
// echoes of random phase, and which is exact for their mean power. With
// steady phasors only, when the Pd at the smallest and the largest
// resultant agree to CellTolerance their mean is returned without an
// integral.

// CellEcho is one echo's contribution to the tested cell.
type CellEcho struct {
	// Power is the echo's mean power at the cell, in units of the noise
	// power of the test (linear, ≥ 0; for an integrated test the
	// integrated SNR).
	Power float64
	// Swerling is the law of its amplitude over the looks the Pd averages
	// over: SwerlingNone (steady), Swerling1/2 (complex Gaussian),
	// Swerling3/4 (four degrees of freedom).
	Swerling int
}

// CellTolerance is the absolute accuracy each nested integral of
// PdInCell aims at.
const CellTolerance = 1e-9

// MaxCellDims is the number of nested integrals PdInCell evaluates.
const MaxCellDims = 2

// maxCellPoints bounds the points of one integral (per nesting level).
const maxCellPoints = 2048

// PdInCell returns the probability that a cell holding the echoes plus
// unit noise crosses the detector's threshold, with every echo's carrier
// phase uniform and independent (the law documented above). pdSteady(x,
// s) must return the detector's Pd for a steady echo of SNR x (linear, re
// the noise) against its threshold multiplied by s > 0, and false where
// it cannot; PdInCell then returns an error. It does not allocate beyond
// a fixed array for up to 1 + MaxCellDims phasors (the echoes are sorted
// in place by descending power, so pass a slice the caller owns).
func PdInCell(echoes []CellEcho, pdSteady func(snr, scale float64) (float64, bool)) (float64, error) {
	v := 1.0
	for _, e := range echoes {
		switch {
		case !(e.Power >= 0) || math.IsInf(e.Power, 1):
			return 0, fmt.Errorf("dsp: cell echo power %g out of range: want finite ≥ 0", e.Power)
		case e.Swerling < SwerlingNone || e.Swerling > Swerling4:
			return 0, fmt.Errorf("dsp: cell echo Swerling %d out of range: want 0 (steady) … 4", e.Swerling)
		}
		if e.Swerling == Swerling1 || e.Swerling == Swerling2 {
			v += e.Power
		}
	}
	for i := 1; i < len(echoes); i++ { // insertion sort, descending power, stable
		for k := i; k > 0 && echoes[k].Power > echoes[k-1].Power; k-- {
			echoes[k], echoes[k-1] = echoes[k-1], echoes[k]
		}
	}
	var c cellInt
	c.f, c.v = pdSteady, v
	dims := 0
	for _, e := range echoes {
		if e.Power <= 0 || e.Swerling == Swerling1 || e.Swerling == Swerling2 {
			continue
		}
		need := 0
		if c.n > 0 {
			need++ // its phase against the reference
		}
		if e.Swerling == Swerling3 || e.Swerling == Swerling4 {
			need++ // its power
		}
		if c.n == len(c.ph) || dims+need > MaxCellDims {
			c.v += e.Power // beyond the nesting: a Gaussian of its power
			continue
		}
		c.ph[c.n] = e
		c.n++
		dims += need
	}
	// With steady phasors only, the resultant lies between |a₀ − Σaᵢ| and
	// Σaᵢ and Pd grows with it: where the Pd at the two ends agree to
	// CellTolerance (a strong target, a weak neighbour), no integral is
	// needed.
	if steady := c.n > 1; steady {
		sum, rest := 0.0, 0.0
		for i := range c.n {
			if c.ph[i].Swerling != SwerlingNone {
				steady = false
			}
			a := math.Sqrt(c.ph[i].Power)
			sum += a
			if i > 0 {
				rest += a
			}
		}
		if steady {
			lo := math.Max(math.Sqrt(c.ph[0].Power)-rest, 0)
			pl, ok1 := c.f(lo*lo/c.v, 1/c.v)
			ph, ok2 := c.f(sum*sum/c.v, 1/c.v)
			if ok1 && ok2 && ph-pl < CellTolerance && ph >= pl {
				return math.Min(math.Max((pl+ph)/2, 0), 1), nil
			}
		}
	}
	p := c.at(0, 0, 0)
	if c.failed {
		return 0, errors.New("dsp: the detector's Pd is not available for a cell echo")
	}
	return math.Min(math.Max(p, 0), 1), nil
}

// cellInt holds the state of PdInCell's nested integrals.
type cellInt struct {
	ph     [1 + MaxCellDims]CellEcho
	n      int
	v      float64
	f      func(snr, scale float64) (float64, bool)
	failed bool
}

// at returns the expectation over phasors i… of the Pd, given the sum
// (re, im) of the amplitudes before i.
func (c *cellInt) at(i int, re, im float64) float64 {
	if c.failed {
		return 0
	}
	if i == c.n {
		p, ok := c.f((re*re+im*im)/c.v, 1/c.v)
		if !ok || math.IsNaN(p) {
			c.failed = true
			return 0
		}
		return p
	}
	e := c.ph[i]
	if e.Swerling == SwerlingNone {
		return c.phase(i, re, im, math.Sqrt(e.Power))
	}
	// Swerling 3/4: |a|² = (mean/2)·q, q ~ Gamma(2, 1) of density
	// q·e^−q. With q = e^t the integrand q²·e^−q·h decays like e^(2t) and
	// exp(−e^t) at the two ends, so the trapezoid rule in t over
	// [tLo, tHi] converges geometrically; the step halves until two
	// estimates agree.
	theta := e.Power / 2
	g := func(t float64) float64 {
		q := math.Exp(t)
		return q * q * math.Exp(-q) * c.phase(i, re, im, math.Sqrt(theta*q))
	}
	const tLo, tHi = -21.0, 4.65 // q from 7.6e-10 (weight below 1e-18) to 105 (e^−105)
	n := 64
	step := (tHi - tLo) / float64(n)
	sum := (g(tLo) + g(tHi)) / 2
	for k := 1; k < n; k++ {
		sum += g(tLo + float64(k)*step)
	}
	est := sum * step
	for 2*n <= maxCellPoints {
		for k := 1; k < 2*n; k += 2 {
			sum += g(tLo + float64(k)*step/2)
		}
		n *= 2
		step /= 2
		next := sum * step
		if math.Abs(next-est) < CellTolerance {
			return next
		}
		est = next
	}
	return est
}

// phase returns the expectation over phasor i's phase (uniform; the
// reference phasor, i = 0, is at phase 0) of the Pd with amplitude amp.
func (c *cellInt) phase(i int, re, im, amp float64) float64 {
	if i == 0 {
		return c.at(1, amp, 0)
	}
	// The resultant before i has some phase ψ; the integrand depends on
	// φ − ψ only, so rotate: integrate over the relative phase θ with the
	// resultant on the real axis.
	r := math.Hypot(re, im)
	h := func(th float64) float64 { return c.at(i+1, r+amp*math.Cos(th), amp*math.Sin(th)) }
	// Trapezoid rule on [0, π] for the even, 2π-periodic h, doubling.
	n := 8
	sum := (h(0) + h(math.Pi)) / 2
	for k := 1; k < n; k++ {
		sum += h(math.Pi * float64(k) / float64(n))
	}
	est := sum / float64(n)
	for 2*n <= maxCellPoints {
		for k := 1; k < 2*n; k += 2 {
			sum += h(math.Pi * float64(k) / float64(2*n))
		}
		n *= 2
		next := sum / float64(n)
		if math.Abs(next-est) < CellTolerance && n >= 32 {
			return next
		}
		est = next
	}
	return est
}
