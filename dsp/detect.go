package dsp

import (
	"maps"
	"math"
	"math/cmplx"
	"slices"
)

// CAMultiplier returns the cell-averaging CFAR threshold multiplier α on
// the mean of n training cells that gives a false-alarm probability pfa
// for a square-law detector in exponential (Gaussian) noise:
//
//	α = n·(pfa^(−1/n) − 1)
//
// (Richards, Fundamentals of Radar Signal Processing, 2nd ed., eq. 6.135).
// It panics if n < 1 or pfa is not in (0, 1).
func CAMultiplier(pfa float64, n int) float64 {
	checkPFA(pfa, n)
	return float64(n) * (math.Pow(pfa, -1/float64(n)) - 1)
}

// FixedMultiplier returns the threshold, relative to the mean noise power,
// that gives pfa for a square-law detector in exponential noise: −ln pfa.
func FixedMultiplier(pfa float64) float64 {
	checkPFA(pfa, 1)
	return -math.Log(pfa)
}

// OSPfa returns the false-alarm probability of an ordered-statistic CFAR
// that multiplies the k-th smallest of n training cells (1 ≤ k ≤ n) by
// α, for a square-law detector in exponential noise (Rohling, IEEE TAES
// 19(4), 1983):
//
//	Pfa = Π_{i=0}^{k−1} (n − i) / (n − i + α).
func OSPfa(alpha float64, n, k int) float64 {
	p := 1.0
	for i := 0; i < k; i++ {
		p *= float64(n-i) / (float64(n-i) + alpha)
	}
	return p
}

// OSMultiplier returns the α for which OSPfa(α, n, k) = pfa, found by
// bisection on log α to a relative precision of 1e-12. It panics if
// k is not in 1…n or pfa is not in (0, 1).
func OSMultiplier(pfa float64, n, k int) float64 {
	checkPFA(pfa, n)
	if k < 1 || k > n {
		panic("dsp: ordered-statistic rank out of range")
	}
	return solvePfa(pfa, func(a float64) float64 { return OSPfa(a, n, k) })
}

func checkPFA(pfa float64, n int) {
	if !(pfa > 0 && pfa < 1) || n < 1 {
		panic("dsp: false-alarm probability must be in (0, 1) with at least one cell")
	}
}

// CFAR computes detection thresholds over a power profile (linear units,
// e.g. |y|²). Training cells lie on both sides of the cell under test,
// beyond Guard cells on each side; Train counts both sides together. Near
// the ends of the profile, and next to cells marked invalid (gates that
// hold no data), only the valid cells that exist are used and the
// multiplier is recomputed for exactly those cells, so the false-alarm
// probability holds everywhere.
//
// Rho, when set, is the complex correlation of the noise between profile
// cells by lag (NoiseCorrelation of the receive reference): at sample
// rates above the bandwidth neighbouring cells share noise. Cell averaging
// then solves Pfa = 1/det(I + (α/N)·R) for the correlation matrix R of the
// cells used (CorrelatedCAMultiplier); an ordered statistic trains on a
// lattice of cells DecorrelationSpacing apart, which are independent by
// construction, and uses Rohling's α for their number. A nil Rho treats
// the cells as independent (Richards eq. 6.135; Rohling). A CFAR is a
// plan: it is not safe for concurrent use.
type CFAR struct {
	PFA   float64      // false-alarm probability per cell
	Guard int          // guard cells on each side
	Train int          // training cells, both sides together (even)
	Rank  int          // ordered-statistic rank (1-based); 0 selects cell averaging
	Rho   []complex128 // noise correlation by lag, ρ(0) = 1; nil for independent cells

	// Variant selects greatest-of, smallest-of or censored averaging
	// (cfarvariants.go); the zero value is CA, or OS when Rank > 0. The
	// variants train on the ordered statistic's lattice of independent
	// cells, so their closed forms hold at any oversampling.
	Variant CFARVariant
	Censor  int // Censored: largest training cells dropped, of Train (scaled to the cells used)

	// Pulses, when > 1, says that every cell of the profile is the sum
	// (or the mean: the law is scale-free) of Pulses square-law detected
	// pulses of independent noise (non-coherent integration), a
	// Gamma(Pulses) variable under noise alone. Cell averaging then
	// trains on the lattice of independent cells DecorrelationSpacing of
	// Rho apart, like an ordered statistic, and its multiplier on their
	// mean is Detector{Pulses, NonCoherent, CFARCells}.Threshold(): the
	// exact Pfa = I_{1/(1+α/M)}(M·Pulses, Pulses) for M independent
	// cells. Only cell averaging (Rank 0, Variant CellAveraging) is
	// defined; 0 or 1 is one pulse.
	Pulses int

	vc   variantCache
	lead []bool

	mult    map[int]float64
	pattern map[string]float64
	key     []byte
	offs    []int
	step    int
	scratch []float64
	prefix  []float64
	count   []int
	// Cell averaging's per-cell factors for the last validity pattern
	// (caCoefficients).
	caCoef  []float64
	caValid []bool
	caNil   bool
}

