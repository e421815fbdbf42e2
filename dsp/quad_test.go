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
