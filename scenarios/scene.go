package scenarios

import (
	"context"
	"math"
	"math/bits"
	"math/cmplx"
	"math/rand/v2"

	"github.com/pulsewright/pulsewright/dsp"
)

// maxFolds bounds how many unambiguous intervals of a distributed target
// are folded into the window.
const maxFolds = 64

// response is one target's noise-free compressed output power over part of
// the window, in units of the output noise power: pow[i] is sample lo+i.
type response struct {
	lo  int
	pow []float64
}

// at returns the power at window sample k (0 outside the support).
func (r *response) at(k int) float64 {
	if k < r.lo || k >= r.lo+len(r.pow) {
		return 0
	}
	return r.pow[k-r.lo]
}

// peak returns the window sample of the largest power and that power; -1
// when the support holds no power.
func (r *response) peak() (int, float64) {
	best, bk := 0.0, -1
	for i, p := range r.pow {
		if p > best {
			best, bk = p, r.lo+i
		}
	}
	return bk, best
}

// peakIn returns the processed gate of the largest power and that power
// (docs/detection.md §2: a target's peak cell); -1 when no processed gate
// holds power. Powers within 1e-9 (relative) of each other tie, and the
// first gate wins: a flat-topped response (a short pulse against a
// tapered reference) has several equal gates up to rounding.
func (r *response) peakIn(processed []bool) (int, float64) {
	best, bk := 0.0, -1
	for i, p := range r.pow {
		if p > best*(1+1e-9) && processed[r.lo+i] {
			best, bk = p, r.lo+i
		}
	}
	return bk, best
}

// scene is the noise-free analysis of every target.
type scene struct {
	m       *model
	targets []*tgt
	total   []float64 // Σ of every target's power per window sample
	train   *train    // slow-time processing when radar.pulses > 1
	clutter *clutterScene
	// reachLo, reachHi bound the window samples whose power is needed:
	// a target whose response cannot reach [reachLo, reachHi) keeps an
	// empty response (see newSceneFor). With partial, point targets'
	// responses are computed on those samples only.
	reachLo, reachHi int
	partial          bool
	fe               *frontEnd
	extras           []extra // impairments' power (impair.go)
	// powCorr correlates |echo|² with |ref|² (powCorrN samples): the
	// white floor of phase-noise skirts (impair.go).
	powCorr  *dsp.Correlator
	powCorrN int
}

// reaches reports whether a response over window samples [lo, hi) is
// needed.
func (sc *scene) reaches(lo, hi int) bool { return lo < sc.reachHi && hi > sc.reachLo }

// tgt is one target's geometry and noise-free response.
type tgt struct {
	t        Target
	rangeM   float64 // true range (point) or near edge (distributed), m
	apparent float64 // apparent range after folding, m
	folds    int
	fd       float64    // Doppler shift, Hz
	amp      float64    // point: echo amplitude for the mean RCS, √(noise power) units
	phase    complex128 // point: carrier phase of the echo
	delay    float64    // point: echo leading edge after window sample 0, s
	received float64    // point: fraction of the pulse's duration heard outside the transmit intervals
	// Point targets: blankTouched when blanking removed part of the echo,
	// unblankedPeak the peak over the gates of the same echo unblanked
	// (docs/detection.md §3).
	blankTouched  bool
	unblankedPeak float64
	// Receiver band (docs/detection.md §2): bandLossDB when |f_d| ≥ fs/2,
	// rejected when the echo lies wholly outside the band.
	outOfBand  bool
	bandLossDB float64
	rejected   bool
	resp       response
	density    []float64
	dlo        int
	// Front end (front_end): the STC's loss at its range, dB; how far its
	// noise-free echo peaks over the ADC's full scale (dB, 0 when not
	// clipped) and the compressed peak that costs, dB; its echo's phase
	// variance from offsets below PRF/2 (rad², lost from its coherent
	// Doppler peak) and over all offsets, dB.
	stcLossDB, overDB, clipLossDB float64
	slowVar, skirtVarDB           float64
	hidden                        bool    // point: beyond the radar horizon (horizon.go)
	rainLossDB                    float64 // point: two-way rain attenuation at its range, dB
	gasLossDB                     float64 // point: two-way gaseous attenuation at its range, dB
	multipathDB                   float64 // point: two-way multipath gain over a flat sea, dB (may be −Inf)
	multipath                     bool
	// Point: its response had the ADC not clipped its echo (empty when
	// not clipped), for the dynamic-range view (floors.go).
	unclipped response
}

