package scenarios

import (
	"context"
	"math"
	"testing"
)

// TestAmbiguitySurface checks |χ(0,0)| = 1 (0 dB, LM04 normalisation) and
// the zero-delay cut of a constant-envelope pulse, |sinc(νT)|: νT = 0.5 →
// −3.922 dB (Richards 2014, eq. 4.53).
func TestAmbiguitySurface(t *testing.T) {
	s := mustDecode(t, `{"version":2,"radar":{"sample_rate_hz":4e6},"waveform":{"kind":"barker","length":13,"chip_s":1e-6}}`)
	a, err := Ambiguity(context.Background(), s, 101, 33)
	if err != nil {
		t.Fatal(err)
	}
	rows, cols := len(a.DopplerHz), len(a.DelayM)
	if got := a.DB[rows/2][cols/2]; math.Abs(got) > 1e-9 {
		t.Errorf("|χ(0,0)| = %v dB, want 0", got)
	}
	if a.DopplerHz[rows/2] != 0 || math.Abs(a.DelayM[cols/2]) > 1e-9 {
		t.Errorf("centre at %v Hz, %v m", a.DopplerHz[rows/2], a.DelayM[cols/2])
	}
	tau := 13e-6
	// Row i has ν = span·(2i/(rows−1) − 1) with span 4/τ: νT = 0.5 at i = rows/2 + (rows−1)/16.
	i := rows/2 + (rows-1)/16
	if nuT := a.DopplerHz[i] * tau; math.Abs(nuT-0.5) > 1e-9 {
		t.Fatalf("row %d has νT = %v", i, nuT)
	}
	if got := a.ZeroDelay[i]; math.Abs(got+3.922) > 0.01 {
		t.Errorf("zero-delay cut at νT = 0.5: %.3f dB, want −3.922", got)
	}
	// The zero-Doppler cut of Barker 13 peaks at 0 dB with −22.28 dB sidelobes
	// (20·log10(1/13), Richards 2014 p. 304); max-hold keeps the level of the sidelobes.
	side := -100.0
	for c, v := range a.ZeroDoppler {
		if math.Abs(a.DelayM[c]) > 1.5e-6*C/2 {
			side = math.Max(side, v)
		}
	}
	if math.Abs(side+22.28) > 0.05 {
		t.Errorf("zero-Doppler sidelobes %.2f dB, want −22.28", side)
	}
	if _, err := Ambiguity(context.Background(), s, 5000, 10); err == nil {
		t.Error("oversized grid accepted")
	}
}

// TestAmbiguityNoFalseNulls: a pulse with fewer samples than plot columns
// is evaluated on a finer internal grid, so no column falls between two
// lags (issue 12: Barker 13 at 2 samples per chip drew −60 dB at 19 m
// from the peak, where the triangular main lobe 13(1 − |Δ|/T) is at
// 20·log10(1 − 0.127) = −1.18 dB).
func TestAmbiguityNoFalseNulls(t *testing.T) {
	s := mustDecode(t, `{"version":2,"waveform":{"kind":"barker","length":13,"chip_s":1e-6}}`)
	a, err := Ambiguity(context.Background(), s, 512, 9)
	if err != nil {
		t.Fatal(err)
	}
	chipM := 1e-6 * C / 2
	best, at := math.Inf(1), 0
	for c, d := range a.DelayM {
		if math.Abs(d) < 0.9*chipM && a.ZeroDoppler[c] < -20 {
			t.Errorf("column at %.1f m inside the main lobe reads %.1f dB", d, a.ZeroDoppler[c])
		}
		if e := math.Abs(d - 19); e < best {
			best, at = e, c
		}
	}
	want := 20 * math.Log10(1-19/chipM)
	if got := a.ZeroDoppler[at]; math.Abs(got-want) > 0.5 {
		t.Errorf("zero-Doppler cut at %.1f m: %.2f dB, want about %.2f", a.DelayM[at], got, want)
	}
}
