package dsp

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// MaxMinimaxTaps is the longest filter MinimaxFilter designs: each of its
// iterations solves a dense system of that size.
const MaxMinimaxTaps = 128

// minimaxIterations bounds Lawson's iteration; it stops earlier when the
// peak sidelobe is within minimaxGapDB of the lower bound on the optimum.
// Weights never fall below minimaxFloor of the largest, and the normal
// matrix carries a ridge of minimaxRidge, so no system is singular.
const (
	minimaxIterations = 3000
	minimaxGapDB      = 0.01
	minimaxFloor      = 1e-12
	minimaxRidge      = 1e-13
	// minimaxWork bounds the iteration's work, (2L)³/3 per Cholesky
	// factorisation: about a second for the longest filters.
	minimaxWork = 3e9
)

// MinimaxFilter returns the mismatched filter h of the given length that
// minimises the peak sidelobe of its response to the sampled code, the
// response fixed to 1 at the centre lag and free over the main lobe
// (lags within half of the centre). With y = A·conj(h) as in
// LeastSquaresFilter, it solves min max_{r ∉ main lobe} |y_r| subject to
// y_centre = 1 by Lawson's iteratively reweighted least squares (Lawson
// 1961; as used for sidelobe-suppression filters, from memory): each step
// minimises Σ w_r·|y_r|² under the constraint in closed form,
// g = M⁻¹a_cᴴ / (a_c·M⁻¹·a_cᴴ), M = Σ w_r·a_rᴴa_r, and then sets
// w_r ← w_r·|y_r| (normalised to Σw = 1), which drives the weighted
// solution toward the minimax one. The first step, with equal weights, is
// the least-squares filter. With Σw = 1, √(Σ w_r·|y_r|²) of each weighted
// optimum is a lower bound on the minimax peak sidelobe, and the iteration
// stops when the best peak sidelobe found is within 0.01 dB of it (or
// after a work budget of about a second at 128 taps). Weights never fall
// below 1e-12 of the largest (a sidelobe at zero may become the peak
// later), and the normal matrix carries a ridge of 1e-13, so no system is
// singular. Checked against scipy.optimize.linprog (Barker 3 at 6 taps:
// −19.55 dB). The iteration is deterministic.
//
// lead has the meaning of LeastSquaresFilter's. It returns an error if the
// code is empty, has no energy or is not finite, if length is outside
// [len(code), MaxMinimaxTaps], or if half is outside [0, len(code)−1].
func MinimaxFilter(code []complex128, length, half int) (h []complex128, lead int, err error) {
	n := len(code)
	if n == 0 {
		return nil, 0, errors.New("minimax filter: empty code")
	}
	for i, v := range code {
		if cmplx.IsNaN(v) || cmplx.IsInf(v) {
			return nil, 0, fmt.Errorf("minimax filter: code sample %d is %v, want finite", i, v)
		}
	}
	if length < n || length > MaxMinimaxTaps {
		return nil, 0, fmt.Errorf("minimax filter: length %d out of range [%d, %d]", length, n, MaxMinimaxTaps)
	}
	if half < 0 || half >= n {
		return nil, 0, fmt.Errorf("minimax filter: main-lobe half-width %d out of range [0, %d]", half, n-1)
	}
	rows := n + length - 1
	c := (n + length - 2) / 2
	lead = length - 1 - c
	// a(r, i) = A[r][i] = code[r − (length−1) + i].
	a := func(r, i int) complex128 {
		if k := r - (length - 1) + i; k >= 0 && k < n {
			return code[k]
		}
		return 0
	}
	side := make([]bool, rows) // sidelobe rows: outside the main lobe
	w := make([]float64, rows)
	nSide := 0
	for r := range w {
		if r < c-half || r > c+half {
			side[r] = true
			nSide++
		}
	}
	for r := range w {
		if side[r] {
			w[r] = 1 / float64(nSide) // Σw = 1 throughout
		}
	}
	// Real form of the Hermitian system M·x = a_cᴴ: [Re M, −Im M; Im M, Re M].
	big := mat.NewSymDense(2*length, nil)
	rhs := mat.NewVecDense(2*length, nil)
	for i := range length {
		v := cmplx.Conj(a(c, i))
		rhs.SetVec(i, real(v))
		rhs.SetVec(length+i, imag(v))
	}
	var (
		g    = make([]complex128, length)
		best = make([]complex128, length)
		psl  = math.Inf(1)
		chol mat.Cholesky
		x    mat.VecDense
	)
	iters := min(minimaxIterations, max(100, int(minimaxWork/(8*math.Pow(float64(length), 3)/3))))
	for range iters {
		for i := range length {
			for j := i; j < length; j++ {
				var s complex128
				// Rows r where both columns i and j touch the code.
				lo := max(length-1-i, length-1-j)
				hi := min(n+length-2-i, n+length-2-j)
				for r := lo; r <= hi; r++ {
					if side[r] {
						s += complex(w[r], 0) * cmplx.Conj(a(r, i)) * a(r, j)
					}
				}
				if i == j {
					s += minimaxRidge // keeps M positive definite as weights vanish
				}
				big.SetSym(i, j, real(s))
				big.SetSym(length+i, length+j, real(s))
				big.SetSym(i, length+j, -imag(s))
				big.SetSym(j, length+i, imag(s))
			}
		}
		if !chol.Factorize(big) {
			break // cannot happen with the ridge; keep the best filter so far
		}
		if err := chol.SolveVecTo(&x, rhs); err != nil {
			break
		}
		var peak complex128
		for i := range length {
			g[i] = complex(x.AtVec(i), x.AtVec(length+i))
			peak += a(c, i) * g[i]
		}
		if peak == 0 || cmplx.IsNaN(peak) {
			break
		}
		for i := range g {
			g[i] /= peak // y_c = 1
		}
		// Sidelobes, the lower bound and the new weights. With Σw = 1,
		// √(Σ w·|y|²) of the weighted optimum bounds the minimax peak
		// sidelobe from below (Lawson 1961), so the gap to the peak
		// sidelobe measures how far from the optimum the iterate is.
		top, sum, wls := 0.0, 0.0, 0.0
		for r := range rows {
			if !side[r] {
				continue
			}
			var y complex128
			for i := range length {
				y += a(r, i) * g[i]
			}
			m := cmplx.Abs(y)
			top = math.Max(top, m)
			wls += w[r] * m * m
			w[r] *= m
			sum += w[r]
		}
		if top < psl {
			psl = top
			copy(best, g)
		}
		if sum == 0 || 20*math.Log10(psl/math.Sqrt(wls)) < minimaxGapDB {
			break
		}
		wmax, total := 0.0, 0.0
		for r := range w {
			if side[r] {
				wmax = math.Max(wmax, w[r])
			}
		}
		for r := range w { // a row at zero now may be the peak later
			if side[r] {
				w[r] = math.Max(w[r], minimaxFloor*wmax)
				total += w[r]
			}
		}
		for r := range w {
			w[r] /= total
		}
	}
	if math.IsInf(psl, 1) {
		return nil, 0, errors.New("minimax filter: no solution (the code has no energy)")
	}
	h = make([]complex128, length)
	for i, v := range best {
		h[i] = cmplx.Conj(v)
	}
	return h, lead, nil
}
