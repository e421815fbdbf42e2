package dsp

import (
	"math"
	"math/cmplx"
	"testing"
)

// TestMultiplePRFRange: PRIs of 1.0 and 1.1 ms, a target at 210 km
// appears at 60.10 km and 45.11 km, and the combined unambiguous range is
// c·lcm(1.0, 1.1 ms)/2 = c·11 ms/2 ≈ 1649 km (worked example of the
// Chinese remainder method, Skolnik, Introduction to Radar Systems, 3rd
// ed., ch. 3; values from the definitions, recomputed by hand:
// 210 − 149.896 = 60.104 km, 210 − 164.886 = 45.114 km).
func TestMultiplePRFRange(t *testing.T) {
	r1, r2 := UnambiguousRange(1e-3), UnambiguousRange(1.1e-3)
	a1, a2 := Wrap(210e3, r1), Wrap(210e3, r2)
	if math.Abs(a1-60.10e3) > 5 || math.Abs(a2-45.11e3) > 5 {
		t.Errorf("apparent ranges %.2f km and %.2f km, want 60.10 and 45.11", a1/1e3, a2/1e3)
	}
	s := NewSchedule(1e-3, 1.1e-3)
	if s.N[0] != 10 || s.N[1] != 11 || math.Abs(s.Delta-1e-4) > 1e-15 {
		t.Errorf("grid Δ %g, N %v; want 0.1 ms, [10 11]", s.Delta, s.N)
	}
	if ru := s.UnambiguousRange(); math.Abs(ru-1649e3) > 0.5e3 {
		t.Errorf("combined unambiguous range %.1f km, want 1649", ru/1e3)
	}
	// Coincidence: one true range within the combined unambiguous range,
	// measured apparent ranges rounded to 25 m gates.
	q := func(x float64) float64 { return 25 * math.Round(x/25) }
	got := Unfold([]float64{q(a1), q(a2)}, []float64{r1, r2}, 0, s.UnambiguousRange(), 30, false)
	if len(got) != 1 || math.Abs(got[0]-210e3) > 30 {
		t.Errorf("unfolded %v, want [210 km]", got)
	}
	// Beyond the combined unambiguous range the fold repeats: two answers.
	got = Unfold([]float64{a1, a2}, []float64{r1, r2}, 0, 2e6, 1, false)
	if len(got) != 2 || math.Abs(got[1]-got[0]-s.UnambiguousRange()) > 1 {
		t.Errorf("over 2000 km: %v, want 210 km and 210 km + 1649 km", got)
	}
	// Inconsistent measurements (a ghost pairing) resolve to nothing.
	if got := Unfold([]float64{60e3, 100e3}, []float64{r1, r2}, 0, s.UnambiguousRange(), 30, false); len(got) != 0 {
		t.Errorf("ghost pairing unfolded to %v", got)
	}
}

// TestCRT: the classic Sunzi Suanjing problem (x ≡ 2 mod 3, 3 mod 5,
// 2 mod 7: 23, modulus 105), non-coprime moduli (x ≡ 1 mod 4, 3 mod 6:
// 9 mod 12) and a contradiction (0 mod 4, 1 mod 6). And range gates:
// with PRIs of 10 and 11 grid steps Δ = 0.1 ms (15 km gates), a target in
// gate 14 (210 km) is seen in gates 4 and 3.
func TestCRT(t *testing.T) {
	for _, c := range []struct {
		r, m   []int
		x, mod int
		ok     bool
	}{
		{[]int{2, 3, 2}, []int{3, 5, 7}, 23, 105, true},
		{[]int{1, 3}, []int{4, 6}, 9, 12, true},
		{[]int{0, 1}, []int{4, 6}, 0, 0, false},
		{[]int{4, 3}, []int{10, 11}, 14, 110, true},
		{[]int{-1}, []int{7}, 6, 7, true},
	} {
		x, mod, ok := CRT(c.r, c.m)
		if x != c.x || mod != c.mod || ok != c.ok {
			t.Errorf("CRT(%v, %v) = %d, %d, %v; want %d, %d, %v", c.r, c.m, x, mod, ok, c.x, c.mod, c.ok)
		}
	}
}

