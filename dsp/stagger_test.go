package dsp

import (
	"encoding/json"
	"math"
	"os"
	"testing"
)

// staggerCase is one record of testdata/stagger/cases.json, written by
// testdata/stagger/gen.py (NumPy/SciPy, from the definitions in
// docs/detection.md §16, not from this code).
type staggerCase struct {
	Name         string    `json:"name"`
	Pattern      []float64 `json:"pattern"`
	Pulses       int       `json:"pulses"`
	Taps         []float64 `json:"taps"`
	Window       string    `json:"window"`
	Wavelength   float64   `json:"wavelength_m"`
	MeanPRI      float64   `json:"mean_pri_s"`
	FirstBlind   float64   `json:"first_blind_scan_mps"`
	MeanPRIBlind float64   `json:"mean_pri_blind_mps"`
	Speeds       []float64 `json:"speeds_mps"`
	BestResponse []float64 `json:"best_response"`
	MeanResponse float64   `json:"mean_response"`
	DipDB        float64   `json:"dip_db"`
	DipMPS       float64   `json:"dip_mps"`
}

func loadStaggerCases(t *testing.T) []staggerCase {
	t.Helper()
	b, err := os.ReadFile("../testdata/stagger/cases.json")
	if err != nil {
		t.Fatal(err)
	}
	var f struct {
		C     float64       `json:"c"`
		Cases []staggerCase `json:"cases"`
	}
	if err := json.Unmarshal(b, &f); err != nil {
		t.Fatal(err)
	}
	if f.C != SpeedOfLight {
		t.Fatalf("golden file made with c = %v, dsp uses %v", f.C, SpeedOfLight)
	}
	return f.Cases
}

func staggerPlan(c staggerCase) *SlowTimePlan {
	tb := MeanPRI(c.Pattern)
	ts := PulseTimes(nil, c.Pattern, c.Pulses)
	for i := range ts {
		ts[i] /= tb
	}
	var w Window
	switch c.Window {
	case "hamming":
		w = Hamming{}
	case "hann":
		w = Hann{}
	}
	return NewStaggeredPlan(ts, c.Taps, w)
}

// TestStaggerBlindSpeedGolden: the first true blind speed of each pattern,
// found in the golden file by scanning range rates for the first at which
// every pulse sees zero Doppler's phase (no use of the common grid), is
// λ/(2Δ) (Schedule.FirstBlindSpeed), and for the two-PRI stagger of
// 100 µs and 125 µs at 9.5 GHz it is (4+5)/2 = 4.5 times the mean PRI's
// λ/(2·112.5 µs) = 140.25 m/s: 631.1 m/s, the published ≈ 631 m/s
// (Skolnik, Introduction to Radar Systems, 3rd ed., ch. 3, staggered
// PRFs; page from memory).
func TestStaggerBlindSpeedGolden(t *testing.T) {
	for _, c := range loadStaggerCases(t) {
		t.Run(c.Name, func(t *testing.T) {
			got := NewSchedule(c.Pattern...).FirstBlindSpeed(c.Wavelength)
			if math.Abs(got-c.FirstBlind) > 1e-6*got {
				t.Errorf("first blind speed %.6f m/s, scan in NumPy %.6f", got, c.FirstBlind)
			}
			if c.Name == "skolnik_100_125us_xband_two_pulse" {
				if math.Abs(got-631) > 0.5 || math.Abs(got/c.MeanPRIBlind-4.5) > 1e-9 {
					t.Errorf("first blind speed %.2f m/s (%.4f × the mean PRI's), want ≈ 631 m/s and 4.5×", got, got/c.MeanPRIBlind)
				}
			}
		})
	}
}

// TestStaggerVelocityResponseGolden: the staggered canceller and the
// filter bank at the true pulse times against the NumPy model at 181
// range rates from 0 to 1.25 × the first blind speed, and the curve's
// mean and deepest dip.
func TestStaggerVelocityResponseGolden(t *testing.T) {
	const tol = 1e-9
	for _, c := range loadStaggerCases(t) {
		t.Run(c.Name, func(t *testing.T) {
			p := staggerPlan(c)
			tb := MeanPRI(c.Pattern)
			for i, v := range c.Speeds {
				got := p.BestToneResponse(nil, -2*v/c.Wavelength*tb)
				if want := c.BestResponse[i]; math.Abs(got-want) > tol*math.Max(1, want) {
					t.Errorf("%.2f m/s: best-bin response %.12g, NumPy %.12g", v, got, want)
				}
			}
			vr := p.NewVelocityResponse(c.Pattern, tb, c.Wavelength, 1.25*c.FirstBlind, 101)
			if math.Abs(vr.FirstBlindMPS-c.FirstBlind) > 1e-6*c.FirstBlind {
				t.Errorf("curve's first blind speed %.4f, NumPy %.4f", vr.FirstBlindMPS, c.FirstBlind)
			}
			if math.Abs(vr.DipDB-c.DipDB) > 1e-6 {
				t.Errorf("deepest dip %.6f dB at %.2f m/s, NumPy %.6f dB at %.2f m/s", vr.DipDB, vr.DipMPS, c.DipDB, c.DipMPS)
			}
			// The curve is re its mean: at the first blind speed it is
			// as deep as at zero.
			last := vr.DB[len(vr.DB)-1]
			if math.IsInf(last, 0) || math.IsNaN(last) {
				t.Errorf("curve holds %v", last)
			}
		})
	}
}

// TestStaggeredPlanUniform: with uniform times the staggered plan is the
// FFT plan, bin for bin (the non-uniform DFT reduces to the DFT).
func TestStaggeredPlanUniform(t *testing.T) {
	const n = 12
	ts := make([]float64, n)
	for i := range ts {
		ts[i] = float64(i)
	}
	u := NewSlowTimePlan(n, MTITwoPulse, Hann{})
	s := NewStaggeredPlan(ts, MTITwoPulse, Hann{})
	x := make([]complex128, n)
	for i := range x {
		x[i] = complex(math.Sin(float64(i)*0.7), math.Cos(float64(i*i)*0.3))
	}
	a, b := u.Apply(nil, x), s.Apply(nil, x)
	for d := range a {
		if e := cmplxAbs(a[d] - b[d]); e > 1e-12 {
			t.Errorf("bin %d: FFT plan %v, staggered plan %v", d, a[d], b[d])
		}
	}
}

func cmplxAbs(z complex128) float64 { return math.Hypot(real(z), imag(z)) }

// TestPulseTimes: PRIs cycle through the pattern from pulse 0.
func TestPulseTimes(t *testing.T) {
	got := PulseTimes(nil, []float64{1, 2, 4}, 6)
	for i, w := range []float64{0, 1, 3, 7, 8, 10} {
		if got[i] != w {
			t.Fatalf("pulse times %v, want 0 1 3 7 8 10", got)
		}
	}
}

func BenchmarkStaggeredPlan(b *testing.B) {
	ts := PulseTimes(nil, []float64{100e-6, 125e-6}, 32)
	for i := range ts {
		ts[i] /= 112.5e-6
	}
	p := NewStaggeredPlan(ts, MTITwoPulse, Hann{})
	x := make([]complex128, 32)
	y := make([]complex128, p.Bins())
	b.ReportAllocs()
	for b.Loop() {
		p.Apply(y, x)
	}
}
