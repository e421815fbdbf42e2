package dsp

import "math"

// ChipIndex returns the chip (or hop) of sample n of an echo delayed by
// delay s at rate fs Hz, for chips of length chip s:
//
//	k = ⌊(n/fs − delay)/chip⌋,
//
// where a quotient within rounding of a whole number r (a few ulps of the
// terms it is formed from, about 1e-14 relative) is taken as r. The
// values a user types (1.3e-6 s chips at 2/1.3e-6 Hz) are not exact in
// binary, so the computed t/chip of a sample on a chip boundary lands a
// few ulps either side of the whole number; truncating it would give the
// previous chip to about a third of such samples. Snapping decides them
// as the decimal values mean, and no rational t/chip of such inputs lies
// that close to a whole number without being one. n may be any finite
// value (use n = t, fs = 1, delay = 0 for a time t in s). fs and chip
// must be positive and finite. It does not allocate.
func ChipIndex(n, fs, delay, chip float64) int {
	a := n / fs
	q := (a - delay) / chip
	r := math.Round(q)
	const eps = 0x1p-52
	tol := 16 * eps * ((math.Abs(a)+math.Abs(delay))/chip + math.Abs(q) + 1)
	if math.Abs(q-r) <= tol {
		return int(r)
	}
	return int(math.Floor(q))
}
