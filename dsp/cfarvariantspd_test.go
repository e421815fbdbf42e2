package dsp

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"
)

// TestVariantPdMonteCarlo checks VariantPd against seeded Monte Carlo
// dwells simulated from the definition (a complex Gaussian cell under test
// holding the target, exponential training cells, the GO/SO/censored
// statistic): each within the 99 % Clopper–Pearson interval of 2·10⁵
// dwells. Also the Swerling 1 identity Pd(χ) = Pfa(α/(1+χ)) (Weiss 1982,
// from memory) is what the Monte Carlo sees.
func TestVariantPdMonteCarlo(t *testing.T) {
	const dwells = 200000
	rng := rand.New(rand.NewPCG(20261202, 7))
	type tc struct {
		v        CFARVariant
		sw       int
		chiDB    float64
		n1, n2   int
		pfa      float64
		censored int
	}
	cases := []tc{
		{GreatestOf, SwerlingNone, 11, 8, 8, 1e-3, 0},
		{SmallestOf, SwerlingNone, 10, 8, 8, 1e-3, 0},
		{GreatestOf, SwerlingNone, 13, 6, 10, 1e-4, 0},
		{SmallestOf, Swerling3, 18, 8, 8, 1e-4, 0},
		{GreatestOf, Swerling4, 18, 8, 8, 1e-4, 0},
		{GreatestOf, Swerling1, 20, 8, 8, 1e-3, 0},
		{SmallestOf, Swerling2, 20, 8, 8, 1e-3, 0},
		{Censored, Swerling1, 20, 16, 0, 1e-3, 2},
		{Censored, SwerlingNone, 12, 16, 0, 1e-3, 2},
		{Censored, SwerlingNone, 14, 24, 0, 1e-4, 5},
		{Censored, Swerling3, 16, 16, 0, 1e-3, 2},
		{Censored, Swerling4, 16, 16, 0, 1e-3, 3},
	}
	for _, c := range cases {
		var alpha float64
		switch c.v {
		case GreatestOf:
			alpha = GOMultiplier(c.pfa, c.n1, c.n2)
		case SmallestOf:
			alpha = SOMultiplier(c.pfa, c.n1, c.n2)
		default:
			alpha = CensoredMultiplier(c.pfa, c.n1, c.censored)
		}
		second := c.n2
		if c.v == Censored {
			second = c.censored
		}
		chi := FromDB(c.chiDB)
		want, err := VariantPd(c.v, c.sw, chi, alpha, c.n1, second)
		if err != nil {
			t.Fatal(err)
		}
		hits := int64(0)
		cells := make([]float64, c.n1+c.n2)
		for range dwells {
			p := chi
			switch c.sw {
			case Swerling1, Swerling2:
				p = chi * rng.ExpFloat64()
			case Swerling3, Swerling4:
				p = chi / 2 * (rng.ExpFloat64() + rng.ExpFloat64())
			}
			re := math.Sqrt(p) + rng.NormFloat64()*math.Sqrt(0.5)
			im := rng.NormFloat64() * math.Sqrt(0.5)
			x := re*re + im*im
			for i := range cells {
				cells[i] = rng.ExpFloat64()
			}
			var z float64
			switch c.v {
			case GreatestOf, SmallestOf:
				a, b := 0.0, 0.0
				for _, v := range cells[:c.n1] {
					a += v
				}
				for _, v := range cells[c.n1:] {
					b += v
				}
				a, b = a/float64(c.n1), b/float64(c.n2)
				z = math.Max(a, b)
				if c.v == SmallestOf {
					z = math.Min(a, b)
				}
			default:
				// drop the censored largest, mean of the rest
				for i := 1; i < len(cells); i++ {
					for k := i; k > 0 && cells[k] < cells[k-1]; k-- {
						cells[k], cells[k-1] = cells[k-1], cells[k]
					}
				}
				m := c.n1 - c.censored
				for _, v := range cells[:m] {
					z += v
				}
				z /= float64(m)
			}
			if x > alpha*z {
				hits++
			}
		}
		lo, hi := ClopperPearson(hits, dwells, 0.99)
		t.Logf("variant %d, Swerling %d, %.0f dB, %d+%d cells, Pfa %g: VariantPd %.4f, Monte Carlo %.4f [%.4f, %.4f]",
			c.v, c.sw, c.chiDB, c.n1, c.n2, c.pfa, want, float64(hits)/dwells, lo, hi)
		if want < lo || want > hi {
			t.Errorf("variant %d, Swerling %d, %.0f dB: VariantPd %.4f outside [%.4f, %.4f]", c.v, c.sw, c.chiDB, want, lo, hi)
		}
	}
}

