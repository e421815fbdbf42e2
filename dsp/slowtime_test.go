package dsp

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestMTIResponse checks the cancellers against their closed forms
// (Richards 2014 §5.2.2): |H|² = 4 sin²(π fT) for the two-pulse and
// 16 sin⁴(π fT) for the three-pulse canceller, divided here by the noise
// gains 2 and 6.
func TestMTIResponse(t *testing.T) {
	for _, f := range []float64{0, 0.01, 0.1, 0.25, 0.37, 0.5, 0.9, 1, 1.5} {
		s := math.Sin(math.Pi * f)
		if got, want := MTIResponse(MTITwoPulse, f), 4*s*s/2; math.Abs(got-want) > 1e-12 {
			t.Errorf("two-pulse at fT=%v: %v, want %v", f, got, want)
		}
		if got, want := MTIResponse(MTIThreePulse, f), 16*s*s*s*s/6; math.Abs(got-want) > 1e-12 {
			t.Errorf("three-pulse at fT=%v: %v, want %v", f, got, want)
		}
	}
	// Blind speeds: zero response at every multiple of the PRF (fT = n).
	for n := 0; n < 4; n++ {
		if got := MTIResponse(MTITwoPulse, float64(n)); got > 1e-20 {
			t.Errorf("two-pulse response at fT=%d is %v, want 0", n, got)
		}
	}
}

// TestSlowTimeGain checks the coherent integration gain N on a bin centre
// with no weighting, and the Hamming window's SNR loss and straddle loss
// for a symmetric window with K = M bins, against Richards 2014 p. 373
// and p. 376 (1.75 dB and 1.5 dB for M = 8) and the rectangular straddle
// loss 3.92 dB (p. 375).
func TestSlowTimeGain(t *testing.T) {
	for _, n := range []int{8, 16, 64} {
		p := NewSlowTimePlan(n, MTINone, nil)
		r := p.ToneResponse(nil, 3.0/float64(n))
		if got := r[p.Bin(3.0/float64(n))]; math.Abs(got-float64(n)) > 1e-9 {
			t.Errorf("N=%d: gain %v, want %d", n, got, n)
		}
	}
	tests := []struct {
		m                int
		loss, straddleDB float64
	}{{8, 1.752, 1.486}, {16, 1.544, 1.615}}
	for _, tt := range tests {
		p := NewSlowTimePlan(tt.m, MTINone, Hamming{})
		on := p.ToneResponse(nil, 0)[p.Bin(0)]
		if got := DB(float64(tt.m) / on); math.Abs(got-tt.loss) > 0.01 {
			t.Errorf("Hamming M=%d: SNR loss %.3f dB, want %.3f", tt.m, got, tt.loss)
		}
		half := 0.5 / float64(tt.m)
		r := p.ToneResponse(nil, half)
		best := math.Max(r[p.Bin(0)], r[p.Bin(0)+1])
		if got := DB(on / best); math.Abs(got-tt.straddleDB) > 0.02 {
			t.Errorf("Hamming M=%d: straddle %.3f dB, want %.3f", tt.m, got, tt.straddleDB)
		}
	}
	p := NewSlowTimePlan(16, MTINone, nil)
	r := p.ToneResponse(nil, 0.5/16)
	if got := DB(16 / math.Max(r[8], r[9])); math.Abs(got-3.908) > 0.01 {
		t.Errorf("rectangular M=16 straddle %.3f dB, want 3.908", got)
	}
}

// TestSlowTimeNoise: white noise of unit power per pulse keeps unit power
// per Doppler bin, with and without MTI and weighting.
func TestSlowTimeNoise(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 3))
	for _, h := range [][]float64{MTINone, MTITwoPulse, MTIThreePulse} {
		p := NewSlowTimePlan(32, h, Hann{})
		x := make([]complex128, 32)
		y := make([]complex128, p.Bins())
		sum, n := 0.0, 0
		for range 4000 {
			for i := range x {
				x[i] = ComplexNormal(r)
			}
			p.Apply(y, x)
			for _, v := range y {
				sum += real(v)*real(v) + imag(v)*imag(v)
				n++
			}
		}
		if mean := sum / float64(n); math.Abs(mean-1) > 0.03 {
			t.Errorf("taps %v: mean noise power %.3f, want 1", h, mean)
		}
	}
}

// TestCFAR2DFalseAlarms runs a 2-D CA-CFAR over a seeded exponential noise
// map and checks the false-alarm rate falls within its 99 % interval.
func TestCFAR2DFalseAlarms(t *testing.T) {
	const nr, nd = 4000, 64
	r := rand.New(rand.NewPCG(4, 4))
	m := make([]float64, nr*nd)
	for i := range m {
		m[i] = r.ExpFloat64()
	}
	c := &CFAR2D{PFA: 1e-3, GuardR: 2, TrainR: 8, GuardD: 1, TrainD: 4}
	p := func(k, d int) float64 { return m[k*nd+d] }
	alarms := 0
	for k := range nr {
		for d := range nd {
			if p(k, d) > c.Level(p, k, d, nr, nd) {
				alarms++
			}
		}
	}
	mean := c.PFA * nr * nd
	if half := 2.576 * math.Sqrt(mean); math.Abs(float64(alarms)-mean) > half {
		t.Errorf("%d false alarms, want %.0f ± %.0f", alarms, mean, half)
	}
}
