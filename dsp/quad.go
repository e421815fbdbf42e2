package dsp

import "math"

// Simpson returns the composite Simpson's rule of f over [a, a + n·h]:
//
//	h/3 · (f(x₀) + 4f(x₁) + 2f(x₂) + 4f(x₃) + … + 4f(xₙ₋₁) + f(xₙ)),
//
// xᵢ = a + i·h: the extended Simpson's rule (Abramowitz & Stegun,
// Handbook of Mathematical Functions, 25.4.6; the equation number from
// memory), exact for cubic polynomials. The result is in the units of f
// times those of h. f is called n + 1 times, in order of increasing i,
// and each point is computed as a + float64(i)·h (not by accumulating h),
// so the abscissae do not drift. n must be even and at least 2 and h
// finite; otherwise Simpson returns NaN without calling f.
func Simpson(f func(x float64) float64, a, h float64, n int) float64 {
	if n < 2 || n%2 != 0 || math.IsNaN(h) || math.IsInf(h, 0) {
		return math.NaN()
	}
	sum := 0.0
	for i := 0; i <= n; i++ {
		w := 2.0
		switch {
		case i == 0 || i == n:
			w = 1
		case i%2 == 1:
			w = 4
		}
		sum += w * f(a+float64(i)*h)
	}
	return sum * h / 3
}
