package dsp

import (
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mathext"
)

// requiredDB is the required single-pulse SNR of d in dB, failing t on error.
func requiredDB(t *testing.T, d Detector, pd float64) float64 {
	t.Helper()
	x, err := d.RequiredSNR(pd)
	if err != nil {
		t.Fatal(err)
	}
	return DB(x)
}

// TestPdCheckValues checks the required SNRs and detection probabilities
// against published values and closed forms, each with its source.
func TestPdCheckValues(t *testing.T) {
	steady := Detector{Pfa: 1e-6, Pulses: 1}
	sw1 := Detector{Pfa: 1e-6, Pulses: 1, Swerling: Swerling1}
	sw1cfar := Detector{Pfa: 1e-6, Pulses: 1, Swerling: Swerling1, CFARCells: 16}
	for _, c := range []struct {
		name, source string
		got, want    float64
		tol          float64 // dB or probability, absolute
	}{
		{"steady, Pd 0.9, Pfa 1e-6, N 1 (dB)",
			"non-central chi-square (scipy.stats.ncx2, testdata/golden/pd.py); Albersheim 1981 gives 13.11 dB for a linear detector",
			requiredDB(t, steady, 0.9), 13.18, 0.01},
		{"Swerling 1, Pd 0.9, Pfa 1e-6, N 1 (dB)",
			"closed form Pd = Pfa^(1/(1+SNR)), Richards, Fundamentals of Radar Signal Processing 2nd ed. §6.3 (Swerling 1, N = 1)",
			requiredDB(t, sw1, 0.9), DB(math.Log(1e-6)/math.Log(0.9) - 1), 1e-7},
		{"Swerling 1, Pd 0.9, Pfa 1e-6, N 1, rounded (dB)", "same", requiredDB(t, sw1, 0.9), 21.14, 0.005},
		{"Swerling 1 behind a 16-cell CA-CFAR, Pd 0.9, Pfa 1e-6 (dB)",
			"Richards 2nd ed. eq. 6.137: Pd = (1 + α/(M(1+SNR)))^(−M), solved for SNR",
			requiredDB(t, sw1cfar, 0.9), DB((math.Pow(0.9/1e-6, 1.0/16) - 1) / (1 - math.Pow(0.9, 1.0/16))), 1e-7},
		{"same, rounded (dB)", "Richards 2nd ed. eq. 6.137", requiredDB(t, sw1cfar, 0.9), 23.15, 0.005},
		{"Pd of a steady target whose signal power equals the threshold, Pfa 1e-6",
			"Marcum Q, scipy.stats.ncx2 (testdata/golden/pd.py)", steady.Pd(-math.Log(1e-6)), 0.54, 0.005},
		{"Pd of a Swerling 1 target whose signal power equals the threshold, Pfa 1e-6",
			"closed form Pfa^(1/(1+T)) = exp(−T/(1+T)), Richards 2nd ed. §6.3", sw1.Pd(-math.Log(1e-6)), 0.39, 0.005},
		{"steady, Pd 0.9, Pfa 1e-8, N 1 (dB)", "Richards 2nd ed. p. 479: \"For N = 1, this is 14.2 dB\"",
			requiredDB(t, Detector{Pfa: 1e-8, Pulses: 1}, 0.9), 14.2, 0.05},
		{"steady, Pd 0.9, Pfa 1e-8, N 10 non-coherent (dB)", "Richards 2nd ed. p. 479: \"for N = 10, it drops to 6.1 dB\"",
			requiredDB(t, Detector{Pfa: 1e-8, Pulses: 10}, 0.9), 6.1, 0.05},
		// A worked example with several pulses: Mahafza & Elsherbeni,
		// Simulations for Radar Systems Design, 2004, §2.8 (fluctuation
		// loss, "accuracy of 0.005 dB or better"), Pd 0.65, Pfa 1e-9,
		// N = 10 non-coherently integrated; the book's printed output:
		// "SNR_SW5 = 5.525" dB with "PD_SW5 = 0.65097" (steady) and
		// "SNR_SW1 = 8.33" dB with "PD_SW1 = 0.65020" (Swerling 1), SNRs on
		// steps of 0.005 and 0.001 dB, the first past Pd 0.65.
		{"steady, Pd 0.65, Pfa 1e-9, N 10 (dB)",
			"Mahafza & Elsherbeni 2004 §2.8: 5.525 dB from the book's Gram-Charlier series (its Pd 0.65097 at 5.525 dB is ours 0.6531); 0.02 dB covers its 0.005 dB step and the series' error",
			requiredDB(t, Detector{Pfa: 1e-9, Pulses: 10}, 0.65), 5.525, 0.02},
		// The book's Swerling 1 figure matches a threshold set for its
		// false-alarm number over the N pulses: its threshold (listing
		// 2.14, pd_swerling5) solves P(N, V_T) = 0.5^(N/n') with n' =
		// N·ln2/Pfa there, and a Swerling 1 threshold from n' = ln2/Pfa
		// (Marcum's convention, Pfa ≈ ln2/n') gives Pfa' = 1 − 0.5^(N/n')
		// ≈ N·Pfa = 1e-8. With that Pfa our series reproduces its Pd to
		// 4e-5; with Pfa 1e-9 it needs 8.74 dB, 0.41 dB more than printed.
		// The conversion is inferred from the numbers, not stated there.
		{"Swerling 1, Pd at 8.33 dB, N 10, Pfa' = 1 − 0.5^(N·Pfa/ln2) = 1e-8 (Pfa 1e-9)",
			"Mahafza & Elsherbeni 2004 §2.8: PD_SW1 = 0.65020 at 8.33 dB; 1e-4 covers the book's threshold iteration, which stops at a relative step of 1e-4 (listing 2.14)",
			Detector{Pfa: -math.Expm1(10 * math.Log(0.5) * 1e-9 / math.Ln2), Pulses: 10, Swerling: Swerling1}.Pd(FromDB(8.33)), 0.65020, 1e-4},
		{"Albersheim, Pd 0.9, Pfa 1e-6, N 1 (dB)", "Albersheim, Proc. IEEE 69(7):839, 1981 (formula)",
			Albersheim(0.9, 1e-6, 1), 13.11, 0.005},
		{"Albersheim, Pd 0.9, Pfa 1e-6, N 10 (dB)", "Albersheim 1981 (formula)", Albersheim(0.9, 1e-6, 10), 4.99, 0.005},
		{"Shnidman, steady, Pd 0.9, Pfa 1e-6, N 1 (dB)", "Shnidman, IEEE TAES 38(3), 2002; Richards eqs. 6.109–6.112",
			Shnidman(0.9, 1e-6, 1, SwerlingNone), 13.12, 0.005},
		{"Shnidman, Swerling 1, Pd 0.9, Pfa 1e-6, N 1 (dB)", "Shnidman 2002 (formula)",
			Shnidman(0.9, 1e-6, 1, Swerling1), 21.35, 0.005},
		// Swerling 2–4 with several pulses. No published table value could
		// be read for this work (searched: Meyer & Mayer 1973, Shnidman
		// 2002, DiFranco & Rubin, Barton, Richards ch. 6, Mahafza ch. 2;
		// docs/detection-probability.md §4), so these are 'computed':
		// scipy numerical integration over the RCS law
		// (testdata/golden/pd.py), a route independent of the series, and
		// the published closed forms of TestPdSeveralPulsesClosedForms.
		{"Swerling 2, Pd 0.9, Pfa 1e-6, N 10 (dB)", "computed: scipy (testdata/golden/pd.py)",
			requiredDB(t, Detector{Pfa: 1e-6, Pulses: 10, Swerling: Swerling2}, 0.9), 6.2918, 0.001},
		{"Swerling 3, Pd 0.9, Pfa 1e-6, N 10 (dB)", "computed: scipy (testdata/golden/pd.py)",
			requiredDB(t, Detector{Pfa: 1e-6, Pulses: 10, Swerling: Swerling3}, 0.9), 9.6013, 0.001},
		{"Swerling 4, Pd 0.9, Pfa 1e-6, N 10 (dB)", "computed: scipy (testdata/golden/pd.py)",
			requiredDB(t, Detector{Pfa: 1e-6, Pulses: 10, Swerling: Swerling4}, 0.9), 5.8062, 0.001},
		{"Swerling 1, Pd 0.9, Pfa 1e-6, N 10 (dB)", "computed: scipy (testdata/golden/pd.py)",
			requiredDB(t, Detector{Pfa: 1e-6, Pulses: 10, Swerling: Swerling1}, 0.9), 13.4996, 0.001},
		{"coverage: 17.02 dB at 5 km falls to 13.18 dB at (km)", "R⁴ law of the radar equation",
			RangeAtSNR(5, 17.02, 13.18), 6.24, 0.005},
	} {
		if math.Abs(c.got-c.want) > c.tol {
			t.Errorf("%s: got %.5f, want %.5f ± %g (%s)", c.name, c.got, c.want, c.tol, c.source)
		}
	}
}

