package dsp

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/dsp/fourier"
	"gonum.org/v1/gonum/dsp/window"
)

// Window is an amplitude weighting applied across the samples of a pulse or
// of a coherent dwell.
//
// Coefficients fills dst with the symmetric ("DFT-odd") window w[k],
// k = 0 … N−1, N = len(dst), so that w[k] = w[N−1−k], and returns dst.
// Windows with a peak are normalised to a peak of 1 (exactly 1 at the
// centre for odd N). A one-point window is {1}. Coefficients panics if
// len(dst) < 1. A periodic ("DFT-even") N-point window, as used in spectral
// analysis tables, is the first N values of the symmetric (N+1)-point one.
type Window interface {
	Coefficients(dst []float64) []float64
}

// Rectangular is the uniform weighting w[k] = 1.
type Rectangular struct{}

// Hann is the raised cosine w[k] = 0.5 − 0.5·cos(2πk/(N−1)).
type Hann struct{}

// Hamming is w[k] = 0.54 − 0.46·cos(2πk/(N−1)) (the rounded 0.54/0.46
// coefficients, not the "exact" 25/46).
type Hamming struct{}

// Blackman is w[k] = 0.42 − 0.50·cos(2πk/(N−1)) + 0.08·cos(4πk/(N−1)).
type Blackman struct{}

// BlackmanHarris is the 4-term Blackman-Harris window (highest sidelobe
// about −92 dB): w[k] = a0 − a1·cos(x) + a2·cos(2x) − a3·cos(3x),
// x = 2πk/(N−1), with a = 0.35875, 0.48829, 0.14128, 0.01168. Its peak is
// a0+a1+a2+a3 = 1.
type BlackmanHarris struct{}

// Taylor is the sampled Taylor line-source weighting with NBar nearly
// equal sidelobes next to the mainlobe at SidelobeDB (negative, in dB
// relative to the peak, e.g. −35), normalised to a peak of 1. It uses the
// same construction as scipy.signal.windows.taylor with norm=True: with
// A = acosh(10^(−SidelobeDB/20))/π and σ² = NBar²/(A² + (NBar−½)²),
//
//	w[k] ∝ 1 + 2·Σ_{m=1}^{NBar−1} F_m·cos(2πm(k − (N−1)/2)/N).
//
// Valid parameters: NBar ≥ 1 (NBar too small for the level leaves the
// first sidelobes above the design level), SidelobeDB < 0; see Validate.
type Taylor struct {
	NBar       int
	SidelobeDB float64 // dB, negative
}

// Chebyshev is the Dolph–Chebyshev window, whose sidelobes are all at
// SidelobeDB (negative, dB relative to the mainlobe peak), normalised to
// a peak of 1. It is built as scipy.signal.windows.chebwin (symmetric):
// the inverse DFT of the Chebyshev polynomial T_{N−1}(β·cos(πk/N)),
// β = cosh(acosh(10^(−SidelobeDB/20))/(N−1)). Large N grows end spikes.
type Chebyshev struct {
	SidelobeDB float64 // dB, negative
}

// Kaiser is the Kaiser–Bessel window
// w[k] = I0(β·√(1 − (2k/(N−1) − 1)²)) / I0(β), with β = Beta ≥ 0
// (Harris's α is β/π).
type Kaiser struct {
	Beta float64
}

// Gaussian is w[k] = exp(−½·((k − M)/(Sigma·M))²), M = (N−1)/2, so Sigma is
// the standard deviation as a fraction of half the window length
// (scipy's std = Sigma·(N−1)/2 samples). Sigma > 0.
type Gaussian struct {
	Sigma float64
}

func fillOnes(dst []float64) []float64 {
	if len(dst) < 1 {
		panic("dsp: window length must be at least 1")
	}
	for i := range dst {
		dst[i] = 1
	}
	return dst
}

// Coefficients fills dst with ones.
func (Rectangular) Coefficients(dst []float64) []float64 { return fillOnes(dst) }

// Coefficients fills dst with the symmetric Hann window (gonum's window.Hann).
func (Hann) Coefficients(dst []float64) []float64 {
	if len(fillOnes(dst)) == 1 {
		return dst
	}
	return window.Hann(dst)
}

// Coefficients fills dst with the symmetric Hamming window (gonum's window.Hamming).
func (Hamming) Coefficients(dst []float64) []float64 {
	if len(fillOnes(dst)) == 1 {
		return dst
	}
	return window.Hamming(dst)
}

// Coefficients fills dst with the symmetric Blackman window (gonum's window.Blackman).
func (Blackman) Coefficients(dst []float64) []float64 {
	if len(fillOnes(dst)) == 1 {
		return dst
	}
	return window.Blackman(dst)
}

// Coefficients fills dst with the symmetric 4-term Blackman-Harris window
// (gonum's window.BlackmanHarris).
func (BlackmanHarris) Coefficients(dst []float64) []float64 {
	if len(fillOnes(dst)) == 1 {
		return dst
	}
	return window.BlackmanHarris(dst)
}

// Coefficients fills dst with the Gaussian window (gonum's window.Gaussian).
func (g Gaussian) Coefficients(dst []float64) []float64 {
	if len(fillOnes(dst)) == 1 {
		return dst
	}
	return window.Gaussian{Sigma: g.Sigma}.Transform(dst)
}