// TestStaggerFirstBlindSpeed: PRIs n₁·Δ and n₂·Δ move the first blind
// speed to (n₁+n₂)/2 times that of the mean PRI (Skolnik, Introduction to
// Radar Systems, 3rd ed., ch. 3, staggered PRFs). 100 µs and 125 µs at
// 9.5 GHz: Δ = 25 µs, λ = c/9.5 GHz = 31.557 mm, λ/(2Δ) = 631.1 m/s
// (recomputed here; the published 631 m/s agrees). The blind speed is
// also found independently by scanning range rates for the first at
// which every PRI's pulse-to-pulse phase advance is a whole cycle.
func TestStaggerFirstBlindSpeed(t *testing.T) {
	lambda := SpeedOfLight / 9.5e9
	s := NewSchedule(100e-6, 125e-6)
	v := s.FirstBlindSpeed(lambda)
	if math.Abs(v-631) > 0.5 {
		t.Errorf("first blind speed %.2f m/s, want 631", v)
	}
	mean := BlindSpeed(112.5e-6, lambda)
	if want := float64(s.N[0]+s.N[1]) / 2 * mean; math.Abs(v-want) > 1e-9*want {
		t.Errorf("first blind speed %.4f m/s, (n1+n2)/2 · %.4f = %.4f", v, mean, want)
	}
	// Scan: the largest |1 − e^{j2π·fd·T_i}| over the PRIs, fd = 2v/λ.
	resid := func(v float64) float64 {
		w := 0.0
		for _, T := range s.PRI {
			w = math.Max(w, cmplx.Abs(1-cmplx.Exp(complex(0, 2*math.Pi*2*v/lambda*T))))
		}
		return w
	}
	first := 0.0
	for x := 10.0; x < 2000; x += 0.01 { // away from the null at 0
		if resid(x) < 0.05 { // near the first common null: take its minimum
			best := math.Inf(1)
			for y := x; y < x+2; y += 0.001 {
				if r := resid(y); r < best {
					first, best = y, r
				}
			}
			break
		}
	}
	if math.Abs(first-v) > 0.02 {
		t.Errorf("scan finds the first common blind speed at %.2f m/s, closed form %.2f", first, v)
	}
	// Each PRI alone is blind far lower.
	if b1, b2 := BlindSpeed(100e-6, lambda), BlindSpeed(125e-6, lambda); b1 > v/4 || b2 > v/4 {
		t.Errorf("single-PRI blind speeds %.1f and %.1f m/s not below the stagger's %.1f", b1, b2, v)
	}
}

// TestUnfoldVelocity: a 280 m/s closing target seen through 100 µs and
// 125 µs PRIs at 9.5 GHz (blind speeds 157.8 and 126.2 m/s) folds to
// different apparent range rates; coincidence over ±315 m/s (half the
// stagger's first blind speed) finds it alone. At 400 m/s, beyond that
// interval, it is taken for 400 − 631.1 = 231.1 m/s receding.
func TestUnfoldVelocity(t *testing.T) {
	lambda := SpeedOfLight / 9.5e9
	p := []float64{BlindSpeed(100e-6, lambda), BlindSpeed(125e-6, lambda)}
	for _, c := range []struct{ v, want float64 }{{-280, -280}, {-400, 231.14}} {
		a := []float64{WrapCentred(c.v, p[0]), WrapCentred(c.v, p[1])}
		got := Unfold(a, p, -315, 315, 0.5, true)
		if len(got) != 1 || math.Abs(got[0]-c.want) > 0.05 {
			t.Errorf("%v m/s, apparent %v: unfolded %v, want [%v]", c.v, a, got, c.want)
		}
	}
	if w := WrapCentred(0.3*p[0], p[0]); math.Abs(w-0.3*p[0]) > 1e-12 {
		t.Errorf("WrapCentred moved an in-range value: %v", w)
	}
}

func TestCommonPeriodIncommensurate(t *testing.T) {
	if _, _, ok := CommonPeriod([]float64{1, math.Sqrt2}, 1000, 1e-9); ok {
		t.Error("1 and √2 have no common grid with n ≤ 1000")
	}
	s := NewSchedule(1, math.Sqrt2)
	if !math.IsInf(s.UnambiguousRange(), 1) || !math.IsInf(s.FirstBlindSpeed(0.03), 1) {
		t.Error("incommensurate schedule: want +Inf combined range and blind speed")
	}
}

// TestAtLeast checks the M-of-N probability against the binomial tail of
// scipy.stats.binom.sf(M−1, N, p) (scipy 1.10.1: 3-of-8 at 0.6 →
// 0.95019264, 2-of-3 at 0.9 → 0.972, 1-of-2 at 0.5 → 0.75) and, for
// unequal probabilities, against enumerating every outcome.
func TestAtLeast(t *testing.T) {
	rep := func(p float64, n int) []float64 {
		out := make([]float64, n)
		for i := range out {
			out[i] = p
		}
		return out
	}
	for _, c := range []struct {
		p    []float64
		m    int
		want float64
	}{
		{rep(0.6, 8), 3, 0.95019264},
		{rep(0.9, 3), 2, 0.972},
		{rep(0.5, 2), 1, 0.75},
		{rep(0.5, 2), 0, 1},
		{rep(0.5, 2), 3, 0},
	} {
		if got := AtLeast(c.p, c.m); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("AtLeast(%v, %d) = %.10g, want %.10g", c.p, c.m, got, c.want)
		}
	}
	p := []float64{0.1, 0.95, 0.5, 0.7, 0.33}
	for m := 0; m <= len(p)+1; m++ {
		want := 0.0
		for mask := range 1 << len(p) {
			pr, k := 1.0, 0
			for i, pi := range p {
				if mask&(1<<i) != 0 {
					pr *= pi
					k++
				} else {
					pr *= 1 - pi
				}
			}
			if k >= m {
				want += pr
			}
		}
		if got := AtLeast(p, m); math.Abs(got-want) > 1e-12 {
			t.Errorf("AtLeast(%v, %d) = %.12g, enumeration %.12g", p, m, got, want)
		}
	}
}
