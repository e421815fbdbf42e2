package dsp

import (
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// MaxExactCorrelatedCells is the largest number of training cells for which
// CorrelatedCAMultiplier's callers (CFAR, CFAR2D) solve the exact
// determinant condition; beyond it they use the effective number of
// independent cells (EffectiveCells).
const MaxExactCorrelatedCells = 64

// uncorrelated is the largest |ρ| at which two cells count as independent
// when an ordered-statistic CFAR thins its training cells (common practice,
// no source: |ρ|² ≤ 1 % of the power is shared).
const uncorrelated = 0.1

// NoiseCorrelation returns the complex correlation of white noise at the
// output of a correlator with reference h (dsp's convention, y[k] =
// Σ x[k+i]·conj(h[i])) between outputs m samples apart:
//
//	ρ(m) = Σ_n h[n]·conj(h[n+m]) / Σ_n |h[n]|²,  m = 0 … len(dst)−1,
//
// with ρ(0) = 1, ρ(−m) = conj(ρ(m)) and ρ(m) = 0 beyond len(h)−1. A nil
// dst allocates len(h) lags (all that can be non-zero); a shorter dst
// gets the first len(dst) lags at a cost of O(len(h)·len(dst)). It
// returns dst. It panics if len(dst) > len(h) or h has no energy.
func NoiseCorrelation(dst, h []complex128) []complex128 {
	if dst == nil {
		dst = make([]complex128, len(h))
	}
	if len(dst) > len(h) {
		panic("dsp: noise correlation destination longer than the reference")
	}
	var e float64
	for _, v := range h {
		e += real(v)*real(v) + imag(v)*imag(v)
	}
	if !(e > 0) {
		panic("dsp: noise correlation of a reference without energy")
	}
	for m := range dst {
		var s complex128
		for n := 0; n+m < len(h); n++ {
			s += h[n] * cmplx.Conj(h[n+m])
		}
		dst[m] = s / complex(e, 0)
	}
	return dst
}

// lagCorrelation returns ρ(m) for any integer m from the non-negative lags
// rho (nil: independent samples, ρ = δ).
func lagCorrelation(rho []complex128, m int) complex128 {
	if m == 0 {
		return 1
	}
	if rho == nil {
		return 0
	}
	if m < 0 {
		if -m >= len(rho) {
			return 0
		}
		return cmplx.Conj(rho[-m])
	}
	if m >= len(rho) {
		return 0
	}
	return rho[m]
}

// HermitianEigenvalues returns the eigenvalues (ascending) of the n×n
// Hermitian matrix r given as r(i, j), from the real symmetric 2n×2n
// embedding [[Re r, −Im r], [Im r, Re r]], whose eigenvalues are those of r,
// each twice. It returns nil if the factorisation fails.
func HermitianEigenvalues(n int, r func(i, j int) complex128) []float64 {
	if n == 0 {
		return nil
	}
	s := mat.NewSymDense(2*n, nil)
	for i := range n {
		for j := i; j < n; j++ {
			v := r(i, j)
			s.SetSym(i, j, real(v))
			s.SetSym(n+i, n+j, real(v))
			// Upper-right block −Im r: element (i, n+j) = −Im r(i, j);
			// (j, n+i) = −Im r(j, i) = Im r(i, j).
			s.SetSym(i, n+j, -imag(v))
			s.SetSym(j, n+i, imag(v))
		}
	}
	var e mat.EigenSym
	if !e.Factorize(s, false) {
		return nil
	}
	v := e.Values(nil)
	out := make([]float64, n)
	for i := range out {
		out[i] = math.Max((v[2*i]+v[2*i+1])/2, 0)
	}
	return out
}

// CorrelatedCAPfa returns the false-alarm probability of a cell-averaging
// CFAR with multiplier α on the mean of N = len(lambda) training cells whose
// complex Gaussian noise has the correlation matrix R with eigenvalues
// lambda, for a square-law detector and a cell under test independent of
// its training cells:
//
//	Pfa = E[exp(−α·S/N)] = 1/det(I + (α/N)·R) = Π_i 1/(1 + α·λ_i/N),
//
// S the sum of the training powers (the moment-generating function of a
// Gaussian quadratic form). With R = I it is Richards' (1 + α/N)^(−N).
func CorrelatedCAPfa(alpha float64, lambda []float64) float64 {
	n := float64(len(lambda))
	s := 0.0
	for _, l := range lambda {
		s += math.Log1p(alpha * l / n)
	}
	return math.Exp(-s)
}

// CorrelatedCAMultiplier returns the α for which CorrelatedCAPfa(α, lambda)
// = pfa, by bisection on log α to a relative precision of 1e-12. It panics
// if lambda is empty, holds no positive value, or pfa is not in (0, 1).
func CorrelatedCAMultiplier(pfa float64, lambda []float64) float64 {
	checkPFA(pfa, len(lambda))
	pos := false
	for _, l := range lambda {
		pos = pos || l > 0
	}
	if !pos {
		panic("dsp: correlated CA multiplier needs a positive eigenvalue")
	}
	return solvePfa(pfa, func(a float64) float64 { return CorrelatedCAPfa(a, lambda) })
}

// EffectiveCells returns N²/Σ_ij |R_ij|² for the n×n correlation matrix r:
// the number of independent cells whose average has the same variance as
// the average of the correlated ones (n when R = I).
func EffectiveCells(n int, r func(i, j int) complex128) float64 {
	s := 0.0
	for i := range n {
		for j := range n {
			v := r(i, j)
			s += real(v)*real(v) + imag(v)*imag(v)
		}
	}
	return float64(n) * float64(n) / s
}

// DecorrelationSpacing returns the smallest spacing s ≥ 1 (in lags) such
// that |c(j·s)| ≤ 0.1 for every j ≥ 1 with j·s ≤ span, c a normalised
// correlation by lag: cells s apart can then be treated as independent
// (common practice, no source, for the 0.1). It returns span+1 when no
// spacing up to span qualifies (a single cell).
func DecorrelationSpacing(span int, c func(m int) float64) int {
	for s := 1; s <= span; s++ {
		ok := true
		for m := s; m <= span; m += s {
			if c(m) > uncorrelated {
				ok = false
				break
			}
		}
		if ok {
			return s
		}
	}
	return span + 1
}

// cutSpectrum is the eigen-decomposition of the noise covariance Σ of the
// cell under test (index 0) and its training cells that the exact
// false-alarm probability needs: the eigenvalues λ_k of the real 2n×2n
// embedding of Σ and the weights w_k = (u_k[0]² + u_k[n]²)/2 of the cell
// under test on each eigenvector.
type cutSpectrum struct {
	n      int // training cells
	lambda []float64
	w      []float64
}

func newCutSpectrum(n int, cov func(i, j int) complex128) (cutSpectrum, bool) {
	m := n + 1
	s := mat.NewSymDense(2*m, nil)
	for i := range m {
		for j := i; j < m; j++ {
			v := cov(i, j)
			s.SetSym(i, j, real(v))
			s.SetSym(m+i, m+j, real(v))
			s.SetSym(i, m+j, -imag(v))
			s.SetSym(j, m+i, imag(v))
		}
	}
	var e mat.EigenSym
	if !e.Factorize(s, true) {
		return cutSpectrum{}, false
	}
	var vec mat.Dense
	e.VectorsTo(&vec)
	sp := cutSpectrum{n: n, lambda: e.Values(nil), w: make([]float64, 2*m)}
	top := 0.0
	for _, l := range sp.lambda {
		top = math.Max(top, l)
	}
	for k := range sp.lambda {
		// Rounding's eigenvalues of a singular Σ (|λ| ≤ 1e-12 of the
		// largest) are its null space: exactly 0, so that logPfa sees
		// the cell under test's weight there as none.
		if sp.lambda[k] <= 1e-12*top {
			sp.lambda[k] = 0
		}
		a, b := vec.At(0, k), vec.At(m, k)
		sp.w[k] = (a*a + b*b) / 2
	}
	return sp, true
}

// logPfa returns ln Pfa of the CA test |z0|² > (α/N)·Σ|z_i|² for complex
// Gaussian noise with the spectrum's covariance. With β = α/N the test
// statistic zᴴQz, Q = diag(1, −β, …, −β), has the eigenvalues μ of
// Σ^½QΣ^½ = (1+β)·ssᴴ − βΣ (s = Σ^½e0): one positive, μ₊, and N others,
// so Pfa = Π_j μ₊/(μ₊ − μ_j) = μ₊^N / p′(μ₊), p(μ) = det(μI − Σ^½QΣ^½)
// = Π_i(μ + βλ_i)·f(μ), f(μ) = 1 − (1+β)·Σ_i λ_i·|v_i0|²/(μ + βλ_i)
// (matrix determinant lemma), μ₊ the root of f on μ > 0.
func (sp cutSpectrum) logPfa(alpha float64) float64 {
	beta := alpha / float64(sp.n)
	// f is increasing and concave on μ > 0: bracket its root, then Newton
	// steps from the left converge monotonically.
	fd := func(mu float64) (f, d float64) {
		s, ds := 0.0, 0.0
		for k, l := range sp.lambda {
			a := l * sp.w[k]
			q := mu + beta*l
			s += a / q
			ds += a / (q * q)
		}
		return 1 - (1+beta)*s, (1 + beta) * ds
	}
	lo := 1.0
	for f, _ := fd(lo); f > 0 && lo > 1e-300; f, _ = fd(lo) {
		lo /= 4
	}
	if f, _ := fd(lo); f > 0 {
		// No positive eigenvalue: the cell under test's noise lies in
		// the span of its training cells (a singular Σ, e.g. Doppler
		// bins of a short windowed CPI) and β exceeds the largest
		// |z0|²/Σ|z_i|² it can reach, so the test never fires.
		return math.Inf(-1)
	}
	mu := lo
	for range 100 {
		f, d := fd(mu)
		if !(f < 0) || d == 0 {
			break
		}
		next := mu - f/d
		if next-mu <= 1e-15*mu {
			mu = next
			break
		}
		mu = next
	}
	var logProd, d float64
	for k, l := range sp.lambda {
		logProd += math.Log(mu + beta*l)
		d += l * sp.w[k] / ((mu + beta*l) * (mu + beta*l))
	}
	return float64(sp.n)*math.Log(mu) - (logProd/2 + math.Log1p(beta) + math.Log(d))
}

// solveLog finds x = ln α with g(x) = 0 for a decreasing g, by bracketing
// then the Illinois variant of regula falsi, to |Δx| ≤ 1e-13.
func solveLog(g func(x float64) float64) float64 {
	a, b := -5.0, 5.0
	ga, gb := g(a), g(b)
	for ga < 0 {
		a -= 10
		ga = g(a)
	}
	for gb > 0 {
		b += 10
		gb = g(b)
	}
	side := 0
	for range 200 {
		x := (a*gb - b*ga) / (gb - ga)
		if math.IsInf(ga, 0) || math.IsInf(gb, 0) {
			x = (a + b) / 2 // regula falsi needs finite ends: bisect
		}
		gx := g(x)
		switch {
		case gx == 0:
			return x
		case gx > 0:
			a, ga = x, gx
			if side == 1 {
				gb /= 2
			}
			side = 1
		default:
			b, gb = x, gx
			if side == -1 {
				ga /= 2
			}
			side = -1
		}
		if b-a <= 1e-13 {
			break
		}
	}
	return (a + b) / 2
}

// CAMultiplierWithCUT returns the cell-averaging multiplier α that gives
// pfa when the cell under test shares noise with its n training cells:
// cov(i, j) is the noise covariance between cells i and j, index 0 the
// cell under test (cov(0, 0) = 1), 1 … n the training cells. It solves
// the exact false-alarm probability of the square-law test
// |z0|² > (α/n)·Σ|z_i|² for complex Gaussian noise (see cutSpectrum's
// logPfa); when the cell under test is independent of its training cells
// this is CorrelatedCAMultiplier (Pfa = 1/det(I + (α/n)·R)). Correlation
// between the cell under test and its training cells lowers the
// false-alarm probability, so α is smaller. It panics if n < 1 or pfa is
// not in (0, 1); it returns NaN if the eigen-decomposition fails.
func CAMultiplierWithCUT(pfa float64, n int, cov func(i, j int) complex128) float64 {
	checkPFA(pfa, n)
	sp, ok := newCutSpectrum(n, cov)
	if !ok {
		return math.NaN()
	}
	target := math.Log(pfa)
	return math.Exp(solveLog(func(x float64) float64 { return sp.logPfa(math.Exp(x)) - target }))
}

// correlatedCAWithCUT returns the CA multiplier for n training cells with
// the cell under test's own correlation to them: cov over indices 0 (the
// cell under test) … n, in units of the cell under test's noise power
// (cov(0, 0) = 1; a training cell may hold more or less noise than it, as
// Doppler bins do behind an MTI canceller). Exact up to
// MaxExactCorrelatedCells training cells (CAMultiplierWithCUT); beyond,
// Richards' formula for the training sum's effective number of
// independent cells, N_e = (Σ_i Σ_ii)²/Σ_ij |Σ_ij|² (the number of equal,
// independent cells with the same mean and variance of the sum; N²/Σ|R_ij|²
// for unit variances), scaled by the ratio of the cell under test's noise
// to the training cells' mean noise:
//
//	α = (N / Σ_i Σ_ii) · N_e·(Pfa^(−1/N_e) − 1),
//
// exact for independent training cells of equal variance (then
// Pfa = (1 + α·σ²/N)^(−N)). It ignores the cell under test's correlation
// and so errs on the safe side (a lower Pfa: 0.87·Pfa for 128 cells, 4
// guard, a Hamming-weighted LFM at 4 samples per 1/B, from the exact form).
func correlatedCAWithCUT(pfa float64, n int, cov func(i, j int) complex128) float64 {
	if n <= MaxExactCorrelatedCells {
		if a := CAMultiplierWithCUT(pfa, n, cov); !math.IsNaN(a) {
			return a
		}
	}
	tr := 0.0
	for i := 1; i <= n; i++ {
		tr += real(cov(i, i))
	}
	ne := EffectiveCells(n, func(i, j int) complex128 { return cov(i+1, j+1) }) * tr * tr / float64(n*n)
	return float64(n) / tr * ne * (math.Pow(pfa, -1/ne) - 1)
}
