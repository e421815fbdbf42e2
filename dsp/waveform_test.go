package dsp

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// instFreq estimates the instantaneous frequency of w at t from the phase
// difference over ±h: arg(u(t+h)·conj(u(t−h)))/(4πh).
func instFreq(w Waveform, t, h float64) float64 {
	return cmplx.Phase(w.At(t+h)*cmplx.Conj(w.At(t-h))) / (4 * math.Pi * h)
}

func TestLFMFrequencyLaw(t *testing.T) {
	// Definition (brief and R ch. 4): f(t) = ±(B/τ)(t − τ/2), from −B/2
	// to +B/2 for an up-chirp; numerical derivative of the phase.
	const tau, b = 20e-6, 5e6
	for _, down := range []bool{false, true} {
		l := LFM{Width: tau, Band: b, Down: down}
		sign := 1.0
		if down {
			sign = -1
		}
		h := 1e-10
		for _, tt := range []float64{1e-9, 2e-6, 7.3e-6, 10e-6, 15e-6, tau - 1e-9} {
			want := sign * b / tau * (tt - tau/2)
			got := instFreq(l, min(max(tt, h), tau-h), h)
			if math.Abs(got-want) > 1e-4*b {
				t.Errorf("down=%v f(%g) = %g Hz, want %g", down, tt, got, want)
			}
		}
		// Slope from two points, and the sweep edges.
		s := (instFreq(l, 15e-6, h) - instFreq(l, 5e-6, h)) / 10e-6
		if math.Abs(s-l.Slope()) > 1e-6*b/tau || math.Abs(math.Abs(s)-b/tau) > 1e-6*b/tau {
			t.Errorf("down=%v slope %g Hz/s, want %g", down, s, l.Slope())
		}
		if f0 := instFreq(l, h, h); math.Abs(f0+sign*b/2) > 1e-3*b {
			t.Errorf("down=%v starts at %g Hz, want %g", down, f0, -sign*b/2)
		}
		if l.At(-1e-9) != 0 || l.At(tau) != 0 || cmplx.Abs(l.At(3e-6)) != 1 {
			t.Errorf("down=%v: support or envelope wrong", down)
		}
		if l.At(tau/2) != 1 {
			t.Errorf("down=%v: u(τ/2) = %v, want 1", down, l.At(tau/2))
		}
	}
}

func TestLFMSidelobes(t *testing.T) {
	// Unweighted PSL vs BT at fs = 8B, computed with numpy, tol 0.05 dB;
	// Richards 2014 p. 285:
	// BT = 100 gives a peak sidelobe "13.5 dB below the mainlobe".
	for _, tc := range []struct{ bt, db float64 }{{10, -14.88}, {20, -13.96}, {50, -13.52}, {100, -13.39}, {1000, -13.28}} {
		l := LFM{Width: tc.bt * 1e-6, Band: 1e6}
		x := Sample(nil, l, 8e6, 0)
		if got := pslrDB(acfMagUp(x, 8)); math.Abs(got-tc.db) > 0.05 {
			t.Errorf("BT=%v: PSLR %.3f dB, want %.2f", tc.bt, got, tc.db)
		}
	}
}

func TestSample(t *testing.T) {
	ph, _ := Barker(13)
	p := PhaseCoded{Phases: ph, Chip: 1e-6}
	x := Sample(nil, p, 4e6, 0)
	if len(x) != 52 {
		t.Fatalf("Barker-13 at 4 samples/chip: %d samples, want 52", len(x))
	}
	for n, v := range x {
		if want := complex(math.Cos(ph[n/4]), 0); cmplx.Abs(v-want) > 1e-15 {
			t.Errorf("x[%d] = %v, want %v", n, v, want)
		}
	}
	// Non-integral samples per chip, offset start, reuse of dst.
	dst := make([]complex128, 40)
	Sample(dst, p, 3.3e6, -1.7e-6)
	for n, v := range dst {
		if want := p.At(-1.7e-6 + float64(n)/3.3e6); v != want {
			t.Errorf("dst[%d] = %v, want %v", n, v, want)
		}
	}
	if got := SampleLen(13e-6, 4e6); got != 52 {
		t.Errorf("SampleLen = %d", got)
	}
	if got := SampleLen(10e-6, 1.05e6); got != 11 {
		t.Errorf("SampleLen(10 µs, 1.05 MHz) = %d, want 11", got)
	}
	if got := SampleLen(0, 1e6); got != 0 {
		t.Errorf("SampleLen(0) = %d", got)
	}
}