// streamOf returns the random stream of (seed, id, salt): a PCG seeded
// with the scenario seed and streamKey(id, salt).
func streamOf(seed int64, id string, salt uint64) *rand.Rand {
	return rand.New(rand.NewPCG(uint64(seed), streamKey(id, salt)))
}

// streamKey is the second PCG seed of a stream: the 64-bit FNV-1a hash of
// id (hash/fnv's New64a, written out so that it allocates nothing) xor
// salt.
func streamKey(id string, salt uint64) uint64 {
	const (
		offset = 14695981039346656037
		prime  = 1099511628211
	)
	h := uint64(offset)
	for i := 0; i < len(id); i++ {
		h ^= uint64(id[i])
		h *= prime
	}
	return h ^ salt
}

// addNoise adds unit-power thermal noise to x from the stream
// (seed, "", salt): the values of dsp.ComplexNormal over streamOf, drawn
// by the faster dsp.AddComplexNormal.
func addNoise(x []complex128, seed int64, salt uint64) {
	var src rand.PCG
	src.Seed(uint64(seed), streamKey("", salt))
	dsp.AddComplexNormal(x, &src)
}

// newScene computes the noise-free response of every target. Work is
// checked against ctx between targets.
func newScene(ctx context.Context, m *model) (*scene, error) {
	return newSceneFor(ctx, m, -1)
}

// newSceneFor is newScene when focus < 0. Otherwise it computes only what
// judging target focus needs: that target's response first, then the
// responses of the others that reach its peak cell or its detector's
// training cells there; the rest keep an empty response, so sc.total is
// exact on those cells only. Used to verify suggested changes.
func newSceneFor(ctx context.Context, m *model, focus int) (*scene, error) {
	sc := &scene{m: m, total: make([]float64, m.n), reachHi: m.n, fe: newFrontEnd(m)}
	sc.targets = make([]*tgt, len(m.s.Targets))
	lp := &localPlan{m: m}
	defer lp.done()
	order := make([]int, 0, len(m.s.Targets))
	if focus >= 0 {
		order = append(order, focus)
	}
	for i := range m.s.Targets {
		if i != focus {
			order = append(order, i)
		}
	}
	for n, i := range order {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		t := m.s.Targets[i]
		g := &tgt{t: t, fd: -2 * t.RangeRateMPS / m.lambda}
		switch t.Kind {
		case TargetPoint:
			sc.point(i, g, lp)
		default:
			if err := sc.distributed(ctx, i, g, lp); err != nil {
				return nil, err
			}
		}
		for k, p := range g.resp.pow {
			sc.total[g.resp.lo+k] += p
		}
		sc.targets[i] = g
		if n == 0 && focus >= 0 {
			sc.partial = true
			sc.reachLo, sc.reachHi = 0, 0
			if k, _ := g.resp.peakIn(m.processed); k >= 0 {
				sc.reachLo, sc.reachHi = k, k+1
				if cf := m.detector(); cf != nil {
					sc.reachLo, _, _, sc.reachHi = cf.TrainingCells(k, m.n)
					sc.reachLo, sc.reachHi = min(sc.reachLo, k), max(sc.reachHi, k+1)
				}
			}
		}
	}
	sc.receiverExtras()
	if focus < 0 {
		m.scanWarnings()
	}
	if m.s.CoherentTrain() && focus < 0 { // suggestions are checked on single pulses
		sc.train = newTrain(m, sc)
	}
	if m.s.NonCoherent() && focus < 0 {
		sc.nciWarnings()
	}
	return sc, nil
}