// TestCFARLoss checks the CA-CFAR loss of a Swerling 1 target against the
// closed form of Richards 2nd ed. eq. 6.137 and Nitzberg (IEEE TAES
// AES-14(1), 1978): the loss in dB halves when the cells double.
func TestCFARLoss(t *testing.T) {
	for _, c := range []struct {
		cells int
		pd    float64
		want  float64 // dB, computed from eq. 6.137 and the known-noise closed form
	}{{8, 0.9, 4.269}, {16, 0.9, 2.007}, {32, 0.9, 0.971}, {64, 0.9, 0.477}, {16, 0.5, 1.996}} {
		d := Detector{Pfa: 1e-6, Pulses: 1, Swerling: Swerling1, CFARCells: c.cells}
		got, err := d.CFARLoss(c.pd)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(got-c.want) > 0.001 {
			t.Errorf("%d cells, Pd %g: CFAR loss %.4f dB, want %.3f", c.cells, c.pd, got, c.want)
		}
	}
	// Ordered-statistic CFAR, rank 12 of 16, Swerling 1: from Rohling's
	// closed form at α/(1+χ) and the known-noise closed form.
	os := Detector{Pfa: 1e-6, Pulses: 1, Swerling: Swerling1, CFARCells: 16, OSRank: 12}
	if got, err := os.CFARLoss(0.9); err != nil || math.Abs(got-2.934) > 0.001 {
		t.Errorf("OS-CFAR 12 of 16: loss %.4f dB (%v), want 2.934", got, err)
	}
	if got, _ := (Detector{Pfa: 1e-6, Pulses: 1}).CFARLoss(0.9); got != 0 {
		t.Errorf("loss without a CFAR = %g, want 0", got)
	}
}

