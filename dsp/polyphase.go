package dsp

import (
	"fmt"
	"math"
)

// Polyphase codes. Formulas as in Levanon & Mozeson, Radar Signals (Wiley
// 2004) ch. 6, Frank (IEEE Trans. IT-9, 1963), Lewis & Kretschmer (IEEE
// Trans. AES-17(3) 1981 for P3/P4, AES-18(5) 1982 for P1/P2) and Chu
// (IEEE Trans. IT-18, 1972). Phases are in radians, not reduced modulo 2π.

// perfectSquareRoot returns M with M² = n, or an error naming op.
func perfectSquareRoot(op string, n int) (int, error) {
	if n < 4 {
		return 0, fmt.Errorf("dsp: %s length %d: must be a perfect square M² with M ≥ 2 (4, 9, 16, …)", op, n)
	}
	m := int(math.Round(math.Sqrt(float64(n))))
	if m*m != n {
		return 0, fmt.Errorf("dsp: %s length %d: must be a perfect square M² (nearest %d, %d)", op, n, (m-1)*(m-1), m*m)
	}
	return m, nil
}

// Frank returns the Frank code of length n = M² (M ≥ 2): chip p·M + q,
// for group p and chip q within it (both 0 … M−1), has phase
//
//	φ = 2π·p·q/M.
//
// PSLR = 20·log10(1/(N·sin(π/M))) dB for the aperiodic autocorrelation.
func Frank(n int) ([]float64, error) {
	m, err := perfectSquareRoot("frank", n)
	if err != nil {
		return nil, err
	}
	ph := make([]float64, n)
	for p := range m {
		for q := range m {
			ph[p*m+q] = 2 * math.Pi * float64(p*q) / float64(m)
		}
	}
	return ph, nil
}

// P1 returns the P1 code of length n = M² (M ≥ 2): chip (j−1)·M + (i−1)
// for group j and chip i within it (both 1 … M) has phase
//
//	φ = −(π/M)·[M − (2j − 1)]·[(j − 1)·M + (i − 1)].
//
// Its aperiodic PSL and ISL equal those of the Frank code.
func P1(n int) ([]float64, error) {
	m, err := perfectSquareRoot("p1", n)
	if err != nil {
		return nil, err
	}
	ph := make([]float64, n)
	fm := float64(m)
	for j := 1; j <= m; j++ {
		for i := 1; i <= m; i++ {
			ph[(j-1)*m+i-1] = -math.Pi / fm * float64(m-(2*j-1)) * float64((j-1)*m+i-1)
		}
	}
	return ph, nil
}

// P2 returns the P2 code of length n = M², M even: chip (j−1)·M + (i−1)
// (group j, chip i within it, both 1 … M) has phase
//
//	φ = [(π/2)·(M − 1)/M − (π/M)·(i − 1)]·(M + 1 − 2j),
//
// which is symmetric in i and j. An odd M gives poor sidelobes and is
// rejected.
func P2(n int) ([]float64, error) {
	m, err := perfectSquareRoot("p2", n)
	if err != nil {
		return nil, err
	}
	if m%2 != 0 {
		return nil, fmt.Errorf("dsp: p2 length %d = %d²: the root M must be even (4, 16, 36, 64, …)", n, m)
	}
	ph := make([]float64, n)
	fm := float64(m)
	for j := 1; j <= m; j++ {
		for i := 1; i <= m; i++ {
			ph[(j-1)*m+i-1] = (math.Pi/2*(fm-1)/fm - math.Pi/fm*float64(i-1)) * float64(m+1-2*j)
		}
	}
	return ph, nil
}

// P3 returns the P3 code of length n ≥ 2: chip i (1 … N) has phase
//
//	φ_i = π·(i − 1)²/N.
func P3(n int) ([]float64, error) {
	if n < 2 {
		return nil, fmt.Errorf("dsp: p3 length %d: must be ≥ 2", n)
	}
	ph := make([]float64, n)
	for i := range n {
		ph[i] = math.Pi * float64(i*i) / float64(n)
	}
	return ph, nil
}

// P4 returns the P4 code of length n ≥ 2: chip i (1 … N) has phase
//
//	φ_i = π·(i − 1)²/N − π·(i − 1).
//
// P4 = P3·(−1)^(i−1): the aperiodic |ACF| is that of P3.
func P4(n int) ([]float64, error) {
	if n < 2 {
		return nil, fmt.Errorf("dsp: p4 length %d: must be ≥ 2", n)
	}
	ph := make([]float64, n)
	for i := range n {
		ph[i] = math.Pi*float64(i*i)/float64(n) - math.Pi*float64(i)
	}
	return ph, nil
}

// ZadoffChu returns the Zadoff–Chu sequence of length n ≥ 2 and root u
// (1 ≤ u < n, gcd(u, n) = 1), shift q = 0: chip k (0 … N−1) has phase
//
//	φ_k = −π·u·k·(k + c_f)/N,  c_f = N mod 2.
//
// Its periodic autocorrelation is zero at every nonzero lag. For even N
// and u = 1 it is the conjugate of P3 (same aperiodic |ACF|).
func ZadoffChu(n, root int) ([]float64, error) {
	if n < 2 {
		return nil, fmt.Errorf("dsp: zadoff-chu length %d: must be ≥ 2", n)
	}
	if root < 1 || root >= n || gcd(root, n) != 1 {
		return nil, fmt.Errorf("dsp: zadoff-chu root %d for length %d: must satisfy 1 ≤ root < %d and gcd(root, %d) = 1", root, n, n, n)
	}
	cf := n % 2
	ph := make([]float64, n)
	for k := range n {
		// u·k·(k+cf) mod 2N keeps the phase exact for large k.
		v := (int64(root) * int64(k) % int64(2*n)) * int64(k+cf) % int64(2*n)
		ph[k] = -math.Pi * float64(v) / float64(n)
	}
	return ph, nil
}

func gcd(a, b int) int {
	for b != 0 {
		a, b = b, a%b
	}
	return a
}
