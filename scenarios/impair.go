package scenarios

import (
	"fmt"
	"math"
	"math/cmplx"

	"github.com/pulsewright/pulsewright/dsp"
)

// Receiver front-end impairments (front_end, docs/detection.md §12) in
// the noise-free analysis and the simulated echo.

// extra is power an impairment adds to the noise-free scene: a target's
// phase-noise skirt or I/Q image, or the receiver's quantisation noise or
// DC offset. It enters the scene's total like a target's response, and a
// verdict can name it as what masks a target.
type extra struct {
	owner int    // index of the target whose echo makes it; -1 for the receiver itself
	cause string // names it in reasons
	resp  response
	// Pulse trains: how its power spreads over Doppler, tones (fd·PRI,
	// weight) plus a flat part per bin (white from pulse to pulse).
	tones []tone
	flat  float64
	gain  []float64 // per Doppler bin, filled by newTrain
}

type tone struct{ fdT, w float64 }

// Causes named in reasons.
const (
	causeSkirt    = "phase-noise skirt"
	causeImage    = "I/Q image"
	causeQuantise = "quantisation noise"
	causeDC       = "DC offset"
)

// frontEnd is the evaluation's view of the scenario's front_end.
type frontEnd struct {
	on       bool
	pn       dsp.PhaseNoise
	pnOn     bool
	mu, nu   complex128
	iq       bool
	adc      dsp.ADC
	adcOn    bool
	adcGain  float64 // the quantiser's small-signal gain on the thermal noise (Bussgang)
	adcRatio float64 // its quantisation noise re the thermal noise, seen through that gain
	dc       complex128
	dcOn     bool
	stc      bool
	spec     FrontEnd
	prfHalf  float64 // PRF/2, Hz: phase noise below is slow-time (pulse to pulse), above fast-time
	skirtMin float64 // skirts under this peak power (noise units) are left out
}

func newFrontEnd(m *model) *frontEnd {
	f := m.s.FrontEnd
	fe := &frontEnd{spec: f, on: f.Any(), mu: 1, prfHalf: 1 / (2 * m.s.Radar.slowPRI()), skirtMin: 1e-4}
	if f.PhaseNoise() {
		fe.pnOn, fe.pn = true, f.profile()
	}
	if f.IQ() {
		fe.iq = true
		fe.mu, fe.nu = dsp.IQImbalance{GainDB: f.IQGainDB, PhaseDeg: f.IQPhaseDeg}.Coefficients()
	}
	if f.ADCBits > 0 {
		fe.adcOn, fe.adc = true, f.adc()
		// Thermal noise has power 1 per complex sample: σ² = ½ per channel.
		fe.adcGain, fe.adcRatio = fe.adc.GaussianNoise(math.Sqrt(0.5))
		if d := fe.adc.Step(); d > 1 {
			m.warn("the ADC's step (%.3g re the thermal noise's rms per channel, %.2f) is coarser than the noise: quantisation adds %.1f dB to the noise floor; lower adc_full_scale_db or add bits", d, math.Sqrt(0.5), dsp.DB(1+fe.adcRatio))
		}
	}
	if f.DCOffsetDB != nil {
		fe.dcOn, fe.dc = true, complex(math.Sqrt(dsp.FromDB(*f.DCOffsetDB)), 0)
	}
	fe.stc = f.STC()
	return fe
}

// stcShape applies the STC's amplitude gain to a buffer whose sample i is
// raw sample b+i (gain set by the time since the latest transmit edge,
// the apparent range of that sample).
func (fe *frontEnd) stcShape(m *model, x []complex128, b int) {
	if !fe.stc {
		return
	}
	for i := range x {
		if x[i] != 0 {
			x[i] *= complex(math.Sqrt(fe.spec.stcGain(m.rangeOf(float64(b+i)))), 0)
		}
	}
}

