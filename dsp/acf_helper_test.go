package dsp

import (
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/dsp/fourier"
)

// acfMag returns |r_k|, k = 0 … len(x)−1, of the aperiodic
// autocorrelation of x, computed with a zero-padded FFT (gonum).
func acfMag(x []complex128) []float64 {
	n := 1
	for n < 2*len(x) {
		n <<= 1
	}
	fft := fourier.NewCmplxFFT(n)
	buf := make([]complex128, n)
	copy(buf, x)
	spec := fft.Coefficients(nil, buf)
	for i, v := range spec {
		spec[i] = complex(real(v)*real(v)+imag(v)*imag(v), 0)
	}
	r := fft.Sequence(nil, spec)
	out := make([]float64, len(x))
	for k := range out {
		out[k] = cmplx.Abs(r[k]) / float64(n)
	}
	return out
}

// pslrDB returns the peak sidelobe ratio in dB of a one-sided |ACF|: the
// largest value beyond the first local minimum after lag 0, relative to
// lag 0.
func pslrDB(r []float64) float64 {
	k := 1
	for k < len(r)-1 && r[k+1] < r[k] {
		k++
	}
	var p float64
	for _, v := range r[k:] {
		p = max(p, v)
	}
	return 20 * math.Log10(p/r[0])
}
