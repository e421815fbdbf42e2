package dsp

import (
	"encoding/json"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"
)

// frontendGolden is testdata/golden/frontend.json, written by
// testdata/golden/frontend.py with numpy and scipy (see its docstring).
type frontendGolden struct {
	Profile struct {
		OffsetHz []float64 `json:"offset_hz"`
		DBcHz    []float64 `json:"dbc_hz"`
	}
	Integral []struct{ F1, F2, Value float64 }
	EchoBand []struct {
		F1, F2, Value float64
		DelayS        float64 `json:"delay_s"`
	} `json:"echo_band"`
	Clip []struct {
		TauS                   float64 `json:"tau_s"`
		BandwidthHz            float64 `json:"bandwidth_hz"`
		FsHz                   float64 `json:"fs_hz"`
		Drive                  float64
		PeakLossDB             float64 `json:"peak_loss_db"`
		PSLRDB                 float64 `json:"pslr_db"`
		FarSidelobeDB          float64 `json:"far_sidelobe_db"`
		FarSidelobeUnclippedDB float64 `json:"far_sidelobe_unclipped_db"`
		ISLRDB                 float64 `json:"islr_db"`
	}
	Quantiser []struct {
		Bits        int
		FullScale   float64 `json:"full_scale"`
		Sigma, Gain float64
		Ratio       float64
	}
	IQ []struct {
		GainDB       float64 `json:"gain_db"`
		PhaseDeg     float64 `json:"phase_deg"`
		IRRFFTDB     float64 `json:"irr_fft_db"`
		IRRFormulaDB float64 `json:"irr_formula_db"`
	}
}

func readFrontendGolden(t *testing.T) frontendGolden {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "testdata", "golden", "frontend.json"))
	if err != nil {
		t.Fatal(err)
	}
	var g frontendGolden
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	return g
}

func TestPhaseNoiseWhiteIntegral(t *testing.T) {
	// A white −120 dBc/Hz floor over a 10 MHz band integrates to
	// 1e-12·1e7 = 1e-5, −50 dBc: one sideband over 0…10 MHz, or both
	// sidebands over ±5 MHz as a phase variance (σ² = 2∫L(f)df, the
	// usual conversion of L(f) to rms phase error; arithmetic, and the
	// value the issue quotes).
	p := PhaseNoise{OffsetHz: []float64{1e3, 1e7}, DBcHz: []float64{-120, -120}}
	if got := DB(p.Integral(0, 10e6)); math.Abs(got+50) > 1e-9 {
		t.Errorf("single sideband over 10 MHz: %.6f dBc, want -50", got)
	}
	if got := DB(p.Variance(0, 5e6)); math.Abs(got+50) > 1e-9 {
		t.Errorf("variance over ±5 MHz: %.6f dB rad², want -50", got)
	}
	// Beyond the last point the level holds.
	if got := DB(p.Integral(1e7, 2e7)); math.Abs(got+50) > 1e-9 {
		t.Errorf("beyond the last point: %.6f", got)
	}
}

func TestPhaseNoiseAgainstQuad(t *testing.T) {
	g := readFrontendGolden(t)
	p := PhaseNoise{OffsetHz: g.Profile.OffsetHz, DBcHz: g.Profile.DBcHz}
	if got := p.Level(3e4); math.Abs(got-(-100-10*math.Log10(3))) > 1e-9 {
		t.Errorf("level at 30 kHz: %v", got)
	}
	for _, c := range g.Integral {
		// scipy.integrate.quad on each segment (frontend.py).
		if got := p.Integral(c.F1, c.F2); math.Abs(got/c.Value-1) > 1e-9 {
			t.Errorf("integral %g…%g: %.12g, scipy quad %.12g", c.F1, c.F2, got, c.Value)
		}
	}
	for _, c := range g.EchoBand {
		// quad over every period of 4sin²(πfT); the mean-of-2 above
		// 8/T costs at most 0.5 % here.
		if got := p.EchoBand(c.F1, c.F2, c.DelayS); math.Abs(got/c.Value-1) > 5e-3 {
			t.Errorf("echo band %g…%g at T=%g: %.6g, scipy quad %.6g (%.3f %%)", c.F1, c.F2, c.DelayS, got, c.Value, 100*(got/c.Value-1))
		}
	}
}