// Validate reports whether Sigma is a positive finite number.
func (g Gaussian) Validate() error {
	if !(g.Sigma > 0) || math.IsInf(g.Sigma, 0) {
		return fmt.Errorf("gaussian window: sigma %v out of range (0, +Inf)", g.Sigma)
	}
	return nil
}

// Coefficients fills dst with the Kaiser window.
func (k Kaiser) Coefficients(dst []float64) []float64 {
	n := len(fillOnes(dst))
	if n == 1 {
		return dst
	}
	i0b := besselI0(k.Beta)
	for i := range dst {
		r := 2*float64(i)/float64(n-1) - 1
		dst[i] = besselI0(k.Beta*math.Sqrt(math.Max(0, 1-r*r))) / i0b
	}
	return dst
}

// Validate reports whether Beta lies in [0, 700] (I0 overflows beyond).
func (k Kaiser) Validate() error {
	if !(k.Beta >= 0 && k.Beta <= 700) {
		return fmt.Errorf("kaiser window: beta %v out of range [0, 700]", k.Beta)
	}
	return nil
}

// besselI0 is the modified Bessel function of the first kind, order 0,
// summed from its power series Σ ((x/2)^k / k!)², whose terms are all
// positive, to full double precision.
func besselI0(x float64) float64 {
	q := x * x / 4
	sum, term := 1.0, 1.0
	for k := 1; k < 10000; k++ {
		term *= q / float64(k*k)
		sum += term
		if term < sum*1e-17 {
			break
		}
	}
	return sum
}

// Coefficients fills dst with the Taylor window.
func (t Taylor) Coefficients(dst []float64) []float64 {
	n := len(fillOnes(dst))
	if n == 1 || t.NBar <= 1 {
		return dst
	}
	fm := taylorCoefficients(t.NBar, -math.Abs(t.SidelobeDB))
	pattern := func(k float64) float64 {
		s := 1.0
		for mi, f := range fm {
			s += 2 * f * math.Cos(2*math.Pi*float64(mi+1)*(k-float64(n)/2+0.5)/float64(n))
		}
		return s
	}
	scale := 1 / pattern(float64(n-1)/2)
	for i := range dst {
		dst[i] = pattern(float64(i)) * scale
	}
	return dst
}

// Validate reports whether NBar lies in [1, 100] and SidelobeDB in [−200, 0).
func (t Taylor) Validate() error {
	if t.NBar < 1 || t.NBar > 100 {
		return fmt.Errorf("taylor window: nbar %d out of range [1, 100]", t.NBar)
	}
	if !(t.SidelobeDB < 0 && t.SidelobeDB >= -200) {
		return fmt.Errorf("taylor window: sidelobe level %v dB out of range [-200, 0)", t.SidelobeDB)
	}
	return nil
}

// Coefficients fills dst with the Dolph–Chebyshev window. It allocates
// an FFT of length N.
func (c Chebyshev) Coefficients(dst []float64) []float64 {
	n := len(fillOnes(dst))
	if n == 1 {
		return dst
	}
	order := float64(n - 1)
	beta := math.Cosh(math.Acosh(math.Pow(10, math.Abs(c.SidelobeDB)/20)) / order)
	p := make([]complex128, n)
	for k := range p {
		x := beta * math.Cos(math.Pi*float64(k)/float64(n))
		var v float64
		switch {
		case x > 1:
			v = math.Cosh(order * math.Acosh(x))
		case x < -1:
			v = float64(2*(n%2)-1) * math.Cosh(order*math.Acosh(-x))
		default:
			v = math.Cos(order * math.Acos(x))
		}
		if n%2 == 0 {
			p[k] = complex(v, 0) * expj(math.Pi/float64(n)*float64(k))
		} else {
			p[k] = complex(v, 0)
		}
	}
	// scipy uses a forward DFT with e^{−j…}; gonum's Coefficients matches.
	fourier.NewCmplxFFT(n).Coefficients(p, p)
	var h int // w = [P[h−1] … P[1], P[0] or P[1]…] as in scipy.
	if n%2 == 1 {
		h = (n + 1) / 2
		for i := 0; i < h; i++ {
			dst[h-1+i] = real(p[i])
			dst[h-1-i] = real(p[i])
		}
	} else {
		h = n/2 + 1
		for i := 1; i < h; i++ {
			dst[h-2+i] = real(p[i])
			dst[h-1-i] = real(p[i])
		}
	}
	peak := 0.0
	for _, v := range dst {
		peak = math.Max(peak, v)
	}
	for i := range dst {
		dst[i] /= peak
	}
	return dst
}

// Validate reports whether SidelobeDB lies in [−300, 0).
func (c Chebyshev) Validate() error {
	if !(c.SidelobeDB < 0 && c.SidelobeDB >= -300) {
		return fmt.Errorf("chebyshev window: sidelobe level %v dB out of range [-300, 0)", c.SidelobeDB)
	}
	return nil
}

// expj returns e^{jθ}.
func expj(theta float64) complex128 {
	s, c := math.Sincos(theta)
	return complex(c, s)
}
