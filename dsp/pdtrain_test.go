package dsp

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mathext"
)

// TestTrainChi4Limits: one pulse is Richards' one-pulse Swerling 4 law
// (Fundamentals of Radar Signal Processing, 2nd ed., Table 6.1); many
// equal weights tend to the exponential of mean 1 + χ (the Gaussian
// limit); the density integrates to the survival function.
func TestTrainChi4Limits(t *testing.T) {
	one, err := NewTrainChi4([]float64{3})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct{ chi, T float64 }{{0, 13.8}, {FromDB(10), 13.8}, {FromDB(20), 6.9}, {FromDB(30), 20}} {
		a := c.chi / 2
		want := math.Exp(-c.T/(1+a)) * (1 + a*c.T/((1+a)*(1+a)))
		if got := one.Survival(c.chi, c.T); math.Abs(got-want) > 1e-14 {
			t.Errorf("one pulse, χ %g, T %g: %g, want %g", c.chi, c.T, got, want)
		}
	}
	w := make([]float64, 4096)
	for i := range w {
		w[i] = 1
	}
	many, err := NewTrainChi4(w)
	if err != nil {
		t.Fatal(err)
	}
	for _, chi := range []float64{1, 10, 100} {
		T := 13.8
		want := math.Exp(-T / (1 + chi))
		if got := many.Survival(chi, T); math.Abs(got-want) > 2e-3*want {
			t.Errorf("4096 equal pulses, χ %g: %g, want near the exponential %g", chi, got, want)
		}
	}
	tr, _ := NewTrainChi4([]float64{0.08, 0.3, 0.7, 1, 1, 0.7, 0.3, 0.08})
	chi := FromDB(12)
	for _, T := range []float64{1, 6.9, 13.8, 30} {
		// ∫_T^∞ f by Simpson's rule
		hi := T + 80*(1+chi)
		n := 20000
		h := (hi - T) / float64(n)
		s := 0.0
		for i := 0; i <= n; i++ {
			wt := 2.0
			if i == 0 || i == n {
				wt = 1
			} else if i%2 == 1 {
				wt = 4
			}
			s += wt * tr.Density(chi, T+float64(i)*h)
		}
		s *= h / 3
		if got := tr.Survival(chi, T); math.Abs(got-s) > 1e-9 {
			t.Errorf("T %g: survival %.12f, ∫ density %.12f", T, got, s)
		}
	}
	for _, bad := range [][]float64{nil, {0, 0}, {1, -1}, {math.Inf(1)}, {math.NaN()}} {
		if _, err := NewTrainChi4(bad); err == nil {
			t.Errorf("weights %v accepted", bad)
		}
	}
}

// TestTrainChi4MonteCarlo: the law against seeded pulse trains simulated
// from the definition — per pulse a chi-square-4 power and a uniform
// phase, through Hamming-windowed DFT taps, plus the bin's noise; a known
// threshold and a 16-cell CA-CFAR; each inside the 99 % Clopper–Pearson
// interval of 2·10⁵ dwells.
func TestTrainChi4MonteCarlo(t *testing.T) {
	const dwells = 200000
	rng := rand.New(rand.NewPCG(20261202, 44))
	for _, c := range []struct {
		n     int
		chiDB float64
		pfa   float64
		cells int
	}{{4, 14, 1e-4, 0}, {16, 12, 1e-3, 0}, {8, 16, 1e-3, 16}} {
		taps := make([]float64, c.n)
		w := make([]float64, c.n)
		noise := 0.0
		for p := range taps {
			taps[p] = 0.54 - 0.46*math.Cos(2*math.Pi*float64(p)/float64(c.n-1))
			w[p] = taps[p] * taps[p]
			noise += w[p]
		}
		law, err := NewTrainChi4(w)
		if err != nil {
			t.Fatal(err)
		}
		chi := FromDB(c.chiDB) // mean power in the bin over its noise
		var want, alpha float64
		if c.cells == 0 {
			want = law.Survival(chi, -math.Log(c.pfa))
		} else {
			alpha = float64(c.cells) * (math.Pow(c.pfa, -1/float64(c.cells)) - 1)
			want = law.PdThreshold(chi, func(x float64) float64 {
				return mathext.GammaIncReg(float64(c.cells), float64(c.cells)*x/alpha)
			})
		}
		hits := int64(0)
		for range dwells {
			var re, im float64
			for p := range taps {
				pw := chi / noise / 2 * (rng.ExpFloat64() + rng.ExpFloat64()) // mean chi/noise per pulse
				ph := 2 * math.Pi * rng.Float64()
				a := taps[p] * math.Sqrt(pw)
				re += a * math.Cos(ph)
				im += a * math.Sin(ph)
			}
			re += rng.NormFloat64() * math.Sqrt(0.5)
			im += rng.NormFloat64() * math.Sqrt(0.5)
			x := re*re + im*im
			thr := -math.Log(c.pfa)
			if c.cells > 0 {
				s := 0.0
				for range c.cells {
					s += rng.ExpFloat64()
				}
				thr = alpha * s / float64(c.cells)
			}
			if x > thr {
				hits++
			}
		}
		lo, hi := ClopperPearson(hits, dwells, 0.99)
		t.Logf("%d pulses, %g dB, Pfa %g, %d cells: law %.4f, Monte Carlo %.4f [%.4f, %.4f]", c.n, c.chiDB, c.pfa, c.cells, want, float64(hits)/dwells, lo, hi)
		if want < lo || want > hi {
			t.Errorf("%d pulses, %g dB: law %.4f outside [%.4f, %.4f]", c.n, c.chiDB, want, lo, hi)
		}
	}
}

