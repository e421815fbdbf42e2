package dsp

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mathext"
)

// TestPdAtThreshold: at the nominal threshold it is Pd; for a Swerling 2
// target over N pulses it is the closed form Q(N, t/(1+SNR)) (Richards,
// Fundamentals of Radar Signal Processing, 2nd ed., eq. 6.107; gonum's
// incomplete gamma; scipy and mpmath agree with it to 1e-15 at these
// points) at thresholds far beyond any Pfa a float64 holds.
func TestPdAtThreshold(t *testing.T) {
	for _, n := range []int{1, 2, 10, 64} {
		d := Detector{Pfa: 1e-6, Pulses: n, Integration: NonCoherent, Swerling: Swerling2}
		for _, snr := range []float64{0.5, 3, 30} {
			if a, b := d.PdAtThreshold(snr, d.Threshold()), d.Pd(snr); math.Abs(a-b) > 1e-14 {
				t.Errorf("n %d snr %g: PdAtThreshold %g, Pd %g", n, snr, a, b)
			}
			for _, th := range []float64{d.Threshold() * 30, 1e4, 1e5} {
				got := d.PdAtThreshold(snr*1e4, th)
				want := mathext.GammaIncRegComp(float64(n), th/(1+snr*1e4))
				// Absolute 1e-12, or 2e-3 relative for the tiny Pd of a
				// 37 dB target against 1e5: the series' relative error there
				// is 7e-4 for N = 1 (Pd 2.07e-9) and 6e-6 for N = 2
				// (measured; immaterial to any status).
				if math.Abs(got-want) > 1e-12 && math.Abs(got-want) > 2e-3*want {
					t.Errorf("n %d snr %g threshold %g: %g, want %g", n, snr*1e4, th, got, want)
				}
			}
		}
	}
}

// TestPdAtSumMultiplier: at the nominal multiplier it is Pd; for a
// Swerling 2 target over N pulses behind M cells it is the closed form
// P(Gamma(N, 1+SNR) > c·Gamma(M·N)) = I_{1/(1+c/(1+SNR))}(M·N, N) (the
// exponential pulses of a Swerling 2 target scale the noise by 1+SNR;
// Richards eq. 6.107 with the CA-CFAR of §6.5), by gonum's incomplete
// beta, at raised multipliers.
func TestPdAtSumMultiplier(t *testing.T) {
	for _, c := range []struct{ n, m int }{{1, 16}, {2, 18}, {10, 16}, {30, 8}} {
		d := Detector{Pfa: 1e-6, Pulses: c.n, Integration: NonCoherent, Swerling: Swerling2, CFARCells: c.m}
		c0 := d.Threshold() / float64(c.m)
		for _, snr := range []float64{0.3, 3, 100} {
			if a, b := d.PdAtSumMultiplier(snr, c0), d.Pd(snr); math.Abs(a-b) > 1e-13 {
				t.Errorf("%+v snr %g: PdAtSumMultiplier %g, Pd %g", c, snr, a, b)
			}
			for _, r := range []float64{3, 100, 1000} {
				got := d.PdAtSumMultiplier(snr, r*c0)
				want := mathext.RegIncBeta(float64(c.m*c.n), float64(c.n), 1/(1+r*c0/(1+snr)))
				if math.Abs(got-want) > 1e-12 && math.Abs(got-want) > 1e-6*want {
					t.Errorf("%+v snr %g raise %g: %g, want %g", c, snr, r, got, want)
				}
			}
		}
	}
}
