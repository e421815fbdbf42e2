package dsp

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mathext"
)

// Probability of detection.
//
// Conventions used throughout this file (the same as Richards,
// Fundamentals of Radar Signal Processing, 2nd ed., ch. 6, and Meyer &
// Mayer, Radar Target Detection, 1973):
//
//   - The receiver is matched-filtered complex baseband with circular
//     Gaussian noise; the detector is square-law, so one cell of one pulse
//     gives |y|²/σ², an exponential variable of mean 1 under noise alone.
//   - SNR is the mean signal power over the mean noise power of ONE pulse
//     at the detector input (after the matched filter, before any
//     integration), as a linear power ratio. For fluctuating targets it is
//     the SNR of the mean RCS.
//   - Pfa is the false-alarm probability per cell (per test).
//   - Non-coherent integration sums the square-law outputs of N pulses:
//     z = Σ|y_i|²/σ², a Gamma(N, 1) variable under noise alone.
//   - Coherent integration sums the complex samples of N pulses first; for
//     a target whose complex amplitude is constant over the pulses it
//     multiplies the SNR by N and leaves one square-law test.
//
// Every detection probability here is the series
//
//	Pd = Σ_{k≥0} w_k · G_k,
//
// where, given the target's total signal energy λ in noise units, the
// detection statistic is a Poisson(λ) mixture of Gamma(N + k) variables
// (the non-central chi-square of the steady target; Shnidman, IEEE TAES
// 25(1), 1989, and 35(3), 1999). A Swerling target makes λ itself random
// with a gamma distribution of shape K (K = 1 Swerling 1, N Swerling 2,
// 2 Swerling 3, 2N Swerling 4, ∞ steady; Shnidman, IEEE TAES 38(3), 2002),
// which turns the Poisson weights w_k into negative-binomial ones. G_k is
// the probability that a Gamma(N + k) variable exceeds the threshold:
// Q(N + k, T) (upper regularized incomplete gamma) with a known noise
// level, or I_y(M·N, N + k) (regularized incomplete beta) behind a cell-
// averaging CFAR with M reference cells. Both G_k obey an additive
// recurrence in k whose terms are summed in the log domain, so the series
// has no cancellation, never overflows, and stops when the remaining
// weights, or the remaining 1 − G_k, are below 1e-16 of the sum.

// Integration says how the pulses of a dwell are combined before the
// threshold.
type Integration int

const (
	// NonCoherent sums the square-law detected pulses (post-detection
	// integration).
	NonCoherent Integration = iota
	// Coherent sums the complex pulses (a Doppler filter matched to the
	// target), then detects.
	Coherent
)

// String returns "noncoherent" or "coherent".
func (i Integration) String() string {
	switch i {
	case NonCoherent:
		return "noncoherent"
	case Coherent:
		return "coherent"
	}
	return fmt.Sprintf("Integration(%d)", int(i))
}

// Limits of a Detector, checked by Validate.
const (
	MaxPulses    = 100000 // most pulses integrated
	MaxCFARCells = 10000  // most CA-CFAR reference cells
)

// Detector is a square-law threshold detector for one cell. It is a small
// value type: its methods allocate nothing and it is safe for concurrent
// use.
type Detector struct {
	Pfa         float64     // false-alarm probability per cell, 0 < Pfa < 1
	Pulses      int         // pulses integrated, 1 … MaxPulses
	Integration Integration // how the pulses are combined
	Swerling    int         // fluctuation model: SwerlingNone (steady) or Swerling1 … Swerling4
	// CFARCells is the number M of reference cells of a cell-averaging
	// CFAR, each integrated like the cell under test; 0 means the noise
	// level is known (a fixed threshold).
	CFARCells int
	// OSRank, when > 0, makes the CFAR an ordered-statistic one: the
	// threshold is α times the OSRank-th smallest (1-based) of the
	// CFARCells reference cells (Rohling, IEEE TAES 19(4), 1983). It
	// needs one test per dwell (Pulses = 1 or Coherent). 0 is cell
	// averaging.
	OSRank int
}

