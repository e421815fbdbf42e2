package dsp

import (
	"math"
	"testing"
)

func TestSimpson(t *testing.T) {
	// Exact for cubics (the rule's error term is h⁵·f⁗/90 per panel pair:
	// Abramowitz & Stegun 25.4.5–25.4.6, from memory): ∫₀² (x³ − x + 1) dx = 4.
	cubic := func(x float64) float64 { return x*x*x - x + 1 }
	if got := Simpson(cubic, 0, 1, 2); math.Abs(got-4) > 1e-15 {
		t.Errorf("cubic, 2 panels: got %.17g, want 4", got)
	}
	// ∫₀^π sin x dx = 2 (calculus); the composite rule's error bound
	// (b − a)·h⁴·max|f⁗|/180 is 1.7e-8 at 100 intervals, and the error is
	// about that size (π⁵/(180·100⁴) = 1.70e-8), not far below it.
	got := Simpson(math.Sin, 0, math.Pi/100, 100)
	if err := got - 2; err < 1e-9 || err > 1.8e-8 {
		t.Errorf("sin over [0, π], 100 intervals: got %.17g, error %.3g outside [1e-9, 1.8e-8]", got, err)
	}
	// The abscissae are a + i·h, each exactly, in increasing order.
	var xs []float64
	Simpson(func(x float64) float64 { xs = append(xs, x); return 0 }, 0.1, 0.3, 4)
	for i, x := range xs {
		if want := 0.1 + float64(i)*0.3; x != want || len(xs) != 5 {
			t.Fatalf("abscissae %v, want 0.1 + i·0.3 for i = 0…4", xs)
		}
	}
	for _, n := range []int{-2, 0, 1, 3} {
		called := false
		if v := Simpson(func(float64) float64 { called = true; return 1 }, 0, 1, n); !math.IsNaN(v) || called {
			t.Errorf("n = %d: got %g (f called: %v), want NaN without a call", n, v, called)
		}
	}
	if v := Simpson(cubic, 0, math.Inf(1), 2); !math.IsNaN(v) {
		t.Errorf("h = +Inf: got %g, want NaN", v)
	}
}

// TestGK15Exact checks the Gauss–Kronrod constants by the rules' defining
// property: the 15-point Kronrod rule integrates polynomials of degree up
// to 22 exactly and its embedded 7-point Gauss rule those up to 13
// (∫_{−1}^{1} x^{2k} dx = 2/(2k+1), calculus); one degree more is not exact.
func TestGK15Exact(t *testing.T) {
	xs, wk, wg := gk15Rule()
	kron := func(deg int) float64 {
		s := wk[7] * math.Pow(0, float64(deg))
		for i := range 7 {
			x := xs[i]
			s += wk[i] * (math.Pow(x, float64(deg)) + math.Pow(-x, float64(deg)))
		}
		return s
	}
	gauss := func(deg int) float64 {
		s := wg[3] * math.Pow(0, float64(deg))
		for j := range 3 {
			x := xs[2*j+1]
			s += wg[j] * (math.Pow(x, float64(deg)) + math.Pow(-x, float64(deg)))
		}
		return s
	}
	exact := func(deg int) float64 { return 2 / float64(deg+1) }
	for deg := 0; deg <= 22; deg += 2 {
		if got := kron(deg); math.Abs(got-exact(deg)) > 1e-15 {
			t.Errorf("Kronrod x^%d: %.17g, want %.17g", deg, got, exact(deg))
		}
		if deg <= 12 {
			if got := gauss(deg); math.Abs(got-exact(deg)) > 1e-15 {
				t.Errorf("Gauss x^%d: %.17g, want %.17g", deg, got, exact(deg))
			}
		}
	}
	if got := kron(24); math.Abs(got-exact(24)) < 1e-12 {
		t.Errorf("Kronrod integrates x^24 exactly (%.17g): the constants are not the 15-point rule's", got)
	}
	if got := gauss(14); math.Abs(got-exact(14)) < 1e-12 {
		t.Errorf("Gauss integrates x^14 exactly (%.17g): not the 7-point rule", got)
	}
}

// TestAdaptiveGK: a sharp logistic step inside one wide panel and a narrow
// Gaussian bump; the integrals are known in closed form (calculus).
func TestAdaptiveGK(t *testing.T) {
	// ∫_0^20 1/(1+e^{−(x−7)/0.01}) dx = 13 + 0.01·ln((1+e^{−700})/(1+e^{−1300})) ≈ 13.
	step := func(x float64) float64 { return 1 / (1 + math.Exp(-(x-7)/0.01)) }
	if got := adaptiveGK(step, []float64{0, 20}, 1e-13); math.Abs(got-13) > 1e-11 {
		t.Errorf("logistic step: %.15g, want 13", got)
	}
	// ∫ e^{−x²/(2·0.05²)} over [−1, 3] = 0.05·√(2π) (the tails beyond are e^{−200}).
	bump := func(x float64) float64 { return math.Exp(-x * x / (2 * 0.05 * 0.05)) }
	if got, want := adaptiveGK(bump, []float64{-1, 0, 3}, 1e-13), 0.05*math.Sqrt(2*math.Pi); math.Abs(got-want) > 1e-13*want {
		t.Errorf("Gaussian bump: %.15g, want %.15g", got, want)
	}
}