// Clone returns a copy of c with its own copies of the multipliers it
// has computed so far (by cell count, by training pattern and per cell
// for the last validity pattern), so that a plan warmed once can be handed
// to several goroutines without each solving the same multipliers again.
// Clone only reads c: clones may be taken concurrently while c itself is
// not in use. The copy shares Rho, which neither modifies.
func (c *CFAR) Clone() *CFAR {
	d := &CFAR{
		PFA: c.PFA, Guard: c.Guard, Train: c.Train, Rank: c.Rank, Rho: c.Rho,
		Variant: c.Variant, Censor: c.Censor, Pulses: c.Pulses,
		vc: maps.Clone(c.vc), mult: maps.Clone(c.mult), pattern: maps.Clone(c.pattern),
		step: c.step, caNil: c.caNil,
		caCoef: slices.Clone(c.caCoef), caValid: slices.Clone(c.caValid),
	}
	return d
}

// Multiplier returns the threshold multiplier for n independent training
// cells.
func (c *CFAR) Multiplier(n int) float64 {
	if c.mult == nil {
		c.mult = make(map[int]float64)
	}
	if a, ok := c.mult[n]; ok {
		return a
	}
	var a float64
	if c.Pulses > 1 {
		a = Detector{Pfa: c.PFA, Pulses: c.Pulses, Integration: NonCoherent, CFARCells: n}.integratedMultiplier()
	} else if c.Rank == 0 {
		a = CAMultiplier(c.PFA, n)
	} else {
		a = OSMultiplier(c.PFA, n, c.rank(n))
	}
	c.mult[n] = a
	return a
}

// Spacing returns the spacing of the training cells an ordered statistic
// uses: 1 for cell averaging or independent cells, otherwise
// DecorrelationSpacing of Rho over the training span.
func (c *CFAR) Spacing() int {
	if c.Rank == 0 && c.Variant == CellAveraging && c.Pulses <= 1 || c.Rho == nil {
		return 1
	}
	if c.step == 0 {
		c.step = DecorrelationSpacing(2*(c.Guard+c.Train/2), func(m int) float64 { return cmplx.Abs(lagCorrelation(c.Rho, m)) })
	}
	return c.step
}

// multiplierFor returns the multiplier for the training offsets offs
// (relative to the cell under test).
func (c *CFAR) multiplierFor(offs []int) float64 {
	if c.Rho == nil || c.Rank != 0 || c.Pulses > 1 {
		return c.Multiplier(len(offs))
	}
	c.key = c.key[:0]
	for _, o := range offs {
		c.key = append(c.key, byte(o), byte(o>>8), byte(o>>16))
	}
	if c.pattern == nil {
		c.pattern = make(map[string]float64)
	}
	if a, ok := c.pattern[string(c.key)]; ok {
		return a
	}
	// Index 0 is the cell under test (offset 0), 1 … N the training cells.
	off := func(i int) int {
		if i == 0 {
			return 0
		}
		return offs[i-1]
	}
	a := correlatedCAWithCUT(c.PFA, len(offs), func(i, j int) complex128 { return lagCorrelation(c.Rho, off(j)-off(i)) })
	c.pattern[string(c.key)] = a
	return a
}

// rank scales the configured rank to n available cells.
func (c *CFAR) rank(n int) int {
	k := int(math.Round(float64(c.Rank) * float64(n) / float64(c.Train)))
	return min(max(k, 1), n)
}

// TrainingCells returns the index ranges [lo1, hi1) and [lo2, hi2) that
// hold the training cells of cell k in a profile of length n (before
// thinning and validity; see Cells).
func (c *CFAR) TrainingCells(k, n int) (lo1, hi1, lo2, hi2 int) {
	half := c.Train / 2
	hi1 = max(k-c.Guard, 0)
	lo1 = max(k-c.Guard-half, 0)
	lo2 = min(k+c.Guard+1, n)
	hi2 = min(k+c.Guard+1+half, n)
	return
}

