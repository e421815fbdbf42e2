package dsp

import (
	"math"
	"sort"
)

// Specific attenuation of rain (ITU-R Recommendation P.838-2, 2003):
// γ = k·R^α dB/km for a rain rate R in mm/h, with k and α by frequency
// and polarisation from its Table 1, for horizontal paths. Between the
// table's frequencies, k is interpolated on logarithmic scales of
// frequency and k and α on a logarithmic scale of frequency and a
// linear one of α (the interpolation rule of CCIR Recommendation 838,
// 1992, whose table P.838-2 refines).

// rainRows returns P.838-2 Table 1, 1 … 50 GHz: frequency (GHz), kH,
// kV, αH, αV, as printed (a value, so the package holds no global).
func rainRows() [21][5]float64 {
	return [21][5]float64{
		{1, 0.0000387, 0.0000352, 0.9122, 0.8801},
		{1.5, 0.0000868, 0.0000784, 0.9341, 0.8905},
		{2, 0.0001543, 0.0001388, 0.9629, 0.9230},
		{2.5, 0.0002416, 0.0002169, 0.9873, 0.9594},
		{3, 0.0003504, 0.0003145, 1.0185, 0.9927},
		{4, 0.0006479, 0.0005807, 1.1212, 1.0749},
		{5, 0.001103, 0.0009829, 1.2338, 1.1805},
		{6, 0.001813, 0.001603, 1.3068, 1.2662},
		{7, 0.002915, 0.002560, 1.3334, 1.3086},
		{8, 0.004567, 0.003996, 1.3275, 1.3129},
		{9, 0.006916, 0.006056, 1.3044, 1.2937},
		{10, 0.01006, 0.008853, 1.2747, 1.2636},
		{12, 0.01882, 0.01680, 1.2168, 1.1994},
		{15, 0.03689, 0.03362, 1.1549, 1.1275},
		{20, 0.07504, 0.06898, 1.0995, 1.0663},
		{25, 0.1237, 0.1125, 1.0604, 1.0308},
		{30, 0.1864, 0.1673, 1.0202, 0.9974},
		{35, 0.2632, 0.2341, 0.9789, 0.9630},
		{40, 0.3504, 0.3104, 0.9394, 0.9293},
		{45, 0.4426, 0.3922, 0.9040, 0.8981},
		{50, 0.5346, 0.4755, 0.8735, 0.8705},
	}
}

// RainTableGHz returns the frequency range of the rain table, GHz.
func RainTableGHz() (lo, hi float64) {
	t := rainRows()
	return t[0][0], t[len(t)-1][0]
}

// RainCoefficients returns k and α of P.838-2 at fGHz (GHz) for
// horizontal (vertical false) or vertical polarisation; ok is false
// outside the table's 1 … 50 GHz.
func RainCoefficients(fGHz float64, vertical bool) (k, alpha float64, ok bool) {
	rainTable := rainRows()
	lo, hi := RainTableGHz()
	if !(fGHz >= lo && fGHz <= hi) {
		return 0, 0, false
	}
	ki, ai := 1, 3
	if vertical {
		ki, ai = 2, 4
	}
	i := sort.Search(len(rainTable), func(i int) bool { return rainTable[i][0] >= fGHz })
	if rainTable[i][0] == fGHz {
		return rainTable[i][ki], rainTable[i][ai], true
	}
	a, b := rainTable[i-1], rainTable[i]
	u := math.Log(fGHz/a[0]) / math.Log(b[0]/a[0])
	k = math.Exp(math.Log(a[ki]) + u*(math.Log(b[ki])-math.Log(a[ki])))
	alpha = a[ai] + u*(b[ai]-a[ai])
	return k, alpha, true
}

// FlatSeaFactor returns the one-way pattern-propagation factor F of a
// point h2 metres above a flat, perfectly reflecting sea (reflection
// coefficient −1, the smooth sea at low grazing angle) seen from an
// antenna h1 metres high at range r (m), wavelength lambda (m): the
// direct ray and the reflected one differ by 2·h1·h2/r in path, so
// F = |1 − exp(−j2π·2h1h2/(λr))| = 2·|sin(2π·h1·h2/(λ·r))| (the flat-earth
// two-ray model of radar texts, from memory). F is 2 at the lobe peaks
// (r = 4h1h2/(λ(2n+1))) and 0 at the nulls; the echo's power scales by
// F⁴ (both ways). Beyond the last peak F ≈ 4π·h1·h2/(λ·r), so the echo
// falls as r⁻⁸.
func FlatSeaFactor(h1, h2, r, lambda float64) float64 {
	return 2 * math.Abs(math.Sin(2*math.Pi*h1*h2/(lambda*r)))
}

// RainAttenuation returns the specific attenuation γ = k·R^α in dB/km
// for a rain rate R (mm/h).
func RainAttenuation(k, alpha, rate float64) float64 { return k * math.Pow(rate, alpha) }
