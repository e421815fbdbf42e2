package dsp

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// PowerSpectrum against the DFT's definition, summed directly, in
// fftshift order.
func TestPowerSpectrumDefinition(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	x := make([]complex128, 37)
	for i := range x {
		x[i] = complex(rng.NormFloat64(), rng.NormFloat64())
	}
	for _, l := range []int{40, 45, 64} {
		p := PowerSpectrum(make([]float64, l), x)
		for i := range p {
			k := (i - l/2 + l) % l
			var s complex128
			for n, v := range x {
				s += v * cmplx.Exp(complex(0, -2*math.Pi*float64(k*n)/float64(l)))
			}
			if want := real(s)*real(s) + imag(s)*imag(s); math.Abs(p[i]-want) > 1e-9*want+1e-9 {
				t.Fatalf("L=%d, bin %d: %g, want %g", l, i, p[i], want)
			}
		}
	}
}

// A tone on bin centre puts all its energy in one bin: the 99 % band is
// that bin less 0.5 % of its width on each side (ITU Radio Regulations
// No. 1.153: 0.5 % of the power below and above the band). Energy spread
// evenly over n bins gives a band of 0.99·n bins.
func TestOccupiedBand(t *testing.T) {
	p := make([]float64, 64)
	p[40] = 3
	lo, hi := OccupiedBand(p, 0.99)
	if math.Abs(lo-(39.5+0.005)) > 1e-12 || math.Abs(hi-(40.5-0.005)) > 1e-12 {
		t.Errorf("tone: band [%g, %g], want [39.505, 40.495]", lo, hi)
	}
	for i := range p {
		p[i] = 1
	}
	lo, hi = OccupiedBand(p, 0.99)
	if math.Abs((hi-lo)-0.99*64) > 1e-9 || math.Abs(lo+hi-63) > 1e-9 {
		t.Errorf("flat: band [%g, %g], want 0.99·64 bins centred on 31.5", lo, hi)
	}
	if lo, hi := OccupiedBand(make([]float64, 8), 0.99); !math.IsNaN(lo) || !math.IsNaN(hi) {
		t.Errorf("no energy: %g, %g, want NaN", lo, hi)
	}
}
