package dsp

import (
	"math"
	"math/cmplx"
)

// Reference returns the matched reference for pulse weighted by w across
// its samples, dst[k] = pulse[k]·w[k] with w the symmetric len(pulse)-point
// window; a nil w leaves the pulse unweighted (the matched filter). A nil
// dst is allocated; otherwise len(dst) must equal len(pulse) (else it
// panics), and dst may be pulse itself. With the package's correlation
// convention the reference is used as is (the conjugation is in the
// correlation). An empty pulse gives an empty result.
func Reference(dst, pulse []complex128, w Window) []complex128 {
	if dst == nil {
		dst = make([]complex128, len(pulse))
	} else if len(dst) != len(pulse) {
		panic("dsp: reference destination length mismatch")
	}
	if w == nil || len(pulse) == 0 {
		copy(dst, pulse)
		return dst
	}
	c := w.Coefficients(make([]float64, len(pulse)))
	for k, v := range pulse {
		dst[k] = v * complex(c[k], 0)
	}
	return dst
}

// Figures are the figures of merit of a compressed pulse: the response of
// a reference filter to the ideal, noise-free, zero-Doppler echo of the
// pulse. Widths and times are in seconds, levels in dB.
type Figures struct {
	PSLRDB         float64 // peak sidelobe level relative to the peak, dB (negative)
	ISLRDB         float64 // integrated sidelobe energy / mainlobe energy, dB
	Mainlobe3dB    float64 // full mainlobe width at half power (−3.01 dB), s
	MainlobeNulls  float64 // mainlobe width between its first nulls or minima, s
	PeakOffset     float64 // peak time minus the expected time (lag −lead), s
	MismatchLossDB float64 // SNR loss against the matched filter, dB ≥ 0
	LPGDB          float64 // loss in processing gain (coherent-gain loss), dB
	GainDB         float64 // SNR gain over the input SNR in the bandwidth, dB
}

// ResponseFigures compresses the zero-Doppler echo of pulse with ref (the
// full correlation z[j] = Σ_i pulse[j+i]·conj(ref[i]) over all lags j at
// which they overlap) and measures it. lead is the filter's lead in
// samples (0 for a matched reference, as returned by LeastSquaresFilter
// otherwise); the peak is expected at lag −lead. fs is the sample rate in
// Hz and bandwidth the pulse's bandwidth B in Hz.
//
// For bandwidth > 0 the response is interpolated band-limitedly (FFT zero
// padding) to at least 16 points per 1/B and its peaks are refined with a
// parabola through three points. bandwidth ≤ 0 measures the samples as
// they are, as one does for codes at one sample per chip (the sample
// rate then stands for B in GainDB).
//
// The match at lag −lead, z[−lead] = Σ_k pulse[k]·conj(ref[k+lead]),
// enters the losses and the gain below.
//
// The mainlobe runs from the peak to the first null or local minimum on
// each side; everything else is sidelobe. ISLR is the ratio of sidelobe to
// mainlobe energy on the (interpolated) grid. MismatchLossDB is
// −10·log10(|z[−lead]|² / (Σ|pulse|²·Σ|ref|²)). LPGDB is
// −20·log10(|z[−lead]| / (max|ref|·Σ|pulse|)): 0 for a matched
// constant-envelope pulse, the window's coherent-gain loss for a weighted
// one. GainDB is 10·log10(|z[−lead]|²·B / (Σ|ref|²·max|pulse|²·fs)),
// the time-bandwidth product BT for a matched constant-envelope pulse.
//
// It panics if pulse or ref is empty or fs ≤ 0; for a reference
// orthogonal to the pulse (no peak) the levels are NaN or ±Inf.
func ResponseFigures(pulse, ref []complex128, lead int, fs, bandwidth float64) Figures {
	return newResponse(pulse, ref, fs, bandwidth).figures(pulse, ref, lead, fs, bandwidth)
}

// ResponseWithFigures returns what Response and ResponseFigures return,
// from one computation of the compressed response (half the work of
// calling both). It panics as they do.
func ResponseWithFigures(pulse, ref []complex128, lead int, fs, bandwidth float64) (t, db []float64, fig Figures) {
	r := newResponse(pulse, ref, fs, bandwidth)
	t, db = r.plot(ref, lead, fs)
	return t, db, r.figures(pulse, ref, lead, fs, bandwidth)
}

