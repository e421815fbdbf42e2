package dsp

import "math"

// Sea clutter reflectivity: the NRL empirical model of V. Gregers-Hansen
// and R. Mital, "An Improved Empirical Model for Radar Sea Clutter
// Reflectivity", IEEE Trans. Aerospace and Electronic Systems 48(4),
// 3512–3524, October 2012 (also Naval Research Laboratory memorandum
// report NRL/MR/5310--12-9346, 27 April 2012). It is a fit to the seven
// tables of measured sea reflectivity in F. E. Nathanson, Radar Design
// Principles, 2nd ed. (1991): grazing angles 0.1, 0.3, 1, 3, 10, 30 and
// 60°, frequencies 0.5, 1.25, 3, 5.6, 9.3, 17 and 35 GHz, sea states 0 … 6,
// horizontal and vertical polarisation. In dB,
//
//	σ⁰ = c1 + c2·log10(sin ψ) + (27.5 + c3·ψ)·log10(f)/(1 + 0.95·ψ)
//	       + c4·(SS + 1)^(1/(2 + 0.085·ψ + 0.033·SS)) + c5·ψ²
//
// with ψ the grazing angle in degrees, f in GHz and SS the sea state;
// horizontal: c1…c5 = −73.0, 20.781, 7.351, 25.65, 0.0054; vertical:
// −50.796, 25.93, 0.7093, 21.588, 0.00211. The formula and coefficients
// are read in the model authors' own program (V. Gregers-Hansen, NRL,
// 5 May 2010, NRL_SigmaSea.m in github.com/scivision/nrl-radar-sea-clutter,
// which publishes it with the report); the report's text could not be
// read here. Its mean absolute deviation from Nathanson's values (those
// tables as the same authors transcribe them in SigmaSea_vs_GrazAng.m)
// is 2.64 dB (H) and 2.54 dB (V) over 0.1 … 60°, as their program states
// and dsp/sea_test.go recomputes.

// SeaModelLimits returns where the NRL model was fitted: frequency (GHz),
// grazing angle (degrees) and sea state, the span of Nathanson's tables.
func SeaModelLimits() (fLo, fHi, psiLo, psiHi, ssHi float64) { return 0.5, 35, 0.1, 60, 6 }

// SeaSigma0DB returns the NRL model's sea reflectivity σ⁰ (dB m²/m²) at
// fGHz (GHz), sea state ss, grazing angle psiDeg (degrees), for vertical
// (true) or horizontal polarisation. The caller keeps the inputs inside
// SeaModelLimits; psiDeg ≤ 0 gives −Inf.
func SeaSigma0DB(fGHz, ss float64, vertical bool, psiDeg float64) float64 {
	c := [5]float64{-73.0, 20.781, 7.351, 25.65, 0.0054}
	if vertical {
		c = [5]float64{-50.796, 25.93, 0.7093, 21.588, 0.00211}
	}
	psi := psiDeg
	return c[0] + c[1]*math.Log10(math.Sin(psi*math.Pi/180)) + (27.5+c[2]*psi)*math.Log10(fGHz)/(1+0.95*psi) +
		c[3]*math.Pow(ss+1, 1/(2+0.085*psi+0.033*ss)) + c[4]*psi*psi
}

// GrazingRange returns the slant range (m) at which the ray from an
// antenna h metres above a sphere of radius ae (m; +Inf for a flat Earth)
// meets the surface at grazing angle psi (rad, 0 < psi ≤ π/2): the
// positive root of r² + 2·ae·r·sin ψ − (2·ae·h + h²) = 0, the inverse of
// GrazingAngle (r = h/sin ψ on a flat Earth).
func GrazingRange(h, psi, ae float64) float64 {
	s := math.Sin(psi)
	if math.IsInf(ae, 1) {
		return h / s
	}
	b := ae * s
	c := 2*ae*h + h*h
	// −b + √(b² + c), written without cancellation.
	return c / (b + math.Sqrt(b*b+c))
}
