package dsp

import "math"

// ChipIndex returns the chip (or hop) of sample n of an echo delayed by
// delay s at rate fs Hz, for chips of length chip s:
//
//	k = ⌊(n/fs − delay)/chip⌋,
//
// the exact floor of the real number formed from the double values n, fs,
// delay and chip. The floating-point quotient decides when it is clearly
// away from a whole number; within rounding of a whole number r, the sign
// of n − fs·(delay + r·chip) decides, evaluated without rounding by
// error-free products and sums (Dekker; Shewchuk, "Adaptive precision
// floating-point arithmetic", Discrete Comput. Geom. 18, 1997). So a chip
// length such as 1.3e-6 s, where t/chip lands a few ulps below a whole
// number, never takes the previous chip. n may be any finite value (use
// n = t, fs = 1, delay = 0 for a time t in s). fs and chip must be
// positive and finite; the result is meaningful for |k| < 2⁵³.
// It does not allocate.
func ChipIndex(n, fs, delay, chip float64) int {
	a := n / fs
	q := (a - delay) / chip
	r := math.Round(q)
	// Rounding error of q: a few ulps of the terms it was formed from.
	const eps = 0x1p-52
	tol := 16 * eps * ((math.Abs(a)+math.Abs(delay))/chip + math.Abs(q) + 1)
	if math.Abs(q-r) > tol {
		return int(math.Floor(q))
	}
	if exactSignLine(n, fs, delay, r, chip) >= 0 {
		return int(r)
	}
	return int(r) - 1
}

// exactSignLine returns the sign of n − fs·delay − fs·r·chip computed
// exactly (no rounding) from the double inputs.
func exactSignLine(n, fs, delay, r, chip float64) int {
	p, pe := twoProduct(r, chip)   // r·chip = p + pe
	a, ae := twoProduct(fs, delay) // fs·delay
	b, be := twoProduct(fs, p)     // fs·p
	c, ce := twoProduct(fs, pe)    // fs·pe
	var buf [8]float64
	e := buf[:1]
	e[0] = n
	for _, x := range [...]float64{-a, -ae, -b, -be, -c, -ce} {
		e = growExpansion(e, x)
	}
	for i := len(e) - 1; i >= 0; i-- { // largest component last
		switch {
		case e[i] > 0:
			return 1
		case e[i] < 0:
			return -1
		}
	}
	return 0
}

// twoProduct returns x·y as the unevaluated sum p + e, exactly (barring
// underflow), with math.FMA.
func twoProduct(x, y float64) (p, e float64) {
	p = x * y
	return p, math.FMA(x, y, -p)
}

// twoSum returns a + b as the unevaluated sum s + e, exactly (Knuth).
func twoSum(a, b float64) (s, e float64) {
	s = a + b
	bb := s - a
	return s, (a - (s - bb)) + (b - bb)
}

// growExpansion adds b to the nonoverlapping expansion e (components in
// increasing magnitude) exactly (Shewchuk's Grow-Expansion) and returns
// the longer expansion, in e's backing array (cap must allow one more).
func growExpansion(e []float64, b float64) []float64 {
	q := b
	for i, v := range e {
		q, e[i] = twoSum(q, v)
	}
	return append(e, q)
}
