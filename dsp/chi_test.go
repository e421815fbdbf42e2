package dsp

import (
	"math"
	"math/cmplx"
	"testing"
)

func chips(phases []float64, k int) []complex128 {
	x := make([]complex128, 0, len(phases)*k)
	for _, p := range phases {
		for range k {
			x = append(x, cmplx.Rect(1, p))
		}
	}
	return x
}

// TestHeldChiCodes checks the exact rect-chip response of published codes
// at one and eight grid points per chip (the figures must not depend on
// the grid).
func TestHeldChiCodes(t *testing.T) {
	barker := func(n int) []float64 { p, _ := Barker(n); return p }
	frank, _ := Frank(256)
	p4, _ := P4(1000)
	cases := []struct {
		name       string
		phases     []float64
		pslr, islr float64 // dB
		widthChips float64 // −3 dB width in chips, 0: not checked
		tolPSLR    float64
		src        string
	}{
		// Levanon & Mozeson, Radar Signals (2004): Barker PSL 1, PSLR 20·log10(1/13);
		// two-sided ISL 12 (continuous integral 24/338 = 12/169 too); width
		// 2(1 − 1/√2) chips of the triangular main lobe 13(1 − |Δ|/T).
		{"barker13", barker(13), 20 * math.Log10(1.0/13), 10 * math.Log10(12.0/169), 2 * (1 - 1/math.Sqrt2), 0.001, "Levanon & Mozeson 2004"},
		// Two-sided code ISL 4 over peak² 16 (published Barker ISL); the
		// continuous integral equals it for this code.
		{"barker4", barker(4), -12.0412, -6.0206, 0, 0.001, "published Barker-4 ISL"},
		// Frank 1963 closed form 20·log10(1/(N·sin(π/M))), N = 256, M = 16.
		{"frank256", frank, 20 * math.Log10(1/(256*math.Sin(math.Pi/16))), math.NaN(), 0, 0.01, "Frank 1963"},
		// P4 1000: computed aperiodic ACF (scipy), −36.37 dB.
		{"p4-1000", p4, -36.37, math.NaN(), 0, 0.01, "computed, scipy"},
	}
	for _, c := range cases {
		for _, k := range []int{1, 8} {
			if k == 8 && len(c.phases) > 300 {
				continue
			}
			x := chips(c.phases, k)
			f := HeldChi(x, x, 1e-6/float64(k)).Figures()
			if !f.Sidelobes || math.Abs(f.PSLRDB-c.pslr) > c.tolPSLR {
				t.Errorf("%s at %d/chip: PSLR %.4f dB (sidelobes %v), want %.4f (%s)", c.name, k, f.PSLRDB, f.Sidelobes, c.pslr, c.src)
			}
			if !math.IsNaN(c.islr) && math.Abs(f.ISLRDB-c.islr) > 0.001 {
				t.Errorf("%s at %d/chip: ISLR %.4f dB, want %.4f (%s)", c.name, k, f.ISLRDB, c.islr, c.src)
			}
			if c.widthChips > 0 && math.Abs(f.Mainlobe3dB/1e-6-c.widthChips) > 1e-9 {
				t.Errorf("%s at %d/chip: width %.6f chips, want %.6f", c.name, k, f.Mainlobe3dB/1e-6, c.widthChips)
			}
			if f.MismatchLossDB > 1e-9 {
				t.Errorf("%s: matched mismatch loss %g dB, want 0", c.name, f.MismatchLossDB)
			}
		}
	}
}

// TestHeldChiNoSidelobes: a rectangular pulse and a code of equal chips
// have a triangular response with nothing outside the main lobe.
func TestHeldChiNoSidelobes(t *testing.T) {
	for _, x := range [][]complex128{{1}, {1, 1, 1, 1}, chips([]float64{0.3, 0.3, 0.3}, 8)} {
		f := HeldChi(x, x, 1).Figures()
		if f.Sidelobes {
			t.Errorf("%d equal chips: sidelobes PSLR %g dB", len(x), f.PSLRDB)
		}
		// Triangle of base 2n: half power at 1 − 1/√2 of n on each side.
		if want := 2 * float64(len(x)) * (1 - 1/math.Sqrt2); math.Abs(f.Mainlobe3dB-want) > 1e-12 {
			t.Errorf("%d equal chips: width %g, want %g", len(x), f.Mainlobe3dB, want)
		}
	}
}

// TestSampledChiLFM: an unweighted LFM of B·τ = 100 evaluated at 8·B has
// its first sidelobe at −13.39 dB (computed at fs = 8B; Richards,
// Fundamentals of Radar Signal Processing, 2nd ed., p. 285: "13.5 dB
// below the mainlobe") and a half-power width of 0.886/B.
func TestSampledChiLFM(t *testing.T) {
	l := LFM{Width: 10e-6, Band: 10e6}
	fs := 8 * l.Band
	x := Sample(nil, l, fs, 0)
	f := SampledChi(x, x, fs, l.Band).Figures()
	if !f.Sidelobes || math.Abs(f.PSLRDB+13.39) > 0.05 {
		t.Errorf("LFM BT 100: PSLR %.3f dB, want −13.39", f.PSLRDB)
	}
	if w := f.Mainlobe3dB * l.Band; math.Abs(w-0.886) > 0.01 {
		t.Errorf("LFM BT 100: width %.4f/B, want 0.886/B (sinc half power)", w)
	}
	if f.MismatchLossDB > 1e-6 {
		t.Errorf("LFM matched: mismatch loss %g dB", f.MismatchLossDB)
	}
}

// TestWindowMidpoints: the continuous windows at the midpoints (i+½)/N
// are the symmetric (2N+1)-point windows (scipy-checked, windows.json) at
// their odd points, exactly for the closed forms and to O(1/N) for Taylor
// (whose N-point construction depends on N); Chebyshev stays N-point.
func TestWindowMidpoints(t *testing.T) {
	const n = 400
	for _, c := range []struct {
		w   Window
		tol float64
	}{
		{Hann{}, 1e-12}, {Hamming{}, 1e-12}, {Blackman{}, 1e-12}, {BlackmanHarris{}, 1e-12},
		{Kaiser{Beta: 6}, 1e-12}, {Gaussian{Sigma: 0.4}, 1e-12}, {Taylor{NBar: 5, SidelobeDB: -35}, 5e-3},
	} {
		got := WindowMidpoints(make([]float64, n), c.w)
		sym := c.w.Coefficients(make([]float64, 2*n+1))
		for i, v := range got {
			if math.Abs(v-sym[2*i+1]) > c.tol {
				t.Fatalf("%T: point %d is %v, symmetric window %v", c.w, i, v, sym[2*i+1])
			}
		}
	}
	got := WindowMidpoints(make([]float64, 9), Chebyshev{SidelobeDB: -50})
	want := Chebyshev{SidelobeDB: -50}.Coefficients(make([]float64, 9))
	for i := range got {
		if got[i] != want[i] {
			t.Fatalf("chebyshev point %d: %v, want %v", i, got[i], want[i])
		}
	}
}
