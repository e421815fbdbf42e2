package dsp

import (
	"math"
	"slices"
)

// CFARVariant selects how a CFAR forms its noise estimate from the
// training cells. The zero value is cell averaging (or an ordered
// statistic when the plan's Rank is set).
type CFARVariant int

const (
	// CellAveraging: α times the mean of all training cells (or the
	// Rank-th smallest when Rank > 0).
	CellAveraging CFARVariant = iota
	// GreatestOf: α times the larger of the means of the leading and the
	// lagging training cells (GO-CFAR). It holds Pfa at a clutter edge,
	// where one half sits in clutter, at the cost of some detection loss
	// in uniform noise.
	GreatestOf
	// SmallestOf: α times the smaller of the two means (SO-CFAR). It
	// resolves a weaker target next to a stronger one when only one half
	// holds the interferer, and loses Pfa control at clutter edges.
	SmallestOf
	// Censored: α times the mean of the training cells left after the
	// Censor largest are dropped (censored mean-level detector): up to
	// Censor interfering targets in the training window do not raise the
	// threshold.
	Censored
)

// GOSOPfa returns the false-alarm probabilities of the greatest-of and
// smallest-of CFAR for a square-law detector in exponential noise, with
// threshold α·max(A, B) or α·min(A, B), where A and B are the MEANS of
// n1 and n2 independent training cells (the two halves) and the cell
// under test is independent of both. With T = α/n on the half-SUM and
// n1 = n2 = n it is Hansen & Sawyers (IEEE TAES 16(6), 1980) and Weiss
// (IEEE TAES 18(1), 1982):
//
//	Pfa_SO = 2·Σ_{k=0}^{n−1} C(n−1+k, k)·(2+T)^−(n+k)
//	Pfa_GO = 2·(1+T)^−n − Pfa_SO.
//
// For unequal halves (edges of the window, blanked gates) the same
// integration over the gamma densities of A and B gives
//
//	Pfa_SO = Σ_{k=0}^{n2−1} C(n1−1+k, k)·n1^n1·n2^k/(α+n1+n2)^(n1+k)
//	       + (the same with n1 and n2 exchanged),
//	Pfa_GO = (1+α/n1)^−n1 + (1+α/n2)^−n2 − Pfa_SO.
//
// When one half is empty both reduce to cell averaging over the other,
// (1+α/n)^−n. It panics if n1 + n2 < 1 or either is negative.
func GOSOPfa(alpha float64, n1, n2 int) (greatest, smallest float64) {
	if n1 < 0 || n2 < 0 || n1+n2 < 1 {
		panic("dsp: greatest/smallest-of CFAR needs training cells")
	}
	ca := func(n int) float64 { return math.Exp(-float64(n) * math.Log1p(alpha/float64(n))) }
	if n1 == 0 || n2 == 0 {
		p := ca(n1 + n2)
		return p, p
	}
	half := func(a, b int) float64 {
		fa, fb := float64(a), float64(b)
		den := math.Log(alpha + fa + fb)
		s := 0.0
		// log of C(a−1+k, k)·a^a·b^k/(α+a+b)^(a+k), k = 0 … b−1.
		lc := 0.0 // log C(a−1+k, k)
		for k := 0; k < b; k++ {
			if k > 0 {
				lc += math.Log(float64(a-1+k)) - math.Log(float64(k))
			}
			s += math.Exp(lc + fa*math.Log(fa) + float64(k)*math.Log(fb) - (fa+float64(k))*den)
		}
		return s
	}
	smallest = half(n1, n2) + half(n2, n1)
	greatest = math.Max(ca(n1)+ca(n2)-smallest, 0)
	return greatest, smallest
}

// CensoredPfa returns the false-alarm probability of the censored
// mean-level CFAR: threshold α·(1/(n−c))·Σ of the n−c smallest of n
// independent exponential training cells (the c largest dropped), for a
// square-law detector and an independent cell under test. Writing the
// order statistics by their normalised spacings (Rényi: X_(i) =
// Σ_{j≤i} E_j/(n−j+1), E_j independent unit exponentials), the kept sum
// is Σ_{j=1}^{n−c} E_j·(n−c−j+1)/(n−j+1), so
//
//	Pfa = Π_{j=1}^{n−c} 1/(1 + (α/(n−c))·(n−c−j+1)/(n−j+1))
//
// (the censored mean-level detector of Rickard & Dillard, IEEE TAES 13(4),
// 1977, analysed in Weiss 1982). With c = 0 it is Richards' eq. 6.135.
// It panics unless 0 ≤ c < n.
func CensoredPfa(alpha float64, n, c int) float64 {
	if c < 0 || c >= n {
		panic("dsp: censored CFAR must keep at least one of its cells")
	}
	m := n - c
	beta := alpha / float64(m)
	s := 0.0
	for j := 1; j <= m; j++ {
		s += math.Log1p(beta * float64(m-j+1) / float64(n-j+1))
	}
	return math.Exp(-s)
}

