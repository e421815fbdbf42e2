package dsp

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

func sincRho(os float64, n int) []complex128 {
	r := make([]complex128, n)
	for m := range r {
		x := math.Pi * float64(m) / os
		r[m] = 1
		if m > 0 {
			r[m] = complex(math.Sin(x)/x, 0)
		}
	}
	return r
}

func ones(n int) []float64 {
	p := make([]float64, n)
	for i := range p {
		p[i] = 1
	}
	return p
}

// TestCorrelatedCAMultiplierGolden checks the CA multipliers for
// correlated cells against α solved with numpy.linalg.eigvalsh/eigh and
// scipy.optimize.brentq (testdata/golden/cfar.py → cfar.json): the
// determinant condition Pfa = 1/det(I + (α/N)·R) for a cell under test
// independent of its training cells ("alpha": 31.448, 14.98 dB, for 16
// cells, 2 guard, ρ(m) = sinc(m/2), Pfa 1e-6; Richards' eq. 6.135, 21.942,
// for independent cells), and the exact test with the cell under test's
// own correlation to its training cells ("alpha_cut", which the CFAR
// uses: 28.325 in the same geometry).
func TestCorrelatedCAMultiplierGolden(t *testing.T) {
	var g struct {
		Sinc []struct {
			Oversampling float64
			Guard, Train int
			PFA          float64 `json:"pfa"`
			Alpha        float64
			AlphaCUT     float64 `json:"alpha_cut"`
		}
		LFM []struct {
			Cells    string
			Offsets  []int
			PFA      float64 `json:"pfa"`
			Alpha    float64
			AlphaCUT float64 `json:"alpha_cut"`
		} `json:"lfm"`
		Map []struct {
			Pulses   int
			GuardR   int `json:"guard_r"`
			TrainR   int `json:"train_r"`
			GuardD   int `json:"guard_d"`
			TrainD   int `json:"train_d"`
			Bin      int
			PFA      float64 `json:"pfa"`
			Cells    int
			Alpha    float64
			AlphaCUT float64 `json:"alpha_cut"`
		}
	}
	readGolden(t, "cfar.json", &g)
	const tol = 1e-9 // relative
	for _, c := range g.Sinc {
		rho := sincRho(c.Oversampling, 64)
		cf := &CFAR{PFA: c.PFA, Guard: c.Guard, Train: c.Train, Rho: rho}
		got := cf.Level(ones(101), 50)
		if math.Abs(got-c.AlphaCUT) > tol*c.AlphaCUT {
			t.Errorf("sinc(m/%g) pfa %g: α = %.9g, want %.9g", c.Oversampling, c.PFA, got, c.AlphaCUT)
		}
		offs := cf.Cells(nil, 50, 101, nil)
		l := HermitianEigenvalues(len(offs), func(i, j int) complex128 { return lagCorrelation(rho, offs[j]-offs[i]) })
		if det := CorrelatedCAMultiplier(c.PFA, l); math.Abs(det-c.Alpha) > tol*c.Alpha {
			t.Errorf("sinc(m/%g) pfa %g: det-condition α = %.9g, want %.9g", c.Oversampling, c.PFA, det, c.Alpha)
		}
		// The prefix-sum path agrees with the per-cell path.
		if th := cf.Thresholds(nil, ones(101)); math.Abs(th[50]-got) > 1e-12*got {
			t.Errorf("sinc(m/%g): Thresholds %v, Level %v", c.Oversampling, th[50], got)
		}
	}
	if c := g.Sinc[2]; c.Oversampling != 2 || c.PFA != 1e-6 || c.Alpha < 31.44 || c.Alpha > 31.46 {
		t.Errorf("golden check value moved: %+v, want α 31.45 at 2×, 1e-6", c)
	}
	lfm := LFM{Width: 20e-6, Band: 1e6}
	rho := NoiseCorrelation(nil, Sample(nil, lfm, 2e6, 0))
	for _, c := range g.LFM {
		cf := &CFAR{PFA: c.PFA, Guard: 2, Train: 16, Rho: rho}
		k := 50
		if c.Cells == "one_side" {
			k = 0 // only the cells after it exist
		}
		got := cf.Level(ones(101), k)
		if math.Abs(got-c.AlphaCUT) > 1e-7*c.AlphaCUT {
			t.Errorf("LFM %s pfa %g: α = %.9g, want %.9g", c.Cells, c.PFA, got, c.AlphaCUT)
		}
		if th := cf.Thresholds(nil, ones(101)); math.Abs(th[k]-got) > 1e-12*got {
			t.Errorf("LFM %s: Thresholds %v, Level %v", c.Cells, th[k], got)
		}
	}
	for _, c := range g.Map {
		plan := NewSlowTimePlan(c.Pulses, MTINone, Hann{})
		cf := &CFAR2D{PFA: c.PFA, GuardR: c.GuardR, TrainR: c.TrainR, GuardD: c.GuardD, TrainD: c.TrainD,
			RhoR: sincRho(2, 64), DopplerCov: plan.NoiseCovariance()}
		got := cf.Level(func(int, int) float64 { return 1 }, 50, c.Bin, 101, plan.Bins())
		if n := len(cf.Cells(nil, 50, c.Bin, 101, plan.Bins())); n != c.Cells {
			t.Errorf("map: %d cells, want %d", n, c.Cells)
		}
		if math.Abs(got-c.AlphaCUT) > tol*c.AlphaCUT {
			t.Errorf("map pfa %g: α = %.9g, want %.9g", c.PFA, got, c.AlphaCUT)
		}
	}
}

