package scenarios

import (
	"math"

	"github.com/pulsewright/pulsewright/dsp"
)

// The slow-time side of a staggered CPI (docs/detection.md §16). Pulse p
// is sent at t_p (Radar.pulseTime); the pulses before the CPI continue
// the pattern backwards, as a uniform train's folds assume its earlier
// pulses. Sweep p listens from t_p; the transmit pulses it hears around
// it are those at t_{p+i} − t_p.

// staggerGroup is the share of a point target's echoes in a staggered
// CPI that land at one apparent position: shift gates from where the
// scene placed its single-pulse response, with the map gain of the
// pulses that put it there.
type staggerGroup struct {
	shift int
	gain  []float64
}

// newPlan returns the slow-time plan of the train's CPI: the FFT plan of
// a uniform train, or the plan at the true pulse times of a stagger.
func (tr *train) newPlan() *dsp.SlowTimePlan {
	r, rx := tr.m.s.Radar, tr.m.s.Receiver
	if tr.times != nil {
		return dsp.NewStaggeredPlan(tr.times, mtiTaps(rx.MTI), dspWindow(rx.DopplerWindow))
	}
	return dsp.NewSlowTimePlan(r.Pulses, mtiTaps(rx.MTI), dspWindow(rx.DopplerWindow))
}

// staggerTimes returns the pulse times of a staggered CPI in mean PRIs,
// or nil for a uniform train.
func staggerTimes(r Radar) []float64 {
	if !r.Staggered() {
		return nil
	}
	ts := dsp.PulseTimes(nil, r.PRIStaggerS, r.Pulses)
	T := r.slowPRI()
	for i := range ts {
		ts[i] /= T
	}
	return ts
}

// recordEnd returns the time after the transmit edge at which a sweep's
// raw record ends, s.
func (m *model) recordEnd() float64 { return m.t0 + float64(m.recLen)/m.fs }

// sweepEchoes calls fn for every echo of a point target (range r0 at t =
// 0, range rate v) that lands in sweep p's raw record: the echo of pulse
// q ≤ p, sent when the target is at r_q = r0 + v·t_q, starts delay =
// t_q + 2·r_q/c − t_p after pulse p's transmit edge.
func (m *model) sweepEchoes(p int, r0, v float64, fn func(q int, rq, delay float64)) {
	r := m.s.Radar
	tp := r.pulseTime(p)
	end := m.recordEnd()
	at := func(q int) (float64, float64) {
		tq := r.pulseTime(q)
		rq := r0 + v*tq
		return rq, tq + 2*rq/C - tp
	}
	q := p
	pat := r.pattern()
	cyc := float64(len(pat)) * r.slowPRI()
	if _, d := at(p); d > end+cyc {
		q -= int(math.Floor((d-end)/cyc)) * len(pat)
	}
	for {
		rq, d := at(q)
		if d < m.t0-m.tau || rq <= 0 {
			return
		}
		if d < end {
			fn(q, rq, d)
		}
		q--
	}
}

// sweepTransmits calls fn with the start of every transmit pulse that
// sweep p's raw record overlaps, s after pulse p's edge (the pulse before
// p's included).
func (m *model) sweepTransmits(p int, fn func(off float64)) {
	r := m.s.Radar
	tp := r.pulseTime(p)
	end := m.recordEnd()
	for i := -1; ; i++ {
		off := r.pulseTime(p+i) - tp
		if off >= end {
			return
		}
		fn(off)
	}
}

// blankSweep zeroes the raw samples of sweep p (x from raw sample 0)
// that fall under a transmit pulse, and those past the record.
func (m *model) blankSweep(x []complex128, p int) {
	for i := m.recLen; i < len(x); i++ {
		x[i] = 0
	}
	m.sweepTransmits(p, func(off float64) {
		lo := int(math.Max(ceilSnap((off-m.t0)*m.fs), 0))
		hi := int(math.Min(math.Max(ceilSnap((off+m.tau-m.t0)*m.fs), 0), float64(min(len(x), m.recLen))))
		for k := lo; k < hi; k++ {
			x[k] = 0
		}
	})
}

// heardSweep returns the fraction of an echo that starts delay s after
// pulse p's edge and lasts τ which no transmit pulse of sweep p covers.
func (m *model) heardSweep(p int, delay float64) float64 {
	lost := 0.0
	m.sweepTransmits(p, func(off float64) {
		if hi, lo := math.Min(off+m.tau, delay+m.tau), math.Max(off, delay); hi > lo {
			lost += hi - lo
		}
	})
	return math.Max(0, 1-lost/m.tau)
}