func (r response) figures(pulse, ref []complex128, lead int, fs, bandwidth float64) Figures {
	var fig Figures
	mag := r.mag
	ip := argmax(mag)
	peakPos, peak := r.refine(ip)
	lo, hi, main, side, sideMax, iSide := splitLobes(mag, ip)
	if iSide >= 0 {
		_, sideMax = r.refine(iSide)
		fig.PSLRDB = 20 * math.Log10(sideMax/peak)
	} else {
		fig.PSLRDB = math.Inf(-1)
	}
	fig.ISLRDB = 10 * math.Log10(side/main)
	half := peak / math.Sqrt2
	fig.Mainlobe3dB = (r.cross(ip, +1, half) - r.cross(ip, -1, half)) / r.rate
	fig.MainlobeNulls = float64(hi-lo) / r.rate
	fig.PeakOffset = (peakPos/float64(r.up) - float64(len(ref)-1) + float64(lead)) / fs

	var dot complex128
	var ep, er, pmax, rmax, sp float64
	for k, v := range pulse { // z at lag −lead: Σ_k pulse[k]·conj(ref[k+lead])
		if i := k + lead; i >= 0 && i < len(ref) {
			dot += v * cmplx.Conj(ref[i])
		}
	}
	for _, v := range pulse {
		a := cmplx.Abs(v)
		ep += a * a
		sp += a
		pmax = math.Max(pmax, a)
	}
	for _, v := range ref {
		a := cmplx.Abs(v)
		er += a * a
		rmax = math.Max(rmax, a)
	}
	d2 := real(dot)*real(dot) + imag(dot)*imag(dot)
	fig.MismatchLossDB = math.Max(0, -10*math.Log10(d2/(ep*er))) // ≥ 0 by Cauchy–Schwarz
	fig.LPGDB = -20 * math.Log10(math.Sqrt(d2)/(rmax*sp))
	b := bandwidth
	if b <= 0 {
		b = fs
	}
	fig.GainDB = 10 * math.Log10(d2*b/(er*pmax*pmax*fs))
	return fig
}

// Response returns the compressed response of ref to the zero-Doppler echo
// of pulse, as ResponseFigures computes it, for plotting: t[i] is the time
// in s relative to the expected peak (lag −lead) and db[i] the magnitude
// in dB relative to the largest grid value (floored at −300 dB). Both
// slices are newly allocated.
func Response(pulse, ref []complex128, lead int, fs, bandwidth float64) (t, db []float64) {
	return newResponse(pulse, ref, fs, bandwidth).plot(ref, lead, fs)
}

func (r response) plot(ref []complex128, lead int, fs float64) (t, db []float64) {
	peak := r.mag[argmax(r.mag)]
	t = make([]float64, len(r.mag))
	db = make([]float64, len(r.mag))
	for i, v := range r.mag {
		t[i] = (float64(i)/float64(r.up) - float64(len(ref)-1) + float64(lead)) / fs
		db[i] = 20 * math.Log10(math.Max(v/peak, 1e-15))
	}
	return t, db
}

// response is a compressed pulse on an interpolated grid: mag[i] is the
// magnitude at lag i/up − (len(ref)−1) samples.
type response struct {
	mag    []float64
	up     int     // interpolation factor
	rate   float64 // grid rate, Hz (fs·up)
	smooth bool    // interpolated: peaks may be refined by a parabola
}

func newResponse(pulse, ref []complex128, fs, bandwidth float64) response {
	if len(pulse) == 0 || len(ref) == 0 || !(fs > 0) {
		panic("dsp: response needs a pulse, a reference and fs > 0")
	}
	z := fullCorrelation(pulse, ref, nil)
	up := 1
	if bandwidth > 0 {
		up = fftSize(int(math.Ceil(16 * bandwidth / fs)))
	}
	fine := interpolate(z, up)
	mag := make([]float64, len(fine))
	for i, v := range fine {
		mag[i] = cmplx.Abs(v)
	}
	return response{mag: mag, up: up, rate: fs * float64(up), smooth: bandwidth > 0}
}

