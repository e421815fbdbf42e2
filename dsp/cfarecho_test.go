package dsp

import (
	"encoding/json"
	"fmt"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func identityCov(i, j int) complex128 {
	if i == j {
		return 1
	}
	return 0
}

// TestCAEchoPdNoiseOnly: with no echo P(D > 0) is the false-alarm
// probability, Richards' (1 + α/M)^(−M) for independent cells (Richards,
// Fundamentals of Radar Signal Processing, 2nd ed., eq. 6.135).
func TestCAEchoPdNoiseOnly(t *testing.T) {
	for _, m := range []int{1, 2, 8, 16, 32, 64} {
		for _, pfa := range []float64{0.3, 1e-3, 1e-6, 1e-9} {
			alpha := float64(m) * (math.Pow(pfa, -1/float64(m)) - 1)
			got, err := CAEchoPd(alpha, make([]complex128, m+1), identityCov)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(got-pfa) > 1e-9 {
				t.Errorf("M %d pfa %g: got %.12g", m, pfa, got)
			}
		}
	}
}

// TestCAEchoPdSteadyTarget: a steady echo in the cell under test alone,
// independent unit-noise cells, is the CA-CFAR Pd of a steady target,
// Detector{CFARCells: M}.Pd (dsp's series, itself checked against scipy in
// TestPdGolden, testdata/golden/pd.py). The echo's phase does not matter.
func TestCAEchoPdSteadyTarget(t *testing.T) {
	worst := 0.0
	for _, m := range []int{1, 3, 8, 16, 24, 64} {
		for _, pfa := range []float64{1e-2, 1e-6, 1e-10} {
			d := Detector{Pfa: pfa, Pulses: 1, CFARCells: m}
			if d.Validate() != nil {
				continue
			}
			alpha := float64(m) * (math.Pow(pfa, -1/float64(m)) - 1)
			tst, err := NewCAEchoTest(alpha, m, identityCov)
			if err != nil {
				t.Fatal(err)
			}
			mu := make([]complex128, m+1)
			for _, snrDB := range []float64{-10, 0, 5, 10, 13, 16, 20, 25, 30, 40} {
				snr := math.Pow(10, snrDB/10)
				mu[0] = complex(math.Sqrt(snr)*math.Cos(1.1), math.Sqrt(snr)*math.Sin(1.1))
				got, err := tst.Pd(mu)
				if err != nil {
					t.Fatal(err)
				}
				want := d.Pd(snr)
				worst = math.Max(worst, math.Abs(got-want))
				if math.Abs(got-want) > 1e-9 {
					t.Errorf("M %d pfa %g SNR %g dB: got %.12g, want %.12g", m, pfa, snrDB, got, want)
				}
			}
		}
	}
	t.Logf("largest difference %.3g", worst)
}

// TestCAEchoPdGolden compares with testdata/golden/cfarecho.json
// (cfarecho.py: the whitened complex form diagonalised by scipy.linalg.eigh
// and Imhof's integral by scipy.integrate.quad, plus a seeded numpy Monte
// Carlo of 10^6 draws): matched-filter correlated cells, the target's own
// range response in the training cells, other echoes there, guard 0 (the
// cell under test's correlated neighbours in the training sum), a random
// positive definite R with unequal powers, probabilities from 1e-10 to
// 1 − 4e-5. The quadrature must agree to 1e-9; the Monte Carlo within five
// standard deviations.
func TestCAEchoPdGolden(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "testdata", "golden", "cfarecho.json"))
	if err != nil {
		t.Fatal(err)
	}
	var g struct {
		Cases []struct {
			Name    string
			Alpha   float64
			CovRe   [][]float64 `json:"cov_re"`
			CovImag [][]float64 `json:"cov_im"`
			MuRe    []float64   `json:"mu_re"`
			MuIm    []float64   `json:"mu_im"`
			PD      float64     `json:"pd"`
			MC      float64     `json:"mc"`
			Draws   float64     `json:"mc_draws"`
		}
	}
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	if len(g.Cases) < 15 {
		t.Fatalf("%d golden cases, want ≥ 15", len(g.Cases))
	}
	worst := 0.0
	defer func() { t.Logf("largest difference from scipy %.3g", worst) }()
	for _, c := range g.Cases {
		mu := make([]complex128, len(c.MuRe))
		for i := range mu {
			mu[i] = complex(c.MuRe[i], c.MuIm[i])
		}
		cov := func(i, j int) complex128 { return complex(c.CovRe[i][j], c.CovImag[i][j]) }
		got, err := CAEchoPd(c.Alpha, mu, cov)
		if err != nil {
			t.Fatalf("%s: %v", c.Name, err)
		}
		worst = math.Max(worst, math.Abs(got-c.PD))
		if math.Abs(got-c.PD) > 1e-9 {
			t.Errorf("%s: got %.12g, scipy %.12g", c.Name, got, c.PD)
		}
		sd := math.Sqrt(got*(1-got)/c.Draws) + 1/c.Draws
		if math.Abs(got-c.MC) > 5*sd {
			t.Errorf("%s: got %.6g, Monte Carlo %.6g (σ %.2g)", c.Name, got, c.MC, sd)
		}
	}
}