func TestPhaseCodedChips(t *testing.T) {
	p := PhaseCoded{Phases: []float64{0, math.Pi / 2, math.Pi}, Chip: 0.1}
	for _, tc := range []struct {
		t    float64
		want complex128
	}{{0, 1}, {0.0999, 1}, {0.1, 1i}, {0.25, -1}, {0.3 - 1e-12, -1}, {p.Duration(), 0}, {-1e-12, 0}} {
		if got := p.At(tc.t); cmplx.Abs(got-tc.want) > 1e-12 {
			t.Errorf("At(%v) = %v, want %v", tc.t, got, tc.want)
		}
	}
	if p.Duration() != float64(3)*0.1 || p.Bandwidth() != 10 {
		t.Errorf("Duration %v Bandwidth %v", p.Duration(), p.Bandwidth())
	}
	if (PhaseCoded{Chip: 1}).Validate() == nil || (PhaseCoded{Phases: []float64{0}}).Validate() == nil {
		t.Error("Validate accepted an empty code or zero chip")
	}
}

func TestCostasWaveform(t *testing.T) {
	order, _ := WelchCostas(10)
	for _, c := range []Costas{{Order: order, Chip: 1e-6}, {Order: []int{1, 0, 2}, Chip: 2e-6}} {
		n := len(c.Order)
		if math.Abs(c.Bandwidth()-float64(n)/c.Chip) > 1e-9 || c.Duration() != float64(n)*c.Chip {
			t.Errorf("Bandwidth %v, Duration %v", c.Bandwidth(), c.Duration())
		}
		h := c.Chip * 1e-4
		for i, o := range c.Order {
			mid := (float64(i) + 0.5) * c.Chip
			want := (float64(o) - float64(n-1)/2) / c.Chip
			if got := instFreq(c, mid, h); math.Abs(got-want) > 1e-6/c.Chip {
				t.Errorf("hop %d: f = %g Hz, want %g", i, got, want)
			}
			// Phase continuity at the boundary into hop i.
			if i > 0 {
				edge := float64(i) * c.Chip
				if d := cmplx.Abs(c.At(edge+1e-15) - c.At(edge-1e-15)); d > 1e-6 {
					t.Errorf("hop %d: phase jump %v at the boundary", i, d)
				}
			}
		}
	}
	if (Costas{Order: []int{0, 0}, Chip: 1}).Validate() == nil {
		t.Error("Validate accepted a non-permutation")
	}
}

// echoWaveforms returns one waveform of each kind for the AddEcho tests.
func echoWaveforms(t *testing.T) map[string]Waveform {
	ph, _ := Barker(13)
	nl, err := NewNLFM(20e-6, 5e6, -35)
	if err != nil {
		t.Fatal(err)
	}
	order, _ := WelchCostas(6)
	return map[string]Waveform{
		"rect":     Rect{Width: 7.3e-6},
		"lfm":      LFM{Width: 20e-6, Band: 5e6},
		"lfm-down": &LFM{Width: 20e-6, Band: 5e6, Down: true},
		"barker":   PhaseCoded{Phases: ph, Chip: 0.77e-6},
		"costas":   Costas{Order: order, Chip: 2e-6},
		"nlfm":     nl,
	}
}