// TestCorrelatedCAReducesToRichards: with R = I the determinant condition
// is (1 + α/N)^(−N) = Pfa, Richards eq. 6.135.
func TestCorrelatedCAReducesToRichards(t *testing.T) {
	for _, n := range []int{1, 8, 16, 64} {
		l := ones(n)
		if got, want := CorrelatedCAMultiplier(1e-6, l), CAMultiplier(1e-6, n); math.Abs(got-want) > 1e-9*want {
			t.Errorf("n=%d: %v, want %v", n, got, want)
		}
	}
}

// compressedNoise returns |y|²/Σ|h|² of n samples of seeded unit complex
// white noise correlated with h: the noise power profile at the
// compressor's output, unit mean, correlated between neighbouring cells
// when fs > B.
func compressedNoise(r *rand.Rand, h []complex128, n int) []float64 {
	x := make([]complex128, n+len(h))
	for i := range x {
		x[i] = ComplexNormal(r)
	}
	y := NewCorrelator(h, len(x)).Apply(nil, x)
	g := 0.0
	for _, v := range h {
		g += real(v)*real(v) + imag(v)*imag(v)
	}
	p := make([]float64, n)
	for i := range p {
		p[i] = (real(y[i])*real(y[i]) + imag(y[i])*imag(y[i])) / g
	}
	return p
}

// binomial99 reports whether count lies in the 99 % interval of a
// binomial(n, p) count (normal approximation, z = 2.576).
func binomial99(count, n int, p float64) (bool, float64, float64) {
	mean := p * float64(n)
	half := 2.576 * math.Sqrt(mean*(1-p))
	return math.Abs(float64(count)-mean) <= half, mean, half
}

