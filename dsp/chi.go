package dsp

import (
	"math"
	"math/cmplx"
)

// Chi is the compressed response χ(Δ) = ∫ u(t+Δ)·conj(h(t)) dt of a filter
// h to the ideal, noise-free, zero-Doppler echo of a pulse u, as a
// function of the continuous delay Δ in s, known on a uniform grid of
// delays, with the energies E_u = ∫|u|² dt and E_h = ∫|h|² dt (s for unit
// envelopes). Build it with HeldChi (exact for signals constant over the
// grid's intervals) or SampledChi (band-limited interpolation of sampled
// signals). The definitions of its figures are in docs/figures.md. A Chi
// is immutable and safe for concurrent use.
type Chi struct {
	z      []complex128 // HeldChi: χ at the nodes (including a zero at each end)
	mag    []float64    // |χ| at the grid points
	step   float64      // grid spacing, s
	lag0   float64      // grid index of lag 0 (x[0] against h[0])
	linear bool         // χ is exactly linear in complex value between nodes
	eu, eh float64      // energies, s
	floor  float64      // sidelobes at or below floor·peak (magnitude) do not count
}

// ChiFigures are the continuous-time figures of a response.
type ChiFigures struct {
	// Sidelobes is false when nothing lies outside the main lobe above the
	// response's numerical floor; PSLRDB and ISLRDB are then 0 and do not
	// apply.
	Sidelobes      bool
	PSLRDB         float64 // highest |χ|² outside the main lobe over peak |χ|², dB (negative)
	ISLRDB         float64 // ∫ outside |χ|² dΔ over ∫ main lobe |χ|² dΔ, dB
	Mainlobe3dB    float64 // width of the interval around the peak where |χ|² ≥ ½·peak², s
	MismatchLossDB float64 // 10·log10(E_u·E_h/|χ_peak|²), dB ≥ 0
	Peak           float64 // |χ_peak|, in the units of χ (s for unit envelopes)
	PeakDelay      float64 // delay of the peak from lag 0 (x[0] against h[0]), s
	EnergyU        float64 // E_u = ∫|u|² dt, in the units of χ
	EnergyH        float64 // E_h = ∫|h|² dt, in the units of χ
}

// HeldChi returns the response of h to x where both are held sequences:
// x[i] holds over [i·step, (i+1)·step), and h[i] likewise, step in s. Then
//
//	χ(j·step) = step·Σ_i x[i+j]·conj(h[i]),  j = −(len(h)−1) … len(x)−1,
//
// χ is exactly linear in complex value between adjacent lags and zero
// from one step beyond the outermost lags, so the figures follow in closed
// form on each segment: |χ|² is a convex quadratic there (sidelobe peaks
// sit on lags), and its minimum, half-power crossing and integral are
// solved exactly. Sidelobes at or below 1e-9 of the peak magnitude do not
// count. It panics if x or h is empty or step is not positive.
func HeldChi(x, h []complex128, step float64) *Chi {
	if len(x) == 0 || len(h) == 0 || !(step > 0) {
		panic("dsp: held response needs two sequences and step > 0")
	}
	c := fullCorrelation(x, h, nil)
	z := make([]complex128, len(c)+2)
	for i, v := range c {
		z[i+1] = v * complex(step, 0)
	}
	ch := &Chi{z: z, mag: make([]float64, len(z)), step: step, lag0: float64(len(h)), linear: true, floor: 1e-9}
	for i, v := range z {
		ch.mag[i] = cmplx.Abs(v)
	}
	ch.eu, ch.eh = step*energyOf(x), step*energyOf(h)
	return ch
}