// TestCAEchoPdCUTCorrelatedPfa: with no echo and the cell under test
// correlated with its training cells, P(D > 0) is the exact false-alarm
// probability of cutSpectrum.logPfa (an independent route: the single
// positive eigenvalue of the test's form and the matrix determinant
// lemma, itself checked against numpy in TestCorrelatedCAMultiplierGolden,
// testdata/golden/cfar.py); with the cell under test independent it is
// CorrelatedCAPfa, 1/det(I + (α/M)R).
func TestCAEchoPdCUTCorrelatedPfa(t *testing.T) {
	rho := sincRho(2, 128)
	for _, tc := range []struct{ guard, m int }{{0, 8}, {1, 16}, {2, 32}, {0, 64}} {
		offs := []int{0}
		for k := 1; k <= tc.m/2; k++ {
			offs = append(offs, tc.guard+k, -tc.guard-k)
		}
		cov := func(i, j int) complex128 { return lagCorrelation(rho, offs[i]-offs[j]) }
		sp, ok := newCutSpectrum(tc.m, cov)
		if !ok {
			t.Fatal("eigen-decomposition failed")
		}
		for _, alpha := range []float64{2, 10, 40} {
			want := math.Exp(sp.logPfa(alpha))
			got, err := CAEchoPd(alpha, make([]complex128, tc.m+1), cov)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(got-want) > 1e-9 {
				t.Errorf("guard %d M %d α %g: got %.12g, logPfa %.12g", tc.guard, tc.m, alpha, got, want)
			}
			// The cell under test made independent: CorrelatedCAPfa.
			indep := func(i, j int) complex128 {
				if (i == 0) != (j == 0) {
					return 0
				}
				return cov(i, j)
			}
			ev := HermitianEigenvalues(tc.m, func(i, j int) complex128 { return cov(i+1, j+1) })
			got, err = CAEchoPd(alpha, make([]complex128, tc.m+1), indep)
			if err != nil {
				t.Fatal(err)
			}
			if want := CorrelatedCAPfa(alpha, ev); math.Abs(got-want) > 1e-9 {
				t.Errorf("guard %d M %d α %g independent CUT: got %.12g, CorrelatedCAPfa %.12g", tc.guard, tc.m, alpha, got, want)
			}
		}
	}
}

// TestCAEchoPdErrors: bad input is an error naming the field.
func TestCAEchoPdErrors(t *testing.T) {
	for _, tc := range []struct {
		name  string
		alpha float64
		mu    []complex128
		cov   func(i, j int) complex128
		want  string
	}{
		{"α 0", 0, make([]complex128, 5), identityCov, "α"},
		{"α NaN", math.NaN(), make([]complex128, 5), identityCov, "α"},
		{"one cell", 3, make([]complex128, 1), identityCov, "cells"},
		{"too many cells", 3, make([]complex128, MaxExactCorrelatedCells+2), identityCov, "training cells"},
		{"NaN mean", 3, []complex128{0, complex(math.NaN(), 0), 0}, identityCov, "mu[1]"},
		{"nil cov", 3, make([]complex128, 3), nil, "covariance"},
		{"zero power", 3, make([]complex128, 3), func(i, j int) complex128 {
			if i == j && i != 2 {
				return 1
			}
			return 0
		}, "cov(2, 2)"},
		{"not Hermitian", 3, make([]complex128, 3), func(i, j int) complex128 {
			if i == j {
				return 1
			}
			if i < j {
				return 0.5i
			}
			return 0.5i
		}, "Hermitian"},
		{"indefinite", 3, make([]complex128, 3), func(i, j int) complex128 {
			if i == j {
				return 1
			}
			return -0.9 // eigenvalues 1.9, 1.9 and 1 − 1.8 = −0.8
		}, "semi-definite"},
	} {
		_, err := CAEchoPd(tc.alpha, tc.mu, tc.cov)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want one naming %q", tc.name, err, tc.want)
		}
	}
	tst, err := NewCAEchoTest(3, 2, identityCov)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := tst.Pd(make([]complex128, 4)); err == nil || !strings.Contains(err.Error(), "4 cells, want 3") {
		t.Errorf("wrong length: error %v", err)
	}
}