// TestPdClosedForms compares the series with the published closed forms of
// Meyer & Mayer (Radar Target Detection, 1973), as printed in Richards 2nd
// ed. §6.3 and Table 6.1.
func TestPdClosedForms(t *testing.T) {
	for _, n := range []int{1, 2, 5, 10, 30} {
		for _, pfa := range []float64{1e-3, 1e-6, 1e-10} {
			tt := GammaThreshold(pfa, float64(n))
			N := float64(n)
			for _, snrDB := range []float64{-10, -3, 0, 4, 9, 15, 25} {
				x := FromDB(snrDB)
				name := fmt.Sprintf("N=%d Pfa=%g SNR=%g dB", n, pfa, snrDB)
				// Swerling 2: every pulse is exponential of mean 1+SNR.
				want := mathext.GammaIncRegComp(N, tt/(1+x))
				if got := (Detector{Pfa: pfa, Pulses: n, Swerling: Swerling2}).Pd(x); !near(got, want, 1e-10) {
					t.Errorf("Swerling 2 %s: Pd %.15g, closed form %.15g", name, got, want)
				}
				// Swerling 1.
				if n == 1 {
					want = math.Exp(-tt / (1 + x))
				} else {
					r := 1 + 1/(N*x)
					want = 1 - mathext.GammaIncReg(N-1, tt) +
						math.Pow(r, N-1)*mathext.GammaIncReg(N-1, tt/r)*math.Exp(-tt/(1+N*x))
				}
				if got := (Detector{Pfa: pfa, Pulses: n, Swerling: Swerling1}).Pd(x); !near(got, want, 1e-9) {
					t.Errorf("Swerling 1 %s: Pd %.15g, closed form %.15g", name, got, want)
				}
				if n == 1 {
					// Swerling 3 and 4 at one pulse.
					want = math.Exp(-2*tt/(2+x)) * (1 + 2*x*tt/((2+x)*(2+x)))
					for _, sw := range []int{Swerling3, Swerling4} {
						if got := (Detector{Pfa: pfa, Pulses: 1, Swerling: sw}).Pd(x); !near(got, want, 1e-10) {
							t.Errorf("Swerling %d %s: Pd %.15g, closed form %.15g", sw, name, got, want)
						}
					}
					// Swerling 1 behind a CA-CFAR, eq. 6.137, for several cell counts.
					for _, m := range []int{1, 4, 16, 100} {
						alpha := CAMultiplier(pfa, m)
						want = math.Pow(1+alpha/(float64(m)*(1+x)), -float64(m))
						d := Detector{Pfa: pfa, Pulses: 1, Swerling: Swerling1, CFARCells: m}
						if d.Validate() != nil {
							continue // too few cells for this Pfa
						}
						if got := d.Pd(x); !near(got, want, 1e-10) {
							t.Errorf("Swerling 1 CA-CFAR M=%d %s: Pd %.15g, eq. 6.137 %.15g", m, name, got, want)
						}
					}
				}
			}
		}
	}
}

// TestPdSeveralPulsesClosedForms checks the series for Swerling 2, 3 and 4
// targets and N non-coherently integrated pulses against closed forms
// that do not share its code, and reaches the required SNRs of
// TestPdCheckValues (Pd 0.9, Pfa 1e-6, N = 10) through them:
//   - Swerling 2: Pd = Q(N, T/(1+χ)) (Meyer & Mayer 1973; Richards,
//     Fundamentals of Radar Signal Processing, 2nd ed., eq. 6.107), so the
//     required SNR is exactly χ = Q⁻¹(N, Pfa)/Q⁻¹(N, Pd) − 1;
//   - Swerling 4: Pd = 1 − (1+χ/2)^(−N) Σ_{j=0…N} C(N, j)(χ/2)^j P(N+j, T/(1+χ/2)),
//     P the lower regularized incomplete gamma function (Marcum and
//     Swerling's result as printed in Mahafza & Elsherbeni, Simulations
//     for Radar Systems Design, 2004, eq. 2.83–2.84; it also follows from
//     the moment-generating function (1+s)^N/(1+s(1+χ/2))^(2N) of the
//     integrated statistic expanded in powers of (1+s(1+χ/2)));
//   - Swerling 3: Marcum's exact result as printed in Mahafza &
//     Elsherbeni, Simulations for Radar Systems Design, 2004, §2.6.4,
//     eqs. 2.81–2.82 (read for this work): with x = Nχ/2 and
//     K₀ = e^(−T/(1+x))·(1+2/(Nχ))^(N−2)·(1 + T/(1+x) − 2(N−2)/(Nχ)),
//     Pd = K₀ for N = 1, 2 (eq. 2.81) and, for N > 2 (eq. 2.82),
//     Pd = T^(N−1)e^(−T)/((1+x)(N−2)!) + 1 − P(N−1, T) + K₀·P(N−1, T/(1+2/(Nχ))),
//     P the lower regularized incomplete gamma function (the book's
//     Γ_I(x, N)). The book's 2.81 applied beyond N = 2 (the form this test
//     used before, recalled from memory) drops the first three terms and
//     the factor P(…), a difference of the order of Pfa.
func TestPdSeveralPulsesClosedForms(t *testing.T) {
	sw4 := func(chi float64, n int, T float64) float64 {
		b := 1 + chi/2
		sum := 0.0
		for j := 0; j <= n; j++ {
			c := math.Exp(lgammaInt(n+1) - lgammaInt(j+1) - lgammaInt(n-j+1) + float64(j)*math.Log(chi/2) - float64(n)*math.Log(b))
			sum += c * mathext.GammaIncReg(float64(n+j), T/b)
		}
		return 1 - sum
	}
	sw3 := func(chi float64, n int, T float64) float64 {
		N, x := float64(n), float64(n)*chi/2
		k0 := math.Exp(-T/(1+x)+(N-2)*math.Log1p(1/x)) * (1 + T/(1+x) - (N-2)/x)
		if n <= 2 {
			return k0 // eq. 2.81
		}
		first := math.Exp((N-1)*math.Log(T) - T - math.Log1p(x) - lgammaInt(n-1)) // T^(N−1)e^(−T)/((1+x)(N−2)!)
		return first + mathext.GammaIncRegComp(N-1, T) + k0*mathext.GammaIncReg(N-1, T/(1+1/x))
	}
	for _, n := range []int{1, 2, 3, 5, 10, 30} {
		for _, pfa := range []float64{1e-3, 1e-6, 1e-9} {
			T := GammaThreshold(pfa, float64(n))
			for _, snrDB := range []float64{-3, 0, 3, 6, 10, 15, 20} {
				x := FromDB(snrDB)
				if got, want := (Detector{Pfa: pfa, Pulses: n, Swerling: Swerling4}).Pd(x), sw4(x, n, T); !near(got, want, 1e-10) {
					t.Errorf("Swerling 4 N=%d Pfa=%g %g dB: series %.15g, closed form %.15g", n, pfa, snrDB, got, want)
				}
				if got, want := (Detector{Pfa: pfa, Pulses: n, Swerling: Swerling3}).Pd(x), sw3(x, n, T); !near(got, want, 1e-10) {
					t.Errorf("Swerling 3 N=%d Pfa=%g %g dB: series %.15g, closed form %.15g", n, pfa, snrDB, got, want)
				}
			}
		}
	}
	// Required SNR, Pd 0.9, Pfa 1e-6, N = 10, by bisection on each closed
	// form (Swerling 2 directly), against the series' RequiredSNR.
	T := GammaThreshold(1e-6, 10)
	bisect := func(pd func(float64) float64) float64 {
		lo, hi := -20.0, 40.0
		for hi-lo > 1e-9 {
			if mid := (lo + hi) / 2; pd(FromDB(mid)) < 0.9 {
				lo = mid
			} else {
				hi = mid
			}
		}
		return (lo + hi) / 2
	}
	for _, c := range []struct {
		sw   int
		want float64
	}{
		{Swerling2, DB(T/mathext.GammaIncRegCompInv(10, 0.9) - 1)},
		{Swerling3, bisect(func(x float64) float64 { return sw3(x, 10, T) })},
		{Swerling4, bisect(func(x float64) float64 { return sw4(x, 10, T) })},
	} {
		got := requiredDB(t, Detector{Pfa: 1e-6, Pulses: 10, Swerling: c.sw}, 0.9)
		t.Logf("Swerling %d, Pd 0.9, Pfa 1e-6, N 10: closed form %.4f dB, series %.4f dB", c.sw, c.want, got)
		if math.Abs(got-c.want) > 1e-4 {
			t.Errorf("Swerling %d, N 10: series %.5f dB, closed form %.5f dB", c.sw, got, c.want)
		}
	}
}