// SampledChi returns the response of h to x, both sampled at fs (Hz) from
// signals of bandwidth about B (Hz): their discrete correlation divided
// by fs, interpolated band-limitedly (FFT zero padding) to at least 16
// points per 1/B, with peaks refined by a parabola through three points;
// integrals are sums on that grid and energies Σ|·|²/fs. Sidelobes at or
// below 1e-5 of the peak magnitude (−100 dB, the order of the
// interpolation's ripple in a monotone tail) do not count. It panics if x
// or h is empty or fs or bandwidth is not positive.
func SampledChi(x, h []complex128, fs, bandwidth float64) *Chi {
	if !(bandwidth > 0) {
		panic("dsp: sampled response needs a bandwidth > 0")
	}
	r := newResponse(x, h, fs, bandwidth)
	for i := range r.mag {
		r.mag[i] /= fs
	}
	return &Chi{mag: r.mag, step: 1 / r.rate, lag0: float64((len(h) - 1) * r.up),
		eu: energyOf(x) / fs, eh: energyOf(h) / fs, floor: 1e-5}
}

// Figures measures the response (definitions in docs/figures.md). For a
// response with no peak (h orthogonal to x) it returns zero figures.
func (c *Chi) Figures() ChiFigures {
	if c.linear {
		return c.linearFigures()
	}
	return c.sampledFigures()
}

// segInt returns ∫_0^e |a + d·ε|² dε.
func segInt(a, d complex128, e float64) float64 {
	aa := real(a)*real(a) + imag(a)*imag(a)
	dd := real(d)*real(d) + imag(d)*imag(d)
	ad := real(cmplx.Conj(a) * d)
	return aa*e + ad*e*e + dd*e*e*e/3
}

// edge walks from the peak node p in direction dir (±1) to the first
// local minimum of |χ| and returns its grid position.
func (c *Chi) edge(p, dir int) float64 {
	z := c.z
	for j := p; j+dir >= 0 && j+dir < len(z); j += dir {
		a, b := z[j], z[j+dir]
		d := b - a
		f0 := real(cmplx.Conj(a) * d) // ½ d|z|²/dε at the near node
		if cmplx.Abs(d) <= 1e-12*c.mag[p] && c.mag[j] >= c.mag[p]*(1-1e-12) {
			continue // a plateau at the peak (up to rounding) belongs to the main lobe
		}
		if f0 >= 0 {
			return float64(j)
		}
		if f1 := real(cmplx.Conj(b) * d); f1 > 0 { // minimum inside the segment
			dd := real(d)*real(d) + imag(d)*imag(d)
			return float64(j) + float64(dir)*(-f0/dd)
		}
	}
	if dir < 0 {
		return 0
	}
	return float64(len(z) - 1)
}

// halfPower walks from the peak node p in direction dir to where |χ|²
// first falls below level and returns that grid position.
func (c *Chi) halfPower(p, dir int, level float64) float64 {
	z := c.z
	for j := p; j+dir >= 0 && j+dir < len(z); j += dir {
		a := z[j]
		d := z[j+dir] - a
		qa := real(d)*real(d) + imag(d)*imag(d)
		qb := 2 * real(cmplx.Conj(a)*d)
		qc := real(a)*real(a) + imag(a)*imag(a) - level
		if e, ok := firstRoot(qa, qb, qc); ok {
			return float64(j) + float64(dir)*e
		}
	}
	if dir < 0 {
		return 0
	}
	return float64(len(z) - 1)
}

// firstRoot returns the smallest ε in [0, 1] where the convex quadratic
// g(ε) = qa·ε² + qb·ε + qc (qa ≥ 0, qc = g(0) ≥ 0) goes below zero.
func firstRoot(qa, qb, qc float64) (float64, bool) {
	if qc < 0 {
		return 0, true
	}
	if qb >= 0 {
		return 0, false // g increases from a non-negative value
	}
	disc := qb*qb - 4*qa*qc
	if disc <= 0 {
		return 0, false
	}
	q := (-qb + math.Sqrt(disc)) / 2 // > 0
	e := qc / q                      // the smaller root, stably
	if e <= 1 {
		return e, true
	}
	return 0, false
}

