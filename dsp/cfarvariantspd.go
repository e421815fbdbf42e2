package dsp

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mathext"
)

// Pd behind the greatest-of, smallest-of and censored CFARs (one test per
// dwell: one pulse, or a coherent dwell at its integrated SNR), with
// independent exponential training cells and a cell under test
// independent of them, in GOSOPfa's and CensoredPfa's conventions.
//
// Swerling 1 and 2 (one test): the cell under test is exponential of mean
// 1 + χ, so dividing it by 1 + χ gives noise alone against the threshold
// α/(1+χ): Pd(χ) = Pfa(α/(1 + χ)), the detector's own false-alarm law at
// a smaller multiplier, for any CFAR whose threshold is α times a
// scale-equivariant statistic of its training cells (Weiss, IEEE TAES
// 18(1), 1982; Gandhi & Kassam, IEEE TAES 24(4), 1988 — from memory,
// not verified against the papers for this work).
//
// Steady and Swerling 3/4 targets (GO and SO): Pd = P(X > α·Z) = E_X[F(X)],
// F the CDF of the threshold and X the test statistic (derived here). The
// halves' means A, B are Gamma(n, 1/n): P(αA ≤ x) = P(n1, n1·x/α), the
// regularized lower incomplete gamma, so
//
//	F_GO(x) = P(n1, n1x/α)·P(n2, n2x/α)
//	F_SO(x) = 1 − (1 − P(n1, n1x/α))·(1 − P(n2, n2x/α)).
//
// The expectation over X: a steady target's density e^−(x+χ)·I0(2√(xχ)),
// by Simpson's rule in u = √x over √χ ± 10 (2 000 intervals); a Swerling
// 3/4 target's (one test) density, from the survival function
// e^(−x/(1+a))·(1 + a·x/(1+a)²), a = χ/2 (Richards, Fundamentals of Radar
// Signal Processing, 2nd ed., Table 6.1), by Simpson's rule in x over
// [0, 60(1+a)] (2 000 intervals).

// Censored CFAR, steady and Swerling 3/4 targets (derived here): by
// CensoredPfa's spacings the kept sum is Σ_{j=1}^{m} b_j·E_j, m = n − c,
// b_j = (m−j+1)/(n−j+1), E_j independent unit exponentials, so the
// threshold (α/m)·Σ b_j·E_j is a sum of m exponential stages of means
// α·b_j/m — the reference of a CA-CFAR with correlated cells whose
// covariance has the eigenvalues b_j (Detector.PdCorrelatedCA, whose
// threshold is α·Σ ev_j·E_j/len(ev)). The race of those stages against
// the test statistic's Gamma(1 + J) stages gives Pd exactly, as for the
// ordered-statistic CFAR (docs/detection-probability.md §3); at zero SNR
// it is CensoredPfa.
func censoredRacePd(swerling int, chi, alpha float64, n, c int) float64 {
	m := n - c
	var buf [64]float64
	b := buf[:0]
	if m > len(buf) {
		b = make([]float64, 0, m)
	}
	for j := 1; j <= m; j++ {
		b = append(b, float64(m-j+1)/float64(n-j+1))
	}
	d := Detector{Pfa: 1e-6, Pulses: 1, Integration: Coherent, Swerling: swerling} // Pfa unused: α sets the threshold
	return d.PdCorrelatedCA(chi, alpha, b)
}