// lgammaInt is ln Γ(n) for a positive whole n.
func lgammaInt(n int) float64 {
	v, _ := math.Lgamma(float64(n))
	return v
}

// TestOSCFARPd: for a Swerling 1 target and one pulse the ordered-statistic
// CFAR has the closed form Pd = Π_{i<k} (M−i)/(M−i+α/(1+χ)), the false-alarm
// formula of Rohling (IEEE TAES 19(4), 1983) at α/(1+χ); the series must
// reproduce it, and give Pfa at zero SNR for every model.
func TestOSCFARPd(t *testing.T) {
	for _, c := range []struct{ m, k int }{{16, 12}, {16, 16}, {24, 18}, {8, 6}, {32, 1}, {200, 150}} {
		for _, pfa := range []float64{1e-3, 1e-6} {
			d := Detector{Pfa: pfa, Pulses: 1, Swerling: Swerling1, CFARCells: c.m, OSRank: c.k}
			if d.Validate() != nil {
				continue // this rank cannot reach the Pfa with a sane multiplier
			}
			alpha := d.Threshold()
			if got := OSPfa(alpha, c.m, c.k); !near(got, pfa, 1e-9) {
				t.Errorf("M=%d k=%d: OSPfa(threshold) = %g, want %g", c.m, c.k, got, pfa)
			}
			for _, snrDB := range []float64{-10, 0, 10, 20, 40} {
				x := FromDB(snrDB)
				want := OSPfa(alpha/(1+x), c.m, c.k)
				if got := d.Pd(x); !near(got, want, 1e-10) {
					t.Errorf("M=%d k=%d Pfa %g SNR %g dB: Pd %.15g, Rohling closed form %.15g", c.m, c.k, pfa, snrDB, got, want)
				}
			}
			for sw := SwerlingNone; sw <= Swerling4; sw++ {
				d.Swerling = sw
				if got := d.Pd(0); !near(got, pfa, 1e-9) {
					t.Errorf("Swerling %d M=%d k=%d: Pd(0) = %g, want Pfa %g", sw, c.m, c.k, got, pfa)
				}
			}
		}
	}
}

// near reports whether got and want agree to a relative tolerance, or an
// absolute one of tol·1e-3 near zero.
func near(got, want, tol float64) bool {
	return math.Abs(got-want) <= tol*math.Max(math.Abs(want), 1e-3)
}

// TestPdProperties checks what must hold whatever the model: Pd(0) is the
// false-alarm probability (with and without CFAR), Pd rises with SNR, the
// CFAR threshold for one pulse is eq. 6.135, coherent integration of a
// steady target is one pulse at N·SNR.
func TestPdProperties(t *testing.T) {
	for sw := SwerlingNone; sw <= Swerling4; sw++ {
		for _, n := range []int{1, 3, 20} {
			for _, m := range []int{0, 1, 2, 8, 32} {
				for _, pfa := range []float64{1e-2, 1e-6, 1e-12} {
					d := Detector{Pfa: pfa, Pulses: n, Swerling: sw, CFARCells: m}
					if d.Validate() != nil {
						continue // too few cells for this Pfa: TestDetectorValidate
					}
					if got := d.Pd(0); !near(got, pfa, 1e-9) {
						t.Errorf("%+v: Pd(0) = %.15g, want Pfa", d, got)
					}
					prev := pfa
					for snrDB := -20.0; snrDB <= 60; snrDB += 2.5 {
						p := d.Pd(FromDB(snrDB))
						if !(p >= prev-1e-13) || p > 1 {
							t.Fatalf("%+v: Pd(%g dB) = %.15g after %.15g", d, snrDB, p, prev)
						}
						prev = p
					}
				}
			}
		}
	}
	for _, m := range []int{2, 8, 16, 64} {
		d := Detector{Pfa: 1e-6, Pulses: 1, CFARCells: m}
		if got, want := d.Threshold(), CAMultiplier(1e-6, m); !near(got, want, 1e-12) {
			t.Errorf("M=%d: threshold %.15g, CAMultiplier %.15g", m, got, want)
		}
	}
	for _, sw := range []int{SwerlingNone, Swerling1, Swerling3} {
		coh := Detector{Pfa: 1e-6, Pulses: 8, Integration: Coherent, Swerling: sw}
		one := Detector{Pfa: 1e-6, Pulses: 1, Swerling: sw}
		if got, want := coh.Pd(FromDB(3)), one.Pd(8*FromDB(3)); got != want {
			t.Errorf("Swerling %d coherent: Pd %g, one pulse at 8·SNR %g", sw, got, want)
		}
	}
	if got, want := (Detector{Pfa: 1e-6, Pulses: 8, Integration: Coherent, Swerling: Swerling2}).Pd(10),
		(Detector{Pfa: 1e-6, Pulses: 1, Swerling: Swerling2}).Pd(10); got != want {
		t.Errorf("Swerling 2 coherent: Pd %g, want the one-pulse %g (no coherent gain)", got, want)
	}
	// Large arguments stay finite and fast.
	for _, d := range []Detector{{Pfa: 1e-12, Pulses: MaxPulses}, {Pfa: 1e-6, Pulses: 1000, CFARCells: 64, Swerling: Swerling4}} {
		for _, snrDB := range []float64{-30, 0, 30, 90} {
			if p := d.Pd(FromDB(snrDB)); math.IsNaN(p) || p < 0 || p > 1 {
				t.Errorf("%+v at %g dB: Pd %g", d, snrDB, p)
			}
		}
	}
}