// Cells appends to dst the offsets from k of the training cells actually
// used at cell k of a profile of length n: inside the profile, valid
// (valid == nil: all), and on the ordered statistic's lattice. Offsets are
// ascending.
func (c *CFAR) Cells(dst []int, k, n int, valid []bool) []int {
	half, s := c.Train/2, c.Spacing()
	for o := -(c.Guard + half); o <= c.Guard+half; o++ {
		if o >= -c.Guard && o <= c.Guard {
			continue
		}
		if s > 1 && o%s != 0 {
			continue
		}
		i := k + o
		if i < 0 || i >= n || valid != nil && !valid[i] {
			continue
		}
		dst = append(dst, o)
	}
	return dst
}

// Level returns the threshold at cell k of power: the multiplier times the
// mean (CA) or the ranked value (OS) of its training cells.
func (c *CFAR) Level(power []float64, k int) float64 {
	return c.LevelValid(power, nil, k)
}

// LevelValid is Level with only the cells i with valid[i] as training
// cells (valid == nil: all). It returns +Inf when no training cell is left.
func (c *CFAR) LevelValid(power []float64, valid []bool, k int) float64 {
	c.offs = c.Cells(c.offs[:0], k, len(power), valid)
	n := len(c.offs)
	if n == 0 {
		return math.Inf(1)
	}
	if c.Variant != CellAveraging {
		c.scratch, c.lead = c.scratch[:0], c.lead[:0]
		for _, o := range c.offs {
			c.scratch = append(c.scratch, power[k+o])
			c.lead = append(c.lead, o < 0)
		}
		return c.vc.level(c.Variant, c.PFA, c.Censor, c.Train, c.scratch, c.lead)
	}
	if c.Rank == 0 {
		s := 0.0
		for _, o := range c.offs {
			s += power[k+o]
		}
		return c.multiplierFor(c.offs) * s / float64(n)
	}
	c.scratch = c.scratch[:0]
	for _, o := range c.offs {
		c.scratch = append(c.scratch, power[k+o])
	}
	return c.Multiplier(n) * quickSelect(c.scratch, c.rank(n)-1)
}

// Thresholds fills dst with the threshold of every cell of power and
// returns it; a nil dst allocates. It costs O(len) for cell averaging and
// O(len·Train) for ordered statistics.
func (c *CFAR) Thresholds(dst, power []float64) []float64 {
	return c.ThresholdsValid(dst, power, nil)
}

// ThresholdsValid is Thresholds with only valid cells as training cells
// (valid == nil: all; else len(valid) must equal len(power)). Invalid
// cells get a threshold too (from their valid neighbours); callers that do
// not process them ignore it.
func (c *CFAR) ThresholdsValid(dst, power []float64, valid []bool) []float64 {
	n := len(power)
	if dst == nil {
		dst = make([]float64, n)
	}
	if len(dst) != n || valid != nil && len(valid) != n {
		panic("dsp: CFAR destination length mismatch")
	}
	if c.Rank != 0 || c.Variant != CellAveraging || c.Pulses > 1 && c.Spacing() > 1 {
		for k := range power {
			dst[k] = c.LevelValid(power, valid, k)
		}
		return dst
	}
	coef := c.caCoefficients(n, valid)
	c.prefix = slices.Grow(c.prefix[:0], n+1)[:n+1]
	p := c.prefix
	p[0] = 0
	// The running sum stays in a register (p[i+1] = p[i] + v, the same
	// additions).
	acc := 0.0
	if valid == nil {
		for i, v := range power {
			acc += v
			p[i+1] = acc
		}
	} else {
		valid = valid[:len(power)]
		for i, v := range power {
			if !valid[i] {
				v = 0
			}
			acc += v
			p[i+1] = acc
		}
	}
	half, g := c.Train/2, c.Guard
	// Cells whose training cells all lie inside the profile (k−g−half ≥ 0
	// and k+g+half < n) read the prefix sums at fixed offsets; the others
	// clamp their ranges as TrainingCells does.
	in0, in1 := min(g+half, n), max(min(n-g-half, n), min(g+half, n))
	edge := func(k int) {
		a := coef[k]
		if a < 0 {
			dst[k] = math.Inf(1)
			return
		}
		hi1, lo1 := max(k-g, 0), max(k-g-half, 0)
		lo2, hi2 := min(k+g+1, n), min(k+g+1+half, n)
		dst[k] = a * nonNegative(p[hi1]-p[lo1]+p[hi2]-p[lo2])
	}
	for k := range in0 {
		edge(k)
	}
	if in1 > in0 {
		// p[k−g] − p[k−g−half] + p[k+g+1+half] − p[k+g+1], in that order.
		lead := p[in0-g-half : in1-g-half]
		hi1 := p[in0-g : in1-g]
		lo2 := p[in0+g+1 : in1+g+1]
		hi2 := p[in0+g+1+half : in1+g+1+half]
		out, co := dst[in0:in1], coef[in0:in1]
		for i := range out {
			a := co[i]
			if a < 0 {
				out[i] = math.Inf(1)
				continue
			}
			out[i] = a * nonNegative(hi1[i]-lead[i]+hi2[i]-lo2[i])
		}
	}
	for k := in1; k < n; k++ {
		edge(k)
	}
	return dst
}