// Validate reports the first field of d that is out of range, naming the
// field, its value and the valid range.
func (d Detector) Validate() error {
	switch {
	case !(d.Pfa > 0 && d.Pfa < 1):
		return fmt.Errorf("dsp: Pfa %g out of range: want 0 < Pfa < 1", d.Pfa)
	case d.Pulses < 1 || d.Pulses > MaxPulses:
		return fmt.Errorf("dsp: Pulses %d out of range: want 1 … %d", d.Pulses, MaxPulses)
	case d.Integration != NonCoherent && d.Integration != Coherent:
		return fmt.Errorf("dsp: Integration %d out of range: want NonCoherent (0) or Coherent (1)", int(d.Integration))
	case d.Swerling < SwerlingNone || d.Swerling > Swerling4:
		return fmt.Errorf("dsp: Swerling %d out of range: want 0 (steady) … 4", d.Swerling)
	case d.CFARCells < 0 || d.CFARCells > MaxCFARCells:
		return fmt.Errorf("dsp: CFARCells %d out of range: want 0 (known noise) or 1 … %d", d.CFARCells, MaxCFARCells)
	case d.Integration == Coherent && d.Swerling == Swerling4 && d.Pulses > 1:
		return errors.New("dsp: coherent integration of a Swerling 4 target over several pulses has no closed form: " +
			"its echo decorrelates from pulse to pulse; use NonCoherent or one pulse")
	}
	if d.OSRank != 0 {
		switch {
		case d.CFARCells == 0 || d.OSRank < 0 || d.OSRank > d.CFARCells:
			return fmt.Errorf("dsp: OSRank %d out of range: want 0 (cell averaging) or 1 … CFARCells (%d)", d.OSRank, d.CFARCells)
		case d.Integration == NonCoherent && d.Pulses > 1:
			return fmt.Errorf("dsp: an ordered-statistic CFAR over %d non-coherently integrated pulses is not "+
				"modelled: want Pulses 1 or Coherent integration", d.Pulses)
		case OSPfa(maxCFARSumMultiplier*float64(d.CFARCells), d.CFARCells, d.OSRank) > d.Pfa:
			return fmt.Errorf("dsp: CFARCells %d with OSRank %d cannot reach Pfa %g with a multiplier below %g: "+
				"use more cells or a higher rank", d.CFARCells, d.OSRank, d.Pfa, maxCFARSumMultiplier*float64(d.CFARCells))
		}
		return nil
	}
	if d.CFARCells > 0 {
		n, _, _ := d.stat()
		if cfarSumMultiplier(d.Pfa, n, float64(d.CFARCells)) > maxCFARSumMultiplier {
			m := d.CFARCells
			for cfarSumMultiplier(d.Pfa, n, float64(m)) > maxCFARSumMultiplier {
				m++
			}
			return fmt.Errorf("dsp: CFARCells %d too few for Pfa %g: the threshold would exceed %g times the "+
				"reference level (a CFAR loss of tens of dB); want %d … %d", d.CFARCells, d.Pfa,
				float64(maxCFARSumMultiplier), m, MaxCFARCells)
		}
	}
	return nil
}

// maxCFARSumMultiplier is the largest CA-CFAR multiplier on the sum of the
// reference cells that Validate accepts; the series for Pd needs about
// 40·(1 + c) terms, so this bounds its cost.
const maxCFARSumMultiplier = 1e4

// stat returns the number of pulses n in the tested statistic and the
// shape K of the gamma law of the target energy in it, with scale, the
// factor from the per-pulse SNR to the mean energy λ = scale·SNR.
// K = +Inf is a steady target.
func (d Detector) stat() (n, shape, scale float64) {
	N := float64(d.Pulses)
	if d.Integration == Coherent {
		switch d.Swerling {
		case Swerling2:
			// Independent complex Gaussian amplitudes: the coherent sum
			// is CN(0, N·SNR·σ²) over noise CN(0, N·σ²), no gain.
			return 1, 1, 1
		case Swerling1:
			return 1, 1, N
		case Swerling3:
			return 1, 2, N
		case Swerling4: // one pulse only (Validate)
			return 1, 2, 1
		}
		return 1, math.Inf(1), N
	}
	switch d.Swerling {
	case Swerling1:
		return N, 1, N
	case Swerling2:
		return N, N, N
	case Swerling3:
		return N, 2, N
	case Swerling4:
		return N, 2 * N, N
	}
	return N, math.Inf(1), N
}

// Threshold returns the detection threshold of d, normalised as follows.
// With a known noise level (CFARCells = 0) it is T in units of the mean
// noise power of one pulse, applied to z = Σ|y_i|²/σ² for non-coherent
// integration, or to |Σy_i|²/(N·σ²) for coherent integration:
//
//	Pfa = Q(n, T)   (upper regularized incomplete gamma; n = N or 1),
//
// so for one pulse T = −ln Pfa. Behind a cell-averaging CFAR it is the
// multiplier α on the MEAN of the M reference cells, each integrated like
// the cell under test (the multiplier on their SUM is α/M):
//
//	Pfa = I_{1/(1+α/M)}(M·n, n),
//
// which for n = 1 is α = M·(Pfa^(−1/M) − 1), Richards eq. 6.135 and
// CAMultiplier. Behind an ordered-statistic CFAR (OSRank > 0) it is the
// multiplier α on the OSRank-th smallest reference cell (OSMultiplier). It
// panics if d is not valid.
func (d Detector) Threshold() float64 {
	d.mustValidate()
	n, _, _ := d.stat()
	if d.CFARCells == 0 {
		return GammaThreshold(d.Pfa, n)
	}
	if d.OSRank > 0 {
		return OSMultiplier(d.Pfa, d.CFARCells, d.OSRank)
	}
	return float64(d.CFARCells) * cfarSumMultiplier(d.Pfa, n, float64(d.CFARCells))
}

// integratedMultiplier is Threshold for a valid cell-averaging d, and
// +Inf when d's CFARCells are too few for its Pfa (Validate refuses it):
// no threshold the reference cells could set holds Pfa then.
func (d Detector) integratedMultiplier() float64 {
	if d.Validate() != nil {
		return math.Inf(1)
	}
	return d.Threshold()
}

