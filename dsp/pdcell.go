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
	var c cellInt
	if err := c.prepare(echoes, pdSteady, CellTolerance); err != nil {
		return 0, err
	}
	// With steady phasors only, the resultant lies between |a₀ − Σaᵢ| and
	// Σaᵢ and Pd grows with it: where the Pd at the two ends agree to
	// CellTolerance (a strong target, a weak neighbour), no integral is
	// needed.
	if steady := c.n > 1; steady {
		for i := range c.n {
			if c.ph[i].Swerling != SwerlingNone {
				steady = false
			}
		}
		if steady {
			lo, hi := c.bounds()
			pl, ok1 := c.f(lo*lo, 1/c.v)
			ph, ok2 := c.f(hi*hi, 1/c.v)
			if ok1 && ok2 && ph-pl < CellTolerance && ph >= pl {
				return math.Min(math.Max((pl+ph)/2, 0), 1), nil
			}
		}
	}
	return c.integrate()
}

// prepare validates the echoes, sorts them, adds the Gaussian ones (and
// the phasors beyond MaxCellDims) to the noise power v and keeps the
// phasors to integrate over; tol is the accuracy of each integral.
func (c *cellInt) prepare(echoes []CellEcho, pdSteady func(snr, scale float64) (float64, bool), tol float64) error {
	v := 1.0
	for _, e := range echoes {
		switch {
		case !(e.Power >= 0) || math.IsInf(e.Power, 1):
			return fmt.Errorf("dsp: cell echo power %g out of range: want finite ≥ 0", e.Power)
		case e.Swerling < SwerlingNone || e.Swerling > Swerling4:
			return fmt.Errorf("dsp: cell echo Swerling %d out of range: want 0 (steady) … 4", e.Swerling)
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
	c.f, c.v, c.tol = pdSteady, v, tol
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
	return nil
}

// bounds returns the smallest and largest amplitude of the phasors'
// resultant over the integration domain, in units of √v (so that the
// steady echo's SNR in the widened noise is the square): a Swerling 3/4
// power ranges over q ∈ [0, qMax] halves of its mean.
func (c *cellInt) bounds() (lo, hi float64) {
	var amax [1 + MaxCellDims]float64
	for i := range c.n {
		e := c.ph[i]
		amax[i] = math.Sqrt(e.Power)
		if e.Swerling != SwerlingNone {
			amax[i] = math.Sqrt(e.Power / 2 * qMax)
		}
		hi += amax[i]
	}
	rest := hi - amax[0]
	a0 := math.Sqrt(c.ph[0].Power) // the reference's smallest amplitude
	if c.ph[0].Swerling != SwerlingNone {
		a0 = 0
	}
	sv := math.Sqrt(c.v)
	return math.Max(a0-rest, 0) / sv, hi / sv
}

// integrate evaluates the nested integrals of the prepared phasors.
func (c *cellInt) integrate() (float64, error) {
	p := c.at(0, 0, 0)
	if c.failed {
		return 0, errors.New("dsp: the detector's Pd is not available for a cell echo")
	}
	return math.Min(math.Max(p, 0), 1), nil
}

// PdInCellInterp returns PdInCell's probability with the detector's
// steady-target Pd replaced by an interpolant, for detectors whose Pd is
// costly (an ordered-statistic CFAR against a raised threshold: its series
// runs over thousands of terms, and the nested integrals ask for it at
// thousands of points). Within one call the threshold scale is the same
// at every point (1/v, v the noise power widened by the Gaussian echoes),
// so pdSteady is a function of the steady resultant's amplitude u alone
// (in units of √v, SNR u²), non-decreasing in u. It is tabulated over the
// domain of the integrals (bounds) as a piecewise Chebyshev interpolant:
// each panel holds the values at 17 Chebyshev–Lobatto points and is
// accepted when its interpolant's last three Chebyshev coefficients add
// up to less than InterpTolerance, else it is halved (at most
// maxInterpDepth times). Above the first amplitude where Pd
// reaches 1 − InterpTolerance (found by doubling steps) Pd is held there:
// the error is at most InterpTolerance, since Pd is non-decreasing and
// at most 1. Where Pd at the two ends of the domain (or at the first
// point within InterpTolerance of 1) differs by less than 2·InterpShortcut,
// their mean is returned without an integral, for every law: the
// integrals average Pd over that domain, and Pd is monotone in u, so the
// error is at most InterpShortcut (their difference may also be rounding
// of a series near 1). The integrals otherwise run to
// InterpCellTolerance. Its result is within 1e-6 of PdInCell's (TestPdInCellInterp compares the two on random
// cells for every detector kind and law); it calls pdSteady a few dozen
// to a few hundred times instead of thousands, and allocates the table.
func PdInCellInterp(echoes []CellEcho, pdSteady func(snr, scale float64) (float64, bool)) (float64, error) {
	var c cellInt
	if err := c.prepare(echoes, pdSteady, InterpCellTolerance); err != nil {
		return 0, err
	}
	if c.n == 0 || (c.n == 1 && (c.ph[0].Swerling == SwerlingNone)) {
		return c.integrate() // one point: nothing to tabulate
	}
	lo, hi := c.bounds()
	var t cellTable
	t.f, t.s = pdSteady, 1/c.v
	pl, ok1 := t.at(lo)
	if !ok1 {
		return 0, errors.New("dsp: the detector's Pd is not available for a cell echo")
	}
	// The first amplitude above lo where Pd is within InterpTolerance of
	// 1, or hi.
	top, ptop := hi, math.NaN()
	for step := 0.5; ; step *= 2 {
		u := math.Min(lo+step, hi)
		p, ok := t.at(u)
		if !ok {
			return 0, errors.New("dsp: the detector's Pd is not available for a cell echo")
		}
		if p >= 1-InterpTolerance || u == hi {
			top, ptop = u, p
			break
		}
	}
	if math.Abs(ptop-pl) < 2*InterpShortcut {
		return math.Min(math.Max((pl+ptop)/2, 0), 1), nil
	}
	if err := t.build(lo, top); err != nil {
		return 0, err
	}
	t.top, t.ptop = top, ptop
	c.tab = &t
	return c.integrate()
}

// InterpTolerance is the accuracy PdInCellInterp's table aims at (absolute,
// in Pd).
const InterpTolerance = 1e-7

// InterpShortcut is the largest error of PdInCellInterp's result where it
// returns the mean of Pd at the two ends of the domain without an
// integral.
const InterpShortcut = 5e-7

// InterpCellTolerance is the accuracy each nested integral of
// PdInCellInterp aims at: above the table's own, whose panel joins put
// steps of InterpTolerance into the integrand.
const InterpCellTolerance = 1e-7

// maxInterpDepth bounds the halvings of a panel of the table.
const maxInterpDepth = 16

// qMax is the largest Swerling 3/4 power, in halves of its mean, of the
// integral over it (at's tHi).
const qMax = 105

// cellTable is PdInCellInterp's interpolant of pdSteady(u², s) on
// [panels[0].a, top], held at ptop above top.
type cellTable struct {
	f         func(snr, scale float64) (float64, bool)
	s         float64
	panels    []cellPanel
	top, ptop float64
	calls     int
	cheb      [cellNodes]float64 // the Chebyshev–Lobatto points cos(πj/16) on [−1, 1]
}

// cellPanel is one panel: the values at the 17 Chebyshev–Lobatto points
// of [a, b], x_j = (a+b)/2 + (b−a)/2·cos(πj/16).
type cellPanel struct {
	a, b float64
	y    [cellNodes]float64
}

// cellNodes is the number of points of a panel.
const cellNodes = 17

// at returns pdSteady at amplitude u.
func (t *cellTable) at(u float64) (float64, bool) {
	t.calls++
	p, ok := t.f(u*u, t.s)
	if !ok || math.IsNaN(p) {
		return 0, false
	}
	return p, true
}

// build fills the panels over [a, b].
func (t *cellTable) build(a, b float64) error {
	for j := range t.cheb {
		t.cheb[j] = math.Cos(math.Pi * float64(j) / (cellNodes - 1))
	}
	var p cellPanel
	return t.panel(a, b, 0, &p)
}

// panel tabulates [a, b], halving it until the test of PdInCellInterp
// passes; p is scratch.
func (t *cellTable) panel(a, b float64, depth int, p *cellPanel) error {
	p.a, p.b = a, b
	m, h := (a+b)/2, (b-a)/2
	for j := range cellNodes {
		y, ok := t.at(m + h*t.cheb[j])
		if !ok {
			return errors.New("dsp: the detector's Pd is not available for a cell echo")
		}
		p.y[j] = y
	}
	if depth < maxInterpDepth && t.tail(p) > InterpTolerance {
		var q cellPanel
		if err := t.panel(a, m, depth+1, &q); err != nil {
			return err
		}
		return t.panel(m, b, depth+1, &q)
	}
	t.panels = append(t.panels, *p)
	return nil
}

// tail returns |c₁₄| + |c₁₅| + |c₁₆|, the last three Chebyshev coefficients
// of the panel's interpolant, c_k = (2/16)·Σ″ y_j·cos(πjk/16) (the
// first and last terms halved, and c₁₆ halved; Trefethen, Approximation
// Theory and Approximation Practice, 2013, ch. 3): they bound how far the
// interpolant can be from a function whose coefficients keep falling.
func (t *cellTable) tail(p *cellPanel) float64 {
	const n = cellNodes - 1
	sum := 0.0
	for k := n - 2; k <= n; k++ {
		c := 0.0
		for j := 0; j <= n; j++ {
			m := (j * k) % (2 * n) // cos(πm/n), m ∈ [0, 2n)
			if m > n {
				m = 2*n - m
			}
			w := p.y[j] * t.cheb[m]
			if j == 0 || j == n {
				w /= 2
			}
			c += w
		}
		c *= 2.0 / n
		if k == n {
			c /= 2
		}
		sum += math.Abs(c)
	}
	return sum
}

// eval returns the interpolated Pd at amplitude u (in units of √v).
func (t *cellTable) eval(u float64) float64 {
	if u >= t.top {
		return t.ptop
	}
	ps := t.panels
	i, j := 0, len(ps)-1
	for i < j { // the last panel whose a ≤ u
		k := (i + j + 1) / 2
		if ps[k].a <= u {
			i = k
		} else {
			j = k - 1
		}
	}
	p := &ps[i]
	x := (2*u - p.a - p.b) / (p.b - p.a)
	x = math.Min(math.Max(x, -1), 1)
	num, den := 0.0, 0.0
	for j := range cellNodes {
		d := x - t.cheb[j]
		if d == 0 {
			return p.y[j]
		}
		w := 1.0 / d
		if j%2 == 1 {
			w = -w
		}
		if j == 0 || j == cellNodes-1 {
			w /= 2
		}
		num += w * p.y[j]
		den += w
	}
	return num / den
}

// cellInt holds the state of PdInCell's nested integrals.
type cellInt struct {
	ph     [1 + MaxCellDims]CellEcho
	n      int
	v      float64
	f      func(snr, scale float64) (float64, bool)
	tab    *cellTable // PdInCellInterp's interpolant of f, or nil
	tol    float64    // the accuracy of each integral
	failed bool
}

// at returns the expectation over phasors i… of the Pd, given the sum
// (re, im) of the amplitudes before i.
func (c *cellInt) at(i int, re, im float64) float64 {
	if c.failed {
		return 0
	}
	if i == c.n {
		if c.tab != nil {
			return c.tab.eval(math.Sqrt((re*re + im*im) / c.v))
		}
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
		if math.Abs(next-est) < c.tol {
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
		if math.Abs(next-est) < c.tol && n >= 32 {
			return next
		}
		est = next
	}
	return est
}