func TestPhaseNoiseProcessVariance(t *testing.T) {
	// The realisation's power per band matches the profile: the sample
	// variance averaged over many records, and the share of it between
	// 100 kHz and 1 MHz read off the records' periodograms.
	g := readFrontendGolden(t)
	p := PhaseNoise{OffsetHz: g.Profile.OffsetHz, DBcHz: g.Profile.DBcHz}
	const n, fs, recs = 4096, 20e6, 400
	bins := PhaseNoiseBins(n, fs, p.Integral)
	rng := rand.New(rand.NewPCG(1, 1))
	x := make([]float64, n)
	var v float64
	for range recs {
		PhaseNoiseDraw(x, bins, rng)
		for _, s := range x {
			v += s * s
		}
	}
	v /= n * recs
	want := p.Variance(0, fs/2)
	if math.Abs(v/want-1) > 0.05 {
		t.Errorf("variance %.4g, want %.4g (2∫L over ±fs/2)", v, want)
	}
}

func TestADCSQNRMonteCarlo(t *testing.T) {
	// Kester, "Taking the Mystery out of the Infamous Formula, SNR =
	// 6.02N + 1.76 dB", Analog Devices MT-001: a full-scale sine through
	// an ideal N-bit converter, quantisation error uniform over ±Δ/2.
	// 12 bits: 74.0 dB. Measured on a complex full-scale tone (a
	// full-scale sine on each of I and Q) at a frequency incommensurate
	// with the sample rate, within 0.2 dB.
	for _, bits := range []int{8, 10, 12, 14} {
		a := ADC{Bits: bits, FullScale: 1}
		want := 6.02*float64(bits) + 1.76
		if math.Abs(a.SQNRDB()-want) > 0.01 {
			t.Errorf("%d bits: SQNRDB %.3f, want %.2f", bits, a.SQNRDB(), want)
		}
		const n = 1 << 16
		x := make([]complex128, n)
		for i := range x {
			x[i] = cmplx.Rect(1, 2*math.Pi*0.1234567*float64(i)+0.3)
		}
		y, clipped := a.Apply(nil, x)
		var sig, err float64
		for i := range x {
			sig += real(x[i])*real(x[i]) + imag(x[i])*imag(x[i])
			d := y[i] - x[i]
			err += real(d)*real(d) + imag(d)*imag(d)
		}
		got := DB(sig / err)
		if math.Abs(got-want) > 0.2 {
			t.Errorf("%d bits: measured SQNR %.3f dB, want %.2f ± 0.2", bits, got, want)
		}
		if clipped != 0 {
			t.Errorf("%d bits: %d samples of a full-scale tone reported clipped", bits, clipped)
		}
		if e := err / n; math.Abs(e/a.NoisePower()-1) > 0.05 { // the uniform model is approximate at few bits
			t.Errorf("%d bits: error power %.4g, Δ²/6 = %.4g", bits, e, a.NoisePower())
		}
	}
	if got := (ADC{Bits: 12, FullScale: 1}).SQNRDB(); math.Abs(got-74.0) > 0.05 {
		t.Errorf("12 bits: %.2f dB, MT-001 gives 74.0", got)
	}
}

