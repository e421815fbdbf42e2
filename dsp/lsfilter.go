package dsp

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// MaxLSFilterTaps is the largest filter length LeastSquaresFilter accepts.
// Long filters are solved as a Hermitian Toeplitz system in O(L²) time and
// O(L) memory (8192 taps: about 10⁸ operations, 0.5 MB).
const MaxLSFilterTaps = 8192

// denseMaxTaps is the filter length up to which the normal equations are
// solved by a dense Cholesky factorisation (gonum/mat) rather than by the
// Levinson recursion.
const denseMaxTaps = 128

// LeastSquaresFilter returns the mismatched (sidelobe-suppression) filter
// h of the given length for the sampled code, with the package's
// correlation convention y[k] = Σ_i x[k+i]·conj(h[i]). It minimises the
// integrated response error ‖A·g − e‖², g = conj(h), where A is the full
// (len(code)+length−1) × length convolution matrix of the code (all lags
// at which the filter overlaps the code) and e is a unit delta at the
// centre row; the peak is therefore near 1 and the sidelobes are the
// least-energy ones attainable with that length.
//
// lead is the number of samples the filter extends before the code's
// first sample: an echo whose leading edge is at sample d peaks at
// y[d−lead]. For length = len(code)+2·lead the filter is centred on the
// code.
//
// It returns an error if the code is empty, has a non-finite sample or no
// energy, or if length is outside [len(code), MaxLSFilterTaps]. The normal
// equations, whose matrix is the code's autocorrelation (Hermitian
// Toeplitz), are solved by Cholesky (gonum/mat) up to 128 taps and by the
// Levinson recursion beyond.
func LeastSquaresFilter(code []complex128, length int) (h []complex128, lead int, err error) {
	return LeastSquaresFilterMainlobe(code, length, 0)
}

// LeastSquaresFilterMainlobe is LeastSquaresFilter for a code sampled at
// more than one sample per chip: the desired response keeps the matched
// filter's main lobe over lags −half … half (the code's autocorrelation
// there, scaled to a unit peak) and is zero elsewhere, instead of a unit
// delta that an oversampled code cannot reach without a large mismatch
// loss. half = 0 is LeastSquaresFilter; use half = ⌈samples per chip⌉ − 1.
func LeastSquaresFilterMainlobe(code []complex128, length, half int) (h []complex128, lead int, err error) {
	n := len(code)
	if n == 0 {
		return nil, 0, errors.New("least-squares filter: empty code")
	}
	var energy float64
	for i, v := range code {
		if cmplx.IsNaN(v) || cmplx.IsInf(v) {
			return nil, 0, fmt.Errorf("least-squares filter: code sample %d is %v, want finite", i, v)
		}
		energy += real(v)*real(v) + imag(v)*imag(v)
	}
	if energy == 0 {
		return nil, 0, errors.New("least-squares filter: code has zero energy")
	}
	if length < n || length > MaxLSFilterTaps {
		return nil, 0, fmt.Errorf("least-squares filter: length %d out of range [%d, %d]", length, n, MaxLSFilterTaps)
	}
	if half < 0 || half >= n {
		return nil, 0, fmt.Errorf("least-squares filter: main-lobe half-width %d out of range [0, %d]", half, n-1)
	}
	lead = length - 1 - (n+length-2)/2 // the centre row is (n+length−2)/2
	var g []complex128
	if length <= denseMaxTaps {
		g, err = lsDense(code, length, lead, half)
	} else {
		g, err = lsLevinson(code, length, lead, half)
	}
	if err != nil {
		return nil, 0, err
	}
	for i, v := range g {
		g[i] = cmplx.Conj(v)
	}
	return g, lead, nil
}

// lsDense solves the normal equations (AᴴA)·g = Aᴴe with a Cholesky
// factorisation (gonum/mat) of their real form
// [Re T, −Im T; Im T, Re T]·[Re g; Im g] = [Re b; Im b], T = AᴴA
// (Hermitian Toeplitz, see lsLevinson), b = Aᴴe. (gonum's QR of the
// stacked A lost accuracy here at a few dozen taps, so the small dense
// path uses the normal equations, which are well conditioned for codes
// with a flat spectrum.)
func lsDense(code []complex128, l, lead, half int) ([]complex128, error) {
	rho, b := normalEquations(code, l, lead, half)
	t := mat.NewSymDense(2*l, nil)
	for i := range l {
		for j := i; j < l; j++ {
			v := rho[j-i] // T[i][j]
			t.SetSym(i, j, real(v))
			t.SetSym(l+i, l+j, real(v))
			t.SetSym(i, l+j, -imag(v))
			t.SetSym(j, l+i, imag(v)) // T[j][i] = conj(v): −Im block entry (j, l+i) = +Im v
		}
	}
	rhs := mat.NewVecDense(2*l, nil)
	for m, v := range b {
		rhs.SetVec(m, real(v))
		rhs.SetVec(l+m, imag(v))
	}
	var ch mat.Cholesky
	if !ch.Factorize(t) {
		return nil, errors.New("least-squares filter: normal equations not positive definite")
	}
	var x mat.VecDense
	if err := ch.SolveVecTo(&x, rhs); err != nil {
		return nil, fmt.Errorf("least-squares filter: %w", err)
	}
	g := make([]complex128, l)
	for m := range g {
		g[m] = complex(x.AtVec(m), x.AtVec(l+m))
	}
	return g, nil
}