// GammaThreshold returns T > 0 with Q(n, T) = pfa, where Q is the upper
// regularized incomplete gamma function: the threshold, in units of the
// noise power of one pulse, on the sum of n square-law detected pulses of
// noise that gives the false-alarm probability pfa. It panics unless
// 0 < pfa < 1 and n > 0.
func GammaThreshold(pfa, n float64) float64 {
	if !(pfa > 0 && pfa < 1) || !(n > 0) {
		panic("dsp: GammaThreshold needs 0 < pfa < 1 and n > 0")
	}
	if n == 1 {
		return -math.Log(pfa)
	}
	return mathext.GammaIncRegCompInv(n, pfa)
}

// cfarSumMultiplier returns c, the CA-CFAR multiplier on the SUM of m
// reference cells, each the sum of n square-law pulses, giving pfa:
// Pfa = P(Gamma(n) > c·Gamma(m·n)) = I_{1/(1+c)}(m·n, n).
func cfarSumMultiplier(pfa, n, m float64) float64 {
	if n == 1 {
		return math.Expm1(-math.Log(pfa) / m)
	}
	y := mathext.InvRegIncBeta(m*n, n, pfa)
	return (1 - y) / y
}

func (d Detector) mustValidate() {
	if err := d.Validate(); err != nil {
		panic(err.Error())
	}
}

// Pd returns the probability of detection of d for a target of per-pulse
// SNR snr (linear power ratio, ≥ 0; see the conventions above). Pd(0) is
// the false-alarm probability. The series is exact up to rounding: the
// tests find it within 1e-10 (relative) of the published closed forms and
// within 1e-8 of scipy quadrature (the quadrature's own accuracy). It
// allocates nothing, except an ordered-statistic CFAR of more than 64
// cells. It panics if d is not valid or snr is negative or not finite.
func (d Detector) Pd(snr float64) float64 {
	d.mustValidate()
	if !(snr >= 0) || math.IsInf(snr, 1) {
		panic("dsp: Pd needs a finite SNR ≥ 0")
	}
	n, shape, scale := d.stat()
	lambda := scale * snr
	if d.CFARCells == 0 {
		return mixture(lambda, shape, gammaTail(n, GammaThreshold(d.Pfa, n)))
	}
	if d.OSRank > 0 {
		return osPd(lambda, shape, OSMultiplier(d.Pfa, d.CFARCells, d.OSRank), d.CFARCells, d.OSRank)
	}
	m := float64(d.CFARCells)
	return mixture(lambda, shape, betaTail(n, m, cfarSumMultiplier(d.Pfa, n, m)))
}

// PdAtThreshold returns the Pd of a known-noise detector d (CFARCells 0)
// against the threshold t > 0 on its statistic in units of the noise
// power of one pulse (Σ|y_i|²/σ² for non-coherent integration, as
// Threshold), for any t: where t is far in the noise tail, Pd at the Pfa
// Q(n, t) would underflow, this does not. PdAtThreshold(snr,
// d.Threshold()) is Pd(snr). It panics if d is not valid, has reference
// cells, or snr or t is out of range.
func (d Detector) PdAtThreshold(snr, t float64) float64 {
	d.mustValidate()
	if d.CFARCells != 0 {
		panic("dsp: PdAtThreshold needs a known noise level (CFARCells 0)")
	}
	if !(snr >= 0) || math.IsInf(snr, 1) || !(t > 0) || math.IsInf(t, 1) {
		panic("dsp: PdAtThreshold needs a finite SNR ≥ 0 and a finite threshold > 0")
	}
	n, shape, scale := d.stat()
	return mixture(scale*snr, shape, gammaTail(n, t))
}

// PdAtSumMultiplier returns the Pd of a cell-averaging detector d
// (CFARCells M > 0, OSRank 0) whose threshold is c > 0 times the SUM of
// its M reference cells (d.Threshold()/M at the nominal Pfa), for any c;
// the series has about 40·(1 + c) terms. It panics if d is not valid, is
// not cell averaging, or snr or c is out of range.
func (d Detector) PdAtSumMultiplier(snr, c float64) float64 {
	d.mustValidate()
	if d.CFARCells == 0 || d.OSRank != 0 {
		panic("dsp: PdAtSumMultiplier needs a cell-averaging CFAR")
	}
	if !(snr >= 0) || math.IsInf(snr, 1) || !(c > 0) || math.IsInf(c, 1) {
		panic("dsp: PdAtSumMultiplier needs a finite SNR ≥ 0 and a finite multiplier > 0")
	}
	n, shape, scale := d.stat()
	return mixture(scale*snr, shape, betaTail(n, float64(d.CFARCells), c))
}