// receive applies the I/Q error, the DC offset and the ADC to a noisy
// record and returns the samples clipped.
func (fe *frontEnd) receive(x []complex128) int {
	if fe.iq {
		for i, v := range x {
			x[i] = fe.mu*v + fe.nu*cmplx.Conj(v)
		}
	}
	if fe.dcOn {
		for i := range x {
			x[i] += fe.dc
		}
	}
	if fe.adcOn {
		_, n := fe.adc.Apply(x, x)
		// Digital gain back to the thermal noise's scale, so plots keep
		// their meaning (a receiver calibrates its noise level).
		if fe.adcGain > 0 {
			for i := range x {
				x[i] /= complex(fe.adcGain, 0)
			}
		}
		return n
	}
	return 0
}

// skirtCells returns the fast-time phase-noise cells from PRF/2 to fs/2,
// eight per decade, each with its one-sided power for an echo delayed T s.
func (fe *frontEnd) skirtCells(fs, T float64) (edges, w []float64) {
	lo, hi := fe.prfHalf, fs/2
	if !(hi > lo) {
		return nil, nil
	}
	n := max(1, int(math.Ceil(math.Log10(hi/lo)*8)))
	edges = make([]float64, n+1)
	w = make([]float64, n)
	for i := range edges {
		edges[i] = lo * math.Pow(hi/lo, float64(i)/float64(n))
	}
	for i := range w {
		w[i] = fe.pn.EchoBand(edges[i], edges[i+1], T)
	}
	return edges, w
}

// slowTones returns the pulse-to-pulse phase noise of an echo delayed T s
// over np pulses as tones either side of its Doppler, and their total
// variance: offsets below PRF/2 in cells a quarter of a Doppler bin
// wide (1/(4·np·PRI)), the first of them on a logarithmic grid, each
// cell's power at its centre.
func (fe *frontEnd) slowTones(fd, pri, T float64, np int) ([]tone, float64) {
	const logCells = 16
	hi := fe.prfHalf
	step := 1 / (4 * float64(np) * pri)
	var out []tone
	total := 0.0
	add := func(a, b, fc float64) {
		w := fe.pn.EchoBand(a, b, T)
		if !(w > 0) {
			return
		}
		out = append(out, tone{(fd + fc) * pri, w}, tone{(fd - fc) * pri, w})
		total += 2 * w
	}
	lo := step * 1e-4
	add(0, lo, lo/2)
	for i := range logCells {
		a, b := lo*math.Pow(step/lo, float64(i)/logCells), lo*math.Pow(step/lo, float64(i+1)/logCells)
		add(a, b, math.Sqrt(a*b))
	}
	for a := step; a < hi; a += step {
		b := math.Min(a+step, hi)
		add(a, b, (a+b)/2)
	}
	return out, total
}

// pointShape applies the STC, the I/Q gain and the ADC's clipping to
// point target g's noise-free echo in the local buffer lp.x (raw samples
// b…, before blanking). It returns the echo after the STC for the image
// and the skirt (nil when neither is on) and the echo before clipping
// (nil when the ADC does not clip it).
func (sc *scene) pointShape(g *tgt, lp *localPlan, b int) (pre, lin []complex128) {
	fe, m := sc.fe, sc.m
	if fe.stc {
		// The loss of the compressed peak: the echo's amplitude gain
		// averaged with its power as weight (exact for a matched filter).
		var e, eg float64
		for i, v := range lp.x {
			p := real(v)*real(v) + imag(v)*imag(v)
			e += p
			eg += p * math.Sqrt(fe.spec.stcGain(m.rangeOf(float64(b+i))))
		}
		if e > 0 && eg > 0 {
			g.stcLossDB = -20 * math.Log10(eg/e)
		}
	}
	fe.stcShape(m, lp.x, b)
	if fe.iq || fe.pnOn {
		pre = append([]complex128(nil), lp.x...)
	}
	if fe.iq {
		for i := range lp.x {
			lp.x[i] *= fe.mu
		}
	}
	if fe.adcOn {
		peak := 0.0
		for _, v := range lp.x {
			peak = math.Max(peak, math.Max(math.Abs(real(v)), math.Abs(imag(v))))
		}
		if peak > fe.adc.FullScale {
			lin = append([]complex128(nil), lp.x...)
			fe.adc.Clip(lp.x, lp.x)
			g.overDB = 20 * math.Log10(peak/fe.adc.FullScale)
		}
	}
	return pre, lin
}

