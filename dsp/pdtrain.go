package dsp

import (
	"fmt"
	"math"
)

// Pulse-to-pulse fluctuating targets seen through a linear slow-time
// filter (a Doppler bin of a range–Doppler map; docs/detection-probability.md
// §2 and §7). Derived here, not taken from a reference.
//
// Pulse p of a Swerling 2 or 4 target carries a complex amplitude Z_p,
// independent from pulse to pulse, with a uniform carrier phase; a
// Doppler bin forms X = Σ_p A_p·Z_p + n, n the bin's complex Gaussian
// noise. Write w_p = |A_p|²·s_p / Σ_q |A_q|²·s_q (s_p the pulse's mean
// power, e.g. a scan's two-way gain), χ the target's mean power in the
// bin over the bin's noise, and measure powers in units of that noise.
//
//   - Swerling 2: each A_p·Z_p is circular complex Gaussian, so X is too,
//     of power 1 + χ: the test |X|² is exponential of mean 1 + χ,
//     whatever the weights — Pd = e^(−T/(1+χ)), the Swerling 1 law of one
//     test at the bin's SNR χ, with no coherent gain (χ is the SNR of one
//     pulse when the filter has no scan weighting).
//   - Swerling 4: |Z_p|² is Gamma(2) (chi-square, four degrees of
//     freedom). A circular variable R·e^(jφ) has the two-dimensional
//     characteristic function E[J0(ρR)]; for R² ~ Gamma(2, θ) it is
//     e^(−u)(1 − u), u = θρ²/4 (from the Laplace transform of J0(ρ√s)).
//     With θ_p = χw_p/2 and t = ρ²/4, X has
//     Φ(t) = e^(−tV)·Π_p (1 − θ_p t), V = 1 + χ/2.
//     Expanding the product, Σ_m (−1)^m e_m t^m (e_m the elementary
//     symmetric polynomials of the θ_p), and t^m·e^(−tV) being the
//     transform of (−Δ/4)^m applied to the complex Gaussian density of
//     power V, with Δ/4 = d/dx x d/dx on radial functions of x = |X|²
//     and D^m e^(−y) = (−1)^m m!·L_m(y)·e^(−y) (Laguerre polynomials):
//
//     f(x) = (1/V)·e^(−y)·Σ_{m≥0} (−1)^m c_m ρ^m L_m(y)
//     Pd(T) = e^(−y)·[1 + Σ_{m≥1} (−1)^(m+1) (c_m/m) ρ^m y L_{m−1}^(1)(y)]
//
//     with y = x/V (or T/V), ρ = (χ/2)/V and c_m = m!·e_m(w) ∈ [0, 1].
//     One pulse (c_1 = 1, the rest 0) gives Richards' Swerling 4 result
//     e^(−T/(1+χ/2))·(1 + (χ/2)T/(1+χ/2)²) (Fundamentals of Radar Signal
//     Processing, 2nd ed., Table 6.1); many equal weights (c_m → 1) give
//     the exponential of mean 1 + χ, the Gaussian limit. The sums are
//     finite (m ≤ number of pulses); |L_n^(α)(y)| ≤ C(n+α, n)·e^(y/2)
//     bounds every term of Pd by c_m ρ^m·(2/e), so rounding stays near
//     10⁻¹⁵ absolute and the sum stops when ρ^m/(1−ρ) < 10⁻¹⁶.

// TrainChi4 is the law of a Swerling 4 target's test in one Doppler bin,
// for the bin's normalised pulse weights (see above). The zero value is
// not usable; NewTrainChi4 builds it. It is read-only after NewTrainChi4
// and safe for concurrent use.
type TrainChi4 struct {
	c []float64 // c[m] = m!·e_m(w), m = 0 … len(w)
}

// NewTrainChi4 returns the law for pulse weights w (each ≥ 0 and finite,
// at least one > 0; they are normalised to sum 1): |A_p|²·s_p of the
// bin's filter taps and the pulses' mean powers.
func NewTrainChi4(w []float64) (*TrainChi4, error) {
	if len(w) == 0 || len(w) > MaxPulses {
		return nil, fmt.Errorf("dsp: Swerling 4 train: %d pulse weights out of range: want 1 … %d", len(w), MaxPulses)
	}
	s := 0.0
	for i, v := range w {
		if !(v >= 0) || math.IsInf(v, 1) {
			return nil, fmt.Errorf("dsp: Swerling 4 train: weight %d is %g: want finite ≥ 0", i, v)
		}
		s += v
	}
	if !(s > 0) {
		return nil, fmt.Errorf("dsp: Swerling 4 train: every weight is 0: want at least one > 0")
	}
	// c_m = m!·e_m by the recurrence e_m ← e_m + w_p·e_{m−1}, i.e.
	// c_m ← c_m + m·w_p·c_{m−1}, over the pulses (c_m ≤ (Σw)^m = 1).
	c := make([]float64, 1, len(w)+1)
	c[0] = 1
	for _, v := range w {
		v /= s
		if v == 0 {
			continue
		}
		c = append(c, 0)
		for m := len(c) - 1; m >= 1; m-- {
			c[m] += float64(m) * v * c[m-1]
		}
	}
	for len(c) > 1 && c[len(c)-1] < 1e-300 {
		c = c[:len(c)-1]
	}
	return &TrainChi4{c: c}, nil
}