func TestDetectorValidate(t *testing.T) {
	for _, c := range []struct {
		d    Detector
		want string // substring of the error; "" for valid
	}{
		{Detector{Pfa: 1e-6, Pulses: 1}, ""},
		{Detector{Pfa: 0, Pulses: 1}, "Pfa 0 out of range: want 0 < Pfa < 1"},
		{Detector{Pfa: 1, Pulses: 1}, "Pfa 1 out of range"},
		{Detector{Pfa: math.NaN(), Pulses: 1}, "Pfa NaN"},
		{Detector{Pfa: 1e-6, Pulses: 0}, "Pulses 0 out of range: want 1 … 100000"},
		{Detector{Pfa: 1e-6, Pulses: 1, Swerling: 5}, "Swerling 5 out of range"},
		{Detector{Pfa: 1e-6, Pulses: 1, CFARCells: -1}, "CFARCells -1 out of range"},
		{Detector{Pfa: 1e-6, Pulses: 1, Integration: 2}, "Integration 2 out of range"},
		{Detector{Pfa: 1e-6, Pulses: 4, Integration: Coherent, Swerling: Swerling4}, "Swerling 4"},
		{Detector{Pfa: 1e-6, Pulses: 1, Integration: Coherent, Swerling: Swerling4}, ""},
		{Detector{Pfa: 1e-6, Pulses: 1, CFARCells: 1}, "CFARCells 1 too few for Pfa 1e-06"},
		{Detector{Pfa: 1e-6, Pulses: 1, CFARCells: 1}, "want 2 … 10000"},
		{Detector{Pfa: 1e-6, Pulses: 1, CFARCells: 2}, ""},
		{Detector{Pfa: 1e-4, Pulses: 1, CFARCells: 1}, ""},
		{Detector{Pfa: 1e-6, Pulses: 1, CFARCells: 16, OSRank: 12}, ""},
		{Detector{Pfa: 1e-6, Pulses: 1, CFARCells: 16, OSRank: 17}, "OSRank 17 out of range: want 0 (cell averaging) or 1 … CFARCells (16)"},
		{Detector{Pfa: 1e-6, Pulses: 1, OSRank: 1}, "OSRank 1 out of range"},
		{Detector{Pfa: 1e-6, Pulses: 4, CFARCells: 16, OSRank: 12}, "ordered-statistic CFAR over 4 non-coherently integrated pulses"},
		{Detector{Pfa: 1e-6, Pulses: 4, Integration: Coherent, CFARCells: 16, OSRank: 12}, ""},
		{Detector{Pfa: 1e-6, Pulses: 1, CFARCells: 16, OSRank: 1}, "CFARCells 16 with OSRank 1 cannot reach Pfa 1e-06"},
	} {
		err := c.d.Validate()
		switch {
		case c.want == "" && err != nil:
			t.Errorf("%+v: unexpected error %v", c.d, err)
		case c.want != "" && (err == nil || !strings.Contains(err.Error(), c.want)):
			t.Errorf("%+v: error %v, want it to contain %q", c.d, err, c.want)
		}
	}
	d := Detector{Pfa: 1e-6, Pulses: 1}
	for _, pd := range []float64{0, 1e-7, 1, 1.5, math.NaN()} {
		if _, err := d.RequiredSNR(pd); err == nil || !strings.Contains(err.Error(), "Pd") {
			t.Errorf("RequiredSNR(%g): error %v, want one naming Pd", pd, err)
		}
	}
}

