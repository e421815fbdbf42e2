package dsp

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestCAMultiplier checks α = N(Pfa^(−1/N) − 1) for independent cells
// against Richards, Fundamentals of Radar Signal Processing, 2nd ed.,
// eq. 6.135 (values to 3 decimals).
func TestCAMultiplier(t *testing.T) {
	for _, tt := range []struct {
		n    int
		want float64
	}{{8, 36.987}, {16, 21.942}, {32, 17.278}, {64, 15.420}} {
		if got := CAMultiplier(1e-6, tt.n); math.Abs(got-tt.want) > 5e-4 {
			t.Errorf("CAMultiplier(1e-6, %d) = %.4f, want %.3f", tt.n, got, tt.want)
		}
	}
	// Known-noise threshold −ln Pfa = 13.8155 (same source).
	if got := FixedMultiplier(1e-6); math.Abs(got-13.8155) > 1e-4 {
		t.Errorf("FixedMultiplier(1e-6) = %v", got)
	}
	// As N → ∞ the CA multiplier tends to −ln Pfa (common practice, no source).
	if got := CAMultiplier(1e-6, 1<<20); math.Abs(got-13.8155) > 1e-3 {
		t.Errorf("CAMultiplier(1e-6, 2^20) = %v, want → 13.8155", got)
	}
}

// TestOSMultiplierInverts checks that OSMultiplier solves Rohling's Pfa
// expression, and that with k = n = 1 it reduces to the closed form
// Pfa = 1/(1+α) (one training cell).
func TestOSMultiplierInverts(t *testing.T) {
	for _, tt := range []struct{ n, k int }{{16, 12}, {24, 18}, {32, 24}, {8, 8}, {1, 1}} {
		a := OSMultiplier(1e-6, tt.n, tt.k)
		if p := OSPfa(a, tt.n, tt.k); math.Abs(p-1e-6)/1e-6 > 1e-9 {
			t.Errorf("n=%d k=%d: Pfa(α=%v) = %v", tt.n, tt.k, a, p)
		}
	}
	if a := OSMultiplier(1e-3, 1, 1); math.Abs(a-999) > 1e-6 {
		t.Errorf("n=k=1: α = %v, want 999", a)
	}
}

// TestCFARFalseAlarmRate runs each CFAR over 2·10⁶ seeded exponential
// noise cells (square-law detector in Gaussian noise) and checks the
// false-alarm count falls inside the 99 % interval of its design Pfa
// (binomial normal approximation; neighbouring cells share training cells,
// which leaves the mean unchanged).
func TestCFARFalseAlarmRate(t *testing.T) {
	const cells = 2_000_000
	r := rand.New(rand.NewPCG(1, 1))
	power := make([]float64, cells)
	for i := range power {
		power[i] = r.ExpFloat64()
	}
	for _, c := range []*CFAR{
		{PFA: 1e-3, Guard: 2, Train: 16},
		{PFA: 1e-3, Guard: 2, Train: 32},
		{PFA: 1e-3, Guard: 3, Train: 24, Rank: 18},
		{PFA: 1e-3, Guard: 2, Train: 16, Rank: 12},
	} {
		th := c.Thresholds(nil, power)
		alarms := 0
		for i, p := range power {
			if p > th[i] {
				alarms++
			}
		}
		mean := c.PFA * cells
		half := 2.576 * math.Sqrt(mean*(1-c.PFA))
		if math.Abs(float64(alarms)-mean) > half {
			t.Errorf("%+v: %d false alarms, 99%% interval %.0f ± %.0f", *c, alarms, mean, half)
		} else {
			t.Logf("train %d rank %d: %d false alarms (expected %.0f ± %.0f)", c.Train, c.Rank, alarms, mean, half)
		}
	}
}

// TestCFARLevelMatchesThresholds checks the per-cell and the prefix-sum
// paths agree.
func TestCFARLevelMatchesThresholds(t *testing.T) {
	r := rand.New(rand.NewPCG(2, 2))
	// Lengths shorter than, equal to and longer than the CFAR window
	// (2·guard + train + 1 = 21 cells), so that the clamped edge path and
	// the interior path are both exercised.
	for _, n := range []int{1, 5, 20, 21, 22, 300} {
		p := make([]float64, n)
		for i := range p {
			p[i] = r.ExpFloat64() * float64(1+i%7)
		}
		c := &CFAR{PFA: 1e-5, Guard: 2, Train: 16}
		th := c.Thresholds(nil, p)
		for k := range p {
			if l := c.Level(p, k); math.Abs(l-th[k]) > 1e-9*l && !(math.IsInf(l, 1) && math.IsInf(th[k], 1)) {
				t.Fatalf("n=%d cell %d: Level %v, Thresholds %v", n, k, l, th[k])
			}
		}
	}
}

func BenchmarkCFARThresholds(b *testing.B) {
	for _, rank := range []int{0, 12} {
		c := &CFAR{PFA: 1e-6, Guard: 2, Train: 16, Rank: rank}
		p := make([]float64, 65536)
		for i := range p {
			p[i] = float64(i%13) + 1
		}
		dst := make([]float64, len(p))
		name := "ca"
		if rank > 0 {
			name = "os"
		}
		b.Run(name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				c.Thresholds(dst, p)
			}
		})
	}
}