// osPd returns the Pd of one square-law test against α times the k-th
// smallest of m exponential reference cells, exactly. By the Rényi
// representation, α·X_(k) is a sum of k exponential stages of rates
// β_i = (m−i)/α, i = 0 … k−1; given j in the Poisson mixture of §Pd the
// statistic is a sum of 1 + j unit exponential stages. The test passes when
// the k reference stages finish first, so, racing the stages (memoryless),
//
//	P(Gamma(1+j) > α·X_(k)) = Σ_{a=0}^{j} h_a,
//	h_a = Π_i p_i · H_a(q_0, …, q_{k−1}),  p_i = β_i/(1+β_i), q_i = 1 − p_i,
//
// with H_a the complete homogeneous symmetric polynomial of degree a, and
// Pd = Σ_a h_a·P(J ≥ a) with J the mixture index. Every term is positive.
// For a Swerling 1 target this sums to Π (m−i)/(m−i+α/(1+χ)) (Rohling 1983).
func osPd(lambda, shape, alpha float64, m, k int) float64 {
	var buf [64]float64 // q_i on the stack for k ≤ 64
	q := buf[:0]
	if k > len(buf) {
		q = make([]float64, 0, k)
	}
	for i := range k {
		q = append(q, alpha/(alpha+float64(m-i))) // 1/(1+β_i), β_i = (m−i)/α
	}
	return racePd(lambda, shape, q)
}

// racePd returns P(Gamma(1+J) > T), J the Poisson (shape = +Inf) or
// negative-binomial mixture index of mean λ, T a sum of exponential stages
// of rates β_i, given as q_i = 1/(1+β_i) (0 < q_i < 1): the stage race of
// osPd. It overwrites q. A fluctuating target of shape 1 or 2 (Swerling
// 1–4 in one test) takes the closed form of fluctPd, the others the race.
func racePd(lambda, shape float64, q []float64) float64 {
	if p, ok := fluctPd(lambda, shape, q); ok {
		return p
	}
	return raceSeries(lambda, shape, q)
}

// raceSeries is racePd by the stage race, for any shape. It overwrites q.
func raceSeries(lambda, shape float64, q []float64) float64 {
	h := q // h[i] = H_a(q_0 … q_i) once q[i] is read; q is kept in qs
	var qbuf [64]float64
	qs := qbuf[:0]
	if len(q) > len(qbuf) {
		qs = make([]float64, 0, len(q))
	}
	qs = append(qs, q...)
	logp0 := 0.0
	for i := range h {
		logp0 += math.Log1p(-qs[i]) // log p_i
		h[i] = 1                    // H_0 = 1
	}
	// Weights of the mixture index J and its survival S_a = P(J ≥ a).
	// The weight w_a is kept as a number while it is one (above
	// minLinear) and as its logarithm logw below, where it adds nothing
	// to S_a; the ratio w_a/w_{a−1} updates either.
	poisson := math.IsInf(shape, 1)
	var logw, w, p float64
	if poisson {
		logw = -lambda
	} else {
		theta := lambda / shape
		logw = -shape * math.Log1p(theta)
		p = theta / (1 + theta)
	}
	linear := logw > logMinLinear
	if linear {
		w = math.Exp(logw)
	}
	surv := 1.0
	// h_a = scale·h[k−1], scale = exp(logscale) while it is a normal
	// number (else h_a is formed from the logarithms).
	logscale := logp0
	scale := math.Exp(logscale)
	sum := 0.0
	prev := math.Inf(1)
	for a := 0; a < maxTerms; a++ {
		if a > 0 {
			// H_a(q_0 … q_i) = H_a(q_0 … q_{i−1}) + q_i·H_{a−1}(q_0 … q_i).
			left := 0.0
			for i := range h {
				h[i] = left + h[i]*qs[i]
				left = h[i]
			}
			if top := h[len(h)-1]; top > 1e100 {
				for i := range h {
					h[i] *= 1e-100
				}
				logscale += 100 * math.Ln10
				scale = math.Exp(logscale)
			}
			// S_a = S_{a−1} − w_{a−1}.
			if linear {
				surv = max(surv-w, 0)
			}
			ratio := lambda / float64(a)
			if !poisson {
				ratio = (shape + float64(a-1)) / float64(a) * p
			}
			switch {
			case lambda == 0:
				surv = 0
			case linear:
				w *= ratio
				if w < minLinear {
					linear, logw = false, math.Log(w)
				}
			default:
				logw += math.Log(ratio)
				if logw > logMinLinear {
					linear, w = true, math.Exp(logw)
				}
			}
		}
		// The h_a sum to 1 over a (Σ_a H_a(q) = Π 1/(1−q_i)), so the
		// rest of the sum, from a on, is below S_a. Past the mode of
		// the weights (ratio r_a = w_{a+1}/w_a < 1 and not growing: the
		// Poisson, or a negative binomial of shape ≥ 1), S_a is below
		// w_a/(1 − r_a): stop when that is below 1e-17 of the sum. (S_a
		// itself, computed by subtraction, keeps a rounding residue near
		// 1e-17 that would never reach 0.)
		if a > 0 && sum > 0 && lambda > 0 && (poisson || shape >= 1) {
			r := lambda / float64(a+1)
			if !poisson {
				r = (shape + float64(a)) / float64(a+1) * p
			}
			wa := w
			if !linear {
				wa = math.Exp(logw)
			}
			if r < 1 && wa/(1-r) <= 1e-17*sum {
				break
			}
		}
		var ha float64
		if scale >= minLinear {
			ha = scale * h[len(h)-1]
		} else {
			ha = math.Exp(logscale + math.Log(h[len(h)-1]))
		}
		term := ha * surv
		sum += term
		if surv == 0 {
			break
		}
		// Past the peak the ratios h_{a+1}/h_a fall towards max q_i, so
		// the rest is below h_a·S_a·ρ/(1−ρ).
		if rho := ha / prev; a > 0 && rho < 1 && ha*surv*rho/(1-rho) <= 1e-17*sum {
			break
		}
		prev = ha
	}
	return min(sum, 1)
}

