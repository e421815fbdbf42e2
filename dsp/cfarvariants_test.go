package dsp

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestCFARVariantMultipliersGolden checks the greatest-of, smallest-of and
// censored multipliers against α solved by numerical integration of the
// noise estimate's density with scipy.integrate.quad and brentq
// (testdata/golden/cfarvariants.py → cfarvariants.json), and the published
// figures: 8 cells each side, Pfa 1e-6, greatest-of T = 2.4195 on the
// half-sum (12.87 dB re the mean), smallest-of T = 5.132 (16.13 dB)
// (Hansen & Sawyers, IEEE TAES 16(6), 1980; Weiss, IEEE TAES 18(1), 1982).
func TestCFARVariantMultipliersGolden(t *testing.T) {
	var g struct {
		GOSO []struct {
			N1, N2  int
			PFA     float64 `json:"pfa"`
			AlphaGO float64 `json:"alpha_go"`
			AlphaSO float64 `json:"alpha_so"`
		} `json:"goso"`
		Censored []struct {
			N, C  int
			PFA   float64 `json:"pfa"`
			Alpha float64
		}
	}
	readGolden(t, "cfarvariants.json", &g)
	const tol = 1e-7 // relative; the golden side is a numerical quadrature
	near := func(got, want float64) bool { return math.Abs(got-want) <= tol*want }
	for _, c := range g.GOSO {
		if a := GOMultiplier(c.PFA, c.N1, c.N2); !near(a, c.AlphaGO) {
			t.Errorf("GO n1 %d n2 %d pfa %g: α = %.10g, scipy %.10g", c.N1, c.N2, c.PFA, a, c.AlphaGO)
		}
		if a := SOMultiplier(c.PFA, c.N1, c.N2); !near(a, c.AlphaSO) {
			t.Errorf("SO n1 %d n2 %d pfa %g: α = %.10g, scipy %.10g", c.N1, c.N2, c.PFA, a, c.AlphaSO)
		}
	}
	if len(g.GOSO) == 0 || len(g.Censored) == 0 {
		t.Fatal("golden file holds no cases")
	}
	for _, c := range g.Censored {
		if a := CensoredMultiplier(c.PFA, c.N, c.C); !near(a, c.Alpha) {
			t.Errorf("censored n %d c %d pfa %g: α = %.10g, scipy %.10g", c.N, c.C, c.PFA, a, c.Alpha)
		}
	}
	// Published check values (Hansen & Sawyers 1980; Weiss 1982).
	for _, c := range []struct {
		name      string
		alpha     float64
		t, db     float64
		tTol, dbT float64
	}{
		{"greatest-of", GOMultiplier(1e-6, 8, 8), 2.4195, 12.87, 5e-5, 0.005},
		{"smallest-of", SOMultiplier(1e-6, 8, 8), 5.132, 16.13, 5e-4, 0.005},
	} {
		if got := c.alpha / 8; math.Abs(got-c.t) > c.tTol {
			t.Errorf("%s: T on the half-sum = %.5f, published %.4f", c.name, got, c.t)
		}
		if got := DB(c.alpha); math.Abs(got-c.db) > c.dbT {
			t.Errorf("%s: α re the mean = %.3f dB, published %.2f", c.name, got, c.db)
		}
	}
	// Censoring nothing is Richards' eq. 6.135.
	if a, b := CensoredMultiplier(1e-6, 16, 0), CAMultiplier(1e-6, 16); math.Abs(a-b) > 1e-9*b {
		t.Errorf("censored with c = 0: α = %v, Richards %v", a, b)
	}
}