// pointExtras adds point target j's I/Q image and phase-noise skirt to
// the scene once its response is known, and its clipping loss.
func (sc *scene) pointExtras(j int, g *tgt, lp *localPlan, b int, pre, lin []complex128) {
	fe := sc.fe
	if lin != nil {
		r := sc.localResponse(lp, lin, b)
		g.unclipped = r
		_, p0 := r.peak()
		if _, p := g.resp.peak(); p > 0 && p0 > 0 {
			g.clipLossDB = math.Max(dsp.DB(p0/p), 0)
		}
	}
	if g.outOfBand || g.amp == 0 {
		return
	}
	m := sc.m
	if fe.iq && pre != nil {
		x := make([]complex128, len(pre))
		for i, v := range pre {
			x[i] = fe.nu * cmplx.Conj(v)
		}
		sc.addExtra(extra{owner: j, cause: causeImage, resp: sc.localResponse(lp, x, b), tones: []tone{{-g.fd * m.s.Radar.slowPRI(), 1}}})
	}
	if fe.pnOn {
		sc.pointSkirt(j, g, lp, b)
	}
}

// localResponse compresses a local buffer (raw samples b…) after
// blanking and returns its power over the window, noise units.
func (sc *scene) localResponse(lp *localPlan, x []complex128, b int) response {
	m := sc.m
	sc.blank(x, b)
	y := lp.c.Apply(nil, x)
	lo, hi := max(b+m.lead, 0), min(b+m.lead+len(x), m.n)
	if lo >= hi {
		return response{}
	}
	r := response{lo: lo, pow: make([]float64, hi-lo)}
	for k := lo; k < hi; k++ {
		v := y[k-b-m.lead]
		r.pow[k-lo] = (real(v)*real(v) + imag(v)*imag(v)) / m.noiseGain
	}
	return r
}

