package dsp

import (
	"math"
	"math/rand/v2"
)

// Physical constants.
const (
	SpeedOfLight = 299792458.0  // c, m/s
	Boltzmann    = 1.380649e-23 // k, J/K
	T0           = 290.0        // reference noise temperature, K
)

// DB converts a power ratio to decibels, 10·log10(x).
func DB(x float64) float64 { return 10 * math.Log10(x) }

// FromDB converts decibels to a power ratio, 10^(x/10).
func FromDB(x float64) float64 { return math.Pow(10, x/10) }

// RadarSNR returns the single-pulse signal-to-noise ratio (linear) of a
// point target at the output of a matched filter, with no weighting and no
// Doppler mismatch:
//
//	SNR = Pt·τ·G²·λ²·σ / ((4π)³·R⁴·k·T0·F·Ls)
//
// with peak power pt (W), pulse width tau (s), one-way antenna gain g,
// wavelength lambda (m), radar cross-section sigma (m²), range r (m),
// noise figure f and system loss ls (linear ratios). The form follows
// the scenario format; it equals Richards (2014) eq. 2.30 with the
// noise bandwidth equal to 1/τ.
func RadarSNR(pt, tau, g, lambda, sigma, r, f, ls float64) float64 {
	return pt * tau * g * g * lambda * lambda * sigma /
		(math.Pow(4*math.Pi, 3) * math.Pow(r, 4) * Boltzmann * T0 * f * ls)
}

// ReceivedPower returns the echo power at the receiver input, W:
// Pt·G²·λ²·σ / ((4π)³·R⁴·Ls).
func ReceivedPower(pt, g, lambda, sigma, r, ls float64) float64 {
	return pt * g * g * lambda * lambda * sigma / (math.Pow(4*math.Pi, 3) * math.Pow(r, 4) * ls)
}

// NoisePower returns the thermal noise power k·T0·F·bw in W for a noise
// figure f (linear) and noise bandwidth bw (Hz).
func NoisePower(f, bw float64) float64 { return Boltzmann * T0 * f * bw }

// WaterK2 is the dielectric factor |K|² of liquid water used for radar
// reflectivity (Battan 1973; Doviak & Zrnić 1993).
const WaterK2 = 0.93

// VolumeReflectivity returns η (m²/m³, i.e. m⁻¹) for a reflectivity factor
// in dBZ (Z in mm⁶/m³) at wavelength lambda (m):
//
//	η = π⁵·|K|²·Z / λ⁴,  Z in m⁶/m³ = 1e-18 × mm⁶/m³.
func VolumeReflectivity(dbz, lambda float64) float64 {
	z := math.Pow(10, dbz/10) * 1e-18
	return math.Pow(math.Pi, 5) * WaterK2 * z / math.Pow(lambda, 4)
}

// BeamArea returns the cross-section (m²) of a Gaussian beam at range r
// (m) with 3-dB beamwidths az and el (rad), so that the resolution volume
// of range extent Δr is BeamArea·Δr (Probert-Jones 1962):
//
//	A = π·r²·az·el / (8·ln 2).
func BeamArea(r, az, el float64) float64 {
	return math.Pi * r * r * az * el / (8 * math.Ln2)
}

// Fluctuation models of a point target's RCS.
const (
	SwerlingNone = 0 // steady
	Swerling1    = 1 // exponential power, scan to scan
	Swerling2    = 2 // exponential power, pulse to pulse
	Swerling3    = 3 // chi-square 4 degrees of freedom, scan to scan
	Swerling4    = 4 // chi-square 4 degrees of freedom, pulse to pulse
)

// SwerlingRCS draws one RCS value (m²) of mean sigma for Swerling model
// case (0 steady; 1, 2 exponential; 3, 4 chi-square with four degrees of
// freedom, mean preserved).
func SwerlingRCS(r *rand.Rand, sigma float64, model int) float64 {
	switch model {
	case Swerling1, Swerling2:
		return sigma * r.ExpFloat64()
	case Swerling3, Swerling4:
		return sigma * (r.ExpFloat64() + r.ExpFloat64()) / 2
	}
	return sigma
}

// ComplexNormal returns a circular complex Gaussian sample of unit power,
// E|z|² = 1.
func ComplexNormal(r *rand.Rand) complex128 {
	return complex(r.NormFloat64()*math.Sqrt2/2, r.NormFloat64()*math.Sqrt2/2)
}
