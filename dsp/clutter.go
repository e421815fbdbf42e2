package dsp

import "math"

// Surface clutter geometry and the effective number of independent cells.

// EarthRadius is the mean radius of the Earth, m (IUGG mean radius R1,
// 6 371 008.8 m, rounded to the kilometre as radar texts use it).
const EarthRadius = 6371e3

// EffectiveEarthRadius is the radius of the 4/3 Earth, m: standard
// atmospheric refraction bends rays as if the Earth's radius were 4/3 of
// its true value (common practice; Skolnik, Introduction to Radar Systems,
// from memory, section not re-read).
// It puts the radar horizon of an antenna h metres high at
// √(2·a_e·h) ≈ 4.12·√h km.
const EffectiveEarthRadius = 4.0 / 3.0 * EarthRadius

// GrazingAngle returns the grazing angle ψ (rad) at which the ray from an
// antenna h metres above a smooth sphere of radius ae (m) meets the
// surface at slant range r (m). By the law of cosines in the triangle
// centre–antenna–surface point,
//
//	sin ψ = (2·ae·h + h² − r²) / (2·ae·r) = h/r + h²/(2·ae·r) − r/(2·ae),
//
// and with ae = +Inf (a flat Earth) sin ψ = h/r. ok is false when no
// surface point lies at that range: r < h (nearer than the ground below
// the antenna), or r at or beyond the horizon √(2·ae·h + h²), where
// sin ψ ≤ 0 (the surface is shadowed). h and r must be positive.
func GrazingAngle(h, r, ae float64) (psi float64, ok bool) {
	if !(h > 0) || !(r > 0) || r < h {
		return 0, false
	}
	s := h / r
	if !math.IsInf(ae, 1) {
		s = (2*ae*h + h*h - r*r) / (2 * ae * r)
	}
	if !(s > 0) {
		return 0, false
	}
	return math.Asin(math.Min(s, 1)), true
}

// ConstantGammaSigma0 returns the surface reflectivity σ⁰ (m²/m², linear)
// of the constant-γ model, σ⁰ = γ·sin ψ, for γ linear and grazing angle
// psi (rad): Richards, Fundamentals of Radar Signal Processing, 2nd ed.,
// eq. 2.64 (after Long 2001), a model of the plateau region of grazing
// angles.
func ConstantGammaSigma0(gamma, psi float64) float64 { return gamma * math.Sin(psi) }

// SurfacePatchRCS returns the radar cross-section (m²) of the surface
// clutter patch one range cell deep, pulse-limited at low grazing angle
// (Skolnik, Introduction to Radar Systems, surface clutter at low grazing
// angles; section not re-read):
//
//	σ_c = σ⁰·R·θ_az·ΔR·sec ψ
//
// with σ⁰ linear (m²/m²), range r (m), azimuth beamwidth thetaAz (rad),
// cell depth dr (m, c/(2B)) and grazing angle psi (rad). The clutter
// power of a cell then falls as σ_c/R⁴ ∝ R⁻³ for a constant σ⁰. The
// formula overstates the patch at high grazing angles, where the beam,
// not the pulse, bounds it.
func SurfacePatchRCS(sigma0, r, thetaAz, dr, psi float64) float64 {
	return sigma0 * r * thetaAz * dr / math.Cos(psi)
}

// NoiseCorrelationLength returns Σ_m |ρ(m)|² over every lag m, ρ the
// correlation of white noise compressed by the reference h (as
// NoiseCorrelation): the number of output samples per independent noise
// sample. It is 1 for a one-tap reference, about fs/B for a matched
// filter sampled at fs, more when the reference is weighted; a window of
// n ≫ len(h) gates holds about n/NoiseCorrelationLength independent
// cells (the effective number N²/Σ_ij|ρ(j−i)|², window ends neglected).
// It panics when h has no energy.
func NoiseCorrelationLength(h []complex128) float64 {
	var e float64
	for _, v := range h {
		e += real(v)*real(v) + imag(v)*imag(v)
	}
	if !(e > 0) {
		panic("dsp: noise correlation length of a reference without energy")
	}
	x := make([]complex128, 2*len(h))
	copy(x, h)
	y := NewCorrelator(h, len(x)).Apply(nil, x)
	// y[j] = Σ_i h[j+i]·conj(h[i]) = e·conj(ρ(j)) for lags j = 0 … len(h)−1.
	s := 0.0
	for j := range h {
		a := (real(y[j])*real(y[j]) + imag(y[j])*imag(y[j])) / (e * e)
		if j == 0 {
			s += a
		} else {
			s += 2 * a
		}
	}
	return s
}
