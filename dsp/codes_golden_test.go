package dsp

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"
)

// goldenCode is one record of testdata/golden/codes.json, written by
// testdata/golden/codes.py from the published formulas with numpy and
// scipy.signal.correlate (versions recorded in the file).
type goldenCode struct {
	Kind     string    `json:"kind"`
	N        int       `json:"n"`
	Root     int       `json:"root"`
	Phases   []float64 `json:"phases"`
	PSL      float64   `json:"psl"`
	PSLRDB   float64   `json:"pslr_db"`
	ISLRDB   float64   `json:"islr_db"`
	Periodic *float64  `json:"periodic_max_sidelobe"`
}

func TestCodesGolden(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "testdata", "golden", "codes.json"))
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Numpy, Scipy string
		Codes        []goldenCode
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Codes) < 20 {
		t.Fatalf("only %d golden codes", len(doc.Codes))
	}
	gens := map[string]func(n, root int) ([]float64, error){
		"frank":     func(n, _ int) ([]float64, error) { return Frank(n) },
		"p1":        func(n, _ int) ([]float64, error) { return P1(n) },
		"p2":        func(n, _ int) ([]float64, error) { return P2(n) },
		"p3":        func(n, _ int) ([]float64, error) { return P3(n) },
		"p4":        func(n, _ int) ([]float64, error) { return P4(n) },
		"zadoffchu": ZadoffChu,
	}
	for _, g := range doc.Codes {
		f, ok := gens[g.Kind]
		if !ok {
			t.Fatalf("unknown kind %q", g.Kind)
		}
		ph, err := f(g.N, g.Root)
		if err != nil {
			t.Fatalf("%s(%d, %d): %v", g.Kind, g.N, g.Root, err)
		}
		if len(ph) != len(g.Phases) {
			t.Fatalf("%s(%d): %d chips, golden %d", g.Kind, g.N, len(ph), len(g.Phases))
		}
		for i := range ph {
			if !samePhase(ph[i], g.Phases[i]) {
				t.Errorf("%s(%d, %d) chip %d: %v rad, golden %v (numpy %s)", g.Kind, g.N, g.Root, i, ph[i], g.Phases[i], doc.Numpy)
				break
			}
		}
		if got := CodePSL(ph); math.Abs(got-g.PSL) > 1e-9*float64(g.N) {
			t.Errorf("%s(%d, %d) PSL = %v, scipy %v", g.Kind, g.N, g.Root, got, g.PSL)
		}
		if got := CodePSLRDB(ph); math.Abs(got-g.PSLRDB) > 1e-6 {
			t.Errorf("%s(%d, %d) PSLR = %v dB, scipy %v", g.Kind, g.N, g.Root, got, g.PSLRDB)
		}
		islr := 10 * math.Log10(CodeISL(ph)/float64(g.N*g.N))
		if math.Abs(islr-g.ISLRDB) > 1e-6 {
			t.Errorf("%s(%d, %d) ISLR = %v dB, scipy %v", g.Kind, g.N, g.Root, islr, g.ISLRDB)
		}
		if g.Periodic != nil && *g.Periodic > 1e-12 {
			t.Errorf("%s(%d, %d): golden periodic sidelobe %v, want 0", g.Kind, g.N, g.Root, *g.Periodic)
		}
	}
}