// TestCFARMonteCarloOversampled is a seeded Monte Carlo of the real noise
// path at 2× oversampling: complex white noise compressed with a sampled
// LFM reference (B = 1 MHz, fs = 2 MHz, 40 samples), then the CFAR. The
// false alarms counted at every 8th cell (whose alarms are nearly
// independent of each other) must fall inside the 99 % binomial interval
// of the design Pfa = 1e-3. The same noise with the independent-cell
// multipliers must fall outside it for cell averaging, which shows the
// test can fail.
func TestCFARMonteCarloOversampled(t *testing.T) {
	const pfa, n, every = 1e-3, 3_200_000, 8
	h := Sample(nil, LFM{Width: 20e-6, Band: 1e6}, 2e6, 0)
	rho := NoiseCorrelation(nil, h)
	p := compressedNoise(rand.New(rand.NewPCG(12, 1)), h, n)
	count := func(c *CFAR) int {
		th := c.Thresholds(nil, p)
		a := 0
		for k := 0; k < n; k += every {
			if p[k] > th[k] {
				a++
			}
		}
		return a
	}
	trials := (n + every - 1) / every
	for _, c := range []*CFAR{
		{PFA: pfa, Guard: 2, Train: 16, Rho: rho},
		{PFA: pfa, Guard: 2, Train: 32, Rho: rho},
		{PFA: pfa, Guard: 2, Train: 16, Rank: 12, Rho: rho},
		{PFA: pfa, Guard: 3, Train: 32, Rank: 24, Rho: rho},
	} {
		a := count(c)
		ok, mean, half := binomial99(a, trials, pfa)
		if !ok {
			t.Errorf("train %d rank %d spacing %d: %d false alarms, 99%% interval %.0f ± %.0f", c.Train, c.Rank, c.Spacing(), a, mean, half)
		} else {
			t.Logf("train %d rank %d spacing %d: %d false alarms (expected %.0f ± %.0f)", c.Train, c.Rank, c.Spacing(), a, mean, half)
		}
	}
	a := count(&CFAR{PFA: pfa, Guard: 2, Train: 16})
	if ok, mean, half := binomial99(a, trials, pfa); ok {
		t.Errorf("independent-cell α on correlated cells: %d false alarms, inside %.0f ± %.0f; the test cannot tell", a, mean, half)
	} else {
		t.Logf("independent-cell α on correlated cells: %d false alarms (design %.0f)", a, mean)
	}
}

// TestCFAR2DMonteCarloOversampled: the same on a range–Doppler map: 32
// pulses of compressed noise at 2× oversampling, a Hann Doppler window
// (which correlates neighbouring bins), CA and OS 2-D CFAR at Pfa 1e-3,
// counted at every 4th range cell and every 2nd bin. Beyond
// MaxExactCorrelatedCells the CA multiplier is approximate and errs low
// (checked: fewer false alarms than Pfa, never more).
func TestCFAR2DMonteCarloOversampled(t *testing.T) {
	const pfa, pulses, nr = 1e-3, 32, 50_000
	h := Sample(nil, LFM{Width: 20e-6, Band: 1e6}, 2e6, 0)
	rho := NoiseCorrelation(nil, h)
	r := rand.New(rand.NewPCG(13, 1))
	plan := NewSlowTimePlan(pulses, MTINone, Hann{})
	nb := plan.Bins()
	cube := make([][]complex128, pulses)
	g := 0.0
	for _, v := range h {
		g += real(v)*real(v) + imag(v)*imag(v)
	}
	corr := NewCorrelator(h, nr+len(h))
	x := make([]complex128, nr+len(h))
	for q := range cube {
		for i := range x {
			x[i] = ComplexNormal(r) / complex(math.Sqrt(g), 0)
		}
		cube[q] = corr.Apply(nil, x)[:nr]
	}
	pw := make([][]float64, nb) // pw[d][k]
	for d := range pw {
		pw[d] = make([]float64, nr)
	}
	col, out := make([]complex128, pulses), make([]complex128, nb)
	for k := range nr {
		for q := range pulses {
			col[q] = cube[q][k]
		}
		plan.Apply(out, col)
		for d, v := range out {
			pw[d][k] = real(v)*real(v) + imag(v)*imag(v)
		}
	}
	cov := plan.NoiseCovariance()
	p := func(k, d int) float64 { return pw[d][k] }
	for _, c := range []*CFAR2D{
		// 50 cells: within MaxExactCorrelatedCells, the exact multiplier.
		{PFA: pfa, GuardR: 2, TrainR: 8, GuardD: 1, TrainD: 2, RhoR: rho, DopplerCov: cov},
		{PFA: pfa, GuardR: 2, TrainR: 16, GuardD: 1, TrainD: 4, Rank: 40, RhoR: rho, DopplerCov: cov},
		{PFA: pfa, GuardR: 2, TrainR: 16, GuardD: 1, TrainD: 4, RhoR: rho, DopplerCov: cov}, // 132 cells: approximate
		// Greatest-of, smallest-of and censored: on the lattice of
		// independent cells, with their closed forms (cfarvariants.go).
		{PFA: pfa, GuardR: 2, TrainR: 32, GuardD: 1, TrainD: 4, Variant: GreatestOf, RhoR: rho, DopplerCov: cov},
		{PFA: pfa, GuardR: 2, TrainR: 32, GuardD: 1, TrainD: 4, Variant: SmallestOf, RhoR: rho, DopplerCov: cov},
		{PFA: pfa, GuardR: 2, TrainR: 32, GuardD: 1, TrainD: 4, Variant: Censored, Censor: 24, RhoR: rho, DopplerCov: cov},
	} {
		a, trials := 0, 0
		for k := 0; k < nr; k += 4 {
			for d := 0; d < nb; d += 2 {
				trials++
				// A noise power above the bin's own variance scale: Hann
				// bins all have unit variance (no MTI).
				if pw[d][k] > c.Level(p, k, d, nr, nb) {
					a++
				}
			}
		}
		ok, mean, half := binomial99(a, trials, pfa)
		if len(c.Cells(nil, 100, 0, nr, nb)) > MaxExactCorrelatedCells && c.Rank == 0 && c.Variant == CellAveraging {
			if float64(a) > mean+half {
				t.Errorf("2-D approximate multiplier: %d false alarms, above %.0f + %.0f", a, mean, half)
			}
			continue
		}
		if !ok {
			t.Errorf("2-D rank %d variant %d: %d false alarms in %d cells, 99%% interval %.0f ± %.0f", c.Rank, c.Variant, a, trials, mean, half)
		} else {
			t.Logf("2-D rank %d variant %d: %d false alarms in %d cells (expected %.0f ± %.0f)", c.Rank, c.Variant, a, trials, mean, half)
		}
	}
}

