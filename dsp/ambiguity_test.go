package dsp

import (
	"fmt"
	"math"
	"testing"
)

// Source: Richards 2014 p. 276 (eq. 4.105–4.106): up-chirp T = 10 µs, B = 10 MHz, f_d = 100 kHz
// → peak shift −f_d·T/B = −100 ns (R-p276) within 0.5 %, peak loss
// 20·log10(1−f_d/B) (0.087 dB; 0.915 dB at f_d/B = 0.1) within 0.005 dB.
// The down-chirp flips the sign of the shift (trap 9).
func TestDopplerResponseLFM(t *testing.T) {
	const T, B = 10e-6, 10e6
	fs := 8 * B
	for _, c := range []struct {
		name   string
		sign   float64
		fd     float64
		checkS bool
	}{
		{"up/100kHz", 1, 100e3, true},
		{"down/100kHz", -1, 100e3, true},
		{"up/-100kHz", 1, -100e3, true},
		{"up/1MHz", 1, 1e6, false},
	} {
		t.Run(c.name, func(t *testing.T) {
			p := lfmPulse(T, B, fs, c.sign)
			loss, shift := DopplerResponse(p, p, fs, c.fd)
			wantLoss := -20 * math.Log10(1-math.Abs(c.fd)/B)
			if math.Abs(loss-wantLoss) > 0.005 {
				t.Errorf("loss %.4f dB, want %.4f ± 0.005", loss, wantLoss)
			}
			wantShift := -c.sign * c.fd * T / B
			if c.checkS && math.Abs(shift-wantShift) > 0.005*math.Abs(wantShift) {
				t.Errorf("shift %.4g s, want %.4g s ± 0.5 %%", shift, wantShift)
			}
		})
	}
}

// Source: Levanon & Mozeson, Radar Signals, 2004 (normalisation):
// |χ(0,0)| = 1, and the volume ∫∫|χ|²dτdν = 1 (Woodward 1953, from memory; Barker-13, |ν| ≤ 4/chip: 1.0002, tol 1e-3).
// At 8 samples per chip, |ν| < 4/chip is one period of the sampled
// χ(τ,ν) in ν, over which the rectangle rule is exact (Parseval): the
// volume is 1 to rounding, and the table's 1.0002 is that value with
// both ends of the Doppler span counted.
func TestAmbiguityVolume(t *testing.T) {
	const spc = 8 // samples per chip, rectangular chips
	const tc = 1e-6
	u := barker13(spc)
	fs := spc / tc
	n := len(u)
	const rows = 832
	dnu := fs / rows
	dopplers := make([]float64, rows) // −fs/2 … fs/2 − dnu
	for i := range dopplers {
		dopplers[i] = -fs/2 + float64(i)*dnu
	}
	chi := Ambiguity(nil, u, fs, n, dopplers)
	if z := chi[rows/2][n]; math.Abs(z-1) > 1e-12 {
		t.Errorf("|χ(0,0)| = %v, want 1", z)
	}
	var vol float64
	for _, row := range chi {
		for _, v := range row {
			vol += v * v
		}
	}
	vol *= dnu / fs
	if math.Abs(vol-1.0002) > 1e-3 || math.Abs(vol-1) > 1e-9 {
		t.Errorf("volume %.12f, want 1 (table 1.0002 ± 1e-3)", vol)
	}
}

// Source: zero-delay cut of a constant-envelope pulse
// |sinc(νT)| (R-p245): νT = 0.25 → −0.912 dB, 0.5 → −3.922 dB, null at 1.
// The sampled pulse gives the Dirichlet kernel sin(πνT)/(N·sin(πνT/N)),
// equal to sinc to about (π/N)² relative.
func TestZeroDelayCut(t *testing.T) {
	const T, B = 10e-6, 10e6
	fs := 8 * B
	u := lfmPulse(T, B, fs, 1)
	nus := []float64{0, 0.25 / T, 0.5 / T, 1 / T}
	want := []float64{0, -0.912, -3.922, math.Inf(-1)}
	cut := ZeroDelayCut(nil, u, fs, nus)
	full := Ambiguity(nil, u, fs, 0, nus)
	for i, nu := range nus {
		got := 20 * math.Log10(cut[i])
		if math.IsInf(want[i], -1) {
			if cut[i] > 1e-9 {
				t.Errorf("νT=%v: |χ| = %g, want a null", nu*T, cut[i])
			}
		} else if math.Abs(got-want[i]) > 0.001 {
			t.Errorf("νT=%v: %.4f dB, want %.3f", nu*T, got, want[i])
		}
		if math.Abs(cut[i]-full[i][0]) > 1e-9 {
			t.Errorf("νT=%v: zero-delay cut %v, Ambiguity %v", nu*T, cut[i], full[i][0])
		}
	}
}