// TestVariantPdLimits: at zero SNR the Pd is the detector's Pfa (steady
// and Swerling 3 integrals against GOSOPfa's closed form, Hansen &
// Sawyers 1980), and bad inputs are refused.
func TestVariantPdLimits(t *testing.T) {
	for _, v := range []CFARVariant{GreatestOf, SmallestOf} {
		a := GOMultiplier(1e-4, 8, 8)
		if v == SmallestOf {
			a = SOMultiplier(1e-4, 8, 8)
		}
		for _, sw := range []int{SwerlingNone, Swerling3} {
			got, err := VariantPd(v, sw, 0, a, 8, 8)
			if err != nil || math.Abs(got-1e-4) > 1e-8 {
				t.Errorf("variant %d, Swerling %d at 0 SNR: %g (%v), want 1e-4", v, sw, got, err)
			}
		}
	}
	// Censored: the stage race at zero SNR is CensoredPfa (Rickard &
	// Dillard 1977's detector; the product form of CensoredPfa).
	a := CensoredMultiplier(1e-5, 24, 4)
	for _, sw := range []int{SwerlingNone, Swerling3, Swerling4} {
		got, err := VariantPd(Censored, sw, 0, a, 24, 4)
		if err != nil || math.Abs(got-1e-5) > 1e-11 {
			t.Errorf("censored, Swerling %d at 0 SNR: %g (%v), want 1e-5", sw, got, err)
		}
	}
	// With nothing censored the censored CFAR is cell averaging:
	// Detector.Pd's CA-CFAR series (itself checked against scipy).
	for _, sw := range []int{SwerlingNone, Swerling3} {
		d := Detector{Pfa: 1e-5, Pulses: 1, Integration: Coherent, Swerling: sw, CFARCells: 16}
		got, err := VariantPd(Censored, sw, FromDB(15), CensoredMultiplier(1e-5, 16, 0), 16, 0)
		if want := d.Pd(FromDB(15)); err != nil || math.Abs(got-want) > 1e-9 {
			t.Errorf("censored with none dropped, Swerling %d: %g (%v), want the CA-CFAR %g", sw, got, err, want)
		}
	}
	for _, bad := range []func() error{
		func() error { _, err := VariantPd(GreatestOf, 0, -1, 10, 8, 8); return err },
		func() error { _, err := VariantPd(GreatestOf, 0, 10, 0, 8, 8); return err },
		func() error { _, err := VariantPd(GreatestOf, 7, 10, 10, 8, 8); return err },
		func() error { _, err := VariantPd(GreatestOf, 0, 10, 10, 0, 0); return err },
		func() error { _, err := VariantPd(Censored, 1, 10, 10, 16, 16); return err },
		func() error { _, err := VariantPd(CellAveraging, 1, 10, 10, 16, 0); return err },
	} {
		if bad() == nil {
			t.Error("bad input accepted")
		}
	}
}

// TestVariantPdGolden checks VariantPd (greatest-of and smallest-of,
// steady and Swerling 1, 3, 4) against scipy quadrature over the reference
// statistic (testdata/golden/variantpd.py, an independent route: the Go
// code integrates over the cell under test), including multipliers raised
// a hundredfold on a 35 dB target: to 1e-9, relative where Pd < 1e-3.
func TestVariantPdGolden(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "testdata", "golden", "variantpd.json"))
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Cases []struct {
			Variant  string  `json:"variant"`
			Swerling int     `json:"swerling"`
			SNRDB    float64 `json:"snr_db"`
			Alpha    float64 `json:"alpha"`
			N1       int     `json:"n1"`
			N2       int     `json:"n2"`
			Pd       float64 `json:"pd"`
		} `json:"cases"`
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Cases) < 150 {
		t.Fatalf("only %d cases", len(doc.Cases))
	}
	worst := 0.0
	for _, c := range doc.Cases {
		v := GreatestOf
		if c.Variant == "so" {
			v = SmallestOf
		}
		got, err := VariantPd(v, c.Swerling, FromDB(c.SNRDB), c.Alpha, c.N1, c.N2)
		if err != nil {
			t.Fatal(err)
		}
		want := min(c.Pd, 1)
		var e float64
		if want < 1e-3 {
			e = math.Abs(got-want) / want
		} else {
			e = math.Abs(got - want)
		}
		worst = max(worst, e)
		if e > 1e-9 {
			t.Errorf("%s Swerling %d, %g dB, α %g, cells %d+%d: Pd %.15g, scipy %.15g", c.Variant, c.Swerling, c.SNRDB, c.Alpha, c.N1, c.N2, got, want)
		}
	}
	t.Logf("worst error %.3g over %d cases", worst, len(doc.Cases))
}

func BenchmarkVariantPd(b *testing.B) {
	for _, c := range []struct {
		name   string
		v      CFARVariant
		sw     int
		chiDB  float64
		alpha  float64
		n1, n2 int
	}{
		{"so_steady_12+12", SmallestOf, SwerlingNone, 13, 20, 12, 12},
		{"go_sw3_12+12", GreatestOf, Swerling3, 13, 20, 12, 12},
		{"so_steady_256+256_raised", SmallestOf, SwerlingNone, 35, 1450, 256, 256},
		{"so_sw3_256+256", SmallestOf, Swerling3, 20, 14.5, 256, 256},
	} {
		b.Run(c.name, func(b *testing.B) {
			for b.Loop() {
				if _, err := VariantPd(c.v, c.sw, FromDB(c.chiDB), c.alpha, c.n1, c.n2); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