// terms returns how many terms of the series matter at ratio rho.
func (t *TrainChi4) terms(rho float64) int {
	n := len(t.c) - 1
	if rho < 1 {
		// ρ^m/(1−ρ) < 1e-16
		if k := math.Log(1e-16*(1-rho)) / math.Log(rho); k < float64(n) {
			n = max(int(math.Ceil(k)), 1)
		}
	}
	return n
}

// Survival returns P(|X|² > T) for a target of mean power chi (linear, ≥ 0)
// in the bin over the bin's noise, against the threshold T ≥ 0 in units
// of that noise.
func (t *TrainChi4) Survival(chi, T float64) float64 {
	if chi == 0 {
		return math.Exp(-T)
	}
	V := 1 + chi/2
	rho := chi / 2 / V
	y := T / V
	s := 1.0
	lPrev, l := 0.0, 1.0 // L_{−1}^(1), L_0^(1)
	pow := 1.0
	for m := 1; m <= t.terms(rho); m++ {
		pow *= rho
		term := t.c[m] / float64(m) * pow * y * l
		if m%2 == 0 {
			term = -term
		}
		s += term
		// L_m^(1) from L_{m−1}^(1), L_{m−2}^(1):
		// m·L_m = (2m − 1 + 1 − y)·L_{m−1} − (m − 1 + 1)·L_{m−2}
		fm := float64(m)
		lPrev, l = l, ((2*fm-y)*l-fm*lPrev)/fm
	}
	return math.Min(math.Max(math.Exp(-y)*s, 0), 1)
}

// Density returns the probability density of |X|² at x ≥ 0 (units as
// Survival).
func (t *TrainChi4) Density(chi, x float64) float64 {
	if chi == 0 {
		return math.Exp(-x)
	}
	return t.density(chi, x, t.terms(chi/2/(1+chi/2)))
}

// density is Density with the number of terms given.
func (t *TrainChi4) density(chi, x float64, terms int) float64 {
	V := 1 + chi/2
	if chi == 0 {
		return math.Exp(-x)
	}
	rho := chi / 2 / V
	y := x / V
	s := 1.0
	lPrev, l := 1.0, 1-y // L_0, L_1
	pow := 1.0
	for m := 1; m <= terms; m++ {
		pow *= rho
		term := t.c[m] * pow * l
		if m%2 == 1 {
			term = -term
		}
		s += term
		// (m+1)·L_{m+1} = (2m + 1 − y)·L_m − m·L_{m−1}
		fm := float64(m)
		lPrev, l = l, ((2*fm+1-y)*l-fm*lPrev)/(fm+1)
	}
	return math.Max(math.Exp(-y)*s/V, 0)
}

// trainSimpson is the number of Simpson intervals of PdThreshold.
const trainSimpson = 4000

// PdThreshold returns P(|X|² > Z) for a random threshold Z independent of
// X with CDF cdf (non-decreasing, in the units of Survival): E_X[cdf(X)].
// Below x0, where cdf < 10⁻¹⁶, the integrand is dropped; above x1, where
// cdf > 1 − 10⁻¹⁶, it is Survival(x1) exactly (x0 and x1 by bisection on
// [0, 60(1 + χ)]); between them Simpson's rule with 4 000 intervals
// (within 2·10⁻¹⁵ of the golden file's quadrature). A CFAR's threshold
// against the bin's noise: cell averaging over M cells with multiplier α
// on their mean, cdf(x) = P(M, M·x/α) (regularized lower incomplete
// gamma); the variants as VariantPd.
func (t *TrainChi4) PdThreshold(chi float64, cdf func(x float64) float64) float64 {
	top := 60 * (1 + chi)
	find := func(level float64) float64 {
		lo, hi := 0.0, top
		if cdf(hi) <= level {
			return hi
		}
		for range 60 {
			mid := (lo + hi) / 2
			if cdf(mid) <= level {
				lo = mid
			} else {
				hi = mid
			}
		}
		return lo
	}
	x0, x1 := find(1e-16), find(1-1e-16)
	tail := 0.0
	if x1 < top {
		tail = t.Survival(chi, x1)
	}
	if !(x1 > x0) {
		return math.Min(math.Max(tail, 0), 1)
	}
	h := (x1 - x0) / trainSimpson
	terms := t.terms(chi / 2 / (1 + chi/2))
	in := Simpson(func(x float64) float64 { return t.density(chi, x, terms) * cdf(x) }, x0, h, trainSimpson)
	return math.Min(math.Max(in+tail, 0), 1)
}

// PdCA returns the Pd behind a cell-averaging CFAR of m independent
// cells with multiplier alpha on their mean: E_S[Survival(χ, α·S/m)],
// S ~ Gamma(m, 1), by Simpson's rule in S over the mean ± 14 standard
// deviations (√m) and 10 more, 400 intervals. The same value as
// PdThreshold with the gamma CDF (within 2·10⁻¹¹ on the golden cases) at a
// fraction of the cost: the reference sum's law is narrow and smooth.
func (t *TrainChi4) PdCA(chi float64, m int, alpha float64) float64 {
	fm := float64(m)
	sd := math.Sqrt(fm)
	lo := math.Max(0, fm-14*sd-10)
	hi := fm + 14*sd + 10
	const n = 400
	h := (hi - lo) / n
	lg, _ := math.Lgamma(fm)
	in := Simpson(func(s float64) float64 {
		if s <= 0 {
			return 0
		}
		dens := math.Exp((fm-1)*math.Log(s) - s - lg)
		return dens * t.Survival(chi, alpha*s/fm)
	}, lo, h, n)
	return math.Min(math.Max(in, 0), 1)
}