// localPlan correlates short buffers that hold one echo and its full
// compressed response: length len(pulse) + len(ref) + 2. The echo starts
// at local sample len(ref) (plus a fraction), so the response, non-zero
// at lags 0 … len(pulse)+len(ref), fits.
type localPlan struct {
	m       *model
	c       *dsp.Correlator
	x, y, u []complex128
	n       int // buffer length when not the default (out-of-band echoes)
}

// bandRingSpan is how far (samples) on each side of an echo beyond the
// receiver band its filtered ringing is kept when the record is longer.
const bandRingSpan = 1024

func (lp *localPlan) size() int {
	if lp.n > 0 {
		return lp.n
	}
	return len(lp.m.pulse) + len(lp.m.ref) + 2
}

func (lp *localPlan) ensure() {
	if lp.c == nil {
		n := lp.size()
		if lp.n == 0 {
			// The default size: a plan kept from an earlier scene of the
			// same reference (done returns it).
			lp.c = lp.m.memo.takePlan(lp.m.ref, n)
		} else {
			lp.c = dsp.NewCorrelator(lp.m.ref, n)
		}
		lp.x = make([]complex128, n)
		lp.y = make([]complex128, n)
	}
}

// done hands a plan of the default size back to the memo for later
// scenes; lp is not used after.
func (lp *localPlan) done() {
	if lp.c != nil && lp.n == 0 {
		lp.m.memo.putPlan(lp.m.ref, lp.size(), lp.c)
		lp.c = nil
	}
}

