package dsp

import (
	"fmt"
	"math"
	"math/cmplx"
	"testing"
)

// lfmPulse samples the textbook linear FM pulse exp(±jπ(B/T)(t−T/2)²),
// t = n/fs, 0 ≤ t < T (up-chirp for sign +1).
func lfmPulse(T, B, fs float64, sign float64) []complex128 {
	n := int(math.Round(T * fs))
	p := make([]complex128, n)
	for i := range p {
		t := float64(i)/fs - T/2
		p[i] = expj(sign * math.Pi * B / T * t * t)
	}
	return p
}

// barker13 samples the Barker-13 code + + + + + − − + + − + − + with
// spc samples per chip.
func barker13(spc int) []complex128 {
	chips := []float64{1, 1, 1, 1, 1, -1, -1, 1, 1, -1, 1, -1, 1}
	p := make([]complex128, 0, len(chips)*spc)
	for _, c := range chips {
		for range spc {
			p = append(p, complex(c, 0))
		}
	}
	return p
}

// Source: Richards 2014 (Fundamentals of Radar Signal Processing, 2nd ed.;
// pages of one electronic edition): unweighted PSL vs BT at fs = 8B
// (p. 285 for BT = 100; other BT computed with numpy), half-power width 0.88589/B (large BT), and the
// compression gain 10·log10(BT) (p. 304).
func TestLFMUnweighted(t *testing.T) {
	const tolPSL = 0.05
	for _, c := range []struct{ bt, psl float64 }{
		{10, -14.88}, {20, -13.96}, {50, -13.52}, {100, -13.39}, {1000, -13.28},
	} {
		t.Run(fmt.Sprint("BT=", c.bt), func(t *testing.T) {
			const B = 10e6
			T := c.bt / B
			fs := 8 * B
			p := lfmPulse(T, B, fs, 1)
			f := ResponseFigures(p, p, 0, fs, B)
			if math.Abs(f.PSLRDB-c.psl) > tolPSL {
				t.Errorf("PSLR %.3f dB, want %.2f ± %v", f.PSLRDB, c.psl, tolPSL)
			}
			if math.Abs(f.GainDB-10*math.Log10(c.bt)) > 1e-9 {
				t.Errorf("compression gain %.6f dB, want %.6f", f.GainDB, 10*math.Log10(c.bt))
			}
			if math.Abs(f.MismatchLossDB) > 1e-12 || math.Abs(f.LPGDB) > 1e-12 {
				t.Errorf("matched filter: mismatch %g dB, LPG %g dB, want 0", f.MismatchLossDB, f.LPGDB)
			}
			if math.Abs(f.PeakOffset) > 1e-3/fs {
				t.Errorf("peak offset %g s, want 0", f.PeakOffset)
			}
			if c.bt >= 100 {
				// 0.88589/B is the large-BT value; at BT = 100 the Fresnel
				// ripple moves it by well under 1 %.
				if w := f.Mainlobe3dB * B; math.Abs(w-0.88589)/0.88589 > 0.01 {
					t.Errorf("3-dB width %.5f/B, want 0.88589/B ± 1 %%", w)
				}
				// Peak to first null ≈ 1/B (R-p267): nulls-to-nulls ≈ 2/B.
				if w := f.MainlobeNulls * B; math.Abs(w-2) > 0.05 {
					t.Errorf("null-to-null width %.4f/B, want ≈ 2/B", w)
				}
			}
		})
	}
}

// Source: receive weighting in time, BT = 100, fs = 8B: Hamming PSL
// −40.75 dB, LPG 5.36 dB (Richards 2014 p. 289: −40.7 dB, LPG 5.36 dB);
// Taylor(5, −35) PSL −33.1 dB and Hamming PSL vs BT (Fresnel ripple;
// Kowatsch & Stocker, IEE Proc. F 129(1), 1982, from memory) computed with numpy.
// The mismatch loss of a weighted constant-envelope pulse is the window's
// SNR loss, 1.347 dB for a long symmetric Hamming window (Richards 2014 p. 373).
func TestLFMWeighted(t *testing.T) {
	const tol = 0.3
	const B = 10e6
	fs := 8 * B
	for _, c := range []struct {
		name string
		bt   float64
		w    Window
		psl  float64
		lpg  float64 // NaN: not listed
	}{
		{"hamming", 100, Hamming{}, -40.75, 5.36},
		{"taylor5-35", 100, Taylor{NBar: 5, SidelobeDB: -35}, -33.1, math.NaN()},
		{"hamming", 20, Hamming{}, -28.5, math.NaN()},
		{"hamming", 50, Hamming{}, -36.5, math.NaN()},
		{"hamming", 200, Hamming{}, -42.2, math.NaN()},
	} {
		t.Run(fmt.Sprintf("%s/BT=%v", c.name, c.bt), func(t *testing.T) {
			p := lfmPulse(c.bt/B, B, fs, 1)
			ref := Reference(nil, p, c.w)
			f := ResponseFigures(p, ref, 0, fs, B)
			if math.Abs(f.PSLRDB-c.psl) > tol {
				t.Errorf("PSLR %.3f dB, want %.2f ± %v", f.PSLRDB, c.psl, tol)
			}
			if !math.IsNaN(c.lpg) && math.Abs(f.LPGDB-c.lpg) > tol {
				t.Errorf("LPG %.3f dB, want %.2f ± %v", f.LPGDB, c.lpg, tol)
			}
			ws := WindowFigures(c.w.Coefficients(make([]float64, len(p))))
			if math.Abs(f.MismatchLossDB-ws.SNRLossDB) > 1e-9 {
				t.Errorf("mismatch loss %.6f dB, window SNR loss %.6f dB", f.MismatchLossDB, ws.SNRLossDB)
			}
			if c.name == "hamming" && c.bt == 100 && math.Abs(f.MismatchLossDB-1.347) > 0.01 {
				t.Errorf("Hamming mismatch loss %.4f dB, want 1.347 ± 0.01", f.MismatchLossDB)
			}
		})
	}
}