// pointSkirt adds point target j's phase-noise skirt: for each offset
// cell above PRF/2 (fast time), the echo shifted by that offset and
// compressed, weighted by the cell's power (docs/detection.md §12), and,
// for pulse trains, the offsets below PRF/2 as Doppler tones on its own
// response. Its own response loses the skirt's share of power.
//
// The fast part is split into a white floor and the rest: the density
// ρ of the top cell (the far-out floor) over every offset in the band,
// which Parseval's theorem gives exactly in one correlation,
// ρ·fs·Σ_n |x[n]|²·|h[n−k]|², less its share below the first compressed
// cell (ρ·2·f_lo times the response) and beyond the band; then each cell's
// power above that floor, compressed at offsets at most 1/(2τ) apart (a
// Doppler step of 1/τ moves an LFM's response by one resolution cell,
// so wider cells would land as separate lumps), at most
// maxSkirtCompressions of them.
func (sc *scene) pointSkirt(j int, g *tgt, lp *localPlan, b int) {
	m, fe := sc.m, sc.fe
	T := 2 * g.t.RangeM / C
	edges, w := fe.skirtCells(m.fs, T)
	fast := 0.0
	for _, v := range w {
		fast += 2 * v
	}
	var slow []tone
	slowVar := 0.0
	if m.s.CoherentTrain() {
		slow, slowVar = fe.slowTones(g.fd, m.s.Radar.slowPRI(), T, m.s.Radar.Pulses)
	}
	if g.amp == 0 || (fast+slowVar)*g.amp*g.amp*m.noiseGain < fe.skirtMin {
		return
	}
	sk := response{lo: g.resp.lo, pow: make([]float64, len(g.resp.pow))}
	x := make([]complex128, len(lp.x))
	// echo fills x with the echo shifted by fd Hz (dsp.AddEcho's sampled
	// Doppler, which wraps beyond ±fs/2), as the receiver records it.
	echo := func(fd float64) {
		clear(x)
		dsp.AddEcho(x, m.wave, m.fs, g.delay-float64(b)/m.fs, complex(g.amp, 0)*g.phase*fe.mu, fd)
		for i := range x {
			if k := b + i; k < 0 || k >= m.recLen {
				x[i] = 0
			}
		}
		fe.stcShape(m, x, b)
	}
	add := func(fd, weight float64) {
		echo(fd)
		r := sc.localResponse(lp, x, b)
		for k, p := range r.pow {
			if kk := r.lo + k - sk.lo; kk >= 0 && kk < len(sk.pow) {
				sk.pow[kk] += weight * p
			}
		}
	}
	shapeW, rho, fLo, terms := fe.skirtTerms(edges, w, g.fd, m.fs, m.tau, T)
	if rho > 0 {
		// The white floor over the band: |x|² correlated with |h|².
		echo(g.fd)
		sc.blank(x, b)
		for i, v := range x {
			x[i] = complex(real(v)*real(v)+imag(v)*imag(v), 0)
		}
		y := sc.powerCorrelator(len(x)).Apply(nil, x)
		for k := range sk.pow {
			if i := sk.lo + k - b - m.lead; i >= 0 && i < len(y) {
				sk.pow[k] += rho * m.fs * math.Max(real(y[i]), 0) / m.noiseGain
			}
		}
		// Less the offsets under the first compressed cell, which keep the
		// response's shape.
		for k, p := range g.resp.pow {
			sk.pow[k] -= rho * 2 * fLo * p
		}
	}
	for _, t := range terms {
		add(t.fd, t.w)
	}
	for k, p := range g.resp.pow {
		sk.pow[k] = math.Max(sk.pow[k]+shapeW*p, 0)
		g.resp.pow[k] = p * (1 - fast)
	}
	g.slowVar = slowVar
	sc.addExtra(extra{owner: j, cause: causeSkirt, resp: sk, flat: 1})
	if len(slow) > 0 {
		own := response{lo: g.resp.lo, pow: append([]float64(nil), g.resp.pow...)}
		sc.addExtra(extra{owner: j, cause: causeSkirt, resp: own, tones: slow})
	}
	g.skirtVarDB = dsp.DB(fast + slowVar)
}

// maxSkirtCompressions bounds the compressions of one target's
// skirt cells (both sides), beyond its white floor.
const maxSkirtCompressions = 256

// powerCorrelator returns a correlator of length n with |ref|² as its
// reference, kept for the scene.
func (sc *scene) powerCorrelator(n int) *dsp.Correlator {
	if sc.powCorr == nil || sc.powCorrN != n {
		h := make([]complex128, len(sc.m.ref))
		for i, v := range sc.m.ref {
			h[i] = complex(real(v)*real(v)+imag(v)*imag(v), 0)
		}
		sc.powCorr, sc.powCorrN = dsp.NewCorrelator(h, n), n
	}
	return sc.powCorr
}

// skirtTerm is one compression of a skirt: the echo at Doppler fd (Hz,
// sampled, so beyond ±fs/2 it wraps) weighted by w (a fraction of the
// carrier's power; negative to take out what the white floor counted).
type skirtTerm struct{ fd, w float64 }