// normalEquations returns the first row ρ of T = AᴴA, T[i][j] = ρ(j−i),
// ρ(d) = Σ_s code[s+d]·conj(code[s]), and b = Aᴴd for the desired
// response d: d_j = ρ(j)/ρ(0) at the rows c+j around the centre row c for
// |j| ≤ half, zero elsewhere. Row c+j of A holds code[i−lead+j] in column
// i, so b[m] = Σ_j d_j·conj(code[m−lead+j]); half = 0 gives
// b[m] = conj(code[m−lead]).
func normalEquations(code []complex128, l, lead, half int) (rho, b []complex128) {
	n := len(code)
	rho = make([]complex128, l) // zero beyond n−1
	for d := 0; d < min(n, l); d++ {
		var s complex128
		for i := 0; i+d < n; i++ {
			s += code[i+d] * cmplx.Conj(code[i])
		}
		rho[d] = s
	}
	acf := func(j int) complex128 { // ρ(j) for any j, |j| < n
		if j >= 0 {
			var s complex128
			for i := 0; i+j < n; i++ {
				s += code[i+j] * cmplx.Conj(code[i])
			}
			return s
		}
		var s complex128
		for i := 0; i-j < n; i++ {
			s += code[i] * cmplx.Conj(code[i-j])
		}
		return s
	}
	r0 := acf(0)
	b = make([]complex128, l)
	for j := -half; j <= half; j++ {
		d := acf(j) / r0
		for m := range b {
			if i := m - lead + j; i >= 0 && i < n {
				b[m] += d * cmplx.Conj(code[i])
			}
		}
	}
	return rho, b
}

// lsLevinson solves the normal equations (AᴴA)·g = Aᴴe. AᴴA is Hermitian
// Toeplitz, T[i][j] = ρ(j−i), ρ(d) = Σ_s code[s+d]·conj(code[s]); the
// right side is b[m] = conj(code[m−lead]).
func lsLevinson(code []complex128, l, lead, half int) ([]complex128, error) {
	rho, b := normalEquations(code, l, lead, half)
	// a(k) = T[i][j] for i−j = k: a(k) = conj(ρ(k)), a(−k) = ρ(k).
	g, err := levinson(rho, b)
	if err != nil {
		return nil, fmt.Errorf("least-squares filter: %w", err)
	}
	return g, nil
}

// levinson solves T·x = y for the Hermitian Toeplitz T with first row
// rho (T[i][j] = rho[j−i] for j ≥ i, conj(rho[i−j]) otherwise) by the
// Levinson recursion with forward and backward vectors.
func levinson(rho, y []complex128) ([]complex128, error) {
	n := len(rho)
	below := func(k int) complex128 { return cmplx.Conj(rho[k]) } // a(k), k > 0
	above := func(k int) complex128 { return rho[k] }             // a(−k), k > 0
	if rho[0] == 0 {
		return nil, errors.New("singular Toeplitz system")
	}
	f := make([]complex128, n)
	bk := make([]complex128, n)
	x := make([]complex128, n)
	nf := make([]complex128, n)
	f[0], bk[0] = 1/rho[0], 1/rho[0]
	x[0] = y[0] / rho[0]
	for k := 1; k < n; k++ {
		var ef, eb, ex complex128
		for i := 0; i < k; i++ {
			ef += below(k-i) * f[i]
			eb += above(i+1) * bk[i]
			ex += below(k-i) * x[i]
		}
		den := 1 - ef*eb
		if cmplx.Abs(den) < 1e-14 || cmplx.IsNaN(den) {
			return nil, errors.New("ill-conditioned Toeplitz system")
		}
		inv := 1 / den
		// f' = ([f;0] − ef·[0;b])/den, b' = ([0;b] − eb·[f;0])/den.
		for i := 0; i <= k; i++ {
			var fi, bPrev complex128
			if i < k {
				fi = f[i]
			}
			if i > 0 {
				bPrev = bk[i-1]
			}
			nf[i] = (fi - ef*bPrev) * inv
		}
		for i := k; i >= 0; i-- {
			var fi, bPrev complex128
			if i < k {
				fi = f[i]
			}
			if i > 0 {
				bPrev = bk[i-1]
			}
			bk[i] = (bPrev - eb*fi) * inv
		}
		copy(f[:k+1], nf[:k+1])
		c := y[k] - ex
		for i := 0; i <= k; i++ {
			x[i] += c * bk[i]
		}
	}
	for _, v := range x {
		if math.IsNaN(real(v)) || math.IsNaN(imag(v)) {
			return nil, errors.New("ill-conditioned Toeplitz system")
		}
	}
	return x, nil
}