// VariantPd returns the Pd of a target of SNR chi (linear, at the cell
// under test, re the noise power) and fluctuation swerling behind a
// greatest-of or smallest-of CFAR with n1 and n2 training cells and
// multiplier alpha on the half-mean (GOMultiplier, SOMultiplier), or a
// censored CFAR with n1 cells, n2 of them censored, and alpha on the kept
// mean (CensoredMultiplier; every fluctuation: Swerling 1 and 2 by the
// closed form, steady and Swerling 3/4 by censoredRacePd). It does not
// allocate for up to 64 kept cells.
func VariantPd(v CFARVariant, swerling int, chi, alpha float64, n1, n2 int) (float64, error) {
	switch {
	case !(chi >= 0) || math.IsInf(chi, 1):
		return 0, fmt.Errorf("dsp: variant CFAR Pd: SNR %g out of range: want finite ≥ 0", chi)
	case !(alpha > 0) || math.IsInf(alpha, 1):
		return 0, fmt.Errorf("dsp: variant CFAR Pd: multiplier %g out of range: want finite > 0", alpha)
	case swerling < SwerlingNone || swerling > Swerling4:
		return 0, fmt.Errorf("dsp: variant CFAR Pd: Swerling %d out of range: want 0 (steady) … 4", swerling)
	}
	switch v {
	case GreatestOf, SmallestOf:
		if n1 < 0 || n2 < 0 || n1+n2 < 1 || n1+n2 > MaxCFARCells {
			return 0, fmt.Errorf("dsp: variant CFAR Pd: halves %d and %d out of range: want ≥ 0, together 1 … %d", n1, n2, MaxCFARCells)
		}
	case Censored:
		if n1 < 1 || n1 > MaxCFARCells || n2 < 0 || n2 >= n1 {
			return 0, fmt.Errorf("dsp: variant CFAR Pd: %d cells with %d censored out of range: want 1 … %d cells, 0 … cells−1 censored", n1, n2, MaxCFARCells)
		}
		if swerling == Swerling1 || swerling == Swerling2 {
			return CensoredPfa(alpha/(1+chi), n1, n2), nil
		}
		return censoredRacePd(swerling, chi, alpha, n1, n2), nil
	default:
		return 0, fmt.Errorf("dsp: variant CFAR Pd: variant %d out of range: want GreatestOf, SmallestOf or Censored", int(v))
	}
	pick := func(g, s float64) float64 {
		if v == GreatestOf {
			return g
		}
		return s
	}
	if swerling == Swerling1 || swerling == Swerling2 {
		return pick(GOSOPfa(alpha/(1+chi), n1, n2)), nil
	}
	cdf := func(x float64) float64 {
		p := func(n int) float64 {
			if n == 0 {
				return 1 // an empty half: the other decides (GOSOPfa)
			}
			return mathext.GammaIncReg(float64(n), float64(n)*x/alpha)
		}
		p1, p2 := p(n1), p(n2)
		if n1 == 0 || n2 == 0 {
			return p1 * p2 // cell averaging over the other half, both variants
		}
		if v == GreatestOf {
			return p1 * p2
		}
		return 1 - (1-p1)*(1-p2)
	}
	// The reference's distribution function steps up where the cell under
	// test crosses α times the half-means' typical values, 1 ± a few
	// 1/√n: a step about α/√n wide, narrow for long halves, so the
	// quadrature starts with edges there (and at the target's scale) and
	// refines adaptively.
	nMin := n1
	if n2 > 0 && (n1 == 0 || n2 < n1) {
		nMin = n2
	}
	var zs [9]float64
	for i, k := range [...]float64{-8, -4, -2, -1, 0, 1, 2, 4, 8} {
		zs[i] = 1 + k/math.Sqrt(float64(nMin))
	}
	var buf [20]float64
	edges := buf[:0]
	var density func(x float64) float64
	if swerling == SwerlingNone {
		sc := math.Sqrt(chi)
		lo, hi := math.Max(0, sc-10), sc+10
		// in u = √x: 2u·e^−(u−√χ)²·i0e(2u√χ)
		density = func(u float64) float64 {
			d := u - sc
			return 2 * u * math.Exp(-d*d) * besselI0e(2*u*sc) * cdf(u*u)
		}
		edges = append(edges, lo, hi, sc)
		for _, z := range zs {
			if z > 0 {
				edges = append(edges, math.Sqrt(alpha*z))
			}
		}
		edges = sortedWithin(edges, lo, hi)
	} else {
		a := chi / 2
		b := 1 + a
		density = func(x float64) float64 {
			return math.Exp(-x/b) / b * (1 + a*x/(b*b) - a/b) * cdf(x)
		}
		hi := 60 * b
		edges = append(edges, 0, hi, b, 5*b, 20*b)
		for _, z := range zs {
			if z > 0 {
				edges = append(edges, alpha*z)
			}
		}
		edges = sortedWithin(edges, 0, hi)
	}
	return math.Min(math.Max(adaptiveGK(density, edges, variantTol), 0), 1), nil
}

// variantTol is the relative accuracy VariantPd asks of its quadrature.
const variantTol = 1e-12

// sortedWithin sorts e in place (insertion sort: a few dozen values) and
// returns the values in [lo, hi] without repeats; lo and hi must be in e.
func sortedWithin(e []float64, lo, hi float64) []float64 {
	for i := 1; i < len(e); i++ {
		for j := i; j > 0 && e[j] < e[j-1]; j-- {
			e[j], e[j-1] = e[j-1], e[j]
		}
	}
	out := e[:0]
	for _, v := range e {
		if v >= lo && v <= hi && (len(out) == 0 || v > out[len(out)-1]) {
			out = append(out, v)
		}
	}
	return out
}

// besselI0e returns e^−x·I0(x) for x ≥ 0 (I0 the modified Bessel function
// of order 0) from its power series below 15 and the asymptotic series
// above (Abramowitz & Stegun, Handbook of Mathematical Functions, 9.6.10
// and 9.7.1), to about 1e-15 relative.
func besselI0e(x float64) float64 {
	if x < 15 {
		t, s, q := 1.0, 1.0, x*x/4
		for k := 1; k < 200 && t > 1e-17*s; k++ {
			t *= q / float64(k*k)
			s += t
		}
		return s * math.Exp(-x)
	}
	// Σ ((2k−1)!!)² / (k!·(8x)^k)
	t, s := 1.0, 1.0
	for k := 1; k < 30; k++ {
		n := float64(2*k - 1)
		next := t * n * n / (float64(k) * 8 * x)
		if next > t {
			break
		}
		t = next
		s += t
		if t < 1e-17*s {
			break
		}
	}
	return s / math.Sqrt(2*math.Pi*x)
}
