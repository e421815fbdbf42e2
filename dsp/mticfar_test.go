package dsp

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestCorrelatedCAUnequalVariance checks the multiplier beyond
// MaxExactCorrelatedCells when the training cells hold more noise than the
// cell under test (Doppler bins behind an MTI canceller). For N independent
// training cells of noise power σ² each and a cell under test of unit
// power, the CA test |z0|² > (α/N)·Σ|z_i|² has
// Pfa = E[exp(−α·S/N)] = (1 + α·σ²/N)^(−N), hand-derived from the
// moment-generating function of the Gamma-distributed sum S (Richards,
// Fundamentals of Radar Signal Processing, 2nd ed., 2014, §6.5.1, with the
// training power scaled by σ²), so α = (N/σ²)·(Pfa^(−1/N) − 1). Before the
// fix the covariance in units of the cell under test was read as a
// correlation matrix: N_e = N/σ⁴ and α grew as Pfa^(−σ⁴/N).
func TestCorrelatedCAUnequalVariance(t *testing.T) {
	const pfa = 1e-6
	for _, n := range []int{80, 132} {
		for _, s2 := range []float64{0.25, 1, 4, 134} {
			got := correlatedCAWithCUT(pfa, n, func(i, j int) complex128 {
				switch {
				case i != j:
					return 0
				case i == 0:
					return 1
				}
				return complex(s2, 0)
			})
			want := float64(n) / s2 * (math.Pow(pfa, -1/float64(n)) - 1)
			if math.Abs(got-want) > 1e-9*want {
				t.Errorf("N=%d σ²=%g: α = %.6g, want %.6g", n, s2, got, want)
			}
		}
	}
}

// TestCFAR2DMTIFalseAlarms measures, by simulation, the false-alarm
// probability of the cell-averaging map CFAR on noise passed through a
// two-pulse MTI canceller, in every Doppler bin: the definition
// Pfa = P(|z0|² > T) checked against the design Pfa, with no formula of
// the detector in the check. The canceller leaves the zero-Doppler bin
// with about 2 % of the mean noise power (its |H(f)|² = 4·sin²(π·f)
// through the window's mainlobe), so its training cells hold some 50
// times its own noise; 102 training cells take the effective-cells path.
// Before the fix that bin's threshold was above 10⁴⁰ times its noise and
// no trial crossed it.
func TestCFAR2DMTIFalseAlarms(t *testing.T) {
	const (
		pulses = 16
		nr     = 15 // range cells: the cell under test in the middle
		pfa    = 1e-2
		trials = 12000
	)
	plan := NewSlowTimePlan(pulses, MTITwoPulse, Hamming{})
	nb := plan.Bins()
	cov := plan.NoiseCovariance()
	cf := &CFAR2D{PFA: pfa, GuardR: 1, TrainR: 12, GuardD: 0, TrainD: 6, DopplerCov: cov}
	if n := len(cf.Cells(nil, nr/2, 0, nr, nb)); n <= MaxExactCorrelatedCells {
		t.Fatalf("%d training cells: the test needs more than %d", n, MaxExactCorrelatedCells)
	}
	zero := plan.Bin(0)
	if r := real(cov[zero][zero]); r > 0.1 {
		t.Fatalf("zero-Doppler bin noise %.3g: the canceller should leave under 10 %%", r)
	}
	r := rand.New(rand.NewPCG(31, 7))
	pw := make([][]float64, nr) // pw[k][d]
	for k := range pw {
		pw[k] = make([]float64, nb)
	}
	x := make([]complex128, pulses)
	y := make([]complex128, nb)
	p := func(k, d int) float64 { return pw[k][d] }
	hits := make([]int, nb)
	for range trials {
		for k := range nr {
			for i := range x {
				x[i] = ComplexNormal(r)
			}
			plan.Apply(y, x)
			for d, v := range y {
				pw[k][d] = real(v)*real(v) + imag(v)*imag(v)
			}
		}
		for d := range nb {
			if th := cf.Level(p, nr/2, d, nr, nb); pw[nr/2][d] > th {
				hits[d]++
			}
		}
	}
	// 120 expected crossings: ±3σ of a binomial count is about ±33. The
	// effective-cells form errs on the safe side, so allow down to 0.4·Pfa.
	for d, h := range hits {
		got := float64(h) / trials
		if got > 1.35*pfa || got < 0.4*pfa {
			t.Errorf("bin %d (noise %.3g): measured Pfa %.4g, want %.g (0.4–1.35×)", d, real(cov[d][d]), got, pfa)
		}
	}
	t.Logf("false alarms per bin of %d trials: %v", trials, hits)
}