// skirtTerms splits the fast-time skirt of an echo at Doppler fd (cells
// edges, one side's power w from skirtCells; T its round trip) as
// docs/detection.md §12 does: shapeW, the power of the cells under
// 1/(20τ), which keep the response's shape; the white floor's density ρ
// (that of the top cell; 0 when there is no compressed cell), applied
// over the whole band by the caller less ρ·2·f_lo of the response; and
// the compressions: the white floor taken out past the band's far edge
// (offsets −fs/2 − f_d … −fs/2 for f_d > 0, which the profile does not
// reach), and each cell's power above the floor on offsets at most
// 1/(2τ) apart, at most maxSkirtCompressions of them, skipping cells
// within 10⁻⁴ of the skirt of the floor and offsets outside the band.
func (fe *frontEnd) skirtTerms(edges, w []float64, fd, fs, tau, T float64) (shapeW, rho, fLo float64, terms []skirtTerm) {
	fast := 0.0
	fLo = -1
	for i, v := range w {
		fast += 2 * v
		if edges[i+1] <= 1/(20*tau) {
			shapeW += 2 * v
		} else if fLo < 0 {
			fLo = edges[i]
		}
	}
	if n := len(w); n > 0 && edges[n] > edges[n-1] && fLo >= 0 {
		rho = math.Max(w[n-1]/(edges[n]-edges[n-1]), 0)
	}
	if rho > 0 && fd != 0 {
		terms = append(terms, skirtTerm{math.Copysign(fs/2, -fd) + fd/2, -rho * math.Abs(fd)})
	}
	budget := maxSkirtCompressions
	for i, v := range w {
		a, b := edges[i], edges[i+1]
		if b <= 1/(20*tau) || !(v > 0) {
			continue
		}
		if rest := v - rho*(b-a); math.Abs(rest) < 1e-4*fast/2 {
			continue // the floor holds this cell
		}
		parts := max(1, min(int(math.Ceil((b-a)*2*tau)), budget/2))
		budget -= parts
		for q := range parts {
			lo, hi := a+(b-a)*float64(q)/float64(parts), a+(b-a)*float64(q+1)/float64(parts)
			fc := math.Sqrt(lo * hi)
			if parts > 1 {
				fc = (lo + hi) / 2
			}
			rest := fe.pn.EchoBand(lo, hi, T) - rho*(hi-lo)
			for _, sgn := range []float64{1, -1} {
				if math.Abs(fd+sgn*fc) < fs/2 { // outside the band: left out (the floor left it out too)
					terms = append(terms, skirtTerm{fd + sgn*fc, rest})
				}
			}
		}
	}
	return shapeW, rho, fLo, terms
}

// receiverExtras adds the quantisation noise and the DC offset.
func (sc *scene) receiverExtras() {
	m, fe := sc.m, sc.fe
	if fe.adcOn {
		r := response{lo: 0, pow: make([]float64, m.n)}
		q := fe.adcRatio
		for k := range r.pow {
			r.pow[k] = q
		}
		sc.addExtra(extra{owner: -1, cause: causeQuantise, resp: r, flat: 1})
	}
	if fe.dcOn {
		x := make([]complex128, m.recLen+m.lead)
		for j := range m.recLen {
			if !m.blanked(j) {
				x[m.lead+j] = fe.dc
			}
		}
		y := dsp.NewCorrelator(m.ref, len(x)).Apply(nil, x)
		r := response{lo: 0, pow: make([]float64, m.n)}
		for k := range r.pow {
			r.pow[k] = (real(y[k])*real(y[k]) + imag(y[k])*imag(y[k])) / m.noiseGain
		}
		sc.addExtra(extra{owner: -1, cause: causeDC, resp: r, tones: []tone{{0, 1}}})
	}
}

func (sc *scene) addExtra(e extra) {
	for k, p := range e.resp.pow {
		sc.total[e.resp.lo+k] += p
	}
	sc.extras = append(sc.extras, e)
}

// ownAt returns target j's own power at gate k: its response and its
// extras.
func (sc *scene) ownAt(j, k int) float64 {
	p := sc.targets[j].resp.at(k)
	for i := range sc.extras {
		if sc.extras[i].owner == j {
			p += sc.extras[i].resp.at(k)
		}
	}
	return p
}