// TestPdGolden compares with testdata/golden/pd.json, computed by
// testdata/golden/pd.py with scipy (non-central chi-square, numerical
// integration over the RCS and the CFAR noise estimate, brentq).
func TestPdGolden(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "testdata", "golden", "pd.json"))
	if err != nil {
		t.Fatal(err)
	}
	type pdCase struct {
		Swerling  int     `json:"swerling"`
		Pulses    int     `json:"pulses"`
		Pfa       float64 `json:"pfa"`
		CFARCells int     `json:"cfar_cells"`
		Coherent  bool    `json:"coherent"`
		SNRDB     float64 `json:"snr_db"`
		Pd        float64 `json:"pd"`
		T         float64 `json:"t"`
		Alpha     float64 `json:"alpha"`
	}
	var doc struct {
		OSCFAR []struct {
			Swerling  int     `json:"swerling"`
			SNRDB     float64 `json:"snr_db"`
			CFARCells int     `json:"cfar_cells"`
			Rank      int     `json:"rank"`
			Pfa       float64 `json:"pfa"`
			Alpha     float64 `json:"alpha"`
			Pd        float64 `json:"pd"`
		} `json:"os_cfar"`
		Scipy      string `json:"scipy"`
		Marcum     []struct{ M, A, B, Q float64 }
		Threshold  []pdCase
		Pd         []pdCase
		Required   []pdCase
		Albersheim []pdCase
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Marcum) < 15 || len(doc.Pd) < 50 || len(doc.Required) < 20 || len(doc.Threshold) < 20 {
		t.Fatalf("golden file too short: %d marcum, %d pd, %d required, %d thresholds",
			len(doc.Marcum), len(doc.Pd), len(doc.Required), len(doc.Threshold))
	}
	det := func(c pdCase) Detector {
		d := Detector{Pfa: c.Pfa, Pulses: c.Pulses, Swerling: c.Swerling, CFARCells: c.CFARCells}
		if c.Coherent {
			d.Integration = Coherent
		}
		return d
	}
	for _, c := range doc.Marcum {
		// Relative, down to the deep tail (Q_1(10, 40) ≈ 1e-198).
		if got := MarcumQ(int(c.M), c.A, c.B); math.Abs(got-c.Q) > 1e-10*c.Q {
			t.Errorf("MarcumQ(%g, %g, %g) = %.15g, scipy %.15g", c.M, c.A, c.B, got, c.Q)
		}
	}
	for _, c := range doc.Threshold {
		d := det(c)
		want := c.T
		if c.CFARCells > 0 {
			want = c.Alpha
		}
		if got := d.Threshold(); !near(got, want, 1e-10) {
			t.Errorf("threshold %+v = %.15g, scipy %.15g", d, got, want)
		}
	}
	for _, c := range doc.Pd {
		d := det(c)
		// scipy's quadrature is asked for 1e-10 relative; allow 1e-8.
		if got := d.Pd(FromDB(c.SNRDB)); !near(got, c.Pd, 1e-8) {
			t.Errorf("Pd %+v at %g dB = %.12g, scipy %.12g", d, c.SNRDB, got, c.Pd)
		}
	}
	for _, c := range doc.Required {
		if got := requiredDB(t, det(c), c.Pd); math.Abs(got-c.SNRDB) > 1e-5 {
			t.Errorf("required SNR %+v for Pd %g = %.6f dB, scipy %.6f", det(c), c.Pd, got, c.SNRDB)
		}
	}
	if len(doc.OSCFAR) < 5 {
		t.Fatalf("only %d ordered-statistic CFAR cases", len(doc.OSCFAR))
	}
	for _, c := range doc.OSCFAR {
		d := Detector{Pfa: c.Pfa, Pulses: 1, Swerling: c.Swerling, CFARCells: c.CFARCells, OSRank: c.Rank}
		if got := d.Threshold(); !near(got, c.Alpha, 1e-10) {
			t.Errorf("OS-CFAR %+v: α %.15g, scipy %.15g", d, got, c.Alpha)
		}
		if got := d.Pd(FromDB(c.SNRDB)); !near(got, c.Pd, 1e-8) {
			t.Errorf("OS-CFAR %+v at %g dB: Pd %.12g, scipy %.12g", d, c.SNRDB, got, c.Pd)
		}
	}
	for _, c := range doc.Albersheim {
		if got := Albersheim(c.Pd, c.Pfa, c.Pulses); math.Abs(got-c.SNRDB) > 1e-9 {
			t.Errorf("Albersheim(%g, %g, %d) = %.12f, python %.12f", c.Pd, c.Pfa, c.Pulses, got, c.SNRDB)
		}
	}
}

// TestApproximationsAgree checks Albersheim's and Shnidman's equations
// against the exact required SNR. Albersheim's (1981) stated accuracy is
// 0.2 dB (range recalled from memory as 0.1 ≤ Pd ≤ 0.9, 1e-7 ≤ Pfa ≤ 1e-3,
// linear detector); it is tested at N = 1, where the detector law does not
// matter. It holds for Pd ≥ 0.5; at Pd 0.3 it is off by up to 0.29 dB and
// at Pd 0.1 by 0.75 dB
// (Pfa 1e-7) to 4.1 dB (Pfa 1e-3), as its argument A + 0.12AB + 1.7B
// approaches 1 — measured here, not a published statement. Shnidman's
// (2002) stated accuracy (Richards p. 491) is 0.5 dB for 0.1 ≤ Pd ≤ 0.99,
// 1e-9 ≤ Pfa ≤ 1e-3, 1 ≤ N ≤ 100 "except at the extreme values of Pd for
// the Swerling 1 case". Measured on the grid below: steady, Swerling 2
// (N ≥ 2) and Swerling 4 stay within 0.42 dB; Swerling 1 (and Swerling 2 at
// N = 1, the same target) reaches 1.05 dB at Pd 0.1, Pfa 1e-3 and 0.89 dB
// at Pd 0.95, Pfa 1e-9; Swerling 3 reaches 0.67 dB at Pd 0.99, N = 100.
// The paper's abstract (DOI 10.1109/TAES.2002.1039422) says "over most of
// the specified parameter ranges, the magnitude of the error ... is less
// than 1 dB, in fact mostly less than 0.5 dB", so those two are held to
// 1.1 dB and 0.7 dB.
func TestApproximationsAgree(t *testing.T) {
	for _, pfa := range []float64{1e-3, 1e-5, 1e-7} {
		for _, pd := range []float64{0.5, 0.7, 0.9} {
			exact := requiredDB(t, Detector{Pfa: pfa, Pulses: 1}, pd)
			if a := Albersheim(pd, pfa, 1); math.Abs(a-exact) > 0.2 {
				t.Errorf("Albersheim Pd %g Pfa %g: %.3f dB, exact %.3f", pd, pfa, a, exact)
			}
		}
	}
	for sw := SwerlingNone; sw <= Swerling4; sw++ {
		for _, n := range []int{1, 2, 5, 10, 30, 100} {
			tol := 0.5
			if sw == Swerling1 || sw == Swerling2 && n == 1 {
				tol = 1.1
			} else if sw == Swerling3 {
				tol = 0.7
			}
			for _, pfa := range []float64{1e-3, 1e-4, 1e-6, 1e-9} {
				for _, pd := range []float64{0.1, 0.3, 0.5, 0.7, 0.8, 0.9, 0.95, 0.99} {
					exact := requiredDB(t, Detector{Pfa: pfa, Pulses: n, Swerling: sw}, pd)
					if s := Shnidman(pd, pfa, n, sw); math.Abs(s-exact) > tol {
						t.Errorf("Shnidman Swerling %d N %d Pd %g Pfa %g: %.3f dB, exact %.3f (tolerance %g dB)",
							sw, n, pd, pfa, s, exact, tol)
					}
				}
			}
		}
	}
}