// Source: Barker-13 (T = 13 chips), computed with numpy from the LM04
// definition; R-p307 (Doppler loss ≤ 1 dB for νT ≤ 0.25): peak and highest
// sidelobe relative to the zero-Doppler peak at νT = 0.1, 0.25, 0.5
// (tolerance 0.05 dB), 16 samples per chip standing for rectangular chips.
func TestAmbiguityBarkerDoppler(t *testing.T) {
	const spc = 16
	u := barker13(spc)
	n := len(u)
	T := float64(n) // fs = 1 Hz: times in samples
	for _, c := range []struct{ nuT, peak, side float64 }{
		{0, 0, -22.28}, {0.1, -0.14, -19.12}, {0.25, -0.91, -11.54}, {0.5, -3.92, -6.92},
	} {
		t.Run(fmt.Sprint("νT=", c.nuT), func(t *testing.T) {
			row := Ambiguity(nil, u, 1, n, []float64{c.nuT / T})[0]
			peak := 20 * math.Log10(row[n])
			// Sidelobes: beyond the first chip on either side of τ = 0.
			side := 0.0
			for j, v := range row {
				if k := j - n; k <= -spc || k >= spc {
					side = math.Max(side, v)
				}
			}
			sideDB := 20 * math.Log10(side)
			if math.Abs(peak-c.peak) > 0.05 || math.Abs(sideDB-c.side) > 0.05 {
				t.Errorf("peak %.3f dB, sidelobe %.3f dB; want %.2f, %.2f", peak, sideDB, c.peak, c.side)
			}
		})
	}
}

// Source: Levanon & Mozeson, Radar Signals, 2004 (their convention
// χ(τ,ν) = ∫u(t)u*(t+τ)e^{j2πνt}dt): for an up-chirp
// u = exp(jπ(B/T)t²) the ridge of |χ(τ,ν)| follows ν = (B/T)·τ.
func TestAmbiguityLFMRidge(t *testing.T) {
	const T, B = 10e-6, 5e6
	fs := 4 * B
	u := lfmPulse(T, B, fs, 1)
	delays := len(u) / 2
	var nus, taus []float64
	for nu := -1e6; nu <= 1e6; nu += 250e3 {
		nus = append(nus, nu)
	}
	chi := Ambiguity(nil, u, fs, delays, nus)
	for _, row := range chi {
		p, _ := refinePeak(row, argmax(row), true)
		taus = append(taus, (p-float64(delays))/fs)
	}
	// Least-squares slope ν/τ through the origin.
	var sxy, sxx float64
	for i := range nus {
		sxy += taus[i] * nus[i]
		sxx += taus[i] * taus[i]
	}
	slope := sxy / sxx
	if math.Abs(slope-B/T)/(B/T) > 0.01 {
		t.Errorf("ridge slope %.4g Hz/s, want B/T = %.4g ± 1 %%", slope, B/T)
	}
}

func BenchmarkAmbiguity(b *testing.B) {
	const T, B = 10e-6, 10e6
	fs := 51.2e6
	u := lfmPulse(T, B, fs, 1) // 512 samples
	dopplers := make([]float64, 512)
	for i := range dopplers {
		dopplers[i] = (float64(i) - 256) * 2e3
	}
	dst := Ambiguity(nil, u, fs, 255, dopplers) // 512 × 511
	b.ReportAllocs()
	for b.Loop() {
		Ambiguity(dst, u, fs, 255, dopplers)
	}
}
