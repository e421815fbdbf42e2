package dsp

import (
	"math"
	"slices"
)

// Pulse-repetition arithmetic: range and velocity ambiguities of one PRI,
// their resolution across several PRIs (Chinese remainder theorem and
// coincidence), and the blind speeds of a staggered pulse train. Times in
// s, ranges in m, speeds in m/s (range rate, positive receding), c =
// SpeedOfLight.

// UnambiguousRange returns c·pri/2, m: echoes from farther fold back by
// multiples of it.
func UnambiguousRange(pri float64) float64 { return SpeedOfLight * pri / 2 }

// BlindSpeed returns λ/(2·pri), m/s: a range rate whose Doppler shift is
// a whole multiple of the PRF looks stationary from pulse to pulse (and
// falls in a zero-Doppler clutter notch); apparent range rates fold by
// multiples of it.
func BlindSpeed(pri, lambda float64) float64 { return lambda / (2 * pri) }

// Wrap returns x folded into [0, period): the apparent range of a target
// at range x for an unambiguous range period.
func Wrap(x, period float64) float64 {
	f := math.Mod(x, period)
	if f < 0 {
		f += period
	}
	if f >= period { // rounding of a tiny negative remainder
		f = 0
	}
	return f
}

// WrapCentred returns x folded into [−period/2, period/2): the apparent
// range rate of a target for a blind-speed period.
func WrapCentred(x, period float64) float64 {
	return Wrap(x+period/2, period) - period/2
}

// CRT solves x ≡ r_i (mod m_i) for non-negative integers by the Chinese
// remainder theorem, in its general form for moduli that need not be
// coprime: it returns the smallest x ≥ 0 and the combined modulus
// lcm(m_i), or ok = false when the congruences contradict each other
// (r_i ≢ r_j mod gcd(m_i, m_j)) or lcm overflows int64. It panics if the
// lengths differ or a modulus is < 1.
func CRT(r, m []int) (x, mod int, ok bool) {
	if len(r) != len(m) {
		panic("dsp: CRT residues and moduli differ in length")
	}
	x, mod = 0, 1
	for i := range m {
		if m[i] < 1 {
			panic("dsp: CRT modulus below 1")
		}
		ri := ((r[i] % m[i]) + m[i]) % m[i]
		// Solve x + mod·t ≡ ri (mod m_i): mod·t ≡ ri − x (mod m_i).
		g, p, _ := extGCD(mod, m[i])
		d := ri - x%m[i]
		if d%g != 0 {
			return 0, 0, false
		}
		mi := m[i] / g
		t := mulMod(((d/g)%mi+mi)%mi, ((p%mi)+mi)%mi, mi)
		if mod > math.MaxInt64/mi {
			return 0, 0, false
		}
		x += mod * t
		mod *= mi
		x %= mod
	}
	return x, mod, true
}

// extGCD returns g = gcd(a, b) and p, q with a·p + b·q = g.
func extGCD(a, b int) (g, p, q int) {
	if b == 0 {
		return a, 1, 0
	}
	g, p1, q1 := extGCD(b, a%b)
	return g, q1, p1 - (a/b)*q1
}

// mulMod returns a·b mod m without overflow for 0 ≤ a, b < m.
func mulMod(a, b, m int) int {
	r := 0
	a %= m
	for b > 0 {
		if b&1 == 1 {
			r = (r + a) % m
		}
		a = (a * 2) % m
		b >>= 1
	}
	return r
}

// CommonPeriod returns the largest Δ of which every period p_i is a whole
// multiple n_i·Δ, with n_i ≤ maxN, within a relative tolerance relTol of
// each n_i: the grid of a staggered or multiple-PRF schedule. ok is false
// when no Δ with n_1 ≤ maxN fits (incommensurate periods). It panics if
// periods is empty or holds a value ≤ 0.
func CommonPeriod(periods []float64, maxN int, relTol float64) (delta float64, n []int, ok bool) {
	if len(periods) == 0 {
		panic("dsp: common period of no periods")
	}
	for _, p := range periods {
		if !(p > 0) {
			panic("dsp: common period of a non-positive period")
		}
	}
	n = make([]int, len(periods))
	for n0 := 1; n0 <= maxN; n0++ {
		delta = periods[0] / float64(n0)
		fit := true
		for i, p := range periods {
			q := p / delta
			k := math.Round(q)
			if k < 1 || k > float64(maxN) || math.Abs(q-k) > relTol*k {
				fit = false
				break
			}
			n[i] = int(k)
		}
		if fit {
			return delta, n, true
		}
	}
	return 0, nil, false
}

// Schedule is a set of PRIs (s) used in turn, as a multiple-PRF schedule
// (one PRI per coherent interval) or a staggered train (PRI changing from
// pulse to pulse): their ambiguities combine the same way.
type Schedule struct {
	PRI []float64 // s, each > 0
	// Delta is the common grid Δ (s) with PRI_i = N_i·Δ; zero when the
	// PRIs are incommensurate within the tolerance NewSchedule used.
	Delta float64
	N     []int
}