// TestCAEchoPdSingular: a singular R (cells closer than the resolution, so
// the training cells' noise is a combination of fewer independent parts)
// needs no inverse; the result is continuous as R approaches it (R + εI).
func TestCAEchoPdSingular(t *testing.T) {
	// Three cells sharing one noise: rank 1.
	one := func(i, j int) complex128 { return 1 }
	mu := []complex128{3, 1, 0.5}
	got, err := CAEchoPd(1.5, mu, one)
	if err != nil {
		t.Fatal(err)
	}
	near, err := CAEchoPd(1.5, mu, func(i, j int) complex128 {
		if i == j {
			return 1 + 1e-9
		}
		return 1
	})
	if err != nil {
		t.Fatal(err)
	}
	// y_k = μ_k + w with one w ~ CN(0, 1); the regularised R is the
	// reference (common practice, no source: continuity in R).
	if math.Abs(got-near) > 1e-6 {
		t.Errorf("singular R: %.10g, R + 1e-9·I: %.10g", got, near)
	}
}

func BenchmarkCAEchoPd(b *testing.B) {
	rho := sincRho(2, 128)
	for _, m := range []int{16, 32, 64} {
		offs := []int{0}
		for k := 1; k <= m/2; k++ {
			offs = append(offs, 2+k, -2-k)
		}
		cov := func(i, j int) complex128 { return lagCorrelation(rho, offs[i]-offs[j]) }
		alpha := float64(m) * (math.Pow(1e-6, -1/float64(m)) - 1)
		mu := make([]complex128, m+1)
		for i, o := range offs {
			mu[i] = 5 * lagCorrelation(rho, o) * complex(math.Cos(0.3), math.Sin(0.3))
			if o == 7 {
				mu[i] += 3i
			}
		}
		b.Run(fmt.Sprintf("build/M%d", m), func(b *testing.B) {
			for range b.N {
				if _, err := NewCAEchoTest(alpha, m, cov); err != nil {
					b.Fatal(err)
				}
			}
		})
		tst, err := NewCAEchoTest(alpha, m, cov)
		if err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprintf("pd/M%d", m), func(b *testing.B) {
			b.ReportAllocs()
			for range b.N {
				if _, err := tst.Pd(mu); err != nil {
					b.Fatal(err)
				}
			}
		})
		d := Detector{Pfa: 1e-6, Pulses: 1}
		ev := HermitianEigenvalues(m, func(i, j int) complex128 { return cov(i+1, j+1) })
		b.Run(fmt.Sprintf("reference-PdCorrelatedCA/M%d", m), func(b *testing.B) {
			for range b.N {
				d.PdCorrelatedCA(25, alpha, ev)
			}
		})
	}
}