// nonNegative is math.Max(s, 0) without its call: −0 and negatives give
// +0, NaN stays NaN.
func nonNegative(s float64) float64 {
	if s <= 0 {
		return 0
	}
	return s
}

// LevelsAt is ThresholdsValid at the listed cells only: it sets dst[k]
// (len(dst) = len(power)) for every k in cells and leaves the rest of dst
// alone, for a caller that tests a few cells of a long profile. Cell
// averaging sums each cell's training cells directly (equal to
// ThresholdsValid's prefix-sum differences to rounding) with the same
// cached multipliers; the other detectors use LevelValid.
func (c *CFAR) LevelsAt(dst, power []float64, valid []bool, cells []int) {
	n := len(power)
	if len(dst) != n || valid != nil && len(valid) != n {
		panic("dsp: CFAR destination length mismatch")
	}
	if c.Rank != 0 || c.Variant != CellAveraging || c.Pulses > 1 && c.Spacing() > 1 {
		for _, k := range cells {
			dst[k] = c.LevelValid(power, valid, k)
		}
		return
	}
	coef := c.caCoefficients(n, valid)
	for _, k := range cells {
		a := coef[k]
		if a < 0 {
			dst[k] = math.Inf(1)
			continue
		}
		lo1, hi1, lo2, hi2 := c.TrainingCells(k, n)
		s := 0.0
		for _, r := range [2][2]int{{lo1, hi1}, {lo2, hi2}} {
			for i := r[0]; i < r[1]; i++ {
				if valid == nil || valid[i] {
					s += power[i]
				}
			}
		}
		dst[k] = a * nonNegative(s)
	}
}

// caCoefficients returns, per cell of a profile of length n with the
// validity valid, the cell-averaging multiplier over the number of
// training cells it uses (the factor on their sum), or −1 when it has
// none. The last pattern's coefficients are kept: Monte Carlo trials test
// profile after profile of one validity.
func (c *CFAR) caCoefficients(n int, valid []bool) []float64 {
	if c.caCoef != nil && len(c.caCoef) == n && c.caNil == (valid == nil) && (valid == nil || slices.Equal(c.caValid, valid)) {
		return c.caCoef
	}
	c.count = slices.Grow(c.count[:0], n+1)[:n+1]
	c.count[0] = 0
	for i := range n {
		c.count[i+1] = c.count[i]
		if valid == nil || valid[i] {
			c.count[i+1]++
		}
	}
	half := c.Train / 2
	full := 2 * half
	var aFull float64
	if full > 0 {
		c.offs = c.Cells(c.offs[:0], c.Guard+half, max(n, 2*(c.Guard+half)+1), nil)
		aFull = c.multiplierFor(c.offs) / float64(full)
	}
	coef := slices.Grow(c.caCoef[:0], n)[:n]
	cnt := c.count
	for k := range n {
		lo1, hi1, lo2, hi2 := c.TrainingCells(k, n)
		m := cnt[hi1] - cnt[lo1] + cnt[hi2] - cnt[lo2]
		switch {
		case m == 0:
			coef[k] = -1
		case m == full:
			coef[k] = aFull
		case c.Rho == nil:
			coef[k] = c.Multiplier(m) / float64(m)
		default:
			c.offs = c.Cells(c.offs[:0], k, n, valid)
			coef[k] = c.multiplierFor(c.offs) / float64(m)
		}
	}
	c.caCoef, c.caNil = coef, valid == nil
	c.caValid = append(c.caValid[:0], valid...)
	return coef
}

// quickSelect returns the k-th smallest (0-based) element of x, reordering x.
func quickSelect(x []float64, k int) float64 {
	lo, hi := 0, len(x)-1
	for lo < hi {
		p := x[(lo+hi)/2]
		i, j := lo, hi
		for i <= j {
			for x[i] < p {
				i++
			}
			for x[j] > p {
				j--
			}
			if i <= j {
				x[i], x[j] = x[j], x[i]
				i++
				j--
			}
		}
		switch {
		case k <= j:
			hi = j
		case k >= i:
			lo = i
		default:
			return x[k]
		}
	}
	return x[k]
}
