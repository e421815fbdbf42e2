package dsp

import (
	"math"
	"math/cmplx"
	"testing"
)

// TestSampledInterpolation checks the band-limited interpolation against
// the analytic signal it was sampled from: a Gaussian-envelope tone,
// g(t) = exp(−½((t − t_c)/σ)²)·exp(j2π·f·t), whose spectrum is a Gaussian
// of standard deviation 1/(2πσ) around f (Fourier transform of a
// Gaussian, any table of transforms). With f = 0.25·rate and σ = 6
// samples, the spectrum falls below 1e-9 of its peak at ±0.4·rate, the
// band SampledHalfWidth is specified for, and the envelope below 1e-9 at
// the recording's edges. Between samples the error is then the kernel's
// own: at most 2e-4 of the peak (−75 dB, the kernel's design figure,
// common practice for a 32-tap Kaiser-windowed sinc, no source). At the
// sample instants the samples come back exactly.
func TestSampledInterpolation(t *testing.T) {
	const (
		rate  = 10e6
		n     = 128
		sigma = 6 / rate
		f     = 0.25 * rate
		tc    = 64 / rate
	)
	g := func(t float64) complex128 {
		z := (t - tc) / sigma
		return complex(math.Exp(-z*z/2), 0) * cmplx.Exp(complex(0, 2*math.Pi*f*t))
	}
	x := make([]complex128, n)
	for i := range x {
		x[i] = g(float64(i) / rate)
	}
	s, err := NewSampled(x, rate, rate/2)
	if err != nil {
		t.Fatal(err)
	}
	for i := range x {
		if got := s.At(float64(i) / rate); got != x[i]*complex(s.Scale(), 0) {
			t.Fatalf("sample %d: %v, want %v", i, got, x[i]*complex(s.Scale(), 0))
		}
	}
	worst := 0.0
	for k := 0; k < 4*n; k++ {
		tt := (float64(k) + 0.37) / (4 * rate)
		worst = math.Max(worst, cmplx.Abs(s.At(tt)/complex(s.Scale(), 0)-g(tt)))
	}
	t.Logf("worst interpolation error %.3g of the peak; linear at mid-sample %.3g", worst, cmplx.Abs(g(64.5/rate)-(x[64]+x[65])/2))
	if worst > 2e-4 {
		t.Errorf("worst interpolation error %.3g of the peak, want ≤ 2e-4", worst)
	}
	// Linear interpolation of the same samples, for scale: at mid-sample a
	// tone at a quarter of the rate comes out at cos(π/4) of its amplitude
	// (0.29 of the peak off); the kernel must beat it by orders of
	// magnitude.
	mid := g(64.5/rate) - (x[64]+x[65])/2
	if cmplx.Abs(mid) < 100*worst {
		t.Errorf("linear interpolation error %.3g is not far above the kernel's %.3g", cmplx.Abs(mid), worst)
	}
	if s.Duration() != n/rate || s.At(-1e-12) != 0 || s.At(n/rate) != 0 {
		t.Errorf("duration %g s, u(0⁻) %v, u(τ) %v", s.Duration(), s.At(-1e-12), s.At(n/rate))
	}
}

// TestSampledScale: the samples are brought to unit mean power, so the
// pulse energy Σ|u(n/rate)|²/rate equals τ, as for a unit-envelope pulse.
func TestSampledScale(t *testing.T) {
	x := []complex128{3, 4i, -3, 0, 1 + 1i}
	s, err := NewSampled(x, 1e6, 5e5)
	if err != nil {
		t.Fatal(err)
	}
	e := 0.0
	for i := range x {
		v := s.At(float64(i) / 1e6)
		e += real(v)*real(v) + imag(v)*imag(v)
	}
	if math.Abs(e/1e6-s.Duration()) > 1e-15 {
		t.Errorf("energy %g, want τ = %g", e/1e6, s.Duration())
	}
	if x[0] != 3 {
		t.Error("NewSampled changed the caller's slice")
	}
}

func TestNewSampledErrors(t *testing.T) {
	for _, c := range []struct {
		name       string
		x          []complex128
		rate, band float64
	}{
		{"empty", nil, 1e6, 1e5},
		{"no energy", []complex128{0, 0}, 1e6, 1e5},
		{"NaN", []complex128{1, complex(math.NaN(), 0)}, 1e6, 1e5},
		{"Inf", []complex128{1, complex(0, math.Inf(1))}, 1e6, 1e5},
		{"zero rate", []complex128{1}, 0, 1e5},
		{"band above rate", []complex128{1}, 1e6, 2e6},
		{"zero band", []complex128{1}, 1e6, 0},
	} {
		if _, err := NewSampled(c.x, c.rate, c.band); err == nil {
			t.Errorf("%s: no error", c.name)
		}
	}
}

// TestSampledReproducesLFM: an LFM sampled at 4B and read back through
// Sampled at other instants agrees with the LFM's own envelope away from
// the pulse's ends (where the LFM's sharp edges are not band-limited), to
// the kernel's accuracy.
func TestSampledReproducesLFM(t *testing.T) {
	l := LFM{Width: 20e-6, Band: 5e6}
	const rate = 20e6
	s, err := NewSampled(Sample(nil, l, rate, 0), rate, l.Band)
	if err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for k := 0; k < 1000; k++ {
		tt := 2e-6 + 16e-6*float64(k)/1000 + 0.3/rate
		worst = math.Max(worst, cmplx.Abs(s.At(tt)-l.At(tt)))
	}
	// The chirp's spectrum leaks beyond ±B/2 only through its edges, a
	// Fresnel tail that falls as 1/f: 2e-3 allows for it 2 µs (40
	// samples) inside the ends.
	t.Logf("worst error against the LFM %.3g", worst)
	if worst > 2e-3 {
		t.Errorf("worst error against the LFM %.3g", worst)
	}
}

func BenchmarkSampledAt(b *testing.B) {
	x := make([]complex128, 4096)
	for i := range x {
		x[i] = cmplx.Exp(complex(0, float64(i*i)*1e-3))
	}
	s, _ := NewSampled(x, 1e6, 5e5)
	dst := make([]complex128, 8192)
	b.ReportAllocs()
	for b.Loop() {
		AddEcho(dst, s, 2e6, 0.3e-6, 1, 0)
	}
}

// TestHeldSamplesAreChips: Barker 7 given at 3 samples per chip and held
// is the rectangular-chip code itself at every instant (definition of a
// phase code with rectangular chips), including instants a hair before a
// chip edge.
func TestHeldSamplesAreChips(t *testing.T) {
	ph, _ := Barker(7)
	code := PhaseCoded{Phases: ph, Chip: 1e-6}
	x := make([]complex128, 21)
	for i := range x {
		x[i] = cmplx.Exp(complex(0, ph[i/3]))
	}
	s, err := NewHeldSamples(x, 3e6, 1e6)
	if err != nil {
		t.Fatal(err)
	}
	for k := range 7000 {
		tt := float64(k) * 1e-9
		if got, want := s.At(tt), code.At(tt); cmplx.Abs(got-want) > 1e-12 {
			t.Fatalf("t = %g s: %v held, %v code", tt, got, want)
		}
	}
	if v, piece, ok := s.Held(); !ok || len(v) != 21 || math.Abs(piece-1/3e6) > 1e-20 {
		t.Errorf("Held() = %d values, %g s, %v", len(v), piece, ok)
	}
	if _, _, ok := (&Sampled{}).Held(); ok {
		t.Error("an interpolated pulse says it is held")
	}
}
