package dsp

import (
	"math"

	"gonum.org/v1/gonum/dsp/fourier"
)

// resyncLen is the number of samples after which AddEcho recomputes its
// phase recursions exactly, bounding rounding growth to ~1e-12.
const resyncLen = 256

// SampleLen returns the number of samples of a pulse of width tau (s) at
// fs (Hz): ⌈τ·fs⌉, with τ·fs within 1e-9 (relative) of a whole number
// taken as that number, so that 13 chips at 4 samples per chip give 52
// samples despite rounding. It returns 0 for a non-positive τ.
func SampleLen(tau, fs float64) int {
	x := tau * fs
	if !(x > 0) {
		return 0
	}
	r := math.Round(x)
	if math.Abs(x-r) <= 1e-9*x {
		return int(r)
	}
	return int(math.Ceil(x))
}

// Sample evaluates the continuous envelope of w on the grid
//
//	dst[n] = u(t0 + n/fs),  n = 0 … len(dst)−1,
//
// with fs in Hz and t0 in s (t0 > 0 starts inside the pulse; t0 < 0 gives
// leading zeros). A nil dst allocates SampleLen(w.Duration(), fs) samples,
// the whole pulse for t0 = 0. It returns dst. Sample uses the
// specialised paths of AddEcho (delay −t0, unit amplitude, no Doppler).
// It panics if fs is not positive and finite.
func Sample(dst []complex128, w Waveform, fs, t0 float64) []complex128 {
	checkRate("Sample", fs)
	if dst == nil {
		dst = make([]complex128, SampleLen(w.Duration(), fs))
	} else {
		clear(dst)
	}
	AddEcho(dst, w, fs, -t0, 1, 0)
	return dst
}

// AddEcho adds a delayed, scaled, Doppler-shifted copy of w to dst:
//
//	dst[n] += amp·u(n/fs − delay)·exp(j2π·fd·n/fs)
//
// for every n whose argument t = n/fs − delay lies in [0, τ); other
// samples are not touched. fs is in Hz, delay in s (exact: not rounded to
// the sample grid; it may be negative or beyond the end of dst, giving a
// partial or empty overlap), fd in Hz (> 0 closing, see the package
// conventions) and amp is the complex amplitude at n = 0 of the Doppler
// term. AddEcho does not allocate. Rect, LFM and PhaseCoded use
// specialised paths that replace per-sample sin/cos by exact phase
// recursions re-anchored every 256 samples (relative error ~1e-12);
// other waveforms call At once per sample. It panics if fs is not
// positive and finite.
func AddEcho(dst []complex128, w Waveform, fs, delay float64, amp complex128, fd float64) {
	checkRate("AddEcho", fs)
	tau := w.Duration()
	lo, hi := echoSpan(len(dst), fs, delay, tau)
	if lo >= hi {
		return
	}
	switch v := w.(type) {
	case Rect:
		addTone(dst[lo:hi], lo, fs, amp, fd)
	case *Rect:
		addTone(dst[lo:hi], lo, fs, amp, fd)
	case LFM:
		addLFM(dst, lo, hi, v, fs, delay, amp, fd)
	case *LFM:
		addLFM(dst, lo, hi, *v, fs, delay, amp, fd)
	case PhaseCoded:
		addChips(dst, lo, hi, len(v.Phases), v.Chip, func(i int) complex128 { return phasor(v.Phases[i]) }, fs, delay, amp, fd)
	case *PhaseCoded:
		addChips(dst, lo, hi, len(v.Phases), v.Chip, func(i int) complex128 { return phasor(v.Phases[i]) }, fs, delay, amp, fd)
	case Held:
		addChips(dst, lo, hi, len(v.Values), v.Chip, func(i int) complex128 { return v.Values[i] }, fs, delay, amp, fd)
	case *Held:
		addChips(dst, lo, hi, len(v.Values), v.Chip, func(i int) complex128 { return v.Values[i] }, fs, delay, amp, fd)
	case Costas:
		addCostas(dst, lo, hi, v, fs, delay, amp, fd)
	case *Costas:
		addCostas(dst, lo, hi, *v, fs, delay, amp, fd)
	default:
		addGeneric(dst, lo, hi, w, fs, delay, amp, fd)
	}
}