// extraGain fills each extra's Doppler distribution on the plan's bins.
func (tr *train) extraGain() {
	nb := tr.plan.Bins()
	tmp := make([]float64, nb)
	for i := range tr.sc.extras {
		e := &tr.sc.extras[i]
		e.gain = make([]float64, nb)
		var a []float64 // the scan's modulation of a point target's echo
		// The decorrelating part spreads over the bins as noise does
		// (tr.noise), or as the scan's pulse powers weight it.
		flat := tr.noise
		if tr.scanA != nil && e.owner >= 0 && tr.sc.targets[e.owner].t.Kind == TargetPoint {
			a = tr.scanA
			flat = tr.plan.FlatResponseBins(tmp, tr.scanPow)
		}
		for d := range e.gain {
			e.gain[d] = e.flat * flat[d]
		}
		for _, t := range e.tones {
			tr.plan.ModulatedToneResponse(tmp, t.fdT, a)
			for d, v := range tmp {
				e.gain[d] += t.w * v
			}
		}
	}
}

// extraPower returns extra i's expected power at range cell k, bin d.
func (tr *train) extraPower(i, k, d int) float64 {
	e := &tr.sc.extras[i]
	return e.resp.at(k) * e.gain[d]
}

// simulation

// pnEcho holds what a point target's simulated phase noise needs.
type pnEcho struct {
	bins []float64 // fast-time variance per DFT bin of a local buffer
	n    int       // its length
	slow []float64 // phase per pulse from offsets below PRF/2, rad
}

// newPNEcho prepares target g's simulated phase noise over np pulses.
func (fe *frontEnd) newPNEcho(m *model, g *tgt, np int, seed int64) *pnEcho {
	if !fe.pnOn || (g.t.Kind == TargetPoint && math.Abs(g.fd) >= m.fs/2) {
		return nil
	}
	T := 2 * g.t.RangeM / C
	if g.t.Kind != TargetPoint {
		T = (g.t.RangeStartM + g.t.RangeStopM) / C
	}
	n := dsp.FFTLen(len(m.pulse) + 2)
	if g.t.Kind != TargetPoint {
		n = dsp.FFTLen(len(g.density) + len(m.pulse) + 1)
	}
	p := &pnEcho{n: n}
	p.bins = dsp.PhaseNoiseBins(n, m.fs, func(f1, f2 float64) float64 {
		return fe.pn.EchoBand(math.Max(f1, fe.prfHalf), math.Max(f2, fe.prfHalf), T)
	})
	if np > 1 {
		// A record four times the interval, so that its lines fall a
		// quarter of a Doppler bin apart as the analysis's cells do
		// (a record of np pulses alone would put every line on a bin).
		ns := dsp.FFTLen(4 * np)
		bins := dsp.PhaseNoiseBins(ns, 1/m.s.Radar.slowPRI(), func(f1, f2 float64) float64 {
			return fe.pn.EchoBand(math.Min(f1, fe.prfHalf), math.Min(f2, fe.prfHalf), T)
		})
		p.slow = dsp.PhaseNoiseDraw(make([]float64, ns), bins, streamOf(seed, g.t.ID, 0x9e51))[:np]
	}
	return p
}

// phases returns pulse p's phase error of the echo's samples.
func (pe *pnEcho) phases(seed int64, id string, p int) []float64 {
	psi := dsp.PhaseNoiseDraw(make([]float64, pe.n), pe.bins, streamOf(seed, id, 0x9e01+uint64(p)<<24))
	if pe.slow != nil {
		for i := range psi {
			psi[i] += pe.slow[p]
		}
	}
	return psi
}