func TestADCClipSidelobes(t *testing.T) {
	// An LFM echo driven past full scale, each channel clipped, then
	// compressed with the unclipped reference: peak loss, peak and far
	// sidelobes and ISLR against numpy.correlate on the same samples
	// (frontend.py).
	g := readFrontendGolden(t)
	for _, c := range g.Clip {
		w := LFM{Width: c.TauS, Band: c.BandwidthHz}
		ref := Sample(nil, w, c.FsHz, 0)
		n := len(ref)
		x := make([]complex128, 3*n)
		for i, v := range ref {
			x[n+i] = v * complex(c.Drive, 0)
		}
		lin := NewCorrelator(ref, len(x)).Apply(nil, x)
		cl, _ := ADC{Bits: 16, FullScale: 1}.Clip(nil, x)
		y := NewCorrelator(ref, len(x)).Apply(nil, cl)
		pw := func(v complex128) float64 { return real(v)*real(v) + imag(v)*imag(v) }
		k, pk, p0 := 0, 0.0, 0.0
		for i, v := range y {
			if pw(v) > pk {
				k, pk = i, pw(v)
			}
			p0 = max(p0, pw(lin[i]))
		}
		var side, far, isl float64
		for i, v := range y {
			d := i - k
			if d < -2 || d > 2 {
				side = max(side, pw(v))
				isl += pw(v)
			}
			if d < -10 || d > 10 {
				far = max(far, pw(v))
			}
		}
		for _, q := range []struct {
			name      string
			got, want float64
		}{
			{"peak loss", DB(p0 / pk), c.PeakLossDB},
			{"PSLR", DB(side / pk), c.PSLRDB},
			{"far sidelobe", DB(far / pk), c.FarSidelobeDB},
			{"ISLR", DB(isl / pk), c.ISLRDB},
		} {
			if math.Abs(q.got-q.want) > 0.01 {
				t.Errorf("drive %g: %s %.4f dB, numpy %.4f", c.Drive, q.name, q.got, q.want)
			}
		}
	}
}

func TestIQImageRejection(t *testing.T) {
	// IRR = (1 + 2g·cos φ + g²)/(1 − 2g·cos φ + g²), the standard
	// image-rejection formula; 0.1 dB and 1° give about 39.6 dB. Checked
	// against a tone through the same imbalance in numpy (frontend.py),
	// and here by a DFT of dsp's output at ±f.
	g := readFrontendGolden(t)
	for _, c := range g.IQ {
		q := IQImbalance{GainDB: c.GainDB, PhaseDeg: c.PhaseDeg}
		if got := q.ImageRejectionDB(); math.Abs(got-c.IRRFormulaDB) > 1e-9 {
			t.Errorf("%g dB, %g°: IRR %.6f, formula %.6f", c.GainDB, c.PhaseDeg, got, c.IRRFormulaDB)
		}
		const n, k0 = 1000, 100
		x := make([]complex128, n)
		for i := range x {
			x[i] = cmplx.Rect(1, 2*math.Pi*k0*float64(i)/n)
		}
		y := q.Apply(nil, x)
		var a, b complex128
		for i, v := range y {
			a += v * cmplx.Rect(1, -2*math.Pi*k0*float64(i)/n)
			b += v * cmplx.Rect(1, 2*math.Pi*k0*float64(i)/n)
		}
		got := DB((real(a)*real(a) + imag(a)*imag(a)) / (real(b)*real(b) + imag(b)*imag(b)))
		if math.Abs(got-c.IRRFFTDB) > 1e-6 {
			t.Errorf("%g dB, %g°: measured IRR %.6f, numpy %.6f", c.GainDB, c.PhaseDeg, got, c.IRRFFTDB)
		}
	}
	if got := (IQImbalance{GainDB: 0.1, PhaseDeg: 1}).ImageRejectionDB(); math.Abs(got-39.6) > 0.05 {
		t.Errorf("0.1 dB, 1°: %.2f dB, want about 39.6", got)
	}
}

func TestSTCGain(t *testing.T) {
	// R⁻⁴ law from 1 to 10 km: 40·log10(10) = 40 dB at 1 km (arithmetic;
	// the value the issue quotes).
	for _, c := range []struct{ r, want float64 }{{500, -40}, {1000, -40}, {2000, -40 + 40*math.Log10(2)}, {10000, 0}, {20000, 0}} {
		if got := DB(STCGain(c.r, 1000, 10000, 4)); math.Abs(got-c.want) > 1e-9 {
			t.Errorf("R = %g m: %.6f dB, want %.6f", c.r, got, c.want)
		}
	}
}