// point places a point target's echo at exact fractional delay and
// compresses it alone.
func (sc *scene) point(j int, g *tgt, lp *localPlan) {
	m := sc.m
	g.rangeM = g.t.RangeM
	g.apparent, g.folds = m.fold(g.t.RangeM)
	sigma := dsp.FromDB(g.t.RCSDBsm)
	r := sc.m.s.Radar
	if g.t.RangeM <= 0 {
		return // at the antenna: no meaningful echo
	}
	if g.hidden = m.beyondHorizon(g.t); g.hidden {
		return // hidden by the Earth's curvature: no echo
	}
	pr := dsp.ReceivedPower(r.PeakPowerW, dsp.FromDB(r.AntennaGainDBi), m.lambda, sigma, g.t.RangeM, dsp.FromDB(r.SystemLossDB))
	g.rainLossDB = m.rainLossDB(g.t.RangeM)
	g.gasLossDB = m.gasLossDB(g.t.RangeM)
	g.amp = math.Sqrt(pr / m.noiseW * dsp.FromDB(-g.rainLossDB-g.gasLossDB))
	if g.multipathDB, g.multipath = m.multipathDB(g.t); g.multipath {
		g.amp *= math.Pow(10, math.Max(g.multipathDB, -400)/20)
	}
	g.phase = cmplx.Rect(1, -4*math.Pi*math.Mod(g.t.RangeM/m.lambda, 1))
	start := 2 * g.apparent / C // echo leading edge after the transmit edge, s
	g.delay = start - m.t0
	g.received = m.heardFraction(start)
	g.outOfBand = math.Abs(g.fd) >= m.fs/2
	d := g.delay * m.fs
	b := int(math.Floor(d)) - len(m.ref)
	if g.outOfBand {
		// The ideal band filter's impulse response rings without end, so
		// the filtered echo reaches every gate: filter and compress it
		// over the whole raw record, not over a local buffer that would
		// cut the ringing off a few gates from the echo (docs/detection.md
		// §2). The buffer starts before raw sample 0 so that its outputs
		// cover gate 0. A long record is cut bandRingSpan samples either
		// side of the echo (the ringing's power there is below −70 dB of
		// its peak), which bounds the FFT's memory.
		b = min(0, -m.lead) - 1
		size := m.recLen - b + len(m.ref) + 2
		if span := lp.size() + 2*bandRingSpan; size > span {
			b = int(math.Floor(d)) - len(m.ref) - bandRingSpan
			size = span
		}
		lp = &localPlan{m: m, n: size}
	}
	// Output j of the local buffer is window sample b+j+lead.
	full0, full1 := max(b+m.lead, 0), min(b+m.lead+lp.size(), m.n)
	lo, hi := full0, full1
	if sc.partial {
		lo, hi = max(lo, sc.reachLo), min(hi, sc.reachHi)
	}
	if lo >= hi || !sc.reaches(lo, hi) {
		return
	}
	lp.ensure()
	clear(lp.x)
	in := m.addEcho(lp.x, g.delay-float64(b)/m.fs, complex(g.amp, 0)*g.phase, g.fd)
	if g.outOfBand {
		if in < 1e-12 {
			g.rejected = true
		} else {
			g.bandLossDB = -dsp.DB(in)
		}
	}
	// Outside the raw record nothing is recorded; blanking is what the
	// transmit intervals then remove (docs/detection.md §1, §3).
	for i := range lp.x {
		if k := b + i; k < 0 || k >= m.recLen {
			lp.x[i] = 0
		}
	}
	var pre, lin []complex128
	if sc.fe.on {
		pre, lin = sc.pointShape(g, lp, b)
		defer func() { sc.pointExtras(j, g, lp, b, pre, lin) }()
	}
	e0 := energy(lp.x)
	if lp.u == nil {
		lp.u = make([]complex128, len(lp.x))
	}
	copy(lp.u, lp.x)
	sc.blank(lp.x, b)
	g.blankTouched = e0 > 0 && energy(lp.x) < e0*(1-1e-12)
	g.resp = response{lo: lo, pow: make([]float64, hi-lo)}
	if g.blankTouched && !sc.partial {
		// The same echo unblanked (lp.u, limited to the record).
		lp.c.Apply(lp.y, lp.u)
		for k := full0; k < full1; k++ {
			v := lp.y[k-b-m.lead]
			g.unblankedPeak = max(g.unblankedPeak, (real(v)*real(v)+imag(v)*imag(v))/m.noiseGain)
		}
	}
	if n := lp.size(); sc.partial && (hi-lo)*len(m.ref) <= 2*n*bits.Len(uint(n)) {
		// A few cells: direct sums cost less than the FFT pair,
		// about 2·n·log2(n) multiply-adds.
		for k := lo; k < hi; k++ {
			v := correlateAt(lp.x, m.ref, k-b-m.lead)
			g.resp.pow[k-lo] = (real(v)*real(v) + imag(v)*imag(v)) / m.noiseGain
		}
		return
	}
	lp.c.Apply(lp.y, lp.x)
	for k := lo; k < hi; k++ {
		v := lp.y[k-b-m.lead]
		g.resp.pow[k-lo] = (real(v)*real(v) + imag(v)*imag(v)) / m.noiseGain
	}
}

func energy(x []complex128) float64 {
	e := 0.0
	for _, v := range x {
		e += real(v)*real(v) + imag(v)*imag(v)
	}
	return e
}

// correlateAt returns Σ_i x[j+i]·conj(h[i]) with x zero beyond its end:
// output j of dsp.Correlator, directly.
func correlateAt(x, h []complex128, j int) complex128 {
	x = x[j:]
	if len(x) > len(h) {
		x = x[:len(h)]
	}
	h = h[:len(x)]
	var re, im float64
	for i, a := range x {
		c := h[i]
		re += real(a)*real(c) + imag(a)*imag(c)
		im += imag(a)*real(c) - real(a)*imag(c)
	}
	return complex(re, im)
}

