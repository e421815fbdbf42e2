package dsp

import (
	"math"
	"math/cmplx"
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
// responses are interpolated band-limitedly at 8 points per sample near
// their peaks and refined with a parabola. fs is the sample rate in Hz.
// It panics if pulse or ref is empty or fs ≤ 0. For many Doppler shifts
// of one pulse, use a DopplerPlan.
func DopplerResponse(pulse, ref []complex128, fs, fd float64) (lossDB, shift float64) {
	return NewDopplerPlan(pulse, ref, fs).Response(fd)
}

// DopplerPlan measures the Doppler response of one pulse and reference at
// many Doppler shifts, reusing its FFT plans and the zero-Doppler peak. It
// is not safe for concurrent use.
type DopplerPlan struct {
	pulse, ref []complex128
	fs         float64
	corr       *Correlator
	fft        *fftPlan
	in, z      []complex128 // correlation input and output, len(pulse)+len(ref)−1
	spec, work []complex128 // spectrum of the zero-padded correlation; FFT scratch
	mag        []float64
	p0, v0     float64 // zero-Doppler peak position (samples) and magnitude
	haveZero   bool    // p0 and v0 are computed (on the first non-zero shift)
	held       bool    // samples are held over their intervals: the response is linear between lags
}

// NewHeldDopplerPlan is NewDopplerPlan for held sequences (each sample
// held over 1/fs, as a rect-chip code or filter at an integer number of
// samples per chip): their response is exactly linear between lags, so
// its peak magnitude sits on a lag and is read there without
// interpolation. The Doppler phase is applied per sample. It panics as
// NewDopplerPlan does.
func NewHeldDopplerPlan(pulse, ref []complex128, fs float64) *DopplerPlan {
	p := NewDopplerPlan(pulse, ref, fs)
	p.held = true
	return p
}

// NewDopplerPlan prepares DopplerResponse for pulse and ref at rate fs.
// It panics as DopplerResponse does.
func NewDopplerPlan(pulse, ref []complex128, fs float64) *DopplerPlan {
	if len(pulse) == 0 || len(ref) == 0 || !(fs > 0) {
		panic("dsp: doppler response needs a pulse, a reference and fs > 0")
	}
	n := len(pulse) + len(ref) - 1
	l := fftSize(n + n/4 + 16)
	p := &DopplerPlan{
		pulse: pulse, ref: ref, fs: fs,
		corr: NewCorrelator(ref, n),
		fft:  newFFTPlan(l),
		in:   make([]complex128, n),
		z:    make([]complex128, n),
		spec: make([]complex128, l),
		work: make([]complex128, l),
		mag:  make([]float64, 2*dopplerUp+1),
	}
	return p
}

// Response returns the peak loss (dB, ≥ 0 up to rounding) and the peak
// time shift (s) at Doppler shift fd in Hz.
func (p *DopplerPlan) Response(fd float64) (lossDB, shift float64) {
	if fd == 0 {
		return 0, 0
	}
	if !p.haveZero {
		p.p0, p.v0 = p.peak(p.pulse, 0)
		p.haveZero = true
	}
	p1, v1 := p.peak(p.pulse, fd)
	return -20 * math.Log10(v1/p.v0), (p1 - p.p0) / dopplerUp / p.fs
}

// peak compresses pulse shifted by fd and returns the peak position in
// units of 1/dopplerUp samples on the full-correlation grid, and its
// magnitude, from the band-limited interpolation near the largest sample.
func (p *DopplerPlan) peak(pulse []complex128, fd float64) (pos, val float64) {
	nr := len(p.ref) - 1
	clear(p.in[:nr])
	for n, v := range pulse {
		p.in[nr+n] = v * expj(2*math.Pi*fd*float64(n)/p.fs)
	}
	p.corr.Apply(p.z, p.in)
	best := 0.0
	for _, v := range p.z {
		best = max(best, real(v)*real(v)+imag(v)*imag(v))
	}
	// The first lag within rounding of the largest: a code whose response
	// has two equal peaks (Barker 13 at some Doppler shifts, one chip
	// either side) must not choose between them by the last bits of the
	// FFT's rounding, which differ between kernels (FMA or not).
	k := 0
	for i, v := range p.z {
		if real(v)*real(v)+imag(v)*imag(v) >= best*(1-1e-9) {
			k = i
			break
		}
	}
	if p.held {
		return float64(k * dopplerUp), math.Sqrt(best)
	}
	clear(p.spec)
	copy(p.spec, p.z)
	p.fft.transform(p.spec, p.work)
	for i := range p.mag {
		t := float64(k) + float64(i-dopplerUp)/dopplerUp
		p.mag[i] = cmplx.Abs(p.at(t))
	}
	j := argmax(p.mag)
	pos, val = refinePeak(p.mag, j, true)
	return float64(k*dopplerUp) + pos - dopplerUp, val
}

// at evaluates the band-limited interpolation of the correlation at
// fractional sample t, as interpolate does (Nyquist bin split between
// ±fs/2), by direct summation of its spectrum.
func (p *DopplerPlan) at(t float64) complex128 {
	l := len(p.spec)
	h := (l + 1) / 2
	neg := l - h
	var acc complex128
	if l%2 == 0 {
		neg--
		acc += p.spec[h] * complex(math.Cos(math.Pi*t), 0)
	}
	step := expj(2 * math.Pi * t / float64(l))
	w := complex(1, 0)
	for k := 0; k < h; k++ {
		acc += p.spec[k] * w
		w *= step
	}
	back := cmplx.Conj(step)
	w = back
	for k := 1; k <= neg; k++ {
		acc += p.spec[l-k] * w
		w *= back
	}
	return acc / complex(float64(l), 0)
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
// It panics if u is empty or has no energy, fs ≤ 0 or delays < 0. The
// surface is that of the sampled pulse at its sample lags: for the
// continuous-time surface of a short pulse, sample it finely (a code held
// at several samples per chip), or a plot with more columns than lags
// shows gaps between them.
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
	fft := newFFTPlan(l) // l = fftSize(…) is 2·3·5-smooth
	work := make([]complex128, l)
	uspec := make([]complex128, l)
	copy(uspec, u)
	fft.transform(uspec, work)
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
		fft.transform(buf, work)
		// c[k] = Σ_n u[n+k]·conj(v[n]) = IFFT(U·conj(V)); χ = conj(c).
		for k, v := range uspec {
			buf[k] = v * cmplx.Conj(buf[k])
		}
		fft.inverse(buf, work)
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