// TestCFARVariantsFalseAlarmRate: seeded exponential noise (square-law
// detector in Gaussian noise, independent cells); the false-alarm count of
// each variant falls in the 99 % binomial interval of its design Pfa, and
// the smallest-of run with the plain CA multiplier falls outside it, which
// shows the test can fail.
func TestCFARVariantsFalseAlarmRate(t *testing.T) {
	const cells, pfa = 200_000, 1e-2 // 2000 expected alarms; small enough for -race
	r := rand.New(rand.NewPCG(3, 1))
	power := make([]float64, cells)
	for i := range power {
		power[i] = r.ExpFloat64()
	}
	count := func(c *CFAR) int {
		th := c.Thresholds(nil, power)
		a := 0
		for i, p := range power {
			if p > th[i] {
				a++
			}
		}
		return a
	}
	for _, c := range []*CFAR{
		{PFA: pfa, Guard: 2, Train: 16, Variant: GreatestOf},
		{PFA: pfa, Guard: 2, Train: 16, Variant: SmallestOf},
		{PFA: pfa, Guard: 1, Train: 24, Variant: Censored, Censor: 3},
		{PFA: pfa, Guard: 2, Train: 16, Variant: Censored, Censor: 4},
	} {
		a := count(c)
		if ok, mean, half := binomial99(a, cells, pfa); !ok {
			t.Errorf("variant %d train %d censor %d: %d false alarms, 99%% interval %.0f ± %.0f", c.Variant, c.Train, c.Censor, a, mean, half)
		} else {
			t.Logf("variant %d train %d censor %d: %d false alarms (expected %.0f ± %.0f)", c.Variant, c.Train, c.Censor, a, mean, half)
		}
	}
	// The CA multiplier on the smaller half-mean: far too many alarms.
	so := &CFAR{PFA: pfa, Guard: 2, Train: 16, Variant: SmallestOf}
	so.vc = variantCache{{-1 - 8, 8}: CAMultiplier(pfa, 16)}
	if a := count(so); func() bool { ok, _, _ := binomial99(a, cells, pfa); return ok }() {
		t.Errorf("smallest-of with the CA multiplier: %d false alarms, inside the interval; the test cannot tell", a)
	}
}

// TestCFARVariantsOversampled: the real noise path at 2× oversampling
// (LFM reference, B = 1 MHz, fs = 2 MHz, as TestCFARMonteCarloOversampled).
// The variants train on the lattice of cells DecorrelationSpacing apart,
// independent by construction, so their closed forms hold; alarms counted
// at every 8th cell must fall in the 99 % interval of Pfa = 1e-2. The same
// variants trained on every cell (no spacing) must not: smallest-of with 1
// guard cell on every correlated cell doubles the false alarms.
func TestCFARVariantsOversampled(t *testing.T) {
	const pfa, n, every = 1e-2, 400_000, 8 // 500 expected alarms
	h := Sample(nil, LFM{Width: 20e-6, Band: 1e6}, 2e6, 0)
	rho := NoiseCorrelation(nil, h)
	p := compressedNoise(rand.New(rand.NewPCG(14, 1)), h, n)
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
		{PFA: pfa, Guard: 2, Train: 32, Variant: GreatestOf, Rho: rho},
		{PFA: pfa, Guard: 2, Train: 32, Variant: SmallestOf, Rho: rho},
		{PFA: pfa, Guard: 2, Train: 48, Variant: Censored, Censor: 6, Rho: rho},
	} {
		a := count(c)
		if ok, mean, half := binomial99(a, trials, pfa); !ok {
			t.Errorf("variant %d spacing %d: %d false alarms, 99%% interval %.0f ± %.0f", c.Variant, c.Spacing(), a, mean, half)
		} else {
			t.Logf("variant %d spacing %d: %d false alarms (expected %.0f ± %.0f)", c.Variant, c.Spacing(), a, mean, half)
		}
	}
	a := count(&CFAR{PFA: pfa, Guard: 1, Train: 16, Variant: SmallestOf})
	if ok, mean, half := binomial99(a, trials, pfa); ok {
		t.Errorf("smallest-of on every correlated cell: %d false alarms, inside %.0f ± %.0f; the test cannot tell", a, mean, half)
	} else {
		t.Logf("smallest-of on every correlated cell: %d false alarms (design %.0f)", a, mean)
	}
}