// blank zeroes the samples of a buffer starting at raw sample b that the
// receiver does not record: inside a transmit interval, before the window
// or past the raw record (docs/detection.md §1).
func (sc *scene) blank(x []complex128, b int) {
	m := sc.m
	for i := range x {
		if k := b + i; k < 0 || k >= m.recLen {
			x[i] = 0
		}
	}
	for _, bl := range m.blanks {
		for k := max(bl[0], b); k < min(bl[1], b+len(x)); k++ {
			x[k-b] = 0
		}
	}
}

// distributed computes the expected power density of an extended or volume
// target on the window grid (its scatterers summed per sample) and the
// expected compressed power: density convolved with |response kernel|².
func (sc *scene) distributed(ctx context.Context, j int, g *tgt, lp *localPlan) error {
	m := sc.m
	r := m.s.Radar
	g.rangeM = g.t.RangeStartM
	g.apparent, g.folds = m.fold(g.t.RangeStartM)
	dr := C / (2 * m.fs) // range per sample, m
	perMetre := func(R float64) float64 { return m.perMetre(g.t, R) }
	m.surfaceWarnings(g.t)
	k0 := 1 / m.noiseW * r.PeakPowerW * math.Pow(dsp.FromDB(r.AntennaGainDBi), 2) * m.lambda * m.lambda /
		(math.Pow(4*math.Pi, 3) * dsp.FromDB(r.SystemLossDB))
	first := int(math.Floor(g.t.RangeStartM / m.unambM))
	last := int(math.Floor(g.t.RangeStopM / m.unambM))
	if last-first >= maxFolds {
		last = first + maxFolds - 1
		m.warn("target %s spans more than %d unambiguous intervals; only the nearest %d are simulated", g.t.ID, maxFolds, maxFolds)
	}
	// span returns the window samples [ka, kb] of fold f's true ranges.
	span := func(f int) (base float64, ka, kb int, ok bool) {
		base = float64(f) * m.unambM
		// True ranges of this fold that land in the window.
		a := math.Max(g.t.RangeStartM, base+m.rangeOf(0))
		b := math.Min(g.t.RangeStopM, base+m.rangeOf(float64(m.n-1)+0.5))
		if a >= b {
			return base, 0, -1, false
		}
		ka = int(math.Max(0, math.Floor(m.sampleOf(a-base))))
		kb = int(math.Min(float64(m.n-1), math.Ceil(m.sampleOf(b-base))))
		return base, ka, kb, true
	}
	klo, khi := m.n, -1
	for f := first; f <= last; f++ {
		if _, ka, kb, ok := span(f); ok {
			klo, khi = min(klo, ka), max(khi, kb)
		}
	}
	if khi < klo {
		return nil
	}
	density := make([]float64, khi-klo+1) // density[k−klo]: only the samples the folds touch
	rainG := m.rainGamma()
	lo, hi := m.n, -1
	for f := first; f <= last; f++ {
		base, ka, kb, ok := span(f)
		if !ok {
			continue
		}
		for k := ka; k <= kb; k++ {
			// Range slab of sample k: [rk−dr/2, rk+dr/2) clipped to the target.
			rk := m.rangeOf(float64(k)) + base
			s0, s1 := math.Max(rk-dr/2, g.t.RangeStartM), math.Min(rk+dr/2, g.t.RangeStopM)
			if s1 <= s0 || !m.processed[k] || rk <= 0 {
				continue
			}
			density[k-klo] += k0 * perMetre(rk) * (s1 - s0) / math.Pow(rk, 4) * dsp.FromDB(-m.rainLoss(rk, rainG)-m.gasLossDB(rk))
			lo, hi = min(lo, k), max(hi, k)
		}
		if err := ctx.Err(); err != nil {
			return err
		}
	}
	if hi < 0 {
		return nil
	}
	g.density, g.dlo = density[lo-klo:hi-klo+1], lo
	if off := len(m.ref) - m.lead; !sc.reaches(lo-off, hi+lp.size()-off) {
		return nil
	}
	// Response kernel |r(l)|² of the Doppler-shifted pulse, l = −len(ref)+1 … len(pulse)−1.
	kern := sc.kernel(lp, g.fd, false)
	shaped := g.density
	if sc.fe.on {
		shaped = sc.fe.densityShape(m, g.density, lo)
	}
	g.resp = sc.convolveDensity(shaped, lo, kern)
	if sc.fe.on {
		sc.distributedExtras(j, g, lp, shaped, lo)
	}
	return nil
}

