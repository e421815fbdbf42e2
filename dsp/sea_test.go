package dsp

import (
	"math"
	"testing"
)

// TestSeaSigma0Golden checks the NRL sea model against the Python
// transcription of its published formula (testdata/golden/propagation.py).
func TestSeaSigma0Golden(t *testing.T) {
	g := readPropagationGolden(t)
	for _, c := range g.Sea {
		if got := SeaSigma0DB(c.FGHz, c.SeaState, c.Vertical, c.PsiDeg); math.Abs(got-c.Sigma0DB) > 1e-10 {
			t.Errorf("f %g GHz, SS %g, vertical %v, ψ %g°: %.12f dB, golden %.12f", c.FGHz, c.SeaState, c.Vertical, c.PsiDeg, got, c.Sigma0DB)
		}
	}
}

// TestSeaSigma0AgainstNathanson: the model's mean absolute deviation from
// Nathanson's measured sea reflectivity (Radar Design Principles, 2nd ed.,
// 1991, as the model's authors transcribe his tables) is the one its
// authors state: 2.64 dB horizontal, 2.54 dB vertical over 0.1 … 60°
// (267 and 286 table entries).
func TestSeaSigma0AgainstNathanson(t *testing.T) {
	g := readPropagationGolden(t)
	sum, n := map[bool]float64{}, map[bool]int{}
	for _, c := range g.Nathanson {
		sum[c.Vertical] += math.Abs(c.Sigma0DB - SeaSigma0DB(c.FGHz, c.SeaState, c.Vertical, c.PsiDeg))
		n[c.Vertical]++
	}
	for _, c := range []struct {
		vertical bool
		points   int
		want     float64
	}{{false, 267, 2.64}, {true, 286, 2.54}} {
		got := sum[c.vertical] / float64(n[c.vertical])
		if n[c.vertical] != c.points || math.Abs(got-c.want) > 0.005 {
			t.Errorf("vertical %v: mean |σ⁰ − Nathanson| = %.4f dB over %d entries, the authors state %.2f dB over %d", c.vertical, got, n[c.vertical], c.want, c.points)
		}
	}
	if d := g.Deviation["H"].Mean; math.Abs(sum[false]/float64(n[false])-d) > 1e-9 {
		t.Errorf("horizontal deviation %.10f, golden %.10f", sum[false]/float64(n[false]), d)
	}
}

// TestSeaSigma0Trends: σ⁰ rises with sea state and grazing angle, and
// vertical exceeds horizontal at low grazing (the trends of Nathanson's
// tables); X band, sea state 3, 1°: −43.27 dB H, −41.19 dB V (the formula
// evaluated by hand).
func TestSeaSigma0Trends(t *testing.T) {
	if h, v := SeaSigma0DB(10, 3, false, 1), SeaSigma0DB(10, 3, true, 1); math.Abs(h+43.268) > 0.001 || math.Abs(v+41.189) > 0.001 {
		t.Errorf("10 GHz, SS 3, 1°: H %.3f, V %.3f dB", h, v)
	}
	for ss := 1.0; ss <= 6; ss++ {
		if !(SeaSigma0DB(9.3, ss, false, 1) > SeaSigma0DB(9.3, ss-1, false, 1)) {
			t.Errorf("σ⁰ does not rise from sea state %g to %g", ss-1, ss)
		}
	}
	for _, psi := range []float64{0.3, 1, 3, 10, 30} {
		if !(SeaSigma0DB(5.6, 3, true, psi) > SeaSigma0DB(5.6, 3, true, psi/3)) {
			t.Errorf("σ⁰ does not rise with grazing angle at %g°", psi)
		}
	}
	if !math.IsInf(SeaSigma0DB(10, 3, false, 0), -1) {
		t.Error("ψ = 0 should give −Inf")
	}
}

// TestGrazingRangeInverts: GrazingRange is the inverse of GrazingAngle on
// the 4/3 Earth and on a flat Earth (r = h/sin ψ).
func TestGrazingRangeInverts(t *testing.T) {
	for _, h := range []float64{5, 20, 300, 10000} {
		for _, deg := range []float64{0.1, 1, 10, 60} {
			psi := deg * math.Pi / 180
			r := GrazingRange(h, psi, EffectiveEarthRadius)
			back, ok := GrazingAngle(h, r, EffectiveEarthRadius)
			if !ok || math.Abs(back-psi) > 1e-9*psi {
				t.Errorf("h %g m, ψ %g°: r %g m gives back %g° (%v)", h, deg, r, back*180/math.Pi, ok)
			}
		}
	}
	if r := GrazingRange(20, math.Pi/6, math.Inf(1)); math.Abs(r-40) > 1e-12 {
		t.Errorf("flat Earth: %g m, want 40", r)
	}
}