func (c *Chi) linearFigures() ChiFigures {
	z, mag := c.z, c.mag
	p := argmax(mag)
	peak := mag[p]
	if peak == 0 {
		return ChiFigures{}
	}
	f := ChiFigures{Peak: peak, PeakDelay: (float64(p) - c.lag0) * c.step, EnergyU: c.eu, EnergyH: c.eh}
	f.MismatchLossDB = math.Max(0, 10*math.Log10(c.eu*c.eh/(peak*peak)))
	lo, hi := c.edge(p, -1), c.edge(p, +1)
	half := peak * peak / 2
	f.Mainlobe3dB = (c.halfPower(p, +1, half) - c.halfPower(p, -1, half)) * c.step
	var side, main, sideMax float64
	for i, v := range mag {
		if (float64(i) < lo || float64(i) > hi) && v > sideMax {
			sideMax = v
		}
	}
	for j := 0; j+1 < len(z); j++ {
		a, d := z[j], z[j+1]-z[j]
		whole := segInt(a, d, 1)
		// Part of segment [j, j+1] inside the main lobe [lo, hi].
		e0 := math.Min(math.Max(lo-float64(j), 0), 1)
		e1 := math.Min(math.Max(hi-float64(j), 0), 1)
		in := segInt(a, d, e1) - segInt(a, d, e0)
		main += in
		side += segInt(a, d, e0) + (whole - segInt(a, d, e1))
	}
	if sideMax > c.floor*peak {
		f.Sidelobes = true
		f.PSLRDB = 20 * math.Log10(sideMax/peak)
		f.ISLRDB = 10 * math.Log10(side/main)
	}
	return f
}

func (c *Chi) sampledFigures() ChiFigures {
	mag := c.mag
	ip := argmax(mag)
	pos, peak := refinePeak(mag, ip, true)
	if peak == 0 {
		return ChiFigures{}
	}
	f := ChiFigures{Peak: peak, PeakDelay: (pos - c.lag0) * c.step, EnergyU: c.eu, EnergyH: c.eh}
	f.MismatchLossDB = math.Max(0, 10*math.Log10(c.eu*c.eh/(peak*peak)))
	_, _, main, side, sideMax, iSide := splitLobes(mag, ip)
	r := response{mag: mag}
	f.Mainlobe3dB = (r.cross(ip, +1, peak/math.Sqrt2) - r.cross(ip, -1, peak/math.Sqrt2)) * c.step
	if iSide >= 0 {
		_, sideMax = refinePeak(mag, iSide, true)
	}
	if sideMax > c.floor*peak {
		f.Sidelobes = true
		f.PSLRDB = 20 * math.Log10(math.Min(sideMax/peak, 1))
		f.ISLRDB = 10 * math.Log10(side/main)
	}
	return f
}

// Plot returns the response for plotting: t[i] the delay in s relative to
// the peak and db[i] = 20·log10(|χ|/|χ_peak|), floored at −300 dB. A held
// response is evaluated at per points on each interval between lags
// (per ≥ 1), so that nulls between lags show; a sampled one on its
// interpolation grid. Both slices are newly allocated.
func (c *Chi) Plot(per int) (t, db []float64) {
	f := c.Figures()
	if f.Peak == 0 {
		f.Peak = 1
	}
	at := func(i int, v float64) {
		t = append(t, float64(i)*c.step/float64(per)-c.lag0*c.step-f.PeakDelay)
		db = append(db, 20*math.Log10(math.Max(v/f.Peak, 1e-15)))
	}
	if !c.linear || per <= 1 {
		per = 1
		t, db = make([]float64, 0, len(c.mag)), make([]float64, 0, len(c.mag))
		for i, v := range c.mag {
			at(i, v)
		}
		return t, db
	}
	n := (len(c.z)-1)*per + 1
	t, db = make([]float64, 0, n), make([]float64, 0, n)
	for j := 0; j+1 < len(c.z); j++ {
		a, d := c.z[j], c.z[j+1]-c.z[j]
		for k := range per {
			at(j*per+k, cmplx.Abs(a+d*complex(float64(k)/float64(per), 0)))
		}
	}
	at(n-1, c.mag[len(c.mag)-1])
	return t, db
}

// Len returns the number of grid points of the response.
func (c *Chi) Len() int { return len(c.mag) }
