package dsp

import (
	"encoding/json"
	"math"
	"os"
	"testing"
)

// TestClopperPearsonGolden checks the exact binomial interval against
// scipy.stats.binomtest(...).proportion_ci(method="exact")
// (testdata/golden/binomial.py).
func TestClopperPearsonGolden(t *testing.T) {
	b, err := os.ReadFile("../testdata/golden/binomial.json")
	if err != nil {
		t.Fatal(err)
	}
	var g struct {
		Cases []struct {
			K, N         int64
			Conf, Lo, Hi float64
		}
	}
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	if len(g.Cases) < 10 {
		t.Fatalf("golden file holds %d cases", len(g.Cases))
	}
	for _, c := range g.Cases {
		lo, hi := ClopperPearson(c.K, c.N, c.Conf)
		if math.Abs(lo-c.Lo) > 1e-9*math.Max(c.Lo, 1e-6) || math.Abs(hi-c.Hi) > 1e-9*math.Max(c.Hi, 1e-6) {
			t.Errorf("ClopperPearson(%d, %d, %g) = [%.12g, %.12g], scipy [%.12g, %.12g]", c.K, c.N, c.Conf, lo, hi, c.Lo, c.Hi)
		}
	}
}

func TestClopperPearsonPanics(t *testing.T) {
	for _, c := range []struct {
		k, n int64
		conf float64
	}{{-1, 10, 0.95}, {11, 10, 0.95}, {0, 0, 0.95}, {1, 10, 1}, {1, 10, 0}, {1, 10, math.NaN()}} {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("ClopperPearson(%d, %d, %g) did not panic", c.k, c.n, c.conf)
				}
			}()
			ClopperPearson(c.k, c.n, c.conf)
		}()
	}
}