// minLinear and logMinLinear: raceSeries keeps a weight or a scale as a
// number at or above 1e-280 and as its logarithm below (a margin above
// the smallest normal number, 2.2e-308).
const (
	minLinear    = 1e-280
	logMinLinear = -644.7238 // ≈ ln(1e-280), rounded up
)

// fluctPd returns racePd's P(X > T) in closed form for a target whose
// mixture shape K is 1 (Swerling 1 and 2 in one test) or 2 (Swerling 3 and
// 4), and false for other shapes. With unit noise, one test's statistic X
// has the survival function (Richards, Fundamentals of Radar Signal
// Processing, 2nd ed., Table 6.1, one pulse)
//
//	K = 1:  P(X > t) = e^(−s·t),               s = 1/(1+λ);
//	K = 2:  P(X > t) = e^(−s·t)·(1 + c·t),     s = 1/(1+λ/2), c = (λ/2)·s²,
//
// and T, a sum of independent exponential stages of rates β_i, has the
// Laplace transform M(s) = Π β_i/(β_i+s), so E[e^(−sT)] = M(s) and
// E[T·e^(−sT)] = −M'(s) = M(s)·Σ 1/(β_i+s). Hence
//
//	K = 1:  Pd = M(s)                      (Rohling 1983 for the OS-CFAR),
//	K = 2:  Pd = M(s)·(1 + c·Σ 1/(β_i+s)),
//
// every term positive, in O(len(q)) operations where the race needs about
// ln(10¹⁷)/(1 − max q_i) terms (tens of thousands for a threshold raised
// far above the noise, as in clutter). q_i = 1/(1+β_i) as racePd's.
func fluctPd(lambda, shape float64, q []float64) (float64, bool) {
	var s, c float64
	switch shape {
	case 1:
		s = 1 / (1 + lambda)
	case 2:
		x := lambda / 2
		s = 1 / (1 + x)
		c = x * s * s
	default:
		return 0, false
	}
	logM, sum := 0.0, 0.0
	for _, qi := range q {
		b := (1 - qi) / qi // β_i
		logM -= math.Log1p(s / b)
		sum += 1 / (b + s)
	}
	return min(math.Exp(logM)*(1+c*sum), 1), true
}

// PdCorrelatedCA returns the Pd of one square-law test of d (one pulse, or
// one coherent sum: Pulses = 1 or Coherent) against a cell-averaging
// threshold α times the mean of M reference cells whose noise samples are
// correlated, as they are at a sample rate above the bandwidth or after a
// Doppler window. ev are the eigenvalues of the M×M covariance matrix R of
// the reference cells' complex noise, each cell of unit noise power
// (trace R = M); the cell under test is independent of them. The reference
// mean is then Σ ev_j·E_j/M with E_j independent unit exponentials, so the
// threshold is a sum of exponential stages and the stage race of the
// ordered-statistic case applies exactly. PdCorrelatedCA(0, …) is
// Pfa = Π_j 1/(1 + α·ev_j/M) = 1/det(I + (α/M)R), CorrelatedCAPfa, so the α
// of CorrelatedCAMultiplier for the same ev holds Pfa; with R = I it equals
// Detector{CFARCells: M}.Pd, and for a Swerling 1 target it is
// Π_j 1/(1 + α·ev_j/(M(1+SNR))). d.CFARCells and d.OSRank are ignored.
// It panics if d is not valid or not one test per dwell, α ≤ 0, ev is
// empty, or an eigenvalue is negative or not finite.
func (d Detector) PdCorrelatedCA(snr, alpha float64, ev []float64) float64 {
	d.CFARCells, d.OSRank = 0, 0
	d.mustValidate()
	if d.Integration == NonCoherent && d.Pulses > 1 {
		panic("dsp: PdCorrelatedCA needs one test per dwell (Pulses 1 or Coherent)")
	}
	if !(snr >= 0) || math.IsInf(snr, 1) || !(alpha > 0) || math.IsInf(alpha, 1) || len(ev) == 0 {
		panic("dsp: PdCorrelatedCA needs a finite SNR ≥ 0, a finite α > 0 and eigenvalues")
	}
	var buf [64]float64
	q := buf[:0]
	if len(ev) > len(buf) {
		q = make([]float64, 0, len(ev))
	}
	m := float64(len(ev))
	for _, e := range ev {
		if !(e >= 0) || math.IsInf(e, 1) {
			panic("dsp: PdCorrelatedCA eigenvalues must be finite and ≥ 0")
		}
		if e > 1e-12*m { // a zero eigenvalue is a stage of no duration
			q = append(q, alpha*e/(alpha*e+m)) // 1/(1+β), β = M/(α·e)
		}
	}
	_, shape, scale := d.stat()
	if len(q) == 0 {
		return 1 // no noise in the reference: a zero threshold
	}
	return racePd(scale*snr, shape, q)
}