// addPointEchoPN adds a point echo with its phase noise (pulse p) to the
// raw record.
func (m *model) addPointEchoPN(rec []complex128, pe *pnEcho, id string, p int, delay float64, amp complex128, fd float64) {
	b := int(math.Floor(delay * m.fs))
	buf := make([]complex128, len(m.pulse)+2)
	m.addEcho(buf, delay-float64(b)/m.fs, amp, fd)
	psi := pe.phases(m.s.Seed, id, p)
	for i, v := range buf {
		if k := b + i; k >= 0 && k < len(rec) && v != 0 {
			rec[k] += v * cmplx.Rect(1, psi[i])
		}
	}
}

// frontWords returns the sentences naming what the front end does to a
// target's own echo, or "".
func (sc *scene) frontWords(g *tgt) string {
	out := ""
	if g.stcLossDB >= 0.05 {
		out += fmt.Sprintf(" The STC attenuates its echo by %.1f dB at %s.", g.stcLossDB, km(g.apparent))
	}
	if g.overDB > 0 {
		out += fmt.Sprintf(" Its echo is clipped by the ADC: it peaks %.1f dB over full scale, which costs %.1f dB of compressed peak and raises its range sidelobes.", g.overDB, g.clipLossDB)
	}
	return out
}

// impairmentReason explains a target masked by an impairment's power.
func (sc *scene) impairmentReason(g *tgt, v verdict, det string) string {
	id := g.t.ID
	clear := dsp.DB(v.peak / v.noiseLevel)
	fe := sc.fe
	var what string
	switch {
	case v.culprit < 0 && v.cause == causeQuantise:
		what = fmt.Sprintf("the ADC's quantisation noise (%d bits, full scale %.0f dB over thermal noise: a floor %.1f dB re thermal noise)",
			fe.spec.ADCBits, fe.spec.ADCFullScaleDB, dsp.DB(fe.adcRatio))
	case v.culprit < 0 && v.cause == causeDC:
		what = fmt.Sprintf("the receiver's DC offset (%.0f dB re thermal noise per sample)", *fe.spec.DCOffsetDB)
	case v.culprit < 0:
		what = "the receiver's " + v.cause
	default:
		o := sc.targets[v.culprit]
		what = fmt.Sprintf("%s's %s", o.t.ID, v.cause)
		switch v.cause {
		case causeSkirt:
			what += fmt.Sprintf(" (its echo's phase error integrates to %.1f dBc over the receiver band)", o.skirtVarDB)
		case causeImage:
			what += fmt.Sprintf(" (image rejection %.1f dB, at the mirrored Doppler %s)", dsp.IQImbalance{GainDB: fe.spec.IQGainDB, PhaseDeg: fe.spec.IQPhaseDeg}.ImageRejectionDB(), hz(-o.fd))
		}
	}
	if v.byCell || v.cell >= v.sceneLevel {
		if v.cell >= v.peak {
			return fmt.Sprintf("Masked by %s: it puts %.1f dB more power into %s's cell than %s's own peak, which would clear the noise-only threshold by %.1f dB.",
				what, dsp.DB(v.cell/v.peak), id, id, clear)
		}
		return fmt.Sprintf("Masked by %s: it puts power only %.1f dB under %s's own peak into %s's cell, which lifts the threshold there.",
			what, dsp.DB(v.peak/v.cell), id, id)
	}
	return fmt.Sprintf("Masked by %s through the %s: it lifts the threshold %s %s's peak, which would clear the noise-only threshold by %.1f dB.",
		what, det, lift(v), id, clear)
}

// densityShape returns a distributed target's density (window samples
// lo…) after the STC and the I/Q gain |μ|².
func (fe *frontEnd) densityShape(m *model, density []float64, lo int) []float64 {
	out := append([]float64(nil), density...)
	mu2 := real(fe.mu)*real(fe.mu) + imag(fe.mu)*imag(fe.mu)
	for i := range out {
		out[i] *= mu2 * fe.spec.stcGain(m.rangeOf(float64(lo+i)))
	}
	return out
}

