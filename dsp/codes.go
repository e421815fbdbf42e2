package dsp

import (
	"fmt"
	"math"
	"math/cmplx"
)

// Phase codes are returned as []float64 of phases in radians, one per
// chip, for use in PhaseCoded. Binary codes use phase 0 for +1 and π for
// −1.

// BinaryPhases converts a ±1 code written as a string of '+' and '-'
// (the Unicode minus '−' is also accepted; spaces are ignored) to phases:
// '+' → 0, '-' → π rad.
func BinaryPhases(code string) ([]float64, error) {
	ph := make([]float64, 0, len(code))
	for i, r := range code {
		switch r {
		case '+':
			ph = append(ph, 0)
		case '-', '−':
			ph = append(ph, math.Pi)
		case ' ':
		default:
			return nil, fmt.Errorf("dsp: binary code %q: character %q at byte %d: valid characters are '+' and '-'", code, r, i)
		}
	}
	if len(ph) == 0 {
		return nil, fmt.Errorf("dsp: binary code %q: empty, need at least 1 chip", code)
	}
	return ph, nil
}

// HexPhases converts an n-chip binary code written in hexadecimal to
// phases. Convention: the first chip is the most significant bit of the
// n-bit number (so the hex string has ⌈n/4⌉ digits and the unused top
// bits of the first digit are zero); bit 1 → +1 (phase 0), bit 0 → −1
// (phase π). Barker-13 is "1F35".
func HexPhases(hex string, n int) ([]float64, error) {
	if n < 1 {
		return nil, fmt.Errorf("dsp: hex code length %d: must be ≥ 1", n)
	}
	digits := (n + 3) / 4
	if len(hex) != digits {
		return nil, fmt.Errorf("dsp: hex code %q: %d digits for length %d, want %d", hex, len(hex), n, digits)
	}
	ph := make([]float64, 0, n)
	for i := range len(hex) {
		var v byte
		switch c := hex[i]; {
		case c >= '0' && c <= '9':
			v = c - '0'
		case c >= 'a' && c <= 'f':
			v = c - 'a' + 10
		case c >= 'A' && c <= 'F':
			v = c - 'A' + 10
		default:
			return nil, fmt.Errorf("dsp: hex code %q: character %q is not a hex digit", hex, c)
		}
		for b := 3; b >= 0; b-- {
			bitPos := (digits-1-i)*4 + b // position in the n-bit number
			if bitPos >= n {
				if v>>b&1 != 0 {
					return nil, fmt.Errorf("dsp: hex code %q: more than %d bits", hex, n)
				}
				continue
			}
			if v>>b&1 == 1 {
				ph = append(ph, 0)
			} else {
				ph = append(ph, math.Pi)
			}
		}
	}
	return ph, nil
}

// barkerCodes lists one Barker code per length (R-p304; the ± strings of
// the Barker sequences table). Lengths 2 and 4 have a second inequivalent
// code, "++" and "+++-", not returned here.
func barkerCode(n int) string {
	switch n {
	case 2:
		return "+-"
	case 3:
		return "++-"
	case 4:
		return "++-+"
	case 5:
		return "+++-+"
	case 7:
		return "+++--+-"
	case 11:
		return "+++---+--+-"
	case 13:
		return "+++++--++-+-+"
	}
	return ""
}

// Barker returns the Barker code of length n ∈ {2, 3, 4, 5, 7, 11, 13}
// as phases (0 or π). Its aperiodic autocorrelation has peak N and every
// sidelobe of magnitude 0 or 1, so PSLR = 20·log10(1/N) dB. No Barker
// code is known for other lengths.
func Barker(n int) ([]float64, error) {
	c := barkerCode(n)
	if c == "" {
		return nil, fmt.Errorf("dsp: barker length %d: valid lengths are 2, 3, 4, 5, 7, 11, 13", n)
	}
	return BinaryPhases(c)
}

// MPS returns a minimum-peak-sidelobe binary code of length n as phases
// (0 or π): a code whose aperiodic autocorrelation peak sidelobe
// max_{k≥1}|r_k| equals the published optimum for n (R-p309, citing Keel
// 2010 and Coxson & Russo 2005), as found by the search program in
// dsp/internal/mpssearch. For the Barker lengths this is a Barker code.
// Valid lengths are 2 … MPSMaxLen().
func MPS(n int) ([]float64, error) {
	hex, _, ok := mpsCode(n)
	if !ok {
		return nil, fmt.Errorf("dsp: mps length %d: valid lengths are 2…%d", n, mpsMaxLen)
	}
	return HexPhases(hex, n)
}

// MPSMaxLen returns the longest length for which MPS has a code.
func MPSMaxLen() int { return mpsMaxLen }

// CodeACF writes the one-sided aperiodic autocorrelation of the
// unit-modulus code c_i = exp(j·phases[i]) into dst:
//
//	dst[k] = r_k = Σ_{i=0}^{N−1−k} c_{i+k}·conj(c_i),  k = 0 … N−1,
//
// so dst[0] = N; the negative lags are r_{−k} = conj(r_k). A nil dst
// allocates; a dst of another length than N panics. Cost O(N²).
func CodeACF(dst []complex128, phases []float64) []complex128 {
	n := len(phases)
	if dst == nil {
		dst = make([]complex128, n)
	}
	if len(dst) != n {
		panic("dsp: CodeACF: destination length mismatch")
	}
	c := make([]complex128, n)
	for i, p := range phases {
		c[i] = phasor(p)
	}
	for k := range n {
		var s complex128
		for i := 0; i+k < n; i++ {
			s += c[i+k] * cmplx.Conj(c[i])
		}
		dst[k] = s
	}
	return dst
}

// CodePSL returns the peak sidelobe max_{k≠0}|r_k| of the aperiodic
// autocorrelation of the code (see CodeACF), in units of one chip
// product, so that the mainlobe is N and PSLR = 20·log10(PSL/N) dB.
// It returns 0 for N ≤ 1.
func CodePSL(phases []float64) float64 {
	r := CodeACF(nil, phases)
	var p float64
	for _, v := range r[min(1, len(r)):] {
		p = max(p, cmplx.Abs(v))
	}
	return p
}

// CodeISL returns the two-sided integrated sidelobe level
// Σ_{k≠0}|r_k|² = 2·Σ_{k≥1}|r_k|², so ISLR = 10·log10(ISL/N²) dB.
func CodeISL(phases []float64) float64 {
	r := CodeACF(nil, phases)
	var s float64
	for _, v := range r[min(1, len(r)):] {
		s += real(v)*real(v) + imag(v)*imag(v)
	}
	return 2 * s
}

// CodePSLRDB returns 20·log10(CodePSL/N) dB (−Inf for N = 1, NaN for an
// empty code).
func CodePSLRDB(phases []float64) float64 {
	return 20 * math.Log10(CodePSL(phases)/float64(len(phases)))
}