func TestAddEchoExact(t *testing.T) {
	// The echo must equal amp·u(n/fs − delay)·exp(j2π·fd·n/fs) evaluated
	// with At at the shifted (fractional) times, and leave other samples
	// untouched.
	rng := rand.New(rand.NewPCG(1, 1))
	const fs = 10e6
	for name, w := range echoWaveforms(t) {
		for trial := range 20 {
			dst := make([]complex128, 400)
			orig := make([]complex128, len(dst))
			for i := range dst {
				dst[i] = complex(rng.NormFloat64(), rng.NormFloat64())
			}
			copy(orig, dst)
			delay := (rng.Float64()*1.4 - 0.3) * float64(len(dst)) / fs // partial overlaps too
			if trial == 0 {
				delay = -w.Duration() - 1e-6 // no overlap
			}
			amp := complex(rng.NormFloat64(), rng.NormFloat64())
			fd := (rng.Float64() - 0.5) * 2e5
			AddEcho(dst, w, fs, delay, amp, fd)
			for n := range dst {
				tt := float64(n)/fs - delay
				got := dst[n] - orig[n]
				if tt < 0 || tt >= w.Duration() {
					if dst[n] != orig[n] {
						t.Fatalf("%s: sample %d outside the pulse (t = %g) changed", name, n, tt)
					}
					continue
				}
				want := amp * w.At(tt) * phasor(2*math.Pi*fd*float64(n)/fs)
				if cmplx.Abs(got-want) > 1e-9*cmplx.Abs(amp) {
					t.Fatalf("%s: delay %g: sample %d = %v, want %v", name, delay, n, got, want)
				}
			}
		}
	}
}

func TestSampleMatchesAt(t *testing.T) {
	for name, w := range echoWaveforms(t) {
		for _, t0 := range []float64{0, -1.23e-6, 0.77e-6} {
			x := Sample(make([]complex128, 300), w, 9.7e6, t0)
			for n, v := range x {
				if want := w.At(t0 + float64(n)/9.7e6); cmplx.Abs(v-want) > 1e-9 {
					t.Fatalf("%s t0=%g: x[%d] = %v, At gives %v", name, t0, n, v, want)
				}
			}
		}
	}
}

func TestAddEchoEnergy(t *testing.T) {
	// A constant-envelope echo fully inside dst adds |amp|²·τ·fs of energy
	// (τ·fs whole: exactly that many samples lie in [0, τ)).
	const fs = 50e6
	l := LFM{Width: 100e-6, Band: 10e6}
	dst := make([]complex128, 8000)
	amp := complex(0.3, -0.4)
	AddEcho(dst, l, fs, 12.345678e-6, amp, 3e3)
	var e float64
	for _, v := range dst {
		e += real(v)*real(v) + imag(v)*imag(v)
	}
	if want := 0.25 * l.Width * fs; math.Abs(e-want) > 1e-9*want {
		t.Errorf("energy %v, want %v", e, want)
	}
}

func TestAddEchoNoAlloc(t *testing.T) {
	dst := make([]complex128, 1000)
	for name, w := range echoWaveforms(t) {
		allocs := testing.AllocsPerRun(10, func() { AddEcho(dst, w, 10e6, 3.3e-6, 1, 100) })
		if allocs != 0 {
			t.Errorf("%s: %v allocs per AddEcho", name, allocs)
		}
	}
}

func TestRateCheckPanics(t *testing.T) {
	defer func() {
		if r := recover(); r == nil {
			t.Error("Sample with fs = 0 did not panic")
		}
	}()
	Sample(nil, Rect{Width: 1}, 0, 0)
}

func BenchmarkAddEchoLFM5000(b *testing.B) {
	const fs = 50e6
	var l Waveform = LFM{Width: 100e-6, Band: 10e6} // 5000 samples
	dst := make([]complex128, 6000)
	b.ReportAllocs()
	for b.Loop() {
		AddEcho(dst, l, fs, 10.3e-6, 1, 1e3)
	}
}

func BenchmarkAddEchoGenericLFM5000(b *testing.B) {
	// The At-per-sample path, for comparison with the specialised one.
	const fs = 50e6
	var w Waveform = struct{ Waveform }{LFM{Width: 100e-6, Band: 10e6}}
	dst := make([]complex128, 6000)
	b.ReportAllocs()
	for b.Loop() {
		AddEcho(dst, w, fs, 10.3e-6, 1, 1e3)
	}
}

func BenchmarkSampleBarker13(b *testing.B) {
	ph, _ := Barker(13)
	var p Waveform = PhaseCoded{Phases: ph, Chip: 1e-6}
	dst := make([]complex128, 52)
	b.ReportAllocs()
	for b.Loop() {
		Sample(dst, p, 4e6, 0)
	}
}