// MarcumQ returns the generalized Marcum Q function Q_m(a, b), the
// probability that a non-central chi-square variable with 2m degrees of
// freedom and non-centrality a² exceeds b²:
//
//	Q_m(a, b) = ∫_b^∞ x (x/a)^(m−1) exp(−(x² + a²)/2) I_{m−1}(ax) dx.
//
// A steady target of per-pulse SNR χ seen in N non-coherently integrated
// pulses against the threshold T is detected with probability
// Q_N(√(2Nχ), √(2T)). It panics unless m ≥ 1, a ≥ 0 and b ≥ 0 are finite.
func MarcumQ(m int, a, b float64) float64 {
	if m < 1 || !(a >= 0) || !(b >= 0) || math.IsInf(a, 1) || math.IsInf(b, 1) {
		panic("dsp: MarcumQ needs m ≥ 1 and finite a, b ≥ 0")
	}
	if b == 0 {
		return 1
	}
	return mixture(a*a/2, math.Inf(1), gammaTail(float64(m), b*b/2))
}

// tail is the sequence G_k = P(X_{n+k} > threshold) of the series: its
// current value and the log of its next increment, for the current shape
// b = n + k of the gamma variable.
type tail struct {
	gamma      bool    // Q(b, t) with a known noise level, else I_y(a, b)
	n          float64 // shape of the statistic under noise alone (N or 1)
	t          float64 // gamma: threshold T
	a          float64 // beta: M·n, the shape of the reference sum
	logy, logv float64 // beta: log y and log(1−y), y = 1/(1+c)

	v float64 // beta: 1−y

	b    float64 // current shape n + k
	g    float64 // G_k
	logd float64 // log(G_{k+1} − G_k)
	d    float64 // G_{k+1} − G_k, while lin
	lin  bool    // d holds the increment (it is at least minLinear)
}

// gammaTail is G_k = Q(n+k, t): Q(b+1, t) = Q(b, t) + e^(−t)·t^b/Γ(b+1).
func gammaTail(n, t float64) tail { return tail{gamma: true, n: n, t: t} }

// betaTail is G_k = I_y(m·n, n+k), y = 1/(1+c), the probability that
// Gamma(n+k) exceeds c times an independent Gamma(m·n):
// I_y(a, b+1) = I_y(a, b) + y^a·(1−y)^b·Γ(a+b)/(Γ(a)·Γ(b+1)).
func betaTail(n, m, c float64) tail {
	logy := -math.Log1p(c)
	return tail{n: n, a: m * n, logy: logy, logv: math.Log(c) + logy, v: c / (1 + c)}
}

// start sets the sequence at k = k0 directly.
func (s *tail) start(k0 float64) {
	b := s.n + k0
	s.b = b
	lb1, _ := math.Lgamma(b + 1)
	if s.gamma {
		s.g = mathext.GammaIncRegComp(b, s.t)
		s.logd = -s.t + b*math.Log(s.t) - lb1
		s.setLinear()
		return
	}
	if b == 1 {
		s.g = math.Exp(s.a * s.logy) // exact: y^a
	} else {
		s.g = mathext.RegIncBeta(s.a, b, math.Exp(s.logy))
	}
	lab, _ := math.Lgamma(s.a + b)
	la, _ := math.Lgamma(s.a)
	s.logd = s.a*s.logy + b*s.logv + lab - la - lb1
	s.setLinear()
}

// setLinear keeps the increment as a number from here on if it is one.
func (s *tail) setLinear() {
	if s.lin = s.logd > logMinLinear; s.lin {
		s.d = math.Exp(s.logd)
	}
}

// next advances from G_k to G_{k+1}. It reports whether G has converged:
// the increments fall and all the remaining ones add up to less than
// 1e-17, so every later G_k equals the current one to rounding.
// The increment is kept as a number while it is at least minLinear (one
// multiplication a term) and as its logarithm below.
func (s *tail) next() (converged bool) {
	var r float64 // d_{k+1}/d_k
	if s.gamma {
		r = s.t / (s.b + 1)
	} else {
		r = s.v * (s.a + s.b) / (s.b + 1)
	}
	s.b++
	if s.lin {
		s.g = min(s.g+s.d, 1)
		if s.d *= r; s.d < minLinear {
			s.lin, s.logd = false, math.Log(s.d)
		}
		return r < 1 && s.d/(1-r) < 1e-17
	}
	s.g = min(s.g+math.Exp(s.logd), 1)
	s.logd += math.Log(r)
	s.setLinear()
	return r < 1 && math.Exp(s.logd)/(1-r) < 1e-17
}