// distributedExtras adds a distributed target's I/Q image and
// phase-noise skirt: its density through the kernels of the image
// (the conjugate pulse at −f_d, scaled |ν|²) and of each offset cell,
// with the round trip of its mid-range for the range correlation.
func (sc *scene) distributedExtras(j int, g *tgt, lp *localPlan, density []float64, lo int) {
	m, fe := sc.m, sc.fe
	mu2 := real(fe.mu)*real(fe.mu) + imag(fe.mu)*imag(fe.mu)
	if fe.iq && mu2 > 0 {
		nu2 := real(fe.nu)*real(fe.nu) + imag(fe.nu)*imag(fe.nu)
		kern := sc.kernel(lp, -g.fd, true)
		for i := range kern {
			kern[i] *= nu2 / mu2
		}
		sc.addExtra(extra{owner: j, cause: causeImage, resp: sc.convolveDensity(density, lo, kern), tones: []tone{{-g.fd * m.s.Radar.slowPRI(), 1}}})
	}
	if !fe.pnOn {
		return
	}
	T := (g.t.RangeStartM + g.t.RangeStopM) / C
	edges, w := fe.skirtCells(m.fs, T)
	fast := 0.0
	for _, v := range w {
		fast += 2 * v
	}
	var slow []tone
	slowVar := 0.0
	if m.s.CoherentTrain() {
		slow, slowVar = fe.slowTones(g.fd, m.s.Radar.slowPRI(), T, m.s.Radar.Pulses)
	}
	_, peak := g.resp.peak()
	if (fast+slowVar)*peak < fe.skirtMin {
		return
	}
	// As a point target's (pointSkirt), through the kernels of its
	// Doppler-shifted pulse: the white floor's kernel is |pulse|²
	// correlated with |ref|².
	shapeW, rho, fLo, terms := fe.skirtTerms(edges, w, g.fd, m.fs, m.tau, T)
	var sk []float64
	if rho > 0 {
		lp.ensure()
		clear(lp.x)
		dsp.AddEcho(lp.x, m.wave, m.fs, float64(len(m.ref))/m.fs, 1, 0)
		x := make([]complex128, len(lp.x))
		for i, v := range lp.x {
			x[i] = complex(real(v)*real(v)+imag(v)*imag(v), 0)
		}
		y := sc.powerCorrelator(len(x)).Apply(nil, x)
		own := sc.kernel(lp, g.fd, false)
		sk = make([]float64, len(own))
		for l := range sk {
			sk[l] = rho*m.fs*math.Max(real(y[l]), 0)/m.noiseGain - rho*2*fLo*own[l]
		}
	}
	for _, t := range terms {
		kern := sc.kernel(lp, t.fd, false)
		if sk == nil {
			sk = make([]float64, len(kern))
		}
		for l, p := range kern {
			sk[l] += t.w * p
		}
	}
	r := response{lo: g.resp.lo, pow: make([]float64, len(g.resp.pow))}
	if sk != nil {
		r = sc.convolveDensity(density, lo, sk)
	}
	for k, p := range g.resp.pow {
		if kk := g.resp.lo + k - r.lo; kk >= 0 && kk < len(r.pow) {
			r.pow[kk] += shapeW * p
		}
		g.resp.pow[k] = p * (1 - fast)
	}
	for k, p := range r.pow {
		r.pow[k] = math.Max(p, 0)
	}
	g.slowVar = slowVar
	sc.addExtra(extra{owner: j, cause: causeSkirt, resp: r, flat: 1})
	if len(slow) > 0 {
		own := response{lo: g.resp.lo, pow: append([]float64(nil), g.resp.pow...)}
		sc.addExtra(extra{owner: j, cause: causeSkirt, resp: own, tones: slow})
	}
	g.skirtVarDB = dsp.DB(fast + slowVar)
}
