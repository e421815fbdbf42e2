package dsp

import (
	"math"
	"math/rand/v2"
	"sort"
	"testing"
)

// TestRadarSNRWorkedExample reproduces the worked range-equation example
// of Mahafza & Elsherbeni, MATLAB Simulations for Radar Systems Design
// (CRC 2004), ch. 1, Fig. 1.12 inputs: Pt 1.5 MW, 5.6 GHz, G 45 dB,
// Te 290 K, B 5 MHz, F 3 dB, L 6 dB, σ 0.1 m², c = 3e8. SNR values at
// 25…165 km computed from those inputs by two routes (a dB budget and the
// linear formula; Mahafza's k = 1.38e-23 adds 0.002 dB).
func TestRadarSNRWorkedExample(t *testing.T) {
	lambda := 3e8 / 5.6e9
	for _, tt := range []struct{ r, want float64 }{
		{25e3, 35.431}, {50e3, 23.390}, {75e3, 16.346}, {100e3, 11.349}, {165e3, 2.649},
	} {
		got := DB(RadarSNR(1.5e6, 1/5e6, FromDB(45), lambda, 0.1, tt.r, FromDB(3), FromDB(6)))
		if math.Abs(got-tt.want) > 0.01 {
			t.Errorf("R = %.0f km: SNR %.3f dB, want %.3f", tt.r/1e3, got, tt.want)
		}
	}
}

// TestNoiseKT0 checks kT0 = 4.0039e-21 W/Hz = −203.975 dBW/Hz (CODATA 2018
// exact k = 1.380649e-23 J/K, T0 = 290 K).
func TestNoiseKT0(t *testing.T) {
	if got := NoisePower(1, 1); math.Abs(got-4.0039e-21) > 1e-25 {
		t.Errorf("kT0 = %v", got)
	}
	if got := DB(NoisePower(1, 1)); math.Abs(got+203.975) > 0.001 {
		t.Errorf("kT0 = %.3f dBW/Hz", got)
	}
}

// TestVolumeReflectivity checks η = π⁵|K|²Z/λ⁴ with |K|² = 0.93 against
// values computed from that form (Atlas & Mossop 1960, as quoted by a
// Colorado Water Conservation Board report; |K|² from Battan 1973 /
// Doviak & Zrnić 1993, from memory).
func TestVolumeReflectivity(t *testing.T) {
	for _, tt := range []struct{ dbz, lambda, want float64 }{
		{40, 0.10, 2.846e-8}, {40, 0.0535, 3.474e-7}, {40, 0.032, 2.714e-6}, {20, 0.10, 2.846e-10},
	} {
		if got := VolumeReflectivity(tt.dbz, tt.lambda); math.Abs(got-tt.want)/tt.want > 5e-4 {
			t.Errorf("%v dBZ at λ %v: η %.4e, want %.4e", tt.dbz, tt.lambda, got, tt.want)
		}
	}
}

// TestBeamArea checks the Gaussian-beam resolution volume
// V = πR²θφ(cτ/2)/(8 ln 2): R 50 km, θ = φ = 1°, τ 1 µs → 6.4717e7 m³
// (Probert-Jones, QJRMS 88, 1962, from memory; value computed from it).
func TestBeamArea(t *testing.T) {
	deg := math.Pi / 180
	v := BeamArea(50e3, deg, deg) * SpeedOfLight * 1e-6 / 2
	if math.Abs(v-6.4717e7)/6.4717e7 > 1e-3 {
		t.Errorf("V = %.4e m³, want 6.4717e7", v)
	}
	// Equivalent RCS ηV, 40 dBZ, S band (λ 10 cm), same volume: 1.842 m² (computed from the two formulas above with c = 3e8).
	v3 := BeamArea(50e3, deg, deg) * 3e8 * 1e-6 / 2
	if s := VolumeReflectivity(40, 0.1) * v3; math.Abs(s-1.842) > 0.002 {
		t.Errorf("ηV = %.4f m², want 1.842", s)
	}
}

// TestSwerlingKS draws seeded Swerling RCS values and applies a
// Kolmogorov–Smirnov test against their distributions: exponential power
// for cases 1 and 2, chi-square with four degrees of freedom (mean
// preserved) for 3 and 4 (Swerling 1960; Richards 2014 §7.2 forms).
// Critical value at α = 0.01: 1.628/√n (Massey 1951 table, asymptotic).
func TestSwerlingKS(t *testing.T) {
	const n = 20000
	cdf := map[int]func(x float64) float64{
		Swerling1: func(x float64) float64 { return 1 - math.Exp(-x) },
		Swerling2: func(x float64) float64 { return 1 - math.Exp(-x) },
		Swerling3: func(x float64) float64 { return 1 - math.Exp(-2*x)*(1+2*x) },
		Swerling4: func(x float64) float64 { return 1 - math.Exp(-2*x)*(1+2*x) },
	}
	for model, f := range cdf {
		r := rand.New(rand.NewPCG(uint64(model), 7))
		x := make([]float64, n)
		for i := range x {
			x[i] = SwerlingRCS(r, 2.5, model) / 2.5
		}
		sort.Float64s(x)
		d := 0.0
		for i, v := range x {
			c := f(v)
			d = math.Max(d, math.Max(math.Abs(c-float64(i)/n), math.Abs(float64(i+1)/n-c)))
		}
		if crit := 1.628 / math.Sqrt(n); d > crit {
			t.Errorf("Swerling %d: KS D = %.4f > %.4f", model, d, crit)
		}
		// The wrong model must fail: exponential draws against chi-square 4.
		if model == Swerling1 {
			wrong := cdf[Swerling3]
			dw := 0.0
			for i, v := range x {
				dw = math.Max(dw, math.Abs(wrong(v)-float64(i)/n))
			}
			if dw < 1.628/math.Sqrt(n) {
				t.Errorf("KS test cannot tell Swerling 1 from 3 (D = %.4f)", dw)
			}
		}
	}
	if got := SwerlingRCS(nil, 3, SwerlingNone); got != 3 {
		t.Errorf("steady target RCS %v", got)
	}
}
