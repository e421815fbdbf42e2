package dsp

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"
)

// cellDetector returns pdSteady for PdInCell: a steady echo against the
// detector's threshold times scale·r. A threshold s times the nominal one
// is the nominal threshold of the same detector at another Pfa: known
// noise Pfa^s (T = −ln Pfa); CA-CFAR (1 + s·c)^(−M), c = Pfa^(−1/M) − 1
// (Richards, Fundamentals of Radar Signal Processing, 2nd ed., eq. 6.135);
// OS-CFAR Rohling's Pfa at s·α.
func cellDetector(kind string, pfa, r float64, cells, rank int) func(x, s float64) (float64, bool) {
	return func(x, s float64) (float64, bool) {
		s *= r
		switch kind {
		case "fixed":
			return MarcumQ(1, math.Sqrt(2*x), math.Sqrt(-2*s*math.Log(pfa))), true
		case "ca":
			c := math.Expm1(-math.Log(pfa) / float64(cells))
			d := Detector{Pfa: math.Exp(-float64(cells) * math.Log1p(s*c)), Pulses: 1, Integration: Coherent, CFARCells: cells}
			if d.Validate() != nil {
				return 0, false
			}
			return d.Pd(x), true
		}
		a := OSMultiplier(pfa, cells, rank)
		d := Detector{Pfa: OSPfa(s*a, cells, rank), Pulses: 1, Integration: Coherent, CFARCells: cells, OSRank: rank}
		if d.Validate() != nil {
			return 0, false
		}
		return d.Pd(x), true
	}
}

// TestPdInCellClosedForms: where the sum has a closed form. A Swerling 1
// target plus a steady echo is Rician over noise of power 1 + χ:
// Q₁(√(2χm/(1+χ)), √(2T/(1+χ))) (Rice 1945; Marcum Q, derived here for the
// widened noise). Two Gaussian echoes: e^(−T/(1+χ+χm)) (Richards Table
// 6.1, with the powers added). One steady echo alone: Marcum Q at its
// power, any phase. A steady target with nothing else: Marcum Q.
func TestPdInCellClosedForms(t *testing.T) {
	const pfa = 1e-6
	T := -math.Log(pfa)
	f := cellDetector("fixed", pfa, 1, 0, 0)
	for _, c := range []struct{ chi, chm float64 }{{30, 4}, {100, 12}, {5, 20}, {300, 0.5}} {
		got, err := PdInCell([]CellEcho{{c.chi, Swerling1}, {c.chm, SwerlingNone}}, f)
		want := MarcumQ(1, math.Sqrt(2*c.chm/(1+c.chi)), math.Sqrt(2*T/(1+c.chi)))
		if err != nil || math.Abs(got-want) > 1e-12 {
			t.Errorf("Swerling 1 %g + steady %g: %g (%v), want %g", c.chi, c.chm, got, err, want)
		}
		got, _ = PdInCell([]CellEcho{{c.chi, Swerling2}, {c.chm, Swerling1}}, f)
		if want := math.Exp(-T / (1 + c.chi + c.chm)); math.Abs(got-want) > 1e-12 {
			t.Errorf("Swerling 1 %g + Swerling 1 %g: %g, want %g", c.chi, c.chm, got, want)
		}
		got, _ = PdInCell([]CellEcho{{c.chi, SwerlingNone}}, f)
		if want := MarcumQ(1, math.Sqrt(2*c.chi), math.Sqrt(2*T)); math.Abs(got-want) > 1e-12 {
			t.Errorf("steady %g: %g, want %g", c.chi, got, want)
		}
	}
	// A Swerling 3 echo alone, against Richards Table 6.1 (one pulse):
	// e^(−T/(1+χ/2))·(1 + (χ/2)·T/(1+χ/2)²).
	for _, chi := range []float64{3, 30, 300} {
		got, _ := PdInCell([]CellEcho{{chi, Swerling3}}, f)
		x := chi / 2
		want := math.Exp(-T/(1+x)) * (1 + x*T/((1+x)*(1+x)))
		if math.Abs(got-want) > 1e-7 {
			t.Errorf("Swerling 3 %g: %g, want %g", chi, got, want)
		}
	}
}