func TestADCGaussianNoise(t *testing.T) {
	// The Bussgang gain and noise ratio of the quantiser for a Gaussian
	// input: against quad in frontend.py, and against a Monte Carlo of
	// Apply (gain within 2 %, ratio within 5 %: clipped tails are rare).
	// Fine steps give the uniform model Δ²/(12σ²).
	g := readFrontendGolden(t)
	rng := rand.New(rand.NewPCG(3, 3))
	for _, c := range g.Quantiser {
		a := ADC{Bits: c.Bits, FullScale: c.FullScale}
		gain, ratio := a.GaussianNoise(c.Sigma)
		if math.Abs(gain/c.Gain-1) > 1e-6 || math.Abs(ratio/c.Ratio-1) > 1e-6 {
			t.Errorf("%d bits, full scale %g: gain %.8g ratio %.8g, quad %.8g %.8g", c.Bits, c.FullScale, gain, ratio, c.Gain, c.Ratio)
		}
		const n = 200000
		x := make([]complex128, n)
		for i := range x {
			x[i] = complex(c.Sigma*rng.NormFloat64(), c.Sigma*rng.NormFloat64())
		}
		y, _ := a.Apply(nil, x)
		var xy, dd float64
		for i := range x {
			xy += real(x[i])*real(y[i]) + imag(x[i])*imag(y[i])
			e := y[i] - complex(gain, 0)*x[i] // the part uncorrelated with x
			dd += real(e)*real(e) + imag(e)*imag(e)
		}
		mg := xy / (2 * n * c.Sigma * c.Sigma)
		mr := dd / (2 * n * gain * gain * c.Sigma * c.Sigma)
		if math.Abs(mg/gain-1) > 0.02 || math.Abs(mr/ratio-1) > 0.05 { // clipped tails are rare and large
			t.Errorf("%d bits, full scale %g: Monte Carlo gain %.4g ratio %.4g, exact %.4g %.4g", c.Bits, c.FullScale, mg, mr, gain, ratio)
		}
	}
	// Input far below one step: every sample lands on ±Δ/2, a sign
	// detector per channel, whose SNR loss on Gaussian noise is 2/π
	// (1.96 dB): ratio π/2 − 1 (the hard-limiter result of Van Vleck
	// and Middleton, from memory).
	if _, r := (ADC{Bits: 8, FullScale: 1000}).GaussianNoise(math.Sqrt(0.5)); math.Abs(r-(math.Pi/2-1)) > 1e-6 {
		t.Errorf("sub-step input: ratio %.8f, π/2 − 1 = %.8f", r, math.Pi/2-1)
	}
	a := ADC{Bits: 12, FullScale: 100}
	d := a.Step()
	if _, r := a.GaussianNoise(1); math.Abs(r/(d*d/12)-1) > 1e-3 {
		t.Errorf("fine steps: ratio %.6g, Δ²/12 = %.6g", r, d*d/12)
	}
}

func TestRainCoefficients(t *testing.T) {
	// ITU-R P.838-2 (2003) Table 1 as printed: at a table frequency the
	// values come back exactly; γ = k·R^α (eq. 1). 10 GHz, horizontal,
	// 10 mm/h: 0.01006·10^1.2747 = 0.1894 dB/km (arithmetic).
	k, a, ok := RainCoefficients(10, false)
	if !ok || k != 0.01006 || a != 1.2747 {
		t.Fatalf("10 GHz H: %v %v %v", k, a, ok)
	}
	if g := RainAttenuation(k, a, 10); math.Abs(g-0.01006*math.Pow(10, 1.2747)) > 1e-12 || math.Abs(g-0.1894) > 1e-4 {
		t.Errorf("γ = %.5f dB/km", g)
	}
	if k, a, _ := RainCoefficients(35, true); k != 0.2341 || a != 0.9630 {
		t.Errorf("35 GHz V: %v %v", k, a)
	}
	// Between rows: log k and α linear in log f (CCIR Rec. 838, 1992).
	k, a, _ = RainCoefficients(9.5, false)
	u := math.Log(9.5/9) / math.Log(10.0/9)
	if wk := math.Exp(math.Log(0.006916) + u*(math.Log(0.01006)-math.Log(0.006916))); math.Abs(k/wk-1) > 1e-12 {
		t.Errorf("9.5 GHz k %.6g, want %.6g", k, wk)
	}
	if wa := 1.3044 + u*(1.2747-1.3044); math.Abs(a-wa) > 1e-12 {
		t.Errorf("9.5 GHz α %.6g, want %.6g", a, wa)
	}
	if _, _, ok := RainCoefficients(0.5, false); ok {
		t.Error("0.5 GHz is outside the table")
	}
	if _, _, ok := RainCoefficients(60, false); ok {
		t.Error("60 GHz is outside the table as read")
	}
}
