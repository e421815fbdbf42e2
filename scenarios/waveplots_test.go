package scenarios

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"testing"
)

// waveScene is a scene with the given waveform at sample rate fs and no
// targets: the wave plots depend on the pulse and the receiver alone.
func waveScene(t testing.TB, waveform string, fs float64, receiver string) *Scenario {
	t.Helper()
	if receiver == "" {
		receiver = `{}`
	}
	return mustDecode(t, fmt.Sprintf(`{"version":2,"radar":{"peak_power_w":1000,"sample_rate_hz":%g,"pri_s":1e-3,"window_start_m":20000,"window_stop_m":30000},
		"waveform":%s,"receiver":%s,"targets":[]}`, fs, waveform, receiver))
}

func mustWavePlots(t testing.TB, s *Scenario) *WavePlots {
	t.Helper()
	w, err := WaveformPlots(context.Background(), s)
	if err != nil {
		t.Fatalf("wave plots: %v", err)
	}
	return w
}

// Source: numpy's FFT of each pulse sampled from its definition
// (testdata/golden/waveplots.py, waveplots.json); occupied bandwidth as
// ITU Radio Regulations No. 1.153 defines it (0.5 % of the energy below
// and 0.5 % above the band).
func TestWavePlotsSpectrumGolden(t *testing.T) {
	var g struct {
		Numpy string
		Cases []struct {
			Name, Kind   string
			PulseWidthS  float64 `json:"pulse_width_s"`
			BandwidthHz  float64 `json:"bandwidth_hz"`
			SampleRateHz float64 `json:"sample_rate_hz"`
			Samples      int
			FFTLen       int                `json:"fft_len"`
			OccupiedLoHz float64            `json:"occupied_lo_hz"`
			OccupiedHiHz float64            `json:"occupied_hi_hz"`
			OccupiedBWHz float64            `json:"occupied_bw_hz"`
			SpectrumDB   map[string]float64 `json:"spectrum_db"`
		}
	}
	b, err := os.ReadFile(filepath.Join("..", "testdata", "golden", "waveplots.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	if len(g.Cases) == 0 {
		t.Fatal("no cases")
	}
	for _, c := range g.Cases {
		t.Run(c.Name, func(t *testing.T) {
			wave := fmt.Sprintf(`{"kind":%q,"pulse_width_s":%g}`, c.Kind, c.PulseWidthS)
			if c.Kind == KindLFM {
				wave = fmt.Sprintf(`{"kind":"lfm","pulse_width_s":%g,"bandwidth_hz":%g}`, c.PulseWidthS, c.BandwidthHz)
			}
			w := mustWavePlots(t, waveScene(t, wave, c.SampleRateHz, ""))
			if len(w.TimeS) != c.Samples || len(w.SpectrumHz) != c.FFTLen {
				t.Fatalf("%d samples, %d bins; numpy %d, %d", len(w.TimeS), len(w.SpectrumHz), c.Samples, c.FFTLen)
			}
			df := c.SampleRateHz / float64(c.FFTLen)
			if math.Abs(w.OccupiedHz[0]-c.OccupiedLoHz) > 1e-6*df || math.Abs(w.OccupiedHz[1]-c.OccupiedHiHz) > 1e-6*df ||
				math.Abs(w.OccupiedBandwidthHz-c.OccupiedBWHz) > 1e-6*df {
				t.Errorf("occupied band %v (%g Hz); numpy %s gives [%g %g] (%g Hz)", w.OccupiedHz, w.OccupiedBandwidthHz, g.Numpy, c.OccupiedLoHz, c.OccupiedHiHz, c.OccupiedBWHz)
			}
			h := c.FFTLen / 2
			for k, want := range c.SpectrumDB {
				var i int
				fmt.Sscan(k, &i)
				if got := w.SpectrumDB[h+i]; math.Abs(got-want) > 1e-6 {
					t.Errorf("spectrum at bin %+d: %.6f dB, numpy %.6f", i, got, want)
				}
			}
		})
	}
}

// The rect pulse's spectrum is τ·sinc(f·τ): first null at 1/τ and the
// first sidelobe near 1.43/τ at −13.26 dB (the Fourier transform of a
// rectangle; Richards, Fundamentals of Radar Signal Processing, 2nd ed.,
// section 4.3 — section from memory). Sampled, it is a Dirichlet kernel
// with the same null; 64 samples keep the sidelobe within 0.02 dB.
func TestWavePlotsRectSpectrumNull(t *testing.T) {
	const tau, fs = 3.2e-6, 20e6 // 64 samples
	w := mustWavePlots(t, waveScene(t, `{"kind":"rect","pulse_width_s":3.2e-6}`, fs, ""))
	null := nearest(w.SpectrumHz, 1/tau)
	if math.Abs(w.SpectrumHz[null]-1/tau) > 1e-6 {
		t.Fatalf("no bin at 1/τ: nearest %g Hz", w.SpectrumHz[null])
	}
	if w.SpectrumDB[null] > -60 || w.SpectrumDB[nearest(w.SpectrumHz, -1/tau)] > -60 {
		t.Errorf("spectrum at ±1/τ is %.1f dB, want a null (≤ −60 dB)", w.SpectrumDB[null])
	}
	for i, f := range w.SpectrumHz {
		if math.Abs(f) < 0.9/tau && w.SpectrumDB[i] < -20 {
			t.Fatalf("spectrum at %g Hz is %.1f dB: a null inside the main lobe", f, w.SpectrumDB[i])
		}
	}
	best := SpectrumFloorDB
	for i, f := range w.SpectrumHz {
		if f > 1/tau && f < 2/tau {
			best = math.Max(best, w.SpectrumDB[i])
		}
	}
	if math.Abs(best-(-13.26)) > 0.05 {
		t.Errorf("first spectral sidelobe %.2f dB, want −13.26 dB (sinc²)", best)
	}
}

func nearest(xs []float64, x float64) int {
	j := 0
	for i, v := range xs {
		if math.Abs(v-x) < math.Abs(xs[j]-x) {
			j = i
		}
	}
	return j
}

// The linear FM pulse u(t) = exp(jπ(B/τ)(t−τ/2)²) has the instantaneous
// frequency (1/2π)·dφ/dt = (B/τ)(t − τ/2): a line of slope B/τ through 0
// at the pulse centre, from −B/2 to +B/2 (the definition; the phase step
// between samples gives it exactly at the midpoint between them). Its
// occupied bandwidth approaches B as B·τ grows (the spectrum tends to a
// rectangle of width B; common practice, no source): within 5 % at
// B·τ = 200 and 1000.
func TestWavePlotsLFMFrequency(t *testing.T) {
	for _, c := range []struct {
		tau, b, fs float64
		down       bool
	}{{20e-6, 10e6, 20e6, false}, {50e-6, 20e6, 40e6, false}, {20e-6, 10e6, 20e6, true}} {
		sweep := ""
		if c.down {
			sweep = `,"sweep":"down"`
		}
		w := mustWavePlots(t, waveScene(t, fmt.Sprintf(`{"kind":"lfm","pulse_width_s":%g,"bandwidth_hz":%g%s}`, c.tau, c.b, sweep), c.fs, ""))
		slope := c.b / c.tau
		if c.down {
			slope = -slope
		}
		if len(w.FreqHz) != len(w.TimeS)-1 || w.PhaseWrapped {
			t.Fatalf("%d frequencies for %d samples, wrapped %v", len(w.FreqHz), len(w.TimeS), w.PhaseWrapped)
		}
		for i, f := range w.FreqHz {
			want := slope * (w.FreqTimeS[i] - c.tau/2)
			if math.Abs(f-want) > 1e-6*c.b {
				t.Fatalf("B·τ=%g down=%v: f(%g s) = %g Hz, want %g", c.b*c.tau, c.down, w.FreqTimeS[i], f, want)
			}
		}
		if obw := w.OccupiedBandwidthHz; math.Abs(obw/c.b-1) > 0.05 {
			t.Errorf("B·τ=%g: occupied bandwidth %g Hz, want within 5 %% of B = %g", c.b*c.tau, obw, c.b)
		}
	}
}

// Source: Richards, Fundamentals of Radar Signal Processing, 2nd ed.,
// eq. 4.105–4.106: an LFM's compressed peak at Doppler f_d keeps the
// amplitude 1 − |f_d|/B (loss −20·log10(1 − |f_d|/B): 0.087 dB at
// f_d/B = 0.01, 0.915 dB at 0.1) and moves by f_d·τ/B in time, earlier for
// an up-chirp and a closing target (positive f_d).
func TestWavePlotsLFMDopplerTolerance(t *testing.T) {
	const tau, b, fs = 20e-6, 10e6, 40e6
	w := mustWavePlots(t, waveScene(t, `{"kind":"lfm","pulse_width_s":2e-5,"bandwidth_hz":1e7}`, fs, ""))
	if n := len(w.DopplerHz); n != dopplerPoints || w.DopplerHz[n/2] != 0 || math.Abs(w.DopplerHz[n-1]-b/10) > 1e-6 {
		t.Fatalf("Doppler axis %d points, centre %g, end %g; want 0 at the centre and B/10 at the end", n, w.DopplerHz[n/2], w.DopplerHz[n-1])
	}
	for i, fd := range w.DopplerHz {
		loss := -20 * math.Log10(1-math.Abs(fd)/b)
		if math.Abs(w.DopplerLossDB[i]-loss) > 0.005 {
			t.Errorf("f_d = %g Hz: loss %.4f dB, Richards %.4f dB", fd, w.DopplerLossDB[i], loss)
		}
		shift := -fd * tau / b * C / 2
		if math.Abs(w.DopplerShiftM[i]-shift) > 0.005*math.Abs(shift)+1e-9 {
			t.Errorf("f_d = %g Hz: range shift %.4f m, Richards %.4f m", fd, w.DopplerShiftM[i], shift)
		}
	}
}

// The matched filter's taps are the pulse itself (dsp's correlation
// conjugates): unit amplitude for a constant-envelope pulse, the pulse's
// own phase. A phase code's phase is wrapped and carries no frequency.
// Barker 13 (Barker 1953): + + + + + − − + + − + − +.
func TestWavePlotsTapsAndCode(t *testing.T) {
	w := mustWavePlots(t, waveScene(t, `{"kind":"barker","length":13,"chip_s":1e-6}`, 2e6, ""))
	if !w.PhaseWrapped || len(w.FreqHz) != 0 {
		t.Errorf("Barker: wrapped %v, %d frequencies; want wrapped phase and none", w.PhaseWrapped, len(w.FreqHz))
	}
	signs := "+++++--++-+-+"
	for i, p := range w.PhaseRad {
		want := 0.0
		if signs[i/2] == '-' {
			want = math.Pi
		}
		if d := math.Abs(cmplx.Phase(cmplx.Rect(1, p-want))); d > 1e-9 {
			t.Errorf("sample %d: phase %g rad, want %g", i, p, want)
		}
	}
	if len(w.TapAmp) != len(w.TimeS) || w.Filter != FilterMatched {
		t.Fatalf("%d taps for %d samples, filter %q", len(w.TapAmp), len(w.TimeS), w.Filter)
	}
	for i := range w.TapAmp {
		if math.Abs(w.TapAmp[i]-1) > 1e-12 || math.Abs(cmplx.Phase(cmplx.Rect(1, w.TapPhaseRad[i]-w.PhaseRad[i]))) > 1e-9 {
			t.Errorf("tap %d: %g at %g rad, want 1 at the pulse's %g rad", i, w.TapAmp[i], w.TapPhaseRad[i], w.PhaseRad[i])
		}
	}
	// A least-squares mismatched filter is longer than the pulse and
	// starts before the echo (lead > 0).
	ls := mustWavePlots(t, waveScene(t, `{"kind":"barker","length":13,"chip_s":1e-6}`, 1e6, `{"filter":"least_squares","filter_length_factor":3}`))
	if len(ls.TapAmp) != 39 || !(ls.TapTimeS[0] < 0) || ls.Filter != FilterLeastSquares {
		t.Errorf("least squares: %d taps from %g s, filter %q; want 39 taps starting before the echo", len(ls.TapAmp), ls.TapTimeS[0], ls.Filter)
	}
}

func TestWavePlotsFinite(t *testing.T) {
	demos, err := Demos()
	if err != nil {
		t.Fatal(err)
	}
	for _, d := range demos {
		name := d.Name
		w := mustWavePlots(t, d.Scenario)
		for _, v := range [][]float64{w.TimeS, w.PhaseRad, w.FreqHz, w.SpectrumHz, w.SpectrumDB, w.TapAmp, w.TapPhaseRad, w.DopplerHz, w.DopplerLossDB, w.DopplerShiftM} {
			for _, x := range v {
				if math.IsNaN(x) || math.IsInf(x, 0) {
					t.Fatalf("%s: a value is %v", name, x)
				}
			}
		}
	}
}