// refine returns the position (grid units) and height of the peak at grid
// index i, through a parabola on i−1, i, i+1 when the grid is smooth.
func (r response) refine(i int) (pos, val float64) {
	return refinePeak(r.mag, i, r.smooth)
}

func refinePeak(m []float64, i int, smooth bool) (pos, val float64) {
	if !smooth || i == 0 || i == len(m)-1 {
		return float64(i), m[i]
	}
	a, b, c := m[i-1], m[i], m[i+1]
	den := a - 2*b + c
	if den >= 0 {
		return float64(i), b
	}
	d := 0.5 * (a - c) / den
	return float64(i) + d, b - 0.25*(a-c)*d
}

// cross returns the grid position where the magnitude first falls below
// level walking from i in direction dir, linearly interpolated.
func (r response) cross(i, dir int, level float64) float64 {
	m := r.mag
	for j := i; j+dir >= 0 && j+dir < len(m); j += dir {
		if m[j+dir] < level {
			f := (m[j] - level) / (m[j] - m[j+dir])
			return float64(j) + float64(dir)*f
		}
	}
	if dir < 0 {
		return 0
	}
	return float64(len(m) - 1)
}

func argmax(v []float64) int {
	k := 0
	for i, x := range v {
		if x > v[k] {
			k = i
		}
	}
	return k
}

// fullCorrelation returns z[j+len(ref)−1] = Σ_i x[j+i]·conj(ref[i]) for
// every lag j = −(len(ref)−1) … len(x)−1. scratch, if long enough, holds
// the zero-padded input.
func fullCorrelation(x, ref []complex128, scratch []complex128) []complex128 {
	n := len(x) + len(ref) - 1
	if cap(scratch) < n {
		scratch = make([]complex128, n)
	}
	in := scratch[:n]
	clear(in[:len(ref)-1])
	copy(in[len(ref)-1:], x)
	return NewCorrelator(ref, n).Apply(nil, in)
}

// interpolate returns the band-limited interpolation of z at up points per
// sample: (len(z)−1)·up+1 values, value i at sample position i/up. z is
// zero-padded in time before the FFT so that the periodic interpolation
// does not wrap its ends into each other.
func interpolate(z []complex128, up int) []complex128 {
	if up <= 1 {
		out := make([]complex128, len(z))
		copy(out, z)
		return out
	}
	l := fftSize(len(z) + len(z)/4 + 16)
	buf := make([]complex128, l)
	copy(buf, z)
	lf := l * up
	big := make([]complex128, lf)
	work := make([]complex128, lf)
	newFFTPlan(l).transform(buf, work[:l])
	spec := buf
	h := (l + 1) / 2 // bins 0 … h−1 are non-negative frequencies
	copy(big[:h], spec[:h])
	neg := l - h
	if l%2 == 0 { // split the Nyquist bin between ±fs/2
		neg--
		big[h] = spec[h] / 2
		big[lf-neg-1] = spec[h] / 2
	}
	copy(big[lf-neg:], spec[l-neg:])
	newFFTPlan(lf).inverse(big, work)
	inv := complex(1/float64(l), 0)
	out := big[:(len(z)-1)*up+1]
	for i := range out {
		out[i] *= inv
	}
	return out
}

// splitLobes divides a response magnitude mag (linear, not squared) at its
// peak index ip into the main lobe, which runs from ip down to the first
// local minimum on each side, [lo, hi], and the sidelobes outside it. It
// returns the main lobe's bounds, the sums of mag² over the main lobe and
// over the sidelobes, and the highest sidelobe sample sideMax at index
// iSide (−1 and 0 when there is no sidelobe).
func splitLobes(mag []float64, ip int) (lo, hi int, main, side, sideMax float64, iSide int) {
	lo, hi, iSide = ip, ip, -1
	for lo > 0 && mag[lo-1] < mag[lo] {
		lo--
	}
	for hi < len(mag)-1 && mag[hi+1] < mag[hi] {
		hi++
	}
	for i, v := range mag {
		if i >= lo && i <= hi {
			main += v * v
			continue
		}
		side += v * v
		if v > sideMax {
			sideMax, iSide = v, i
		}
	}
	return lo, hi, main, side, sideMax, iSide
}