// Source: Barker-13 zero-Doppler PSL −22.28 dB = 20·log10(1/13) (Richards
// 2014 p. 304; PSL defined on the samples, 1 sample per chip).
func TestBarker13(t *testing.T) {
	want := 20 * math.Log10(1.0/13)
	// One sample per chip, measured on the samples.
	p := barker13(1)
	f := ResponseFigures(p, p, 0, 1e6, 0)
	if math.Abs(f.PSLRDB-want) > 1e-9 {
		t.Errorf("1 sample/chip: PSLR %.4f dB, want %.4f", f.PSLRDB, want)
	}
	if math.Abs(f.GainDB-10*math.Log10(13)) > 1e-9 {
		t.Errorf("gain %.4f dB, want 10·log10(13)", f.GainDB)
	}
	// Rectangular chips at 8 samples per chip, band-limited interpolation
	// at B = 1/chip: the sidelobe apexes are kinks, so allow 0.05 dB (common practice, no source).
	p = barker13(8)
	f = ResponseFigures(p, p, 0, 8e6, 1e6)
	if math.Abs(f.PSLRDB-(-22.28)) > 0.05 {
		t.Errorf("8 samples/chip: PSLR %.4f dB, want −22.28 ± 0.05", f.PSLRDB)
	}
}

func TestReference(t *testing.T) {
	p := []complex128{1 + 1i, 2, 3i, 4, 5}
	r := Reference(nil, p, Hamming{})
	w := Hamming{}.Coefficients(make([]float64, 5))
	for k := range p {
		if cmplx.Abs(r[k]-p[k]*complex(w[k], 0)) > 1e-15 {
			t.Errorf("ref[%d] = %v", k, r[k])
		}
	}
	if r := Reference(nil, p, nil); r[2] != p[2] {
		t.Error("nil window must copy the pulse")
	}
}

func TestResponse(t *testing.T) {
	const B = 10e6
	fs := 8 * B
	p := lfmPulse(10e-6, B, fs, 1)
	tt, db := Response(p, p, 0, fs, B)
	if len(tt) != len(db) || len(tt) < 2*len(p) {
		t.Fatalf("lengths %d, %d", len(tt), len(db))
	}
	i := argmax(db)
	if math.Abs(db[i]) > 1e-12 || math.Abs(tt[i]) > 1/fs {
		t.Errorf("peak %v dB at %v s, want 0 dB at 0 s", db[i], tt[i])
	}
	for j := 1; j < len(tt); j++ {
		if !(tt[j] > tt[j-1]) {
			t.Fatal("time axis not increasing")
		}
	}
}

// ResponseWithFigures must equal Response and ResponseFigures exactly:
// the same computation, shared.
func TestResponseWithFigures(t *testing.T) {
	const fs = 20e6
	lfm := LFM{Width: 10e-6, Band: 5e6}
	pulse := Sample(nil, lfm, fs, 0)
	ref := Reference(nil, pulse, Hamming{})
	t1, db1 := Response(pulse, ref, 0, fs, lfm.Band)
	f1 := ResponseFigures(pulse, ref, 0, fs, lfm.Band)
	t2, db2, f2 := ResponseWithFigures(pulse, ref, 0, fs, lfm.Band)
	if f1 != f2 || len(t1) != len(t2) || len(db1) != len(db2) {
		t.Fatalf("figures %+v vs %+v, lengths %d/%d", f1, f2, len(t1), len(t2))
	}
	for i := range t1 {
		if t1[i] != t2[i] || db1[i] != db2[i] {
			t.Fatalf("sample %d: (%v, %v) vs (%v, %v)", i, t1[i], db1[i], t2[i], db2[i])
		}
	}
}