// staggerGroups returns point target j's groups on a staggered CPI's map:
// pulse p's echo (at the target's range at t = 0) lands shift gates from
// the scene's single-pulse response, weighted in amplitude by the share
// of it sweep p hears against the share the scene's response holds; the
// pulses of each shift form a group whose gain is the plan's response to
// the tone they carry at their true times, c of its power coherent.
func (tr *train) staggerGroups(j int, c float64) []staggerGroup {
	m, g := tr.m, tr.sc.targets[j]
	np := m.s.Radar.Pulses
	ref := 2*g.apparent/C - m.t0 // the scene's echo start, s after window sample 0
	heard0 := g.received
	amps := map[int][]float64{}
	var order []int
	for p := range np {
		m.sweepEchoes(p, g.t.RangeM, 0, func(_ int, _, delay float64) {
			s := int(math.Round((delay - m.t0 - ref) * m.fs))
			a := m.heardSweep(p, delay)
			if heard0 > 0 {
				a /= heard0
			}
			if tr.scanA != nil {
				a *= tr.scanA[p] // the beam's two-way gain at pulse p
			}
			if amps[s] == nil {
				amps[s] = make([]float64, np)
				order = append(order, s)
			}
			amps[s][p] += a
		})
	}
	nb := tr.plan.Bins()
	fdT := g.fd * tr.T
	x := make([]complex128, np)
	y := make([]complex128, nb)
	pows := make([]float64, np)
	var out []staggerGroup
	for _, s := range order {
		a := amps[s]
		for p := range np {
			x[p] = complex(a[p], 0) * tr.plan.Tone(fdT, p)
			pows[p] = a[p] * a[p]
		}
		tr.plan.Apply(y, x)
		flat := tr.plan.FlatResponseBins(nil, pows)
		gain := make([]float64, nb)
		for d, v := range y {
			tone := real(v)*real(v) + imag(v)*imag(v)
			gain[d] = (c*tone + (1-c)*flat[d]) * (1 - g.slowVar)
		}
		out = append(out, staggerGroup{shift: s, gain: gain})
	}
	return out
}

// groupPeak returns the strongest cell of point target j's groups on
// processed gates.
func (tr *train) groupPeak(j int) (k, d int, p float64) {
	k, d, p, _ = tr.groupPeakOf(j)
	return k, d, p
}

// peakGroup returns the index of the group holding target j's map peak,
// or −1 when no processed gate holds its power.
func (tr *train) peakGroup(j int) int {
	_, _, _, i := tr.groupPeakOf(j)
	return i
}

func (tr *train) groupPeakOf(j int) (k, d int, p float64, group int) {
	resp := &tr.sc.targets[j].resp
	k, d, group = -1, -1, -1
	for gi, gr := range tr.groups[j] {
		gd, gm := 0, 0.0
		for i, v := range gr.gain {
			if v > gm {
				gd, gm = i, v
			}
		}
		for i, pw := range resp.pow {
			kk := resp.lo + i + gr.shift
			if kk < 0 || kk >= tr.m.n || !tr.m.processed[kk] {
				continue
			}
			if q := pw * gm; q > p {
				k, d, p, group = kk, gd, q, gi
			}
		}
	}
	return k, d, p, group
}

// staggerBlind reports whether Doppler fd (Hz) falls on the zero-Doppler
// filter of a staggered CPI only by folding: within half a bin of a
// multiple of 1/Δ other than zero (docs/detection.md §16).
func (tr *train) staggerBlind(fd float64) bool {
	r := tr.m.s.Radar
	s := dsp.NewSchedule(r.PRIStaggerS...)
	if s.Delta == 0 {
		return false
	}
	half := s.Delta / (2 * float64(tr.plan.Bins()) * tr.T) // half a bin in cycles per Δ
	return math.Abs(dsp.Fold(fd*s.Delta)) < half && math.Abs(fd*s.Delta) >= half
}

// slow returns pulse p's time in slow-time units (the PRI, or a stagger's
// mean PRI): p for a uniform train.
func (f *clutterField) slow(p int) float64 {
	r := f.m.s.Radar
	if !r.Staggered() {
		return float64(p)
	}
	return r.pulseTime(p) / r.slowPRI()
}
