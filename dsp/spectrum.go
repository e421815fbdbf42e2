package dsp

import "math"

// SpectrumLen returns the transform length PowerSpectrum uses for a pulse
// of n samples zero-padded to at least minLen: the smallest length ≥
// max(n, minLen) whose prime factors are 2, 3 and 5.
func SpectrumLen(n, minLen int) int { return fftSize(max(n, minLen, 1)) }

// PowerSpectrum fills dst with the energy spectrum of x zero-padded to
// len(dst) samples, in fftshift order,
//
//	dst[i] = |X[k]|²,  X[k] = Σ_t x[t]·exp(−j2π·k·t/L),  k = i − ⌊L/2⌋ (mod L),
//
// so dst[i] lies at frequency (i − ⌊L/2⌋)·fs/L for sample rate fs and the
// zero frequency sits at index ⌊L/2⌋. len(dst) must be a length
// SpectrumLen returns (prime factors 2, 3 and 5) and at least len(x);
// otherwise it panics. A nil dst is an error too: the caller chooses the
// padding. It allocates the plan and two scratch buffers of len(dst).
func PowerSpectrum(dst []float64, x []complex128) []float64 {
	l := len(dst)
	if l < len(x) || l == 0 || fftSize(l) != l {
		panic("dsp: power spectrum length must be a 2-3-5 length at least the input's")
	}
	buf := make([]complex128, l)
	copy(buf, x)
	newFFTPlan(l).transform(buf, make([]complex128, l))
	h := l / 2
	for i := range dst {
		v := buf[(i-h+l)%l]
		dst[i] = real(v)*real(v) + imag(v)*imag(v)
	}
	return dst
}

// OccupiedBand returns the lower and upper edges, in bins (fractional,
// on the index axis of p), of the band that holds the fraction frac of
// the total of the power spectrum p: the powers below the lower edge and
// above the upper edge are each (1−frac)/2 of the total. This is the
// occupied bandwidth of ITU Radio Regulations No. 1.153 and
// Recommendation ITU-R SM.328 (frac = 0.99: 0.5 % on each side). Each
// bin's power is taken as spread evenly over [i−½, i+½), so the edges
// are interpolated within a bin. It returns NaN, NaN when p is empty or
// has no positive total, or frac is outside (0, 1).
func OccupiedBand(p []float64, frac float64) (lo, hi float64) {
	total := 0.0
	for _, v := range p {
		total += v
	}
	if len(p) == 0 || !(total > 0) || !(frac > 0 && frac < 1) {
		return math.NaN(), math.NaN()
	}
	tail := (1 - frac) / 2 * total
	return edge(p, tail, false), edge(p, tail, true)
}

// edge walks p from the start (or from the end when back) until the
// running sum reaches tail, and returns the interpolated bin position.
func edge(p []float64, tail float64, back bool) float64 {
	acc := 0.0
	n := len(p)
	for j := range n {
		i := j
		if back {
			i = n - 1 - j
		}
		if acc+p[i] >= tail && p[i] > 0 {
			f := (tail - acc) / p[i] // fraction of bin i inside the tail
			if back {
				return float64(i) + 0.5 - f
			}
			return float64(i) - 0.5 + f
		}
		acc += p[i]
	}
	if back {
		return -0.5
	}
	return float64(n) - 0.5
}