// TestTrainChi4Golden: TrainChi4 against testdata/golden/pdtrain.py, which
// computes the same probabilities from the definition without the series:
// the radial characteristic function (each term's E[J0(bR)] checked by
// quadrature over its gamma law) inverted by Kluyver's J1 integral with
// scipy quad, and behind a CA-CFAR a further quad over the reference
// sum's gamma law. Uniform, Hamming- and Hann-weighted trains of 1 to 32
// pulses, 0 to 30 dB, Pfa 1e-3 and 1e-6.
func TestTrainChi4Golden(t *testing.T) {
	var g struct {
		Known []struct {
			Weights   []float64 `json:"weights"`
			SNRDB     float64   `json:"snr_db"`
			Threshold float64   `json:"threshold"`
			Pd        float64   `json:"pd"`
		} `json:"known_noise"`
		CA []struct {
			Weights []float64 `json:"weights"`
			SNRDB   float64   `json:"snr_db"`
			Cells   int       `json:"cells"`
			Pfa     float64   `json:"pfa"`
			Pd      float64   `json:"pd"`
		} `json:"ca_cfar"`
	}
	readGolden(t, "pdtrain.json", &g)
	if len(g.Known) < 30 || len(g.CA) < 3 {
		t.Fatalf("golden file has %d and %d cases", len(g.Known), len(g.CA))
	}
	worst := 0.0
	for _, c := range g.Known {
		law, err := NewTrainChi4(c.Weights)
		if err != nil {
			t.Fatal(err)
		}
		got := law.Survival(FromDB(c.SNRDB), c.Threshold)
		worst = math.Max(worst, math.Abs(got-c.Pd))
		if math.Abs(got-c.Pd) > 1e-9 {
			t.Errorf("%d pulses, %g dB, T %g: %.12f, golden %.12f", len(c.Weights), c.SNRDB, c.Threshold, got, c.Pd)
		}
	}
	for _, c := range g.CA {
		law, _ := NewTrainChi4(c.Weights)
		m := float64(c.Cells)
		alpha := m * (math.Pow(c.Pfa, -1/m) - 1)
		got := law.PdThreshold(FromDB(c.SNRDB), func(x float64) float64 { return mathext.GammaIncReg(m, m*x/alpha) })
		worst = math.Max(worst, math.Abs(got-c.Pd))
		if math.Abs(got-c.Pd) > 1e-7 {
			t.Errorf("CA-CFAR %d cells, %d pulses, %g dB: %.10f, golden %.10f", c.Cells, len(c.Weights), c.SNRDB, got, c.Pd)
		}
		ca := law.PdCA(FromDB(c.SNRDB), c.Cells, alpha)
		worst = math.Max(worst, math.Abs(ca-c.Pd))
		if math.Abs(ca-c.Pd) > 1e-9 {
			t.Errorf("PdCA, %d cells, %d pulses, %g dB: %.12f, golden %.12f", c.Cells, len(c.Weights), c.SNRDB, ca, c.Pd)
		}
	}
	t.Logf("largest difference %.2g", worst)
}

// BenchmarkTrainChi4: one Pd of a Swerling 4 target in a Doppler bin of a
// Hamming-weighted 32-pulse train, known noise and behind a 132-cell
// CA-CFAR (the hill-clutter demo's region), against the one-pulse
// Swerling 3/4 CA-CFAR series (Detector.Pd) measured in the same run.
func BenchmarkTrainChi4(b *testing.B) {
	w := make([]float64, 32)
	for p := range w {
		v := 0.54 - 0.46*math.Cos(2*math.Pi*float64(p)/31)
		w[p] = v * v
	}
	law, _ := NewTrainChi4(w)
	chi := FromDB(15)
	b.Run("known", func(b *testing.B) {
		for range b.N {
			law.Survival(chi, 13.8)
		}
	})
	m := 132.0
	alpha := m * (math.Pow(1e-6, -1/m) - 1)
	b.Run("ca132", func(b *testing.B) {
		for range b.N {
			law.PdThreshold(chi, func(x float64) float64 { return mathext.GammaIncReg(m, m*x/alpha) })
		}
	})
	b.Run("ca132-PdCA", func(b *testing.B) {
		for range b.N {
			law.PdCA(chi, 132, alpha)
		}
	})
	d := Detector{Pfa: 1e-6, Pulses: 1, Integration: Coherent, Swerling: Swerling4, CFARCells: 132}
	b.Run("series-ca132-onepulse", func(b *testing.B) {
		for range b.N {
			d.Pd(chi)
		}
	})
}