// GOMultiplier returns α on the larger half-MEAN for which the
// greatest-of CFAR with n1 and n2 cells has false-alarm probability pfa
// (GOSOPfa), by bisection on log α to 1e-12. SOMultiplier is the
// same for the smallest-of CFAR, CensoredMultiplier for CensoredPfa.
func GOMultiplier(pfa float64, n1, n2 int) float64 {
	checkPFA(pfa, n1+n2)
	return solvePfa(pfa, func(a float64) float64 { g, _ := GOSOPfa(a, n1, n2); return g })
}

// SOMultiplier: see GOMultiplier.
func SOMultiplier(pfa float64, n1, n2 int) float64 {
	checkPFA(pfa, n1+n2)
	return solvePfa(pfa, func(a float64) float64 { _, s := GOSOPfa(a, n1, n2); return s })
}

// CensoredMultiplier: see GOMultiplier.
func CensoredMultiplier(pfa float64, n, c int) float64 {
	checkPFA(pfa, n)
	return solvePfa(pfa, func(a float64) float64 { return CensoredPfa(a, n, c) })
}

// solvePfa finds α > 0 with f(α) = pfa for a decreasing f, by bisection
// on log α to a relative precision of 1e-12.
func solvePfa(pfa float64, f func(float64) float64) float64 {
	lo, hi := 1e-12, 1.0
	for f(hi) > pfa && hi < 1e300 {
		hi *= 2
	}
	for range 300 {
		mid := math.Sqrt(lo * hi)
		if f(mid) > pfa {
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

// censorFor scales the configured censoring to n available cells out of
// train: round(censor·n/train), at most n−1.
func censorFor(censor, n, train int) int {
	if train <= 0 {
		return 0
	}
	k := int(math.Round(float64(censor) * float64(n) / float64(train)))
	return min(max(k, 0), n-1)
}

// variantCache holds the multipliers a variant CFAR has solved, by the
// cell counts that determine them.
type variantCache map[[2]int]float64

// level returns the threshold of variant v from the training values vals,
// lead[i] telling whether vals[i] is in the leading half (before the cell
// under test). censor is the configured censoring over train cells. It
// reorders vals and returns +Inf when vals is empty.
func (vc *variantCache) level(v CFARVariant, pfa float64, censor, train int, vals []float64, lead []bool) float64 {
	if len(vals) == 0 {
		return math.Inf(1)
	}
	if *vc == nil {
		*vc = make(variantCache)
	}
	switch v {
	case GreatestOf, SmallestOf:
		var s1, s2 float64
		n1, n2 := 0, 0
		for i, x := range vals {
			if lead[i] {
				s1, n1 = s1+x, n1+1
			} else {
				s2, n2 = s2+x, n2+1
			}
		}
		key := [2]int{n1, n2}
		if v == SmallestOf {
			key[0] = -1 - n1
		}
		a, ok := (*vc)[key]
		if !ok {
			if v == GreatestOf {
				a = GOMultiplier(pfa, n1, n2)
			} else {
				a = SOMultiplier(pfa, n1, n2)
			}
			(*vc)[key] = a
		}
		switch {
		case n1 == 0:
			return a * s2 / float64(n2)
		case n2 == 0:
			return a * s1 / float64(n1)
		case v == GreatestOf:
			return a * math.Max(s1/float64(n1), s2/float64(n2))
		default:
			return a * math.Min(s1/float64(n1), s2/float64(n2))
		}
	case Censored:
		n := len(vals)
		c := censorFor(censor, n, train)
		key := [2]int{n, c}
		a, ok := (*vc)[key]
		if !ok {
			a = CensoredMultiplier(pfa, n, c)
			(*vc)[key] = a
		}
		slices.Sort(vals)
		s := 0.0
		for _, x := range vals[:n-c] {
			s += x
		}
		return a * s / float64(n-c)
	}
	panic("dsp: unknown CFAR variant")
}