// kernel returns the response kernel |r(l)|² (noise units) of the pulse
// shifted by fd Hz (its complex conjugate with conj): y[j] is the
// response at lag j + lead − len(ref) from the echo's start.
func (sc *scene) kernel(lp *localPlan, fd float64, conj bool) []float64 {
	m := sc.m
	lp.ensure()
	clear(lp.x)
	dsp.AddEcho(lp.x, m.wave, m.fs, float64(len(m.ref))/m.fs, 1, fd)
	if conj {
		for i, v := range lp.x {
			lp.x[i] = cmplx.Conj(v)
		}
	}
	lp.c.Apply(lp.y, lp.x)
	kern := make([]float64, len(lp.y))
	for j, v := range lp.y {
		kern[j] = (real(v)*real(v) + imag(v)*imag(v)) / m.noiseGain
	}
	return kern
}

// convolveDensity returns the expected compressed power of a density on
// window samples lo… through a kernel from kernel.
func (sc *scene) convolveDensity(density []float64, lo int, kern []float64) response {
	m := sc.m
	hi := lo + len(density) - 1
	off := len(m.ref) - m.lead
	outLo, outHi := max(lo-off, 0), min(hi+len(kern)-off, m.n)
	if outHi <= outLo {
		return response{}
	}
	pow := make([]float64, outHi-outLo)
	if len(density)*len(kern) <= 1<<15 { // beyond, the FFT is cheaper
		for i, q := range density {
			if q == 0 {
				continue
			}
			for j, kv := range kern {
				if k := lo + i + j - off; k >= outLo && k < outHi {
					pow[k-outLo] += q * kv
				}
			}
		}
	} else {
		convolveFFT(m.memo, pow, outLo, density, lo, kern, off)
	}
	return response{lo: outLo, pow: pow}
}

// convolveFFT adds Σ_i q[i]·kern[k−(qlo+i)+off] to dst[k−dlo] by FFT
// correlation with the reversed kernel. A memo keeps the result for the
// same q, kern, placement and len(dst) (reuse.go): a clutter patch's or
// a rain band's, the same while another target is dragged.
func convolveFFT(memo *pdMemo, dst []float64, dlo int, q []float64, qlo int, kern []float64, off int) {
	shift := qlo - off - dlo
	if k := memo.conv(q, kern, shift, len(dst)); k != nil {
		for i, v := range k.add {
			dst[k.a+i] += v
		}
		return
	}
	n := len(q) + len(kern)
	rev := make([]complex128, len(kern))
	for j, v := range kern {
		rev[len(kern)-1-j] = complex(v, 0)
	}
	x := make([]complex128, n)
	for i, v := range q {
		x[len(kern)-1+i] = complex(v, 0)
	}
	y := dsp.NewCorrelator(rev, n).Apply(nil, x)
	// y[t] = Σ_{i+j=t} q[i]·kern[j], which lands on sample k = qlo + t − off.
	a, b := max(shift, 0), min(len(y)+shift, len(dst)) // the dst indices written
	if a >= b {
		return
	}
	add := make([]float64, b-a)
	for t, v := range y {
		k := t + qlo - off
		if k >= dlo && k < dlo+len(dst) {
			add[k-dlo-a] = math.Max(real(v), 0)
			dst[k-dlo] += add[k-dlo-a]
		}
	}
	if memo != nil {
		memo.keepConv(&keptConv{q: append([]float64(nil), q...), kern: append([]float64(nil), kern...), shift: shift, dstLen: len(dst), a: a, add: add})
	}
}