func checkRate(op string, fs float64) {
	if !(fs > 0) || math.IsInf(fs, 0) {
		panic("dsp: " + op + ": sample rate must be positive and finite")
	}
}

// echoSpan returns the sample range [lo, hi) within [0, n) whose argument
// t = k/fs − delay lies in [0, tau), using that exact expression at the
// edges.
func echoSpan(n int, fs, delay, tau float64) (lo, hi int) {
	if !(tau > 0) || math.IsNaN(delay) || math.IsInf(delay, 0) || n == 0 {
		return 0, 0
	}
	a, b := delay*fs, (delay+tau)*fs
	if a > float64(n)+1 || b < -1 {
		return 0, 0
	}
	arg := func(k int) float64 { return float64(k)/fs - delay }
	lo = int(math.Ceil(max(a, -1)))
	for lo > 0 && arg(lo-1) >= 0 {
		lo--
	}
	for arg(lo) < 0 {
		lo++
	}
	hi = int(math.Ceil(min(b, float64(n)+1)))
	for hi > lo && arg(hi-1) >= tau {
		hi--
	}
	for hi <= n && arg(hi) < tau {
		hi++
	}
	return max(lo, 0), min(hi, n)
}

// phasor returns exp(jθ).
func phasor(theta float64) complex128 {
	s, c := math.Sincos(theta)
	return complex(c, s)
}

// addTone adds amp·exp(j2π·fd·n/fs) for n = n0 … n0+len(d)−1.
func addTone(d []complex128, n0 int, fs float64, amp complex128, fd float64) {
	w := 2 * math.Pi * fd / fs
	step := phasor(w)
	var z complex128
	for i := range d {
		if i%resyncLen == 0 {
			z = amp * phasor(w*float64(n0+i))
		}
		d[i] += z
		z *= step
	}
}

func addLFM(dst []complex128, lo, hi int, l LFM, fs, delay float64, amp complex128, fd float64) {
	k := l.Slope()
	alpha := math.Pi * k / (fs * fs)
	c := phasor(2 * alpha)
	var z, r complex128
	for n := lo; n < hi; n++ {
		if (n-lo)%resyncLen == 0 {
			// θ(n+m) = θ(n) + β·m + α·m², re-anchored exactly here.
			x := float64(n)/fs - delay - l.Width/2
			theta := math.Pi*k*x*x + 2*math.Pi*fd*float64(n)/fs
			beta := 2*math.Pi*k*x/fs + 2*math.Pi*fd/fs
			z = amp * phasor(theta)
			r = phasor(beta + alpha)
		}
		dst[n] += z
		z *= r
		r *= c
	}
}

// addChips adds the echo of a chip-based pulse of nc chips of length
// chip whose chip i has the envelope value val(i). The chip of each
// sample is exact (ChipIndex), so the span [lo, hi) from echoSpan is
// widened by one sample each way and decided sample by sample.
func addChips(dst []complex128, lo, hi, nc int, chip float64, val func(int) complex128, fs, delay float64, amp complex128, fd float64) {
	lo, hi = max(lo-1, 0), min(hi+1, len(dst))
	w := 2 * math.Pi * fd / fs
	step := phasor(w)
	var dop, v complex128
	last := -1
	for n := lo; n < hi; n++ {
		if (n-lo)%resyncLen == 0 {
			dop = amp * phasor(w*float64(n))
		}
		i := ChipIndex(float64(n), fs, delay, chip)
		if i >= 0 && i < nc {
			if i != last {
				v = val(i)
				last = i
			}
			dst[n] += dop * v
		}
		dop *= step
	}
}