// maxTerms bounds the series. With the limits of Detector it is not
// reached: the series starts 40 standard deviations below the mean of the
// weights and stops past the mode when the remaining weight, or the
// remaining increments of G, fall below 1e-16 of the sum.
const maxTerms = 50_000_000

// mixture sums Σ w_k G_k with w_k the Poisson(λ) weights (shape = +Inf) or
// the negative-binomial weights of a Poisson whose mean is gamma
// distributed with the given shape and mean λ.
func mixture(lambda, shape float64, s tail) float64 {
	if lambda == 0 {
		s.start(0)
		return s.g
	}
	poisson := math.IsInf(shape, 1)
	variance := lambda
	var p float64
	if !poisson {
		theta := lambda / shape
		variance = lambda * (1 + theta)
		p = theta / (1 + theta) // success probability of the negative binomial
	}
	// Weights more than 40 standard deviations below the mean are below
	// e^(−800) of the peak for these laws: start there.
	k0 := max(math.Floor(lambda-40*math.Sqrt(variance)), 0)
	lk1, _ := math.Lgamma(k0 + 1)
	var logw float64
	if poisson {
		logw = -lambda + k0*math.Log(lambda) - lk1
	} else {
		lks, _ := math.Lgamma(shape + k0)
		ls, _ := math.Lgamma(shape)
		logw = lks - ls - lk1 - shape*math.Log1p(lambda/shape)
		if k0 > 0 {
			logw += k0 * math.Log(p)
		}
	}
	// ratio returns w_{k+1}/w_k.
	ratio := func(k float64) float64 {
		if poisson {
			return lambda / (k + 1)
		}
		return (shape + k) / (k + 1) * p
	}
	s.start(k0)
	const tol = 1e-16
	sum, wsum := 0.0, 0.0
	// The weight is kept as a number while it is at least minLinear (one
	// multiplication a term) and as its logarithm below.
	lin := logw > logMinLinear
	var w float64
	if lin {
		w = math.Exp(logw)
	}
	for j := 0; j < maxTerms; j++ {
		k := k0 + float64(j)
		if !lin {
			w = math.Exp(logw)
		}
		sum += w * s.g
		wsum += w
		converged := s.next()
		r := ratio(k)
		if lin {
			if w *= r; w < minLinear {
				lin, logw = false, math.Log(w)
			}
		} else if logw += math.Log(r); logw > logMinLinear {
			lin, w = true, math.Exp(logw)
		}
		if converged {
			// Every later G equals s.g to rounding: add the remaining
			// weight at once.
			return min(sum+max(1-wsum, 0)*s.g, 1)
		}
		if rn := ratio(k + 1); rn < 1 && r < 1 {
			// Past the mode the ratios fall, so the remaining weight is
			// below w_{k+1}/(1 − r_{k+1}); each G is at most 1.
			wn := w
			if !lin {
				wn = math.Exp(logw)
			}
			if wn/(1-rn) <= tol*sum {
				break
			}
		}
	}
	return min(sum, 1)
}

// RequiredSNR returns the per-pulse SNR (linear) at which d reaches the
// detection probability pd, found by bisection on the SNR in dB to 1e-9 dB.
// It returns an error naming pd and its valid range when pd is not in
// (Pfa, 1), or when more than 200 dB would be needed. It panics if d is not
// valid.
func (d Detector) RequiredSNR(pd float64) (float64, error) {
	d.mustValidate()
	if !(pd > d.Pfa && pd < 1) {
		return 0, fmt.Errorf("dsp: required Pd %g out of range: want Pfa (%g) < Pd < 1", pd, d.Pfa)
	}
	lo, hi := -60.0, 20.0
	for d.Pd(FromDB(lo)) > pd {
		lo -= 40
		if lo < -300 {
			return FromDB(lo), nil
		}
	}
	for d.Pd(FromDB(hi)) < pd {
		lo = hi
		hi += 40
		if hi > 200 {
			return 0, fmt.Errorf("dsp: Pd %g needs more than 200 dB of SNR with %d reference cells; "+
				"add reference cells or pulses", pd, d.CFARCells)
		}
	}
	for hi-lo > 1e-9 {
		mid := (lo + hi) / 2
		if d.Pd(FromDB(mid)) < pd {
			lo = mid
		} else {
			hi = mid
		}
	}
	return FromDB((lo + hi) / 2), nil
}

// CFARLoss returns the CFAR loss in dB of d at the detection probability
// pd: the required SNR behind the CA-CFAR over the required SNR of the
// same detector with a known noise level. It is 0 without a CFAR.
func (d Detector) CFARLoss(pd float64) (float64, error) {
	with, err := d.RequiredSNR(pd)
	if err != nil {
		return 0, err
	}
	known := d
	known.CFARCells, known.OSRank = 0, 0
	without, err := known.RequiredSNR(pd)
	if err != nil {
		return 0, err
	}
	return DB(with / without), nil
}

