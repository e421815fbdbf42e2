package dsp

import (
	"math"

	"gonum.org/v1/gonum/mathext"
)

// ClopperPearson returns the exact (Clopper–Pearson) two-sided confidence
// interval [lo, hi] of a binomial probability after k successes in n
// independent trials, at confidence level conf (0 < conf < 1, e.g. 0.95):
//
//	lo = B⁻¹(α/2; k, n−k+1)      (0 when k = 0)
//	hi = B⁻¹(1−α/2; k+1, n−k)    (1 when k = n)
//
// with α = 1 − conf and B⁻¹ the inverse of the regularised incomplete
// beta function (C. J. Clopper and E. S. Pearson, "The use of confidence
// or fiducial limits illustrated in the case of the binomial",
// Biometrika 26(4):404–413, 1934). The interval covers the true
// probability with at least conf probability for every n and p, so it is
// conservative; it is the one scipy's binomtest(...).proportion_ci(
// method="exact") returns. It panics when n < 1, k < 0, k > n or conf is
// outside (0, 1): these are programmer errors.
func ClopperPearson(k, n int64, conf float64) (lo, hi float64) {
	if n < 1 || k < 0 || k > n || !(conf > 0 && conf < 1) {
		panic("dsp: ClopperPearson needs 0 ≤ k ≤ n, n ≥ 1 and 0 < conf < 1")
	}
	a := 1 - conf
	fk, fn := float64(k), float64(n)
	lo, hi = 0, 1
	if k > 0 {
		lo = mathext.InvRegIncBeta(fk, fn-fk+1, a/2)
	}
	if k < n {
		hi = mathext.InvRegIncBeta(fk+1, fn-fk, 1-a/2)
	}
	return math.Max(lo, 0), math.Min(hi, 1)
}
