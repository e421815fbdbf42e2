package dsp

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// TestCorrelatorOutputs: a plan for the first n outputs of a longer window
// against the definition y[k] = Σ x[k+i]·conj(h[i]) summed directly (x
// zero beyond its end) and against the full plan's first n outputs, for
// single blocks, overlap-save blocks, both FFT plans and two workers.
func TestCorrelatorOutputs(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	for _, c := range []struct{ nIn, n, m, workers int }{
		{1133, 734, 400, 1}, {1133, 734, 400, 2}, {1133, 1133, 400, 1}, {5000, 700, 13, 1},
		{70000, 65536, 5000, 2}, {70000, 9000, 64, 2}, {300, 1, 300, 1}, {10, 10, 1, 1},
	} {
		h := make([]complex128, c.m)
		x := make([]complex128, c.nIn)
		for i := range h {
			h[i] = ComplexNormal(r)
		}
		for i := range x {
			x[i] = ComplexNormal(r)
		}
		p := NewCorrelatorOutputs(h, c.nIn, c.n, c.workers)
		if p.Len() != c.n || p.InLen() != c.nIn {
			t.Fatalf("%+v: Len %d InLen %d", c, p.Len(), p.InLen())
		}
		y := p.Apply(nil, x)
		full := NewCorrelator(h, c.nIn).Apply(nil, x)
		scale := 0.0
		for _, v := range h {
			scale += real(v)*real(v) + imag(v)*imag(v)
		}
		scale = math.Sqrt(scale * float64(c.m)) // a bound on |y| of unit samples, roughly
		for _, k := range []int{0, c.n / 3, c.n / 2, c.n - 1} {
			var want complex128
			for i := range h {
				if k+i < c.nIn {
					want += x[k+i] * cmplx.Conj(h[i])
				}
			}
			if d := cmplx.Abs(y[k] - want); d > 1e-12*scale {
				t.Errorf("%+v: y[%d] = %v, direct sum %v", c, k, y[k], want)
			}
		}
		for k := range y {
			if d := cmplx.Abs(y[k] - full[k]); d > 1e-12*scale {
				t.Fatalf("%+v: y[%d] = %v, full plan %v", c, k, y[k], full[k])
			}
		}
	}
}
