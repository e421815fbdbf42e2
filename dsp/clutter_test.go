package dsp

import (
	"math"
	"testing"
)

func TestSurfacePatchRCS(t *testing.T) {
	// Check value of the low-grazing-angle surface clutter equation
	// σ_c = σ⁰·R·θ·ΔR·sec ψ (Skolnik, Introduction to Radar Systems):
	// σ⁰ = −20 dB, R = 10 km, θ = 1°, ΔR = 15 m → 14.2 dBsm.
	got := DB(SurfacePatchRCS(FromDB(-20), 10e3, math.Pi/180, 15, 0))
	if math.Abs(got-14.18) > 0.005 {
		t.Errorf("patch RCS %.4f dBsm, want 14.18 (10·log10(0.01·1e4·0.017453·15))", got)
	}
	// sec ψ: at 60° the patch doubles (+3.01 dB).
	if d := DB(SurfacePatchRCS(1, 1, 1, 1, math.Pi/3)); math.Abs(d-10*math.Log10(2)) > 1e-12 {
		t.Errorf("sec 60° gives %.6f dB, want 3.0103", d)
	}
}

func TestGrazingAngle(t *testing.T) {
	// Flat Earth: sin ψ = h/R.
	if psi, ok := GrazingAngle(100, 1000, math.Inf(1)); !ok || math.Abs(math.Sin(psi)-0.1) > 1e-15 {
		t.Errorf("flat Earth ψ = %v (%v), want asin(0.1)", psi, ok)
	}
	// 4/3 Earth horizon: √(2·a_e·h + h²); for h = 10 m about 4.12·√10 =
	// 13.03 km (the 4.12·√h km rule of thumb, common practice).
	h := 10.0
	rh := math.Sqrt(2*EffectiveEarthRadius*h + h*h)
	if math.Abs(rh/1e3-4.12*math.Sqrt(h)) > 0.02 {
		t.Errorf("horizon %.3f km, want about %.3f", rh/1e3, 4.12*math.Sqrt(h))
	}
	if _, ok := GrazingAngle(h, rh*1.001, EffectiveEarthRadius); ok {
		t.Error("a range beyond the horizon has a grazing angle")
	}
	if _, ok := GrazingAngle(h, rh*0.999, EffectiveEarthRadius); !ok {
		t.Error("a range inside the horizon has no grazing angle")
	}
	if _, ok := GrazingAngle(h, 5, EffectiveEarthRadius); ok {
		t.Error("a range shorter than the height has a grazing angle")
	}
	// Law of cosines, checked by placing the points: antenna at (0, a+h),
	// surface point at angle φ from the vertical; ψ is the angle between
	// the local horizontal and the line to the antenna.
	a := EffectiveEarthRadius
	for _, phi := range []float64{1e-4, 5e-4, 1e-3} {
		px, py := a*math.Sin(phi), a*math.Cos(phi)
		dx, dy := 0-px, a+h-py
		r := math.Hypot(dx, dy)
		want := math.Asin((dx*math.Sin(phi) + dy*math.Cos(phi)) / r) // component along the outward normal
		got, ok := GrazingAngle(h, r, a)
		if !ok && want > 0 || ok && math.Abs(got-want) > 1e-9 {
			t.Errorf("φ = %g: ψ = %.12f (%v), geometry gives %.12f", phi, got, ok, want)
		}
	}
}

func TestConstantGamma(t *testing.T) {
	// σ⁰ = γ·sin ψ (Richards, Fundamentals of Radar Signal Processing,
	// eq. 2.64): γ = −10 dB at 30° gives −13.01 dB.
	if d := DB(ConstantGammaSigma0(FromDB(-10), math.Pi/6)); math.Abs(d+13.0103) > 1e-4 {
		t.Errorf("σ⁰ = %.4f dB, want −13.0103", d)
	}
}

func TestNoiseCorrelationLength(t *testing.T) {
	// A rectangular reference of N ones: ρ(m) = (N−|m|)/N, so
	// Σ_m ρ² = 1 + (N−1)(2N−1)/(3N) (closed-form sum of squares).
	for _, n := range []int{1, 2, 4, 17, 100} {
		h := make([]complex128, n)
		for i := range h {
			h[i] = complex(0.3, -0.4)
		}
		want := 1 + float64((n-1)*(2*n-1))/float64(3*n)
		if got := NoiseCorrelationLength(h); math.Abs(got-want) > 1e-9*want {
			t.Errorf("N = %d: %.12f, want %.12f", n, got, want)
		}
	}
	// A sampled sinc of half-band (fs = 2B): Σ_m sinc²(m/2) = 2 (Poisson
	// summation of a band-limited pulse); truncated at ±2000 lags.
	const half = 2000
	h := make([]complex128, 2*half+1)
	for i := range h {
		x := float64(i-half) / 2
		if x == 0 {
			h[i] = 1
		} else {
			h[i] = complex(math.Sin(math.Pi*x)/(math.Pi*x), 0)
		}
	}
	if got := NoiseCorrelationLength(h); math.Abs(got-2) > 0.01 {
		t.Errorf("half-band sinc: %.4f, want 2", got)
	}
}