// TestPdMonteCarlo draws 2·10⁵ noisy dwells of each model, simulated
// pulse by pulse from the definitions (complex Gaussian noise, Swerling
// RCS drawn per dwell or per pulse, square-law detection, non-coherent or
// coherent sum, CA-CFAR from noise-only reference cells), and checks that
// the closed forms fall inside the 99 % interval of the empirical Pd.
func TestPdMonteCarlo(t *testing.T) {
	const trials = 200_000
	rnd := rand.New(rand.NewPCG(15, 1))
	for _, d := range []Detector{
		{Pfa: 1e-2, Pulses: 4},
		{Pfa: 1e-4, Pulses: 4},
		{Pfa: 1e-4, Pulses: 4, Swerling: Swerling1},
		{Pfa: 1e-4, Pulses: 4, Swerling: Swerling2},
		{Pfa: 1e-4, Pulses: 4, Swerling: Swerling3},
		{Pfa: 1e-4, Pulses: 4, Swerling: Swerling4},
		{Pfa: 1e-3, Pulses: 1, CFARCells: 16},
		{Pfa: 1e-3, Pulses: 1, Swerling: Swerling1, CFARCells: 16},
		{Pfa: 1e-3, Pulses: 3, Swerling: Swerling4, CFARCells: 8},
		{Pfa: 1e-4, Pulses: 4, Integration: Coherent, Swerling: Swerling3},
		{Pfa: 1e-4, Pulses: 4, Integration: Coherent, Swerling: Swerling2},
		{Pfa: 1e-3, Pulses: 4, Integration: Coherent, Swerling: Swerling1, CFARCells: 8},
		{Pfa: 1e-3, Pulses: 1, CFARCells: 16, OSRank: 12},
		{Pfa: 1e-3, Pulses: 1, Swerling: Swerling3, CFARCells: 24, OSRank: 18},
	} {
		snr := 0.0 // the first case checks the false-alarm rate
		if d.Pfa < 1e-2 {
			var err error
			if snr, err = d.RequiredSNR(0.6); err != nil {
				t.Fatal(err)
			}
		}
		want := d.Pd(snr)
		hits := 0
		thr := d.Threshold()
		for range trials {
			if simulateDwell(rnd, d, snr) > thr {
				hits++
			}
		}
		p := float64(hits) / trials
		half := 2.576 * math.Sqrt(want*(1-want)/trials)
		t.Logf("%+v at %.2f dB: Monte Carlo %.5f, closed form %.5f, 99 %% half-width %.5f", d, DB(snr), p, want, half)
		if math.Abs(p-want) > half {
			t.Errorf("%+v at %.2f dB: Monte Carlo Pd %.5f, closed form %.5f (99 %% half-width %.5f)",
				d, DB(snr), p, want, half)
		}
	}
}

// simulateDwell returns one draw of the detection statistic of d divided by
// the noise estimate: Σ|y|² (known noise σ² = 1) or Σ|y|² over the mean of
// the reference cells (CA-CFAR), or |Σy|²/N for coherent integration.
func simulateDwell(rnd *rand.Rand, d Detector, snr float64) float64 {
	n := d.Pulses
	scan := SwerlingRCS(rnd, 1, d.Swerling) // drawn once per dwell (Swerling 1, 3)
	phase := rnd.Float64() * 2 * math.Pi
	var sum float64
	var csum complex128
	for range n {
		rcs := scan
		if d.Swerling == Swerling2 || d.Swerling == Swerling4 {
			rcs = SwerlingRCS(rnd, 1, d.Swerling)
			phase = rnd.Float64() * 2 * math.Pi
		}
		a := math.Sqrt(snr * rcs)
		y := complex(a*math.Cos(phase), a*math.Sin(phase)) + ComplexNormal(rnd)
		sum += real(y)*real(y) + imag(y)*imag(y)
		csum += y
	}
	if d.Integration == Coherent {
		sum = (real(csum)*real(csum) + imag(csum)*imag(csum)) / float64(n)
	}
	if d.CFARCells == 0 {
		return sum
	}
	if d.OSRank > 0 { // one pulse: the OSRank-th smallest reference cell
		var buf [64]float64
		cells := buf[:d.CFARCells]
		for i := range cells {
			z := ComplexNormal(rnd)
			cells[i] = real(z)*real(z) + imag(z)*imag(z)
		}
		slices.Sort(cells)
		return sum / cells[d.OSRank-1]
	}
	var ref float64
	for range d.CFARCells {
		var cell float64
		var ccell complex128
		for range n {
			z := ComplexNormal(rnd)
			cell += real(z)*real(z) + imag(z)*imag(z)
			ccell += z
		}
		if d.Integration == Coherent {
			cell = (real(ccell)*real(ccell) + imag(ccell)*imag(ccell)) / float64(n)
		}
		ref += cell
	}
	return sum / (ref / float64(d.CFARCells))
}

func BenchmarkPd(b *testing.B) {
	for _, d := range []Detector{
		{Pfa: 1e-6, Pulses: 1},
		{Pfa: 1e-6, Pulses: 10, Swerling: Swerling1},
		{Pfa: 1e-6, Pulses: 100, Swerling: Swerling4},
		{Pfa: 1e-6, Pulses: 1, CFARCells: 16},
		{Pfa: 1e-6, Pulses: 1, CFARCells: 16, OSRank: 12},
	} {
		b.Run(fmt.Sprintf("sw%d_N%d_M%d_k%d", d.Swerling, d.Pulses, d.CFARCells, d.OSRank), func(b *testing.B) {
			for b.Loop() {
				d.Pd(FromDB(10))
			}
		})
	}
	// An OS-CFAR threshold raised as a clutter edge raises it (the
	// multiplier of Pfa 1e-30, 660) on a 35 dB target: the stage race's
	// long case, and the closed form for the fluctuating ones.
	for _, sw := range []int{SwerlingNone, Swerling1, Swerling3} {
		d := Detector{Pfa: 1e-30, Pulses: 1, Swerling: sw, CFARCells: 24, OSRank: 18}
		b.Run(fmt.Sprintf("raised_sw%d_M24_k18", sw), func(b *testing.B) {
			for b.Loop() {
				d.Pd(FromDB(35))
			}
		})
	}
}

