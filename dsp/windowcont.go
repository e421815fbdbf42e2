package dsp

import "math"

// WindowMidpoints fills dst with the continuous form of the window w at
// the midpoints of N = len(dst) equal cells of [0, 1],
//
//	dst[i] = w((i + ½)/N),  i = 0 … N−1,
//
// where w(x), x ∈ [0, 1], is the limit of the symmetric N-point window
// sampled at x = n/(N−1) as N grows: the cosine sums in x (Hann,
// Hamming, Blackman, Blackman-Harris), I0(β·√(1 − (2x−1)²))/I0(β)
// (Kaiser), exp(−½((2x−1)/σ)²) (Gaussian) and Taylor's cosine series
// 1 + 2·Σ F_m·cos(2πm(x − ½)) normalised to its peak. Chebyshev has no
// continuous form: dst is its symmetric N-point window. A nil w is
// uniform. It returns dst and panics if len(dst) < 1. It does not
// allocate except for Chebyshev (an FFT of N points) and Taylor (its
// n̄−1 coefficients).
func WindowMidpoints(dst []float64, w Window) []float64 {
	n := len(fillOnes(dst))
	x := func(i int) float64 { return (float64(i) + 0.5) / float64(n) }
	cosSum := func(a ...float64) {
		for i := range dst {
			v, s := 0.0, 1.0
			for k, c := range a {
				v += s * c * math.Cos(2*math.Pi*float64(k)*x(i))
				s = -s
			}
			dst[i] = v
		}
	}
	switch v := w.(type) {
	case nil, Rectangular:
	case Hann:
		cosSum(0.5, 0.5)
	case Hamming:
		cosSum(0.54, 0.46)
	case Blackman:
		cosSum(0.42, 0.5, 0.08)
	case BlackmanHarris:
		cosSum(0.35875, 0.48829, 0.14128, 0.01168)
	case Kaiser:
		i0b := besselI0(v.Beta)
		for i := range dst {
			r := 2*x(i) - 1
			dst[i] = besselI0(v.Beta*math.Sqrt(math.Max(0, 1-r*r))) / i0b
		}
	case Gaussian:
		for i := range dst {
			r := (2*x(i) - 1) / v.Sigma
			dst[i] = math.Exp(-0.5 * r * r)
		}
	case Taylor:
		if v.NBar <= 1 {
			return dst
		}
		fm := taylorCoefficients(v.NBar, -math.Abs(v.SidelobeDB))
		peak := 1.0
		for _, f := range fm {
			peak += 2 * f
		}
		for i := range dst {
			s := 1.0
			for m, f := range fm {
				s += 2 * f * math.Cos(2*math.Pi*float64(m+1)*(x(i)-0.5))
			}
			dst[i] = s / peak
		}
	default: // Chebyshev, and any other window: its symmetric N-point form
		w.Coefficients(dst)
	}
	return dst
}