// TestCAEchoPdTargetClosedForms: a fluctuating target alone in the cell
// under test of independent cells is Detector{Swerling: s, CFARCells:
// M}.Pd (Swerling 1: Richards' closed form (1 + α/(M(1+χ)))^(−M),
// Fundamentals of Radar Signal Processing, 2nd ed., eq. 6.137; Swerling 3:
// dsp's series, checked against scipy in TestPdGolden); steady, Pd with
// the same amplitudes.
func TestCAEchoPdTargetClosedForms(t *testing.T) {
	worst := 0.0
	for _, m := range []int{4, 16, 32} {
		pfa := 1e-6
		alpha := float64(m) * (math.Pow(pfa, -1/float64(m)) - 1)
		tst, err := NewCAEchoTest(alpha, m, identityCov)
		if err != nil {
			t.Fatal(err)
		}
		for _, snrDB := range []float64{0, 10, 17, 25, 35} {
			snr := math.Pow(10, snrDB/10)
			target := make([]complex128, m+1)
			target[0] = complex(0, math.Sqrt(snr))
			for _, sw := range []int{SwerlingNone, Swerling1, Swerling2, Swerling3, Swerling4} {
				got, err := tst.PdTarget(sw, target, nil)
				if err != nil {
					t.Fatal(err)
				}
				want := Detector{Pfa: pfa, Pulses: 1, Swerling: sw, CFARCells: m}.Pd(snr)
				if sw == Swerling1 {
					if r := math.Pow(1+alpha/(float64(m)*(1+snr)), -float64(m)); math.Abs(r-want) > 1e-12 {
						t.Fatalf("Richards %g, series %g", r, want)
					}
				}
				worst = math.Max(worst, math.Abs(got-want))
				if math.Abs(got-want) > 1e-8 {
					t.Errorf("M %d SNR %g dB Swerling %d: got %.12g, want %.12g", m, snrDB, sw, got, want)
				}
			}
		}
	}
	t.Logf("largest difference %.3g", worst)
}

// TestCAEchoPdTargetSwerling1Sidelobes: a Swerling 1 target with its own
// range response s in correlated cells (the cell under test correlated
// with its neighbours) and no other echo is complex Gaussian, y ~
// CN(0, R + s·sᴴ), so its Pd is that covariance's false-alarm
// probability by cutSpectrum.logPfa (the one positive eigenvalue of the
// test's form and the matrix determinant lemma; checked against numpy in
// TestCorrelatedCAMultiplierGolden) — an independent route to the
// quadrature over its power.
func TestCAEchoPdTargetSwerling1Sidelobes(t *testing.T) {
	rho := sincRho(2, 128)
	for _, tc := range []struct {
		guard, m   int
		snrDB, pfa float64
	}{{0, 8, 12, 1e-2}, {1, 16, 18, 1e-5}, {2, 24, 25, 1e-5}} {
		offs := []int{0}
		for k := 1; k <= tc.m/2; k++ {
			offs = append(offs, tc.guard+k, -tc.guard-k)
		}
		cov := func(i, j int) complex128 { return lagCorrelation(rho, offs[i]-offs[j]) }
		a := math.Sqrt(math.Pow(10, tc.snrDB/10))
		target := make([]complex128, tc.m+1)
		for i, o := range offs {
			target[i] = complex(a, 0) * lagCorrelation(rho, o) * complex(math.Cos(0.8), math.Sin(0.8))
		}
		alpha := float64(tc.m) * (math.Pow(tc.pfa, -1/float64(tc.m)) - 1)
		tst, err := NewCAEchoTest(alpha, tc.m, cov)
		if err != nil {
			t.Fatal(err)
		}
		got, err := tst.PdTarget(Swerling1, target, nil)
		if err != nil {
			t.Fatal(err)
		}
		sp, ok := newCutSpectrum(tc.m, func(i, j int) complex128 { return cov(i, j) + target[i]*cmplx.Conj(target[j]) })
		if !ok {
			t.Fatal("eigen-decomposition failed")
		}
		want := math.Exp(sp.logPfa(alpha))
		t.Logf("guard %d M %d %g dB: %.10g, logPfa route %.10g", tc.guard, tc.m, tc.snrDB, got, want)
		if math.Abs(got-want) > 1e-8 {
			t.Errorf("guard %d M %d %g dB: got %.12g, want %.12g", tc.guard, tc.m, tc.snrDB, got, want)
		}
	}
}