// NewSchedule returns the schedule of the PRIs with their common grid,
// found by CommonPeriod with n ≤ 10 000 and a relative tolerance of 1e-9.
func NewSchedule(pri ...float64) Schedule {
	s := Schedule{PRI: slices.Clone(pri)}
	if d, n, ok := CommonPeriod(pri, 10000, 1e-9); ok {
		s.Delta, s.N = d, n
	}
	return s
}

// lcmN returns lcm(N_i), or 0 when it exceeds 2⁵³ or there is no grid.
func (s Schedule) lcmN() int {
	if s.Delta == 0 {
		return 0
	}
	l := 1
	for _, n := range s.N {
		g, _, _ := extGCD(l, n)
		if l/g > (1<<53)/n {
			return 0
		}
		l = l / g * n
	}
	return l
}

// UnambiguousRange returns the schedule's combined unambiguous range,
// c·lcm(PRI_i)/2 with lcm(PRI_i) = Δ·lcm(N_i), m: the smallest range at
// which every PRI's fold repeats together. It returns +Inf for
// incommensurate PRIs.
func (s Schedule) UnambiguousRange() float64 {
	l := s.lcmN()
	if l == 0 {
		return math.Inf(1)
	}
	return SpeedOfLight * s.Delta * float64(l) / 2
}

// FirstBlindSpeed returns the first range rate > 0 at which the Doppler
// phase advance over every PRI is a whole number of cycles, λ/(2Δ) m/s:
// there every PRI is blind together (a staggered train, or every CPI of a
// multiple-PRF schedule). For two PRIs N_1·Δ and N_2·Δ with N_1, N_2
// coprime this is (N_1 + N_2)/2 times the blind speed λ/(2·T_mean) of the
// mean PRI (Skolnik, Introduction to Radar Systems, 3rd ed., ch. 3, staggered
// PRFs). It returns +Inf for incommensurate PRIs.
func (s Schedule) FirstBlindSpeed(lambda float64) float64 {
	if s.Delta == 0 {
		return math.Inf(1)
	}
	return lambda / (2 * s.Delta)
}

// Unfold returns every true value x in [lo, hi] consistent with the
// apparent values a_i measured with fold periods p_i: the folded x agrees
// with a_i within tol (circular distance), folding by Wrap(x, p_i)
// (ranges; centred = false) or WrapCentred (range rates; centred = true).
// This is resolution by coincidence; for integer bins it finds what CRT
// does. Candidates are generated from the first
// period's folds and merged when closer than tol. It returns them
// ascending: exactly one means resolved, several mean the schedule cannot
// tell them apart within [lo, hi] at that tolerance, none means the
// measurements are inconsistent (a ghost pairing). It panics if the
// lengths differ, a period is ≤ 0 or tol < 0.
func Unfold(apparent, period []float64, lo, hi, tol float64, centred bool) []float64 {
	if len(apparent) != len(period) || len(period) == 0 || tol < 0 {
		panic("dsp: unfold needs one period per apparent value and tol ≥ 0")
	}
	for _, p := range period {
		if !(p > 0) {
			panic("dsp: unfold period must be positive")
		}
	}
	fold := Wrap
	if centred {
		fold = WrapCentred
	}
	dist := func(x, a, p float64) float64 {
		d := math.Abs(fold(x, p) - a)
		return math.Min(d, p-d)
	}
	p0, a0 := period[0], apparent[0]
	var out []float64
	k0 := math.Floor((lo - a0) / p0)
	for k := k0; a0+k*p0 <= hi+tol; k++ {
		x := a0 + k*p0
		if x < lo-tol {
			continue
		}
		good := true
		for i := 1; i < len(period); i++ {
			if dist(x, apparent[i], period[i]) > tol {
				good = false
				break
			}
		}
		if good && (len(out) == 0 || x-out[len(out)-1] > tol) {
			out = append(out, x)
		}
	}
	return out
}

// AtLeast returns the probability that at least m of len(p) independent
// events occur, event i with probability p[i] (each in [0, 1]): the
// detection probability of an M-of-N rule over N independent looks (the
// Poisson binomial tail; with equal p it is the binomial sum
// Σ_{k=m}^{N} C(N,k)·p^k·(1−p)^(N−k), Richards, Fundamentals of Radar
// Signal Processing, 2nd ed., §6, binary integration). It returns 1 for
// m ≤ 0 and 0 for m > len(p). The sum runs by the recursion over events
// on the count distribution, O(N²), without forming binomial
// coefficients. It panics if a probability lies outside [0, 1].
func AtLeast(p []float64, m int) float64 {
	if m <= 0 {
		return 1
	}
	if m > len(p) {
		return 0
	}
	// q[k]: probability of exactly k events among those seen so far.
	q := make([]float64, len(p)+1)
	q[0] = 1
	for i, pi := range p {
		if !(pi >= 0 && pi <= 1) {
			panic("dsp: AtLeast probability outside [0, 1]")
		}
		for k := i + 1; k >= 1; k-- {
			q[k] = q[k]*(1-pi) + q[k-1]*pi
		}
		q[0] *= 1 - pi
	}
	s := 0.0
	for k := m; k <= len(p); k++ {
		s += q[k]
	}
	return math.Min(math.Max(s, 0), 1)
}