// addCostas adds a Costas echo, the hop of each sample decided exactly as
// in addChips.
func addCostas(dst []complex128, lo, hi int, c Costas, fs, delay float64, amp complex128, fd float64) {
	lo, hi = max(lo-1, 0), min(hi+1, len(dst))
	w := 2 * math.Pi * fd / fs
	step := phasor(w)
	var dop complex128
	for n := lo; n < hi; n++ {
		if (n-lo)%resyncLen == 0 {
			dop = amp * phasor(w*float64(n))
		}
		if i := ChipIndex(float64(n), fs, delay, c.Chip); i >= 0 && i < len(c.Order) {
			dst[n] += dop * c.hop(i, float64(n)/fs-delay)
		}
		dop *= step
	}
}

func addGeneric(dst []complex128, lo, hi int, wf Waveform, fs, delay float64, amp complex128, fd float64) {
	w := 2 * math.Pi * fd / fs
	step := phasor(w)
	var dop complex128
	for n := lo; n < hi; n++ {
		if (n-lo)%resyncLen == 0 {
			dop = amp * phasor(w*float64(n))
		}
		dst[n] += dop * wf.At(float64(n)/fs-delay)
		dop *= step
	}
}

// AddEchoInBand adds to dst the echo AddEcho describes (same arguments)
// as a receiver whose band is [−fs/2, fs/2) hears it: the continuous echo
// amp·u(t − delay)·exp(j2π·fd·t) is passed through the ideal filter of
// that band, then sampled at fs, so an echo whose Doppler lies outside the
// band is rejected rather than aliased. bandwidth (Hz, > 0) is the
// waveform's nominal bandwidth, which sets the internal rate M·fs,
// M = max(16, ⌈16·(|fd| + 4·bandwidth)/fs⌉), so that M·fs/2 is at least
// eight times |fd| + 4·bandwidth (the spectrum beyond it, which would
// alias into the band, is neglected).
// The filter is applied by FFT over dst's span padded on both sides by
// at least max(len(dst), 256) samples (the transform's length is rounded
// up to a power of two); ringing beyond that is neglected. It
// returns the fraction of the echo's energy inside the band (1 for an
// echo with no energy). It allocates.
func AddEchoInBand(dst []complex128, w Waveform, fs, delay float64, amp complex128, fd, bandwidth float64) float64 {
	if len(dst) == 0 {
		return 1
	}
	m := max(16, int(math.Ceil(16*(math.Abs(fd)+4*bandwidth)/fs)))
	r := float64(m) * fs
	// Zero padding of max(len(dst), 256) samples on each side: the band's
	// edges cut the spectrum finely enough, and the filter's ringing does
	// not wrap around onto dst.
	pad := max(len(dst), 256)
	// A power of two at least that long: an FFT of an arbitrary length
	// with a large prime factor costs far more (the extra zeros only pad
	// further).
	l := 1
	for l < (len(dst)+2*pad)*m {
		l <<= 1
	}
	x := make([]complex128, l)
	// The Doppler phase stays referenced to dst's sample 0.
	AddEcho(x, w, r, delay+float64(pad)/fs, amp*expj(-2*math.Pi*fd*float64(pad)/fs), fd)
	f := fourier.NewCmplxFFT(l)
	c := f.Coefficients(nil, x)
	var in, all float64
	for k, v := range c {
		p := real(v)*real(v) + imag(v)*imag(v)
		all += p
		fk := float64(k) * r / float64(l)
		if k >= (l+1)/2 {
			fk -= r
		}
		if fk >= -fs/2 && fk < fs/2 {
			in += p
		} else {
			c[k] = 0
		}
	}
	if all == 0 {
		return 1
	}
	f.Sequence(x, c)
	scale := complex(1/float64(l), 0)
	for i := range dst {
		dst[i] += x[(pad+i)*m] * scale
	}
	return in / all
}