// BenchmarkCFARThresholdsCorrelated: thresholds of a 100 000-cell profile
// with correlated cells (2× oversampled LFM), valid cells only after the
// first 400 (a blanked start), for 16 and 64 training cells: the edge
// patterns each need an eigen-decomposition, solved once per plan.
func BenchmarkCFARThresholdsCorrelated(b *testing.B) {
	rho := NoiseCorrelation(nil, Sample(nil, LFM{Width: 20e-6, Band: 1e6}, 2e6, 0))
	p := ones(100_000)
	valid := make([]bool, len(p))
	for i := 400; i < len(valid); i++ {
		valid[i] = true
	}
	dst := make([]float64, len(p))
	for _, train := range []int{16, 64} {
		b.Run(fmt.Sprintf("train=%d/first", train), func(b *testing.B) {
			for range b.N {
				c := &CFAR{PFA: 1e-6, Guard: 2, Train: train, Rho: rho}
				c.ThresholdsValid(dst, p, valid)
			}
		})
		b.Run(fmt.Sprintf("train=%d/again", train), func(b *testing.B) {
			c := &CFAR{PFA: 1e-6, Guard: 2, Train: train, Rho: rho}
			c.ThresholdsValid(dst, p, valid)
			b.ResetTimer()
			for range b.N {
				c.ThresholdsValid(dst, p, valid)
			}
		})
	}
}

// TestCAMultiplierWithCUTSingular: a cell under test whose noise lies in
// the span of its training cells (a singular covariance, as the Doppler
// bins of a short CPI under a window that is zero at its ends give).
// With z0 = (z1 + z2)/√2 and z1, z2 independent, write w = (z1 − z2)/√2:
// |z1|² + |z2|² = |z0|² + |w|², so |z0|² > β(|z1|² + |z2|²) is
// |z0|²/|w|² > β/(1 − β), a ratio of independent unit exponentials:
// Pfa = 1 − β = 1 − α/2 for α < 2 and 0 beyond (closed form, derived
// here). The multiplier was NaN (the exact form found no positive
// eigenvalue at the bracket's first α) and the 2-D CFAR fell back to the
// effective-cells form, 3.3 dB high in a case of the pulse-train
// differential test (testdata/diffmodel/train.py, train-119).
func TestCAMultiplierWithCUTSingular(t *testing.T) {
	c := complex(1/math.Sqrt2, 0)
	cov := func(i, j int) complex128 {
		switch {
		case i == j:
			return 1
		case i == 0 || j == 0:
			return c
		}
		return 0
	}
	for _, pfa := range []float64{1e-6, 1e-3, 0.1} {
		want := 2 * (1 - pfa)
		if a := CAMultiplierWithCUT(pfa, 2, cov); !(math.Abs(a-want) < 1e-9*want) {
			t.Errorf("pfa %g: α %v, want %v", pfa, a, want)
		}
	}
}
