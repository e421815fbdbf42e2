package dsp

import (
	"math"
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
	lo, hi := 1e-12, 1.0
	for OSPfa(hi, n, k) > pfa {
		hi *= 2
	}
	for range 200 {
		mid := math.Sqrt(lo * hi)
		if OSPfa(mid, n, k) > pfa {
			lo = mid
		} else {
			hi = mid
		}
		if hi-lo <= 1e-12*hi {
			break
		}
	}
	return math.Sqrt(lo * hi)
}

func checkPFA(pfa float64, n int) {
	if !(pfa > 0 && pfa < 1) || n < 1 {
		panic("dsp: false-alarm probability must be in (0, 1) with at least one cell")
	}
}

// CFAR computes detection thresholds over a power profile (linear units,
// e.g. |y|²). Training cells lie on both sides of the cell under test,
// beyond Guard cells on each side; Train counts both sides together. Near
// the ends of the profile only the cells that exist are used and the
// multiplier is recomputed for their number, so the false-alarm
// probability holds everywhere. A CFAR is a plan: it is not safe for
// concurrent use.
type CFAR struct {
	PFA   float64 // false-alarm probability per cell
	Guard int     // guard cells on each side
	Train int     // training cells, both sides together (even)
	Rank  int     // ordered-statistic rank (1-based); 0 selects cell averaging

	mult    map[int]float64
	scratch []float64
	prefix  []float64
}

// Multiplier returns the threshold multiplier for n training cells.
func (c *CFAR) Multiplier(n int) float64 {
	if c.mult == nil {
		c.mult = make(map[int]float64)
	}
	if a, ok := c.mult[n]; ok {
		return a
	}
	var a float64
	if c.Rank == 0 {
		a = CAMultiplier(c.PFA, n)
	} else {
		a = OSMultiplier(c.PFA, n, c.rank(n))
	}
	c.mult[n] = a
	return a
}

// rank scales the configured rank to n available cells.
func (c *CFAR) rank(n int) int {
	k := int(math.Round(float64(c.Rank) * float64(n) / float64(c.Train)))
	return min(max(k, 1), n)
}

// TrainingCells returns the index ranges [lo1, hi1) and [lo2, hi2) of the
// training cells of cell k in a profile of length n.
func (c *CFAR) TrainingCells(k, n int) (lo1, hi1, lo2, hi2 int) {
	half := c.Train / 2
	hi1 = max(k-c.Guard, 0)
	lo1 = max(k-c.Guard-half, 0)
	lo2 = min(k+c.Guard+1, n)
	hi2 = min(k+c.Guard+1+half, n)
	return
}

// Level returns the threshold at cell k of power: the multiplier times the
// mean (CA) or the ranked value (OS) of its training cells.
func (c *CFAR) Level(power []float64, k int) float64 {
	lo1, hi1, lo2, hi2 := c.TrainingCells(k, len(power))
	n := hi1 - lo1 + hi2 - lo2
	if n == 0 {
		return math.Inf(1)
	}
	if c.Rank == 0 {
		s := 0.0
		for _, v := range power[lo1:hi1] {
			s += v
		}
		for _, v := range power[lo2:hi2] {
			s += v
		}
		return c.Multiplier(n) * s / float64(n)
	}
	c.scratch = append(append(c.scratch[:0], power[lo1:hi1]...), power[lo2:hi2]...)
	return c.Multiplier(n) * quickSelect(c.scratch, c.rank(n)-1)
}

// Thresholds fills dst with the threshold of every cell of power and
// returns it; a nil dst allocates. It costs O(len) for cell averaging and
// O(len·Train) for ordered statistics.
func (c *CFAR) Thresholds(dst, power []float64) []float64 {
	n := len(power)
	if dst == nil {
		dst = make([]float64, n)
	}
	if len(dst) != n {
		panic("dsp: CFAR destination length mismatch")
	}
	if c.Rank != 0 {
		for k := range power {
			dst[k] = c.Level(power, k)
		}
		return dst
	}
	c.prefix = slices.Grow(c.prefix[:0], n+1)[:n+1]
	c.prefix[0] = 0
	for i, v := range power {
		c.prefix[i+1] = c.prefix[i] + v
	}
	// Cells whose training cells all lie inside power need no clamping:
	// [inLo, inHi), with 2·half cells each.
	half := c.Train / 2
	inLo, inHi := c.Guard+half, n-c.Guard-half
	if half == 0 || inLo >= inHi {
		inLo, inHi = n, n
	}
	if inLo < inHi {
		a := c.Multiplier(2*half) / float64(2*half)
		p := c.prefix
		for k := inLo; k < inHi; k++ {
			s := p[k-c.Guard] - p[k-c.Guard-half] + p[k+c.Guard+1+half] - p[k+c.Guard+1]
			if s < 0 {
				s = 0
			}
			dst[k] = a * s
		}
	}
	lastM, lastA := -1, 0.0
	edge := func(k int) {
		lo1, hi1, lo2, hi2 := c.TrainingCells(k, n)
		m := hi1 - lo1 + hi2 - lo2
		if m == 0 {
			dst[k] = math.Inf(1)
			return
		}
		if m != lastM { // the count changes only near the ends
			lastM, lastA = m, c.Multiplier(m)/float64(m)
		}
		s := c.prefix[hi1] - c.prefix[lo1] + c.prefix[hi2] - c.prefix[lo2]
		dst[k] = lastA * math.Max(s, 0)
	}
	for k := range inLo {
		edge(k)
	}
	for k := inHi; k < n; k++ {
		edge(k)
	}
	return dst
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
