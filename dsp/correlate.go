package dsp

import (
	"math"

	"gonum.org/v1/gonum/dsp/fourier"
)

// Correlator is a fast-correlation plan: it compresses windows of n
// samples with a fixed reference h of m samples,
//
//	y[k] = Σ_{i=0}^{m−1} x[k+i]·conj(h[i]),  k = 0 … n−1,
//
// with x taken as zero beyond its end (the package convention: an echo
// whose leading edge is at sample d peaks at y[d]). It multiplies spectra
// from gonum's mixed-radix fourier.CmplxFFT at a length L whose prime
// factors are 2, 3 and 5: one block of L ≥ n+m−1 when that is cheapest,
// otherwise overlap-save blocks of L−m+1 outputs each, L chosen by an
// operation-count model. A Correlator owns its scratch space; Apply does
// not allocate when dst is given. It is not safe for concurrent use.
type Correlator struct {
	n, m int
	step int               // outputs per block, L−m+1
	fft  *fourier.CmplxFFT // length L
	spec []complex128      // conj(FFT(h zero-padded to L)) / L
	buf  []complex128      // length L
}

// NewCorrelator returns a plan for windows of n samples (n ≥ 1) and the
// reference ref (len(ref) ≥ 1), which is copied. It panics on empty
// arguments (programmer errors).
func NewCorrelator(ref []complex128, n int) *Correlator {
	if n < 1 || len(ref) < 1 {
		panic("dsp: correlator needs n ≥ 1 and a non-empty reference")
	}
	return newCorrelatorLen(ref, n, bestBlockLen(n, len(ref)))
}

// newCorrelatorLen builds the plan with FFT length l ≥ len(ref).
func newCorrelatorLen(ref []complex128, n, l int) *Correlator {
	m := len(ref)
	c := &Correlator{
		n:    n,
		m:    m,
		step: l - m + 1,
		fft:  fourier.NewCmplxFFT(l),
		spec: make([]complex128, l),
		buf:  make([]complex128, l),
	}
	copy(c.spec, ref)
	c.fft.Coefficients(c.spec, c.spec)
	inv := 1 / float64(l)
	for i, v := range c.spec {
		c.spec[i] = complex(real(v)*inv, -imag(v)*inv)
	}
	return c
}

// bestBlockLen picks the FFT length minimising blocks·L·log2(L) over
// 2,3,5-smooth L from the smallest useful block to one block of n+m−1.
func bestBlockLen(n, m int) int {
	single := fftSize(n + m - 1)
	best, bestCost := single, blockCost(n, m, single)
	for l := fftSize(2 * m); l < single; l = fftSize(l + 1) {
		if c := blockCost(n, m, l); c < bestCost {
			best, bestCost = l, c
		}
	}
	return best
}

func blockCost(n, m, l int) float64 {
	blocks := (n + l - m) / (l - m + 1) // ceil(n / (l−m+1))
	return float64(blocks) * float64(l) * math.Log2(float64(l))
}

// Len returns n, the input and output length.
func (c *Correlator) Len() int { return c.n }

// RefLen returns the reference length m.
func (c *Correlator) RefLen() int { return c.m }

// Apply compresses x (len(x) = Len()) into dst and returns dst; a nil dst
// is allocated. dst must not overlap x. Apply panics if len(x) or a
// non-nil len(dst) differs from Len().
func (c *Correlator) Apply(dst, x []complex128) []complex128 {
	if len(x) != c.n {
		panic("dsp: correlator input length mismatch")
	}
	if dst == nil {
		dst = make([]complex128, c.n)
	} else if len(dst) != c.n {
		panic("dsp: correlator destination length mismatch")
	}
	l := len(c.buf)
	for b := 0; b < c.n; b += c.step {
		k := copy(c.buf, x[b:])
		clear(c.buf[k:])
		c.fft.Coefficients(c.buf, c.buf)
		for i, v := range c.spec {
			c.buf[i] *= v
		}
		c.fft.Sequence(c.buf, c.buf)
		copy(dst[b:min(b+c.step, c.n)], c.buf[:min(c.step, l)])
	}
	return dst
}
