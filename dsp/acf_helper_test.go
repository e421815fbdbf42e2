package dsp

import (
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/dsp/fourier"
)

// acfMag returns |r_k|, k = 0 … len(x)−1, of the aperiodic
// autocorrelation of x, computed with a zero-padded FFT (gonum).
func acfMag(x []complex128) []float64 { return acfMagUp(x, 1) }

// acfMagUp returns |r| at lags k/up samples, k = 0 … up·len(x)−1, by
// zero-padding the energy spectrum |X|² (band-limited interpolation of
// the ACF), so that sidelobe peaks between samples are not missed.
func acfMagUp(x []complex128, up int) []float64 {
	n := 1
	for n < 2*len(x) {
		n <<= 1
	}
	fft := fourier.NewCmplxFFT(n)
	buf := make([]complex128, n)
	copy(buf, x)
	spec := fft.Coefficients(nil, buf)
	big := make([]complex128, n*up)
	for i, v := range spec {
		p := complex(real(v)*real(v)+imag(v)*imag(v), 0)
		if i < n/2 {
			big[i] = p
		} else {
			big[n*up-n+i] = p
		}
	}
	r := fourier.NewCmplxFFT(n*up).Sequence(nil, big)
	out := make([]float64, up*len(x))
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

// windowPSL returns the peak sidelobe (dB re the peak at DC) of the
// spectrum of the window w, zero-padded 64× (gonum FFT).
func windowPSL(w []complex128) float64 {
	n := 64 * len(w)
	buf := make([]complex128, n)
	copy(buf, w)
	spec := fourier.NewCmplxFFT(n).Coefficients(nil, buf)
	mag := make([]float64, n/2)
	for i := range mag {
		mag[i] = cmplx.Abs(spec[i])
	}
	return pslrDB(mag)
}