func ExampleDetector_RequiredSNR() {
	d := Detector{Pfa: 1e-6, Pulses: 1, Swerling: Swerling1, CFARCells: 16}
	snr, _ := d.RequiredSNR(0.9)
	loss, _ := d.CFARLoss(0.9)
	fmt.Printf("%.2f dB, of which %.2f dB CFAR loss\n", DB(snr), loss)
	// Output: 23.15 dB, of which 2.01 dB CFAR loss
}

// TestPdCorrelatedCA checks the CA-CFAR Pd with correlated reference cells:
// with R = I it is the independent-cell series; for Swerling 1 it is the
// closed form Π 1/(1 + α·ev/(M(1+χ))), the moment-generating function of
// the reference mean (the correlated-cell Pfa 1/det(I + (α/M)R) at
// α/(1+χ)); and a Monte Carlo of cells made by a two-tap moving average of
// white noise (covariance 1 on the diagonal, ½ beside it, eigenvalues
// 1 + cos(iπ/(M+1)), i = 1 … M) agrees inside its 99 % interval.
func TestPdCorrelatedCA(t *testing.T) {
	const m = 16
	ones := make([]float64, m)
	for i := range ones {
		ones[i] = 1
	}
	for sw := SwerlingNone; sw <= Swerling4; sw++ {
		d := Detector{Pfa: 1e-6, Pulses: 1, Swerling: sw, CFARCells: m}
		alpha := d.Threshold()
		for _, snrDB := range []float64{-5, 5, 15, 25} {
			x := FromDB(snrDB)
			if got, want := d.PdCorrelatedCA(x, alpha, ones), d.Pd(x); !near(got, want, 1e-10) {
				t.Errorf("Swerling %d at %g dB, R = I: %.15g, independent cells %.15g", sw, snrDB, got, want)
			}
		}
	}
	ev := make([]float64, m)
	for i := range ev {
		ev[i] = 1 + math.Cos(float64(i+1)*math.Pi/(m+1))
	}
	// α giving Pfa 1e-3 with these cells (CorrelatedCAMultiplier, the
	// detector's own); the series at zero SNR must give that Pfa.
	steady := Detector{Pfa: 1e-3, Pulses: 1}
	alpha := CorrelatedCAMultiplier(1e-3, ev)
	if got := steady.PdCorrelatedCA(0, alpha, ev); !near(got, 1e-3, 1e-9) {
		t.Fatalf("Pd(0) with α %g = %g, want Pfa 1e-3", alpha, got)
	}
	for _, snrDB := range []float64{0, 10, 20} {
		x := FromDB(snrDB)
		want := 1.0
		for _, e := range ev {
			want /= 1 + alpha*e/(m*(1+x))
		}
		sw1 := Detector{Pfa: 1e-3, Pulses: 1, Swerling: Swerling1}
		if got := sw1.PdCorrelatedCA(x, alpha, ev); !near(got, want, 1e-10) {
			t.Errorf("Swerling 1 correlated at %g dB: %.15g, closed form %.15g", snrDB, got, want)
		}
	}
	// Monte Carlo, steady target, near Pd 0.6.
	snr := FromDB(10)
	want := steady.PdCorrelatedCA(snr, alpha, ev)
	rnd := rand.New(rand.NewPCG(12, 15))
	const trials = 200_000
	hits := 0
	var w [m + 1]complex128
	for range trials {
		phase := rnd.Float64() * 2 * math.Pi
		a := math.Sqrt(snr)
		y := complex(a*math.Cos(phase), a*math.Sin(phase)) + ComplexNormal(rnd)
		for i := range w {
			w[i] = ComplexNormal(rnd)
		}
		ref := 0.0
		for i := range m {
			c := (w[i] + w[i+1]) / complex(math.Sqrt2, 0)
			ref += real(c)*real(c) + imag(c)*imag(c)
		}
		if real(y)*real(y)+imag(y)*imag(y) > alpha*ref/m {
			hits++
		}
	}
	p := float64(hits) / trials
	half := 2.576 * math.Sqrt(want*(1-want)/trials)
	t.Logf("correlated cells, α %.3f (independent cells: %.3f): Monte Carlo %.5f, series %.5f, 99 %% half-width %.5f",
		alpha, CAMultiplier(1e-3, m), p, want, half)
	if math.Abs(p-want) > half {
		t.Errorf("correlated CA-CFAR: Monte Carlo Pd %.5f, series %.5f (99 %% half-width %.5f)", p, want, half)
	}
}

// TestFluctPdMatchesRace checks the closed form of fluctPd (Swerling 1–4 in
// one test against a sum of exponential stages) against the stage race it
// replaces (raceSeries), on random stage rates from the noise level to a
// threshold raised far into clutter (q up to 0.9995) and SNRs from 0 to
// 40 dB. Both are also checked against scipy quadrature in TestPdGolden
// (testdata/golden/pd.py, os_cfar, including multipliers of Pfa 1e-30 and
// 1e-60); this one covers the space between those cases.
func TestFluctPdMatchesRace(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for i := range 400 {
		shape := float64(1 + i%2)
		k := 1 + rng.IntN(40)
		q := make([]float64, k)
		top := 0.5 + 0.4995*rng.Float64()
		for j := range q {
			q[j] = top * (0.02 + 0.98*rng.Float64())
		}
		lambda := 0.0
		if i%10 != 0 {
			lambda = math.Pow(10, 4*rng.Float64())
		}
		got, ok := fluctPd(lambda, shape, q)
		if !ok {
			t.Fatalf("shape %g: no closed form", shape)
		}
		want := raceSeries(lambda, shape, append([]float64(nil), q...))
		if math.Abs(got-want) > 1e-10*want+1e-15 {
			t.Errorf("shape %g, λ %.6g, %d stages, q up to %.6g: closed form %.15g, race %.15g", shape, lambda, k, top, got, want)
		}
	}
	if _, ok := fluctPd(1, math.Inf(1), []float64{0.5}); ok {
		t.Error("a steady target (shape +Inf) took the closed form")
	}
}
