package dsp

import (
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/dsp/fourier"
)

// WindowStats are the figures of merit of an N-point weighting w, with
// the definitions of Harris (1978). Frequencies are in DFT bins of the
// N-point window (1 bin = fs/N).
type WindowStats struct {
	CoherentGain      float64 // Σw/N (1 for the rectangle)
	ENBW              float64 // equivalent noise bandwidth NΣw²/(Σw)², bins
	SNRLossDB         float64 // 10·log10(ENBW), dB ≥ 0 (Harris's processing loss)
	HighestSidelobeDB float64 // highest sidelobe of |W(f)| relative to |W(0)|, dB (negative)
	ScallopLossDB     float64 // −20·log10|W(½ bin)/W(0)|, dB
	WorstCaseLossDB   float64 // ScallopLossDB + SNRLossDB, dB
	Width3dB          float64 // full width of |W(f)| at −3.000 dB, bins
	Width6dB          float64 // full width at −6.000 dB, bins
}

// WindowFigures returns the figures of merit of the weighting w, which may
// be symmetric or periodic (the figures depend on which, and on N; see
// the package docs of the tests). Σw must be non-zero and len(w) ≥ 1.
//
// The highest sidelobe is found on a zero-padded FFT of at least 16
// points per bin, beyond the first minimum of |W| next to the mainlobe,
// then refined on the exact transform W(f) = Σ w[k]·e^{−j2πfk/N}; the
// widths are found by bisection on the exact transform. A window with no
// sidelobe (N = 1) reports −Inf. WindowFigures allocates.
func WindowFigures(w []float64) WindowStats {
	n := len(w)
	if n < 1 {
		panic("dsp: empty window")
	}
	var s1, s2 float64
	for _, v := range w {
		s1 += v
		s2 += v * v
	}
	st := WindowStats{
		CoherentGain: s1 / float64(n),
		ENBW:         float64(n) * s2 / (s1 * s1),
	}
	st.SNRLossDB = 10 * math.Log10(st.ENBW)
	mag := func(bins float64) float64 { return dtftMag(w, bins/float64(n)) }
	w0 := math.Abs(s1)
	st.ScallopLossDB = -20 * math.Log10(mag(0.5)/w0)
	st.WorstCaseLossDB = st.ScallopLossDB + st.SNRLossDB
	st.Width3dB = 2 * crossing(mag, w0*math.Pow(10, -3.0/20), float64(n)/2)
	st.Width6dB = 2 * crossing(mag, w0*math.Pow(10, -6.0/20), float64(n)/2)
	st.HighestSidelobeDB = highestSidelobe(w, w0)
	return st
}

// dtftMag returns |Σ w[k]·e^{−j2πfk}| for f in cycles per sample.
func dtftMag(w []float64, f float64) float64 {
	var s complex128
	step := expj(-2 * math.Pi * f)
	rot := complex(1, 0)
	for k, v := range w {
		if k%64 == 0 { // limit rounding drift of the rotation
			rot = expj(-2 * math.Pi * f * float64(k))
		}
		s += complex(v, 0) * rot
		rot *= step
	}
	return cmplx.Abs(s)
}

// crossing returns the smallest f in (0, fmax] bins where the decreasing
// mainlobe g(f) first falls below level, by a scan then bisection.
func crossing(g func(float64) float64, level, fmax float64) float64 {
	const step = 1.0 / 16
	lo := 0.0
	for lo+step <= fmax && g(lo+step) > level {
		lo += step
	}
	hi := math.Min(lo+step, fmax)
	for range 60 {
		mid := (lo + hi) / 2
		if g(mid) > level {
			lo = mid
		} else {
			hi = mid
		}
	}
	return (lo + hi) / 2
}

// highestSidelobe returns the highest sidelobe of |W| relative to w0, dB.
func highestSidelobe(w []float64, w0 float64) float64 {
	n := len(w)
	if n < 2 {
		return math.Inf(-1)
	}
	l := fftSize(16 * n)
	seq := make([]complex128, l)
	for i, v := range w {
		seq[i] = complex(v, 0)
	}
	spec := fourier.NewCmplxFFT(l).Coefficients(nil, seq)
	half := l / 2
	m := make([]float64, half+1)
	for i := range m {
		m[i] = cmplx.Abs(spec[i])
	}
	// First local minimum after the mainlobe.
	i := 1
	for i < half && m[i+1] < m[i] {
		i++
	}
	if i >= half {
		return math.Inf(-1)
	}
	// Refine the few highest local maxima beyond it on the exact transform.
	type cand struct {
		i int
		v float64
	}
	var top [8]cand
	for j := i + 1; j < half; j++ {
		if m[j] >= m[j-1] && m[j] >= m[j+1] {
			c := cand{j, m[j]}
			for k := range top {
				if c.v > top[k].v {
					top[k], c = c, top[k]
				}
			}
		}
	}
	if m[half] > m[half-1] {
		c := cand{half, m[half]}
		for k := range top {
			if c.v > top[k].v {
				top[k], c = c, top[k]
			}
		}
	}
	best := 0.0
	df := 1 / float64(l)
	for _, c := range top {
		if c.v == 0 {
			continue
		}
		g := func(f float64) float64 { return -dtftMag(w, f) }
		lo := math.Max(float64(c.i-1)*df, float64(i)*df)
		hi := math.Min(float64(c.i+1)*df, 0.5)
		best = math.Max(best, -goldenMin(g, lo, hi))
	}
	return 20 * math.Log10(best/w0)
}

// goldenMin returns the minimum value of g on [a, b] by golden-section
// search (g unimodal there), including the end points.
func goldenMin(g func(float64) float64, a, b float64) float64 {
	const r = 0.6180339887498949
	c, d := b-r*(b-a), a+r*(b-a)
	gc, gd := g(c), g(d)
	for range 60 {
		if gc < gd {
			b, d, gd = d, c, gc
			c = b - r*(b-a)
			gc = g(c)
		} else {
			a, c, gc = c, d, gd
			d = a + r*(b-a)
			gd = g(d)
		}
	}
	return math.Min(math.Min(gc, gd), math.Min(g(a), g(b)))
}
