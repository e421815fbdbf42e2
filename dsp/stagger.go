package dsp

import "math"

// Staggered pulse trains: the PRI changes from pulse to pulse, cycling
// through a pattern T_0, T_1, …, T_{L−1} (s). Pulse p is transmitted at
//
//	t_p = Σ_{i<p} T_{i mod L},  t_0 = 0,
//
// so slow time is sampled non-uniformly. A tone of Doppler frequency f_d
// (Hz) advances its phase by 2π·f_d·t_p at pulse p; it is invisible to
// every pulse-to-pulse canceller and lands on the zero-Doppler filter only
// when f_d·T_i is a whole number for every PRI of the pattern, i.e. at
// multiples of 1/Δ with Δ the pattern's common grid (Schedule.Delta): the
// first true blind speed λ/(2Δ) (Schedule.FirstBlindSpeed).

// PulseTimes fills dst (n values; nil allocates) with the transmit times
// t_p (s) of n pulses whose PRIs cycle through pattern (s, each > 0) and
// returns it. It panics if pattern is empty or holds a value ≤ 0.
func PulseTimes(dst []float64, pattern []float64, n int) []float64 {
	if len(pattern) == 0 {
		panic("dsp: pulse times of an empty PRI pattern")
	}
	for _, T := range pattern {
		if !(T > 0) {
			panic("dsp: pulse times of a non-positive PRI")
		}
	}
	if dst == nil {
		dst = make([]float64, n)
	}
	if len(dst) != n {
		panic("dsp: pulse times destination length mismatch")
	}
	t := 0.0
	for p := range dst {
		dst[p] = t
		t += pattern[p%len(pattern)]
	}
	return dst
}

// MeanPRI returns the mean of a PRI pattern, s: the slow-time unit of a
// staggered plan (NewStaggeredPlan).
func MeanPRI(pattern []float64) float64 {
	s := 0.0
	for _, T := range pattern {
		s += T
	}
	return s / float64(len(pattern))
}

// NewStaggeredPlan prepares slow-time processing of a staggered train:
// pulses at times[q] (in units of the mean PRI T̄, so that the uniform
// train has times[q] = q), an MTI canceller with taps h applied to
// consecutive pulses as they come (y_q = Σ_i h_i·x_{q+l−1−i}, the
// staggered canceller, whose output q is stamped with the time of its
// newest pulse, times[q+l−1]), the window w over the M = N−l+1 canceller
// outputs, and a Doppler filter bank evaluated at the true pulse times:
//
//	Y_d = s · Σ_q w_q·y_q·e^{−j2π·f_d·(times[q+l−1] − times[l−1])},  f_d = (d − ⌊M/2⌋)/M
//
// (cycles per mean PRI), the non-uniform DFT, its time origin at the
// first output. With uniform times this is
// exactly NewSlowTimePlan. The bins span one mean PRF: a Doppler beyond
// ±PRF̄/2 leaks into them through the stagger's grating lobes, attenuated
// (the velocity response, BestToneResponse), and a tone is rejected like
// zero Doppler only at multiples of the pattern's 1/Δ. The scaling s keeps
// white noise of unit power per pulse at unit power in every bin (each bin's
// filter vector has the same norm, so one s serves all). The plan holds
// the M×M filter matrix: the cost per range cell is M² complex
// multiply-adds instead of an FFT's M·log M. It panics if fewer than
// len(h) pulses are given.
func NewStaggeredPlan(times []float64, h []float64, w Window) *SlowTimePlan {
	n := len(times)
	p := NewSlowTimePlan(n, h, w)
	l := len(h)
	p.times = append([]float64(nil), times...)
	p.dft = make([]complex128, p.m*p.m)
	for d := range p.m {
		f := p.BinFrequency(d)
		for q := range p.m {
			p.dft[d*p.m+q] = expj(-2 * math.Pi * f * (times[q+l-1] - times[l-1]))
		}
	}
	return p
}

// Staggered reports whether the plan samples slow time at given times
// (NewStaggeredPlan).
func (p *SlowTimePlan) Staggered() bool { return p.times != nil }

// applyStaggered is Apply's non-uniform DFT: p.buf holds the windowed,
// scaled canceller outputs.
func (p *SlowTimePlan) applyStaggered(dst []complex128) {
	for d := range p.m {
		row := p.dft[d*p.m : (d+1)*p.m]
		var re, im float64
		for q, e := range row {
			b := p.buf[q]
			re += real(b)*real(e) - imag(b)*imag(e)
			im += real(b)*imag(e) + imag(b)*real(e)
		}
		dst[d] = complex(re, im)
	}
}

