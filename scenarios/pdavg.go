package scenarios

import (
	"math"

	"gonum.org/v1/gonum/mathext"

	"github.com/pulsewright/pulsewright/dsp"
)

// Pd of a steady target where dsp's series does not reach: a CA or OS
// CFAR whose multiplier on its reference exceeds what the series accepts
// (a few training cells, near the window's edges, or a threshold the
// scene raises far above the noise-only one). The test statistic X =
// |√χ + n|², n unit complex noise, has the density
// e^−(x+χ)·I0(2√(xχ)) (the non-central chi-square with two degrees of
// freedom); Pd = P(X > threshold) = E_X[P(threshold < X)], the
// threshold's CDF averaged over that density (docs/detection.md §6).
// In u = √x the density is 2u·e^−(u−√χ)²·i0e(2u√χ), a bump of unit
// width, integrated by Simpson's rule over √χ ± 10 (the rest is below
// e^−100).

// avgIntervals is the number of Simpson intervals over the 20 units of u:
// a step of 0.02 against a bump of width 1/√2.
const avgIntervals = 1000

// pdAverage returns E_X[cdf(X)] for a steady target of SNR chi (linear).
func pdAverage(chi float64, cdf func(x float64) float64) float64 {
	sc := math.Sqrt(chi)
	lo := math.Max(0, sc-10)
	h := (sc + 10 - lo) / avgIntervals
	in := dsp.Simpson(func(u float64) float64 {
		d := u - sc
		return 2 * u * math.Exp(-d*d) * i0e(2*u*sc) * cdf(u*u)
	}, lo, h, avgIntervals)
	return math.Min(math.Max(in, 0), 1)
}

// i0e returns e^−x·I0(x) for x ≥ 0, I0 the modified Bessel function of
// order 0, from the polynomial approximations of Abramowitz & Stegun,
// Handbook of Mathematical Functions, 9.8.1 (x ≤ 3.75, relative error
// below 1.6e-7) and 9.8.2 (x ≥ 3.75, below 1.9e-7).
func i0e(x float64) float64 {
	if x <= 3.75 {
		t := x / 3.75
		t *= t
		return math.Exp(-x) * (1 + t*(3.5156229+t*(3.0899424+t*(1.2067492+t*(0.2659732+t*(0.0360768+t*0.0045813))))))
	}
	t := 3.75 / x
	return (0.39894228 + t*(0.01328592+t*(0.00225319+t*(-0.00157565+t*(0.00916281+t*(-0.02057706+t*(0.02635537+t*(-0.01647633+t*0.00392377)))))))) / math.Sqrt(x)
}

// thresholdCDF returns the CDF of a CFAR's threshold, for a detector r
// times above its nominal one, against x in units of the noise power; nil
// for a known noise level. CA-CFAR (M independent cells): the threshold
// is c·r times the sum of M unit exponentials, c = Pfa^(−1/M) − 1, so its
// CDF is the regularized lower incomplete gamma P(M, x/(c·r)). OS-CFAR:
// α·r times the k-th smallest of N unit exponentials, which is below y
// when at least k of them are: the regularized incomplete beta
// I_p(k, N−k+1), p = 1 − e^−y.
func thresholdCDF(d dsp.Detector, r float64) func(x float64) float64 {
	m := d.CFARCells
	switch {
	case m == 0:
		return nil
	case d.OSRank > 0:
		a := r * dsp.OSMultiplier(d.Pfa, m, d.OSRank)
		k := float64(d.OSRank)
		return func(x float64) float64 {
			return mathext.RegIncBeta(k, float64(m)-k+1, -math.Expm1(-x/a))
		}
	}
	c := r * math.Expm1(-math.Log(d.Pfa)/float64(m))
	return func(x float64) float64 { return mathext.GammaIncReg(float64(m), x/c) }
}

// pdBeyond is the Pd of a steady target's test t against r times the
// nominal threshold by pdAverage; ok is false for fluctuating targets and
// known noise levels (the series reaches every threshold there).
func (t pdTest) pdBeyond(snr, r float64) (float64, bool) {
	if t.det.Pulses > 1 {
		return 0, false // one pulse's average only
	}
	cdf := thresholdCDF(t.det, r)
	if t.det.Swerling != dsp.SwerlingNone || cdf == nil || t.ev != nil {
		return 0, false
	}
	return pdAverage(snr, cdf), true
}