// Albersheim returns the single-pulse SNR in dB that N non-coherently
// integrated pulses of a steady target need for detection probability pd
// at false-alarm probability pfa, by Albersheim's equation (Proc. IEEE
// 69(7):839, 1981; Richards eq. 6.87):
//
//	A = ln(0.62/Pfa),  B = ln(Pd/(1−Pd)),
//	SNR = −5·log10 N + (6.2 + 4.54/√(N + 0.44))·log10(A + 0.12AB + 1.7B).
//
// It was fitted for a LINEAR (envelope) detector and is stated to be within
// 0.2 dB for 0.1 ≤ Pd ≤ 0.9, 1e-7 ≤ Pfa ≤ 1e-3 and 1 ≤ N ≤ 8096; against
// the square-law detector here it differs by about 0.3 dB at N = 10. It
// panics unless 0 < pd < 1, 0 < pfa < 1 and n ≥ 1.
func Albersheim(pd, pfa float64, n int) float64 {
	if !(pd > 0 && pd < 1) || !(pfa > 0 && pfa < 1) || n < 1 {
		panic("dsp: Albersheim needs 0 < pd < 1, 0 < pfa < 1 and n ≥ 1")
	}
	a := math.Log(0.62 / pfa)
	b := math.Log(pd / (1 - pd))
	N := float64(n)
	return -5*math.Log10(N) + (6.2+4.54/math.Sqrt(N+0.44))*math.Log10(a+0.12*a*b+1.7*b)
}

// Shnidman returns the single-pulse SNR in dB that N non-coherently
// integrated pulses (square-law detector) need for detection probability
// pd at false-alarm probability pfa for the given Swerling model (0 steady
// … 4), by Shnidman's equation (IEEE TAES 38(3), 2002; Richards eqs.
// 6.109–6.112):
//
//	K = ∞, 1, N, 2, 2N for Swerling 0 … 4;  α = 0 (N < 40) or ¼,
//	η = √(−0.8 ln(4Pfa(1−Pfa))) + sgn(Pd − ½)·√(−0.8 ln(4Pd(1−Pd))),
//	X∞ = η(η + 2√(N/2 + α − ¼)),
//	C1 = (((17.7006Pd − 18.4496)Pd + 14.5339)Pd − 3.525)/K,
//	C2 = (exp(27.31Pd − 25.14) + (Pd − 0.8)(0.7 ln(1e-5/Pfa) + (2N − 20)/80))/K,
//	C_dB = C1 (Pd ≤ 0.872) or C1 + C2,  SNR = 10^(C_dB/10)·X∞/N.
//
// Its stated accuracy is 0.5 dB for 0.1 ≤ Pd ≤ 0.99, 1e-9 ≤ Pfa ≤ 1e-3 and
// 1 ≤ N ≤ 100. It panics unless 0 < pd < 1, 0 < pfa < 1, n ≥ 1 and the
// model is 0 … 4.
func Shnidman(pd, pfa float64, n, swerling int) float64 {
	if !(pd > 0 && pd < 1) || !(pfa > 0 && pfa < 1) || n < 1 || swerling < SwerlingNone || swerling > Swerling4 {
		panic("dsp: Shnidman needs 0 < pd < 1, 0 < pfa < 1, n ≥ 1 and a Swerling model 0 … 4")
	}
	N := float64(n)
	var k float64
	switch swerling {
	case SwerlingNone:
		k = math.Inf(1)
	case Swerling1:
		k = 1
	case Swerling2:
		k = N
	case Swerling3:
		k = 2
	case Swerling4:
		k = 2 * N
	}
	alpha := 0.0
	if n >= 40 {
		alpha = 0.25
	}
	sgn := 1.0
	if pd < 0.5 {
		sgn = -1
	}
	eta := math.Sqrt(-0.8*math.Log(4*pfa*(1-pfa))) + sgn*math.Sqrt(-0.8*math.Log(4*pd*(1-pd)))
	xinf := eta * (eta + 2*math.Sqrt(N/2+alpha-0.25))
	c1 := (((17.7006*pd-18.4496)*pd+14.5339)*pd - 3.525) / k
	c2 := (math.Exp(27.31*pd-25.14) + (pd-0.8)*(0.7*math.Log(1e-5/pfa)+(2*N-20)/80)) / k
	cdb := c1
	if pd > 0.872 {
		cdb += c2
	}
	return DB(FromDB(cdb) * xinf / N)
}

// RangeAtSNR returns the range at which a target whose SNR is refSNRdB at
// refRange reaches snrDB, by the R⁴ law of the radar equation:
//
//	R = refRange · 10^((refSNRdB − snrDB)/40).
//
// The range is in the unit of refRange.
func RangeAtSNR(refRange, refSNRdB, snrDB float64) float64 {
	return refRange * math.Pow(10, (refSNRdB-snrDB)/40)
}

// SNRAtRange returns the SNR in dB at range r of a target whose SNR is
// refSNRdB at refRange (same unit), by the R⁴ law:
// SNR = refSNRdB + 40·log10(refRange/r).
func SNRAtRange(refRange, refSNRdB, r float64) float64 {
	return refSNRdB + 40*math.Log10(refRange/r)
}