// TestCAEchoPdTargetGolden compares PdTarget with the "fluct" cases of
// testdata/golden/cfarecho.json (cfarecho.py: scipy.integrate.quad over
// the power law, scipy.stats.expon for Swerling 1 and gamma(2, ½) for
// Swerling 3, of the Imhof integral of scipy; and a seeded numpy Monte
// Carlo of 10^6 draws that draws the power each time): a fluctuating
// target with its own range response in the training cells, alone and
// beside a steady echo, guard 1 (LFM) and 0 (Barker).
func TestCAEchoPdTargetGolden(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "testdata", "golden", "cfarecho.json"))
	if err != nil {
		t.Fatal(err)
	}
	var g struct {
		Fluct []struct {
			Name     string
			Swerling int
			Alpha    float64
			CovRe    [][]float64 `json:"cov_re"`
			CovIm    [][]float64 `json:"cov_im"`
			TargetRe []float64   `json:"target_re"`
			TargetIm []float64   `json:"target_im"`
			OthersRe []float64   `json:"others_re"`
			OthersIm []float64   `json:"others_im"`
			PD       float64     `json:"pd"`
			MC       float64     `json:"mc"`
			Draws    float64     `json:"mc_draws"`
		}
	}
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	if len(g.Fluct) < 4 {
		t.Fatalf("%d golden fluctuating cases, want ≥ 4", len(g.Fluct))
	}
	for _, c := range g.Fluct {
		n := len(c.TargetRe)
		s, o := make([]complex128, n), make([]complex128, n)
		for i := range s {
			s[i] = complex(c.TargetRe[i], c.TargetIm[i])
			o[i] = complex(c.OthersRe[i], c.OthersIm[i])
		}
		tst, err := NewCAEchoTest(c.Alpha, n-1, func(i, j int) complex128 { return complex(c.CovRe[i][j], c.CovIm[i][j]) })
		if err != nil {
			t.Fatal(err)
		}
		got, err := tst.PdTarget(c.Swerling, s, o)
		if err != nil {
			t.Fatalf("%s: %v", c.Name, err)
		}
		t.Logf("%s: %.12g, scipy %.12g, Monte Carlo %.6g", c.Name, got, c.PD, c.MC)
		if math.Abs(got-c.PD) > 1e-8 {
			t.Errorf("%s: got %.12g, scipy %.12g", c.Name, got, c.PD)
		}
		if sd := math.Sqrt(got*(1-got)/c.Draws) + 1/c.Draws; math.Abs(got-c.MC) > 5*sd {
			t.Errorf("%s: got %.6g, Monte Carlo %.6g (σ %.2g)", c.Name, got, c.MC, sd)
		}
	}
}

func BenchmarkCAEchoPdTarget(b *testing.B) {
	rho := sincRho(2, 128)
	const m = 16
	offs := []int{0}
	for k := 1; k <= m/2; k++ {
		offs = append(offs, 1+k, -1-k)
	}
	cov := func(i, j int) complex128 { return lagCorrelation(rho, offs[i]-offs[j]) }
	alpha := float64(m) * (math.Pow(1e-5, -1/float64(m)) - 1)
	tst, err := NewCAEchoTest(alpha, m, cov)
	if err != nil {
		b.Fatal(err)
	}
	s, o := make([]complex128, m+1), make([]complex128, m+1)
	for i, off := range offs {
		s[i] = 7 * lagCorrelation(rho, off)
		o[i] = 4i * lagCorrelation(rho, off-7)
	}
	for _, sw := range []int{SwerlingNone, Swerling1, Swerling3} {
		b.Run(fmt.Sprintf("swerling%d/M%d", sw, m), func(b *testing.B) {
			b.ReportAllocs()
			for range b.N {
				if _, err := tst.PdTarget(sw, s, o); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// TestCAEchoPdTargetErrors: bad input to PdTarget is an error naming it.
func TestCAEchoPdTargetErrors(t *testing.T) {
	tst, err := NewCAEchoTest(3, 2, identityCov)
	if err != nil {
		t.Fatal(err)
	}
	ok := make([]complex128, 3)
	for _, tc := range []struct {
		name          string
		sw            int
		target, other []complex128
		want          string
	}{
		{"short target", Swerling1, make([]complex128, 2), nil, "target amplitudes: 2 cells"},
		{"short others", Swerling1, ok, make([]complex128, 4), "other echoes' amplitudes: 4 cells"},
		{"NaN target", Swerling3, []complex128{1, complex(0, math.Inf(1)), 0}, nil, "target[1]"},
		{"NaN others", Swerling1, ok, []complex128{0, 0, complex(math.NaN(), 0)}, "others[2]"},
		{"Swerling 5", 5, ok, nil, "Swerling 5"},
	} {
		_, err := tst.PdTarget(tc.sw, tc.target, tc.other)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want one naming %q", tc.name, err, tc.want)
		}
	}
}
