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
// peak sidelobe changes by less than minimaxTolDB between iterations.
const (
	minimaxIterations = 400
	minimaxTolDB      = 1e-5
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
// w_r ← w_r·|y_r| (normalised), which drives the weighted solution toward
// the minimax one. The first step, with equal weights, is the
// least-squares filter. The iteration is deterministic.
//
// lead has the meaning of LeastSquaresFilter's. It returns an error if the
// code is empty or not finite, if length is outside [len(code),
// MaxMinimaxTaps], if half is outside [0, len(code)−1], or if a system is
// singular.
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
	w := make([]float64, rows)
	for r := range w {
		if r < c-half || r > c+half {
			w[r] = 1
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
		prev = math.Inf(1)
		chol mat.Cholesky
		x    mat.VecDense
	)
	for range minimaxIterations {
		for i := range length {
			for j := i; j < length; j++ {
				var s complex128
				// Rows r where both columns i and j touch the code.
				lo := max(length-1-i, length-1-j)
				hi := min(n+length-2-i, n+length-2-j)
				for r := lo; r <= hi; r++ {
					if w[r] != 0 {
						s += complex(w[r], 0) * cmplx.Conj(a(r, i)) * a(r, j)
					}
				}
				big.SetSym(i, j, real(s))
				big.SetSym(length+i, length+j, real(s))
				big.SetSym(i, length+j, -imag(s))
				big.SetSym(j, length+i, imag(s))
			}
		}
		if !chol.Factorize(big) {
			return nil, 0, errors.New("minimax filter: weighted system is singular")
		}
		if err := chol.SolveVecTo(&x, rhs); err != nil {
			return nil, 0, fmt.Errorf("minimax filter: %w", err)
		}
		var peak complex128
		for i := range length {
			g[i] = complex(x.AtVec(i), x.AtVec(length+i))
			peak += a(c, i) * g[i]
		}
		for i := range g {
			g[i] /= peak // y_c = 1
		}
		// Sidelobes and the new weights.
		top, sum := 0.0, 0.0
		for r := range rows {
			if w[r] == 0 {
				continue
			}
			var y complex128
			for i := range length {
				y += a(r, i) * g[i]
			}
			m := cmplx.Abs(y)
			top = math.Max(top, m)
			w[r] *= m
			sum += w[r]
		}
		if top < psl {
			psl = top
			copy(best, g)
		}
		if sum == 0 || math.Abs(20*math.Log10(top/prev)) < minimaxTolDB {
			break
		}
		prev = top
		for r := range w {
			if w[r] != 0 {
				w[r] = math.Max(w[r]/sum, 1e-300)
			}
		}
	}
	h = make([]complex128, length)
	for i, v := range best {
		h[i] = cmplx.Conj(v)
	}
	return h, lead, nil
}
