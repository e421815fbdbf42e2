package dsp

import (
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// The exact Pd of one cell-averaging test whose cells hold echoes
// (docs/detection-probability.md §7, "Echoes in the training cells").
//
// The complex outputs y = (y_0, y_1 … y_M) of the cell under test (index 0)
// and its M training cells are complex Gaussian, y ~ CN(μ, R): μ the
// echoes' (steady) complex amplitudes at the cells, R the noise covariance
// (E[(y−μ)(y−μ)ᴴ] = R, circular: E[(y−μ)(y−μ)ᵀ] = 0), both in units of
// the noise power the CFAR's α was set for. The test fires when
//
//	D = |y_0|² − β·Σ_{k=1..M} |y_k|² > 0,  β = α/M,
//
// a Hermitian form D = yᴴAy, A = diag(1, −β … −β), indefinite. In the
// real embedding ỹ = (Re y, Im y) ~ N(μ̃, Σ̃), Σ̃ = ½·[[Re R, −Im R],
// [Im R, Re R]], D = ỹᵀÃỹ with Ã = diag(A, A). With any factor Σ̃ = LLᵀ
// (here from the eigen-decomposition of Σ̃, so a singular R needs no
// inverse) and the eigen-decomposition LᵀÃL = PΛPᵀ, ỹ = μ̃ + Lx, x ~ N(0, I),
// the characteristic function of D is (the Gaussian integral
// E[exp(a·xᵀKx + hᵀx)] = det(I − 2aK)^(−½)·exp(½hᵀ(I − 2aK)⁻¹h))
//
//	φ(t) = exp(i·t·d₀) · Π_k (1 − 2iλ_k t)^(−½) · exp(−2t²·c_k²/(1 − 2iλ_k t)),
//
// d₀ = μᴴAμ, c = PᵀLᵀÃμ̃. Where Σ̃ is invertible, c_k = λ_k·ν_k with
// ν = PᵀL⁻¹μ̃, and each factor is Imhof's (1 − 2iλt)^(−½)·
// exp(iλν²t/(1 − 2iλt)) (Imhof, "Computing the distribution of quadratic
// forms in normal variables", Biometrika 48, 1961, eq. 2.3 with a
// non-central term); a λ_k = 0 direction with c_k ≠ 0 is the Gaussian part
// a singular R leaves. The eigenvalues come in equal pairs (the embedding
// of a complex form), so each pair is one factor (1 − 2iλt)⁻¹. Gil-Pelaez's
// inversion (Biometrika 38, 1951) gives
//
//	P(D > 0) = ½ + (1/π)·∫_0^∞ Im φ(t)/t dt,
//
// evaluated in s = ln t (the 1/t cancels) by adaptive Gauss–Kronrod (7–15)
// over [t_lo, t_hi], with t_lo = π·ε/(4·E|D|) (|Im φ(t)| ≤ t·E|D| bounds
// the piece below) and t_hi where Imhof's truncation bound,
// (1/π)·(2/p)·Π_{k∈S}(2|λ_k|t_hi)^(−½)·exp(−2t_hi²·Σc_k²/(1 + 4λ_k²t_hi²)),
// S the p eigenvalues with 2|λ_k|t_hi > 1, is below ε/4.

// EchoPdTolerance is the absolute accuracy P(D > 0) aims at in
// CAEchoTest.Pd: the truncation at either end and the quadrature's own
// error estimate each stay within a quarter of it.
const EchoPdTolerance = 1e-10

// maxEchoIntervals bounds the adaptive quadrature's subintervals.
const maxEchoIntervals = 4000

// CAEchoTest is one single-test cell-averaging CFAR decision,
// |y_0|² > (α/M)·Σ_{k=1..M}|y_k|², whose noise covariance has been
// decomposed (the law above); Pd evaluates it for any echo amplitudes.
// Build it with NewCAEchoTest. Its methods do not modify it, so it is safe
// for concurrent use.
type CAEchoTest struct {
	m     int     // training cells M
	beta  float64 // α/M
	noise float64 // tr(|A|·R): the noise part of E|D|
	mean  float64 // tr(A·R): the noise part of E[D]
	// sig1, sig2, sig3 are Σσ, Σσ², Σσ³ over the eigenvalues σ of R,
	// sigMax the largest, and aMax = max(1, β) (the lower end's bound).
	sig1, sig2, sig3, sigMax, aMax float64
	// lam are the eigenvalues of LᵀÃL: one per equal pair when pair
	// (weight 1 in ln φ), else every one (weight ½).
	lam  []float64
	pair bool
	// g is r×2(M+1), row-major: c = g·(Ãμ̃), so the pair k has
	// c² = c[2k]² + c[2k+1]².
	g    []float64
	rows int
}

// NewCAEchoTest decomposes the test |y_0|² > (α/M)·Σ_{k=1..M}|y_k|²
// for M = m training cells: alpha is the CA multiplier α (> 0, finite, on
// the mean of the training cells, as CorrelatedCAMultiplier and
// CAMultiplierWithCUT return it), cov(i, j) = E[(y_i − μ_i)·conj(y_j − μ_j)]
// the noise covariance between cells i and j, index 0 the cell under test,
// 1 … m the training cells, in units of the noise power α refers to
// (cov(i, i) = 1 for unit noise in every cell). cov must be Hermitian and
// positive semi-definite (checked to 1e-9 of its largest diagonal entry);
// m must be in 1 … MaxExactCorrelatedCells. It costs two symmetric
// eigen-decompositions of size 2(m+1) and allocates O(m²).
func NewCAEchoTest(alpha float64, m int, cov func(i, j int) complex128) (*CAEchoTest, error) {
	if m < 1 || m > MaxExactCorrelatedCells {
		return nil, fmt.Errorf("dsp: training cells %d out of range: want 1 … %d", m, MaxExactCorrelatedCells)
	}
	if !(alpha > 0) || math.IsInf(alpha, 1) {
		return nil, fmt.Errorf("dsp: CA multiplier α %g out of range: want a finite α > 0", alpha)
	}
	if cov == nil {
		return nil, fmt.Errorf("dsp: noise covariance missing: want cov(i, j) for cells 0 … %d", m)
	}
	n := m + 1
	top := 0.0
	for i := range n {
		v := cov(i, i)
		if !(real(v) > 0) || math.IsInf(real(v), 0) || !(math.Abs(imag(v)) <= 1e-9*real(v)) {
			return nil, fmt.Errorf("dsp: noise covariance cov(%d, %d) = %v out of range: want a finite real power > 0", i, i, v)
		}
		top = math.Max(top, real(v))
	}
	sig := mat.NewSymDense(2*n, nil)
	for i := range n {
		for j := i; j < n; j++ {
			v := cov(i, j)
			if cmplx.IsNaN(v) || cmplx.IsInf(v) {
				return nil, fmt.Errorf("dsp: noise covariance cov(%d, %d) = %v out of range: want finite", i, j, v)
			}
			if w := cov(j, i); cmplx.Abs(v-cmplx.Conj(w)) > 1e-9*top {
				return nil, fmt.Errorf("dsp: noise covariance not Hermitian: cov(%d, %d) = %v but cov(%d, %d) = %v", i, j, v, j, i, w)
			}
			// Σ̃ = ½·[[Re R, −Im R], [Im R, Re R]].
			sig.SetSym(i, j, real(v)/2)
			sig.SetSym(n+i, n+j, real(v)/2)
			sig.SetSym(i, n+j, -imag(v)/2)
			sig.SetSym(j, n+i, imag(v)/2)
		}
	}
	var es mat.EigenSym
	if !es.Factorize(sig, true) {
		return nil, fmt.Errorf("dsp: noise covariance of %d cells: eigen-decomposition failed", n)
	}
	sv := es.Values(nil)
	if sv[0] < -1e-9*top {
		return nil, fmt.Errorf("dsp: noise covariance not positive semi-definite: eigenvalue %g (largest power %g)", 2*sv[0], top)
	}
	var vec mat.Dense
	es.VectorsTo(&vec)
	// L = V_r·S_r^½ over the eigenvalues above rounding (a singular R's
	// null directions carry no noise).
	keep := make([]int, 0, 2*n)
	for k, s := range sv {
		if s > 1e-13*top {
			keep = append(keep, k)
		}
	}
	r := len(keep)
	l := mat.NewDense(2*n, r, nil)
	for c, k := range keep {
		s := math.Sqrt(sv[k])
		for i := range 2 * n {
			l.Set(i, c, vec.At(i, k)*s)
		}
	}
	beta := alpha / float64(m)
	// K = LᵀÃL, Ã = diag(1, −β … −β, 1, −β … −β).
	aw := func(i int) float64 {
		if i%n == 0 {
			return 1
		}
		return -beta
	}
	al := mat.NewDense(2*n, r, nil)
	for i := range 2 * n {
		w := aw(i)
		for c := range r {
			al.Set(i, c, w*l.At(i, c))
		}
	}
	var kd mat.Dense
	kd.Mul(l.T(), al)
	kmat := mat.NewSymDense(r, nil)
	for a := range r {
		for b := a; b < r; b++ {
			kmat.SetSym(a, b, (kd.At(a, b)+kd.At(b, a))/2)
		}
	}
	var ek mat.EigenSym
	if !ek.Factorize(kmat, true) {
		return nil, fmt.Errorf("dsp: test statistic of %d cells: eigen-decomposition failed", n)
	}
	kv := ek.Values(nil)
	var p mat.Dense
	ek.VectorsTo(&p)
	// g = PᵀLᵀ (r × 2n).
	var g mat.Dense
	g.Mul(p.T(), l.T())
	t := &CAEchoTest{m: m, beta: beta, rows: r, g: make([]float64, r*2*n)}
	for a := range r {
		for i := range 2 * n {
			t.g[a*2*n+i] = g.At(a, i)
		}
	}
	// Equal pairs: ascending values, so neighbours pair up. An odd count
	// (a rank drop through rounding) or a pair that is not one keeps
	// every value with weight ½.
	big := 0.0
	for _, v := range kv {
		big = math.Max(big, math.Abs(v))
	}
	t.pair = r%2 == 0
	for k := 0; t.pair && k < r; k += 2 {
		t.pair = math.Abs(kv[k]-kv[k+1]) <= 1e-8*big
	}
	if t.pair {
		t.lam = make([]float64, r/2)
		for k := range t.lam {
			t.lam[k] = (kv[2*k] + kv[2*k+1]) / 2
		}
	} else {
		t.lam = kv
	}
	for i := range n {
		t.noise += math.Abs(aw(i)) * real(cov(i, i))
		t.mean += aw(i) * real(cov(i, i))
	}
	// Σ̃'s eigenvalues are σ/2, each twice.
	for _, v := range sv {
		v = max(v, 0)
		t.sig1 += v
		t.sig2 += 2 * v * v
		t.sig3 += 4 * v * v * v
		t.sigMax = max(t.sigMax, 2*v)
	}
	t.aMax = max(1, beta)
	return t, nil
}

// Cells returns the number of training cells M the test was built for.
func (t *CAEchoTest) Cells() int { return t.m }

// Pd returns P(|y_0|² > (α/M)·Σ_k |y_k|²) for y ~ CN(mu, R): mu holds the
// echoes' complex amplitudes at the cell under test (mu[0]) and the
// training cells (mu[1] … mu[M]), in units of the square root of the noise
// power (|mu[i]|² is an SNR), len(mu) = M+1. mu = nil is noise alone: the
// false-alarm probability. The result is within EchoPdTolerance (absolute)
// of the exact value, or an error says it could not be reached. It
// allocates nothing for M ≤ 64 (unless the quadrature needs more than 256
// subintervals).
func (t *CAEchoTest) Pd(mu []complex128) (float64, error) {
	n := t.m + 1
	if mu != nil && len(mu) != n {
		return 0, fmt.Errorf("dsp: echo amplitudes: %d cells, want %d (the cell under test and %d training cells)", len(mu), n, t.m)
	}
	var am [2 * (MaxExactCorrelatedCells + 1)]float64
	var cbuf [2 * (MaxExactCorrelatedCells + 1)]float64
	d0, mnorm, m2 := 0.0, 0.0, 0.0 // μᴴAμ, μᴴ|A|μ, ‖μ‖²
	for i, v := range mu {
		if cmplx.IsNaN(v) || cmplx.IsInf(v) {
			return 0, fmt.Errorf("dsp: echo amplitude mu[%d] = %v out of range: want finite", i, v)
		}
		w := -t.beta
		if i == 0 {
			w = 1
		}
		am[i], am[n+i] = w*real(v), w*imag(v)
		p := real(v)*real(v) + imag(v)*imag(v)
		d0 += w * p
		mnorm += math.Abs(w) * p
		m2 += p
	}
	// c² per pair.
	c2 := cbuf[:len(t.lam)]
	for k := range c2 {
		c2[k] = 0
	}
	if mu != nil {
		for a := range t.rows {
			row := t.g[a*2*n : (a+1)*2*n]
			s := 0.0
			for i, v := range row {
				s += v * am[i]
			}
			if t.pair {
				c2[a/2] += s * s
			} else {
				c2[a] = s * s
			}
		}
	}
	w := 0.5 // the weight of each value in ln φ
	if t.pair {
		w = 1
	}
	tol := EchoPdTolerance
	// Lower end: Im φ(t) = E[sin(tD)] and |sin x − x| ≤ |x|³/6, so
	// ∫_0^lo Im φ(t)/t dt = lo·E[D] within lo³·E|D|³/18, E[D] = tr(AR) +
	// μᴴAμ. |D| ≤ max(1, β)·S, S = ‖y‖², whose cumulants are
	// κ_r = (r−1)!·(Σσ^r + r·μᴴR^(r−1)μ) (σ the eigenvalues of R;
	// μᴴR^kμ ≤ σ_max^k·‖μ‖²), E[S³] = κ₃ + 3κ₂κ₁ + κ₁³.
	k1 := t.sig1 + m2
	k2 := t.sig2 + 2*t.sigMax*m2
	k3 := 2 * (t.sig3 + 3*t.sigMax*t.sigMax*m2)
	d3 := t.aMax * t.aMax * t.aMax * (k3 + 3*k2*k1 + k1*k1*k1)
	lo := math.Cbrt(18 * math.Pi * tol / 4 / d3)
	low := lo * (t.mean + d0) // ∫_0^lo Im φ(t)/t dt
	// Upper end: double until Imhof's bound holds.
	hi := 1 / (t.noise + mnorm)
	for range 2000 {
		if t.tailBound(hi, c2, w) < tol/4 {
			break
		}
		hi *= 2
	}
	if t.tailBound(hi, c2, w) >= tol/4 {
		return 0, fmt.Errorf("dsp: echo Pd: the characteristic function does not decay (β %g, %d cells)", t.beta, t.m)
	}
	f := func(s float64) float64 {
		return imagPhi(math.Exp(s), d0, t.lam, c2, w)
	}
	// Start from 8 panels: the integrand in ln t lives on a few decades.
	v, err := absGK(f, math.Log(lo), math.Log(hi), 8, math.Pi*tol/4)
	if err != nil {
		return 0, fmt.Errorf("dsp: echo Pd (β %g, %d cells): %w", t.beta, t.m, err)
	}
	return min(max(0.5+(low+v)/math.Pi, 0), 1), nil
}

// tailBound is Imhof's bound on (1/π)·|∫_u^∞ Im φ(t)/t dt|.
func (t *CAEchoTest) tailBound(u float64, c2 []float64, w float64) float64 {
	logb, p, e := 0.0, 0.0, 0.0
	for k, l := range t.lam {
		x := 2 * math.Abs(l) * u
		if x > 1 { // (1 + x²)^(−w/2) ≤ x^(−w)
			logb -= w * math.Log(x)
			p += 2 * w
		}
		e += 2 * u * u * c2[k] / (1 + x*x)
	}
	if p == 0 {
		return math.Inf(1) // no decay proven yet: look further out
	}
	return math.Exp(logb-e) * 2 / p / math.Pi
}

// imagPhi returns Im φ(t) for the eigenvalues λ_k, each of weight w
// (1 for a pair, ½ alone), with c2_k the squared projections of the mean.
func imagPhi(t, d0 float64, lam, c2 []float64, w float64) float64 {
	// ln φ = i·t·d₀ + Σ_k w·[−ln(1 − 2iλt)] − 2t²c²/(1 − 2iλt), with
	// 1/(1 − 2iλt) = (1 + 2iλt)/(1 + 4λ²t²).
	if w == 1 {
		// Pairs: Π_k 1/(1 − ix_k) = p/|p|², p = Π_k (1 + ix_k), one
		// complex product (rescaled by 2^±k as it grows) and one
		// logarithm and one arctangent in all: sin is 2π-periodic, so
		// arg p needs no unwrapping.
		re, im := 0.0, t*d0
		pr, pi := 1.0, 0.0
		scale := 0 // p = (pr + i·pi)·2^scale
		for k, l := range lam {
			x := 2 * l * t
			pr, pi = pr-pi*x, pi+pr*x
			if c := c2[k]; c != 0 {
				f := 2 * t * t * c / (1 + x*x)
				re -= f
				im -= f * x
			}
			if math.Abs(pr)+math.Abs(pi) > 0x1p500 {
				pr, pi = math.Ldexp(pr, -500), math.Ldexp(pi, -500)
				scale += 500
			}
		}
		mag := math.Hypot(pr, pi)
		re -= math.Log(mag) + float64(scale)*math.Ln2
		return math.Exp(re) * math.Sin(im+math.Atan2(pi, pr))
	}
	re, im := 0.0, t*d0
	for k, l := range lam {
		x := 2 * l * t
		q := 1 + x*x
		re -= w * 0.5 * math.Log1p(x*x)
		im += w * math.Atan(x)
		if c := c2[k]; c != 0 {
			re -= 2 * t * t * c / q
			im -= 2 * t * t * c * x / q
		}
	}
	return math.Exp(re) * math.Sin(im)
}

// absGK integrates f over [a, b], starting from start equal panels, to an
// absolute error estimate tol by halving the panel of largest error
// (QUADPACK's qag strategy, without extrapolation; gk15Panel's 15-point
// Kronrod rule and its difference from the 7-point Gauss rule), and
// returns an error when maxEchoIntervals panels do not reach it. The
// panels live on the stack up to 256.
func absGK(f func(float64) float64, a, b float64, start int, tol float64) (float64, error) {
	type piece struct{ a, b, v, e float64 }
	var buf [256]piece
	ps := buf[:0]
	h := (b - a) / float64(start)
	tv, te := 0.0, 0.0
	for i := range start {
		x0, x1 := a+float64(i)*h, a+float64(i+1)*h
		if i == start-1 {
			x1 = b
		}
		v, e := gk15Panel(f, x0, x1)
		ps = append(ps, piece{x0, x1, v, e})
		tv += v
		te += e
	}
	for len(ps) < maxEchoIntervals {
		if te <= tol {
			return tv, nil
		}
		w := 0
		for i := range ps {
			if ps[i].e > ps[w].e {
				w = i
			}
		}
		p := ps[w]
		m := (p.a + p.b) / 2
		v1, e1 := gk15Panel(f, p.a, m)
		v2, e2 := gk15Panel(f, m, p.b)
		ps[w] = piece{p.a, m, v1, e1}
		ps = append(ps, piece{m, p.b, v2, e2})
		// Re-sum (not update) so rounding does not accumulate.
		tv, te = 0, 0
		for _, q := range ps {
			tv += q.v
			te += q.e
		}
	}
	if te <= tol {
		return tv, nil
	}
	return tv, fmt.Errorf("quadrature did not reach %g (error estimate %g after %d intervals)", tol, te, len(ps))
}

// CAEchoPd returns P(|y_0|² > (α/M)·Σ_{k=1..M}|y_k|²) for y ~ CN(mu, R),
// M = len(mu) − 1 training cells, R given by cov: NewCAEchoTest(alpha,
// len(mu)−1, cov) then its Pd(mu). Build the CAEchoTest once to evaluate
// many amplitudes against one covariance.
func CAEchoPd(alpha float64, mu []complex128, cov func(i, j int) complex128) (float64, error) {
	if len(mu) < 2 {
		return 0, fmt.Errorf("dsp: echo amplitudes: %d cells, want the cell under test and 1 … %d training cells", len(mu), MaxExactCorrelatedCells)
	}
	t, err := NewCAEchoTest(alpha, len(mu)-1, cov)
	if err != nil {
		return 0, err
	}
	return t.Pd(mu)
}

// PdTarget returns the Pd of a target whose echo fluctuates from look to
// look (one test per look) while the other echoes stay as they are:
// target holds its complex amplitudes at the cells at its mean power (the
// cell under test first, then the training cells, as for Pd; its own
// range response, the carrier phase its range gives included), others
// the other echoes' (nil: none). Its power is x times the mean with x of
// the law of swerling, its phase kept, so
//
//	Pd = E_x[ P(D > 0 | μ = √x·target + others) ]:
//
// SwerlingNone, x = 1 (Pd(target + others)); Swerling1 and Swerling2
// (one test: the same law), x exponential of mean 1; Swerling3 and
// Swerling4, x ~ Gamma(2, ½). The expectation is adaptive Gauss–Kronrod
// over the amplitude a = √x (the means are linear in it, so the integrand
// is analytic), density 2a·e^(−a²) (Swerling 1) or 8a³·e^(−2a²) (Swerling
// 3), on [0, a_hi] leaving out less than 1e-11 of the law's mass, to an
// error estimate of 1e-9 (absolute; each Pd within EchoPdTolerance). With
// a target alone in the cells and Swerling 1 the echo is complex
// Gaussian whatever its phase, y ~ CN(0, R + target·targetᴴ). It returns
// an error for amplitudes of the wrong length or not finite and for a
// Swerling model outside 0 … 4. It allocates nothing for M ≤ 64 (unless
// a quadrature needs more than 256 subintervals).
func (t *CAEchoTest) PdTarget(swerling int, target, others []complex128) (float64, error) {
	n := t.m + 1
	if len(target) != n {
		return 0, fmt.Errorf("dsp: target amplitudes: %d cells, want %d (the cell under test and %d training cells)", len(target), n, t.m)
	}
	if others != nil && len(others) != n {
		return 0, fmt.Errorf("dsp: other echoes' amplitudes: %d cells, want %d (the cell under test and %d training cells)", len(others), n, t.m)
	}
	for i, v := range target {
		if cmplx.IsNaN(v) || cmplx.IsInf(v) {
			return 0, fmt.Errorf("dsp: target amplitude target[%d] = %v out of range: want finite", i, v)
		}
	}
	for i, v := range others {
		if cmplx.IsNaN(v) || cmplx.IsInf(v) {
			return 0, fmt.Errorf("dsp: other echoes' amplitude others[%d] = %v out of range: want finite", i, v)
		}
	}
	var buf [MaxExactCorrelatedCells + 1]complex128
	mu := buf[:n]
	at := func(a float64) (float64, error) {
		for i := range mu {
			mu[i] = complex(a, 0) * target[i]
			if others != nil {
				mu[i] += others[i]
			}
		}
		return t.Pd(mu)
	}
	// In the amplitude a = √x (the means are linear in it, so the
	// integrand is analytic in a): Swerling 1, density 2a·e^(−a²);
	// Swerling 3, 8a³·e^(−2a²).
	var hi float64
	var density func(a float64) float64
	switch swerling {
	case SwerlingNone:
		return at(1)
	case Swerling1, Swerling2:
		hi = math.Sqrt(26) // e^(−26) = 5e-12 of the mass beyond
		density = func(a float64) float64 { return 2 * a * math.Exp(-a*a) }
	case Swerling3, Swerling4:
		hi = math.Sqrt(15) // 31·e^(−30) = 3e-12 beyond
		density = func(a float64) float64 { return 8 * a * a * a * math.Exp(-2*a*a) }
	default:
		return 0, fmt.Errorf("dsp: Swerling %d out of range: want 0 (steady) … 4", swerling)
	}
	var perr error
	f := func(a float64) float64 {
		if perr != nil {
			return 0
		}
		p, err := at(a)
		if err != nil {
			perr = err
		}
		return p * density(a)
	}
	v, err := absGK(f, 0, hi, 4, 1e-9)
	if perr != nil {
		return 0, perr
	}
	if err != nil {
		return 0, fmt.Errorf("dsp: fluctuating target's Pd: over its power: %w", err)
	}
	return min(max(v, 0), 1), nil
}