// Tone returns the unit tone e^{j2π·fdT·t_i} at pulse i of the plan, fdT
// in cycles per (mean) PRI, t_i in PRIs (mean PRIs of a staggered plan).
func (p *SlowTimePlan) Tone(fdT float64, i int) complex128 {
	if p.times != nil {
		return expj(2 * math.Pi * fdT * p.times[i])
	}
	return expj(2 * math.Pi * fdT * float64(i))
}

// BestToneResponse returns the largest of ToneResponse(fdT) over the
// bins: the power gain of the processing (canceller, window and filter
// bank) for a unit-power tone at fdT cycles per (mean) PRI in the filter
// it falls in best, relative to the noise power per bin. With no window,
// no canceller and a tone on a bin centre this is N, the coherent
// integration gain. As a function of the range rate it is the velocity
// response of the train; scratch (Bins() values, nil allocates) is
// overwritten.
func (p *SlowTimePlan) BestToneResponse(scratch []float64, fdT float64) float64 {
	scratch = p.ToneResponse(scratch, fdT)
	best := 0.0
	for _, v := range scratch {
		best = math.Max(best, v)
	}
	return best
}

// VelocityResponse is the velocity response of a slow-time plan:
// BestToneResponse as a function of range rate.
type VelocityResponse struct {
	RateMPS []float64 // range rates, m/s (positive receding), ascending from 0
	DB      []float64 // BestToneResponse in dB re the curve's mean power over one first-blind-speed period
	// FirstBlindMPS is the first range rate > 0 at which every pulse
	// sees the same phase as at zero Doppler, λ/(2Δ) (Schedule), m/s; 0
	// when the PRIs have no common grid.
	FirstBlindMPS float64
	// DipDB is the deepest point of the curve (dB, ≤ 0 re the mean)
	// between the edges of the notches at 0 and at FirstBlindMPS, each
	// edge a quarter of the longest PRI's blind speed λ/(4·T_max) away
	// from the notch; DipMPS is where it lies. Both are zero when
	// FirstBlindMPS is 0.
	DipDB, DipMPS float64
}

// NewVelocityResponse evaluates the plan's velocity response at points
// range rates from 0 to span m/s, for wavelength lambda (m), the PRI
// pattern pattern (s; one value for a uniform train) and the slow-time
// unit unit (s: the mean PRI of a staggered plan, the PRI otherwise).
// A range rate v has Doppler f_d = −2v/λ. It panics if points < 2 or
// span ≤ 0.
func (p *SlowTimePlan) NewVelocityResponse(pattern []float64, unit, lambda, span float64, points int) VelocityResponse {
	if points < 2 || !(span > 0) {
		panic("dsp: velocity response needs at least 2 points over a positive span")
	}
	vr := VelocityResponse{RateMPS: make([]float64, points), DB: make([]float64, points)}
	scratch := make([]float64, p.m)
	resp := func(v float64) float64 { return p.BestToneResponse(scratch, -2*v/lambda*unit) }
	s := NewSchedule(pattern...)
	if s.Delta > 0 {
		vr.FirstBlindMPS = s.FirstBlindSpeed(lambda)
	}
	// The mean power over one period of the response (or over the span
	// when there is no grid), by the trapezoid rule on a fine grid.
	period := vr.FirstBlindMPS
	if period == 0 {
		period = span
	}
	const fine = 4096
	mean := 0.0
	for i := range fine {
		mean += resp(period * (float64(i) + 0.5) / fine)
	}
	mean /= fine
	floor := mean * 1e-30 // −300 dB: a null prints as a floor, never −Inf
	for i := range vr.RateMPS {
		v := span * float64(i) / float64(points-1)
		vr.RateMPS[i] = v
		vr.DB[i] = DB(math.Max(resp(v), floor) / mean)
	}
	if vr.FirstBlindMPS > 0 {
		tmax := 0.0
		for _, T := range pattern {
			tmax = math.Max(tmax, T)
		}
		edge := lambda / (4 * tmax)
		lo, hi := edge, vr.FirstBlindMPS-edge
		vr.DipDB = math.Inf(1)
		for i := range fine + 1 {
			v := lo + (hi-lo)*float64(i)/fine
			if d := DB(math.Max(resp(v), floor) / mean); d < vr.DipDB {
				vr.DipDB, vr.DipMPS = d, v
			}
		}
	}
	return vr
}