// TestPdInCellGolden compares with testdata/golden/pdcell.json: the
// crossing probability from the definition by scipy (ncx2, quad over the
// phases and the Swerling 3 power, Gauss–Legendre over the CFAR's
// threshold law), fixed threshold, CA and OS CFARs, all fluctuation laws.
func TestPdInCellGolden(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "testdata", "golden", "pdcell.json"))
	if err != nil {
		t.Fatal(err)
	}
	var g struct {
		Cases []struct {
			Echoes []struct {
				Power    float64 `json:"power"`
				Swerling int     `json:"swerling"`
			} `json:"echoes"`
			Det struct {
				Kind  string  `json:"kind"`
				Pfa   float64 `json:"pfa"`
				Scale float64 `json:"scale"`
				Cells int     `json:"cells"`
				Rank  int     `json:"rank"`
			} `json:"det"`
			Pd float64 `json:"pd"`
		} `json:"cases"`
	}
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	if len(g.Cases) < 20 {
		t.Fatalf("%d cases in pdcell.json", len(g.Cases))
	}
	worst, worstInterp := 0.0, 0.0
	for i, c := range g.Cases {
		var e []CellEcho
		for _, x := range c.Echoes {
			e = append(e, CellEcho{x.Power, x.Swerling})
		}
		d := c.Det
		e2 := append([]CellEcho(nil), e...)
		got, err := PdInCell(e, cellDetector(d.Kind, d.Pfa, d.Scale, d.Cells, d.Rank))
		worst = max(worst, math.Abs(got-c.Pd))
		if err != nil || math.Abs(got-c.Pd) > 1e-6 {
			t.Errorf("case %d (%s, %v): Pd %.8f (%v), scipy %.8f", i, d.Kind, c.Echoes, got, err, c.Pd)
		}
		// The tabulated path the report uses, against the same file.
		got, err = PdInCellInterp(e2, cellDetector(d.Kind, d.Pfa, d.Scale, d.Cells, d.Rank))
		worstInterp = max(worstInterp, math.Abs(got-c.Pd))
		if err != nil || math.Abs(got-c.Pd) > 2e-6 {
			t.Errorf("case %d (%s, %v): tabulated Pd %.8f (%v), scipy %.8f", i, d.Kind, c.Echoes, got, err, c.Pd)
		}
	}
	t.Logf("%d cases, largest difference %.2g (PdInCellInterp %.2g)", len(g.Cases), worst, worstInterp)
}

// TestPdInCellErrors: bad echoes are refused with the field and range.
func TestPdInCellErrors(t *testing.T) {
	f := cellDetector("fixed", 1e-6, 1, 0, 0)
	for _, e := range []CellEcho{{-1, 0}, {math.Inf(1), 0}, {math.NaN(), 0}, {1, 5}, {1, -1}} {
		if _, err := PdInCell([]CellEcho{e}, f); err == nil {
			t.Errorf("%v accepted", e)
		}
	}
	if _, err := PdInCell([]CellEcho{{10, 0}}, func(x, s float64) (float64, bool) { return 0, false }); err == nil {
		t.Error("a detector without a Pd accepted")
	}
}

func BenchmarkPdInCell(b *testing.B) {
	f := cellDetector("ca", 1e-6, 1.3, 16, 0)
	e := make([]CellEcho, 2)
	for b.Loop() {
		e[0], e[1] = CellEcho{25, SwerlingNone}, CellEcho{5, SwerlingNone}
		if _, err := PdInCell(e, f); err != nil {
			b.Fatal(err)
		}
	}
}

// TestPdInCellInterp: the tabulated path (PdInCellInterp) against the
// direct quadrature (PdInCell, itself checked against the SciPy golden
// file above) on seeded random cells: a steady, Swerling 1–4 target with
// one or two neighbours of every law, behind a fixed threshold, a CA-CFAR,
// an OS-CFAR and a CA-CFAR over correlated cells (eigenvalues of a
// lag-one correlation of 0.6), thresholds raised by 0–30 dB. The table
// aims at 1e-9 and the integrals at 1e-8; the test allows 1e-6.
func TestPdInCellInterp(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 2026))
	kinds := []string{"fixed", "ca", "os", "corr"}
	worst := 0.0
	calls, direct := 0, 0
	n := 160
	if testing.Short() {
		n = 40
	}
	for i := range n {
		kind := kinds[i%len(kinds)]
		pfa := math.Pow(10, -3-4*rng.Float64())
		r := math.Pow(10, 3*rng.Float64()*rng.Float64())
		cells := 8 + rng.IntN(25)
		rank := max(1, int(math.Round(0.75*float64(cells))))
		var f func(x, s float64) (float64, bool)
		if kind == "corr" {
			ev := HermitianEigenvalues(cells, func(i, j int) complex128 {
				switch i - j {
				case 0:
					return 1
				case 1, -1:
					return 0.6
				}
				return 0
			})
			alpha := CorrelatedCAMultiplier(pfa, ev)
			d := Detector{Pfa: pfa, Pulses: 1, Integration: Coherent}
			f = func(x, s float64) (float64, bool) { return d.PdCorrelatedCA(x, s*r*alpha, ev), true }
		} else {
			f = cellDetector(kind, pfa, r, cells, rank)
		}
		counted := func(k *int) func(x, s float64) (float64, bool) {
			return func(x, s float64) (float64, bool) { *k++; return f(x, s) }
		}
		e := []CellEcho{{FromDB(5 + 25*rng.Float64()), rng.IntN(5)}}
		for range 1 + rng.IntN(2) {
			e = append(e, CellEcho{FromDB(-5 + 25*rng.Float64()), rng.IntN(5)})
		}
		e2 := append([]CellEcho(nil), e...)
		want, err1 := PdInCell(e, counted(&direct))
		got, err2 := PdInCellInterp(e2, counted(&calls))
		if err1 != nil || err2 != nil {
			t.Errorf("case %d (%s, %v): errors %v, %v", i, kind, e, err1, err2)
			continue
		}
		worst = max(worst, math.Abs(got-want))
		if math.Abs(got-want) > 1e-6 {
			t.Errorf("case %d (%s, Pfa %.2g, raise %.3g, %d cells, %v): tabulated %.9f, direct %.9f", i, kind, pfa, r, cells, e, got, want)
		}
	}
	t.Logf("%d cells: largest difference %.2g; detector Pd calls %d tabulated, %d direct", n, worst, calls, direct)
}
