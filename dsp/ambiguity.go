package dsp

import (
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/dsp/fourier"
)

// dopplerUp is the interpolation factor (points per sample) of the
// compressed responses compared by DopplerResponse.
const dopplerUp = 8

// DopplerResponse compresses the echo pulse[n]·exp(j2π·fd·n/fs) (fd in Hz,
// positive for a closing target) with ref and compares its peak with the
// zero-Doppler one. lossDB ≥ 0 is the drop of the peak magnitude in dB
// (20·log10(1−|fd|/B) in magnitude for a long LFM pulse, with the sign
// reversed) and shift is the peak time minus the zero-Doppler peak time
// in s: negative (earlier) for an up-chirp and a positive Doppler. Both
// responses are interpolated band-limitedly at 8 points per sample and
// their peaks refined with a parabola. fs is the sample rate in Hz. It
// panics if pulse or ref is empty or fs ≤ 0.
func DopplerResponse(pulse, ref []complex128, fs, fd float64) (lossDB, shift float64) {
	if len(pulse) == 0 || len(ref) == 0 || !(fs > 0) {
		panic("dsp: doppler response needs a pulse, a reference and fs > 0")
	}
	peak := func(x []complex128) (pos, val float64) {
		fine := interpolate(fullCorrelation(x, ref, nil), dopplerUp)
		m := make([]float64, len(fine))
		for i, v := range fine {
			m[i] = cmplx.Abs(v)
		}
		return refinePeak(m, argmax(m), true)
	}
	p0, v0 := peak(pulse)
	echo := make([]complex128, len(pulse))
	for n, v := range pulse {
		echo[n] = v * expj(2*math.Pi*fd*float64(n)/fs)
	}
	p1, v1 := peak(echo)
	return -20 * math.Log10(v1/v0), (p1 - p0) / dopplerUp / fs
}

// Ambiguity fills dst with the magnitude of the normalised ambiguity
// function of the sampled pulse u (rate fs in Hz),
//
//	χ(τ,ν) = Σ_n u[n]·conj(u[n+k])·e^{j2πν·n/fs} / Σ_n |u[n]|²,  τ = k/fs,
//
// the discrete form of χ(τ,ν) = ∫u(t)·u*(t+τ)·e^{j2πνt}dt with
// |χ(0,0)| = 1 (Levanon & Mozeson's convention: for an up-chirp the
// ridge runs along τ = ν·T/B, the opposite sign to the filter's time
// axis). dst[i][j] holds |χ| at Doppler dopplers[i] (Hz) and delay
// k = j − delays samples, j = 0 … 2·delays. A nil dst is allocated;
// otherwise it must have len(dopplers) rows of 2·delays+1 values (else it
// panics). Each Doppler row costs two FFTs of about len(u)+delays points.
// It panics if u is empty or has no energy, fs ≤ 0 or delays < 0.
func Ambiguity(dst [][]float64, u []complex128, fs float64, delays int, dopplers []float64) [][]float64 {
	if len(u) == 0 || !(fs > 0) || delays < 0 {
		panic("dsp: ambiguity needs a pulse, fs > 0 and delays ≥ 0")
	}
	cols := 2*delays + 1
	if dst == nil {
		dst = make([][]float64, len(dopplers))
		for i := range dst {
			dst[i] = make([]float64, cols)
		}
	} else if len(dst) != len(dopplers) {
		panic("dsp: ambiguity destination row count mismatch")
	}
	n := len(u)
	energy := energyOf(u)
	if energy == 0 {
		panic("dsp: ambiguity of a pulse with no energy")
	}
	// Circular correlation at length l ≥ n + min(delays, n−1) keeps every
	// needed lag free of wrap-around.
	l := fftSize(n + min(delays, n-1))
	fft := fourier.NewCmplxFFT(l)
	uspec := make([]complex128, l)
	copy(uspec, u)
	fft.Coefficients(uspec, uspec)
	buf := make([]complex128, l)
	scale := 1 / (float64(l) * energy)
	for i, nu := range dopplers {
		row := dst[i]
		if len(row) != cols {
			panic("dsp: ambiguity destination row length mismatch")
		}
		clear(buf)
		for k, v := range u {
			buf[k] = v * expj(2*math.Pi*nu*float64(k)/fs)
		}
		fft.Coefficients(buf, buf)
		// c[k] = Σ_n u[n+k]·conj(v[n]) = IFFT(U·conj(V)); χ = conj(c).
		for k, v := range uspec {
			buf[k] = v * cmplx.Conj(buf[k])
		}
		fft.Sequence(buf, buf)
		for j := range row {
			k := j - delays
			switch {
			case k <= -n || k >= n:
				row[j] = 0
			case k < 0:
				row[j] = cmplx.Abs(buf[l+k]) * scale
			default:
				row[j] = cmplx.Abs(buf[k]) * scale
			}
		}
	}
	return dst
}

// ZeroDopplerCut fills dst (2·delays+1 values; nil allocates) with |χ(τ,0)|
// for τ = k/fs, k = −delays … delays: the normalised autocorrelation
// magnitude of u. It panics as Ambiguity does.
func ZeroDopplerCut(dst []float64, u []complex128, delays int) []float64 {
	if dst == nil {
		dst = make([]float64, 2*delays+1)
	}
	Ambiguity([][]float64{dst}, u, 1, delays, []float64{0})
	return dst
}

// ZeroDelayCut fills dst (len(dopplers) values; nil allocates) with
// |χ(0,ν)| = |Σ|u[n]|²·e^{j2πν·n/fs}| / Σ|u[n]|² at each Doppler ν in Hz,
// the Fourier transform of the pulse's power envelope. It panics if u has
// no energy, fs ≤ 0 or a non-nil dst has the wrong length.
func ZeroDelayCut(dst []float64, u []complex128, fs float64, dopplers []float64) []float64 {
	if !(fs > 0) {
		panic("dsp: zero-delay cut needs fs > 0")
	}
	if dst == nil {
		dst = make([]float64, len(dopplers))
	} else if len(dst) != len(dopplers) {
		panic("dsp: zero-delay cut destination length mismatch")
	}
	energy := energyOf(u)
	if energy == 0 {
		panic("dsp: zero-delay cut of a pulse with no energy")
	}
	for i, nu := range dopplers {
		var s complex128
		for n, v := range u {
			p := real(v)*real(v) + imag(v)*imag(v)
			s += complex(p, 0) * expj(2*math.Pi*nu*float64(n)/fs)
		}
		dst[i] = cmplx.Abs(s) / energy
	}
	return dst
}

func energyOf(u []complex128) float64 {
	var e float64
	for _, v := range u {
		e += real(v)*real(v) + imag(v)*imag(v)
	}
	return e
}
