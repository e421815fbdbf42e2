package scenarios

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"
	"runtime"
	"slices"
	"sync"

	"github.com/pulsewright/pulsewright/dsp"
)

// RangeDoppler is the range–Doppler map of a pulse train: Doppler bins by
// range cells (the range axis of Series), in dB relative to the noise
// power per cell.
type RangeDoppler struct {
	DopplerHz    []float64   // bin centres, Hz, ascending from −PRF/2
	RangeRateMPS []float64   // the range rate of each bin, m/s (−f_d·λ/2)
	DB           [][]float32 // DB[bin][cell]
	CleanDB      [][]float32 // noise-free expected map, same layout
}

// train is the slow-time side of a pulse-train evaluation.
type train struct {
	m    *model
	sc   *scene
	plan *dsp.SlowTimePlan
	gain [][]float64 // gain[j][bin]: target j's power per bin for unit single-pulse power, re unit noise per pulse
	// noise[bin]: the power per bin of white noise of unit power per
	// pulse (the diagonal of plan.NoiseCovariance). Its mean over the
	// bins is 1; it is 1 in every bin without an MTI canceller on a
	// uniform train, and follows the canceller's |H(f)|²/Σh² with one
	// (near zero at zero Doppler, about 2 at ±PRF/2 for two pulses).
	noise []float64
	cf2   *dsp.CFAR2D    // the map's detector, kept with the multipliers it has solved
	cov   [][]complex128 // plan.NoiseCovariance(), made once (noiseCov); read only
	cfOK  bool
	// T is the slow-time unit, s: the PRI, or a stagger's mean PRI;
	// times the pulse times in units of T for a stagger (nil: uniform).
	T     float64
	times []float64
	// groups[j]: point target j's echoes on a staggered CPI's map (nil
	// otherwise, when gain[j] times its response is its map power).
	groups [][]staggerGroup
	// radar.scan: each pulse's two-way voltage gain on a point target
	// (nil: staring), its power, and each target's scan loss on the map,
	// dB (nil: staring).
	scanA, scanPow []float64
	scanLoss       []float64
}

func mtiTaps(kind string) []float64 {
	switch kind {
	case MTITwoPulse:
		return dsp.MTITwoPulse
	case MTIThreePulse:
		return dsp.MTIThreePulse
	}
	return dsp.MTINone
}

// coherentFraction is the share of a target's mean power that stays
// coherent from pulse to pulse: all of it for steady and scan-to-scan
// (Swerling 1 and 3) targets; none for Swerling 2 and 4, whose complex
// amplitude — power and carrier phase — is drawn anew every pulse
// (simulate), so its mean is zero and its power spreads over the Doppler
// bins as white noise does (docs/detection-probability.md §2).
func coherentFraction(fluct string) float64 {
	switch fluct {
	case "swerling2", "swerling4":
		return 0
	}
	return 1
}

// noiseCov returns the plan's noise covariance (dsp.SlowTimePlan.
// NoiseCovariance), computed on the first call or, for a uniform train,
// kept across evaluations (reuse.go); callers do not change it.
func (tr *train) noiseCov() [][]complex128 {
	if tr.cov == nil {
		if tr.times == nil {
			rx := tr.m.s.Receiver
			tr.cov = tr.m.memo.noiseCov(tr.m.s.Radar.Pulses, rx.MTI, rx.DopplerWindow, tr.plan.NoiseCovariance)
		} else {
			tr.cov = tr.plan.NoiseCovariance()
		}
	}
	return tr.cov
}

func newTrain(m *model, sc *scene) *train {
	r := m.s.Radar
	tr := &train{m: m, sc: sc, T: r.slowPRI(), times: staggerTimes(r)}
	tr.plan = tr.newPlan()
	nb := tr.plan.Bins()
	tr.noise = make([]float64, nb)
	for d, row := range tr.noiseCov() {
		tr.noise[d] = real(row[d])
	}
	tr.groups = make([][]staggerGroup, len(sc.targets))
	if tr.scanA = m.scanGains(); tr.scanA != nil {
		tr.scanPow = make([]float64, len(tr.scanA))
		for i, a := range tr.scanA {
			tr.scanPow[i] = a * a
		}
		tr.scanLoss = make([]float64, len(sc.targets))
	}
	for j, g := range sc.targets {
		gain := make([]float64, nb)
		fdT := g.fd * tr.T
		switch {
		case g.t.Kind == TargetPoint && tr.times != nil:
			// gain[j]: the gain of the group its map peak belongs to (the
			// integrated SNR's); power and peak use every group.
			tr.groups[j] = tr.staggerGroups(j, coherentFraction(g.t.Fluctuation))
			if i := tr.peakGroup(j); i >= 0 {
				copy(gain, tr.groups[j][i].gain)
			}
		case g.t.Kind == TargetPoint:
			c := coherentFraction(g.t.Fluctuation)
			tone := tr.plan.ToneResponse(nil, fdT)
			for d := range gain {
				gain[d] = (c*tone[d] + (1-c)*tr.noise[d]) * (1 - g.slowVar)
			}
			if tr.scanA != nil {
				// The scan weights each pulse by the beam's two-way gain.
				plain := slices.Max(gain)
				mod := tr.plan.ModulatedToneResponse(tone, fdT, tr.scanA)
				flat := tr.plan.FlatResponseBins(nil, tr.scanPow)
				for d := range gain {
					gain[d] = (c*mod[d] + (1-c)*flat[d]) * (1 - g.slowVar)
				}
				if peak := slices.Max(gain); peak > 0 && plain > 0 {
					tr.scanLoss[j] = dsp.DB(plain / peak)
				}
			}
		default:
			// Gaussian Doppler spectrum of rms width 2σv/λ, as 33 tones.
			sd := 2 * g.t.VelocitySpreadMPS / m.lambda * tr.T
			if sd*float64(nb) < 0.05 {
				tr.plan.ToneResponse(gain, fdT)
				break
			}
			const k = 33
			tone := make([]float64, nb)
			wsum := 0.0
			for i := range k {
				x := 3 * (2*float64(i)/(k-1) - 1)
				w := math.Exp(-x * x / 2)
				wsum += w
				tr.plan.ToneResponse(tone, fdT+x*sd)
				for d := range gain {
					gain[d] += w * tone[d]
				}
			}
			for d := range gain {
				gain[d] /= wsum
			}
		}
		if g.t.Kind != TargetPoint {
			for d := range gain {
				gain[d] *= 1 - g.slowVar
			}
		}
		tr.gain = append(tr.gain, gain)
	}
	tr.extraGain()
	for j, g := range sc.targets {
		if g.t.Kind != TargetPoint {
			continue
		}
		move := math.Abs(g.t.RangeRateMPS) * r.pulseTime(r.Pulses)
		if move > m.resolution() {
			m.warn("target %s moves %.1f m during the %d-pulse interval, more than the %.1f m resolution: its echo migrates across range cells and the map spreads it", g.t.ID, move, r.Pulses, m.resolution())
		}
		_ = j
	}
	return tr
}

// power returns target j's expected power at range cell k, Doppler bin d.
func (tr *train) power(j, k, d int) float64 {
	if gs := tr.groups[j]; gs != nil {
		s := 0.0
		for _, g := range gs {
			s += tr.sc.targets[j].resp.at(k-g.shift) * g.gain[d]
		}
		return s
	}
	return tr.sc.targets[j].resp.at(k) * tr.gain[j][d]
}

// peak returns target j's peak cell on the map.
func (tr *train) peak(j int) (k, d int, p float64) {
	if tr.groups[j] != nil {
		return tr.groupPeak(j)
	}
	k, pr := tr.sc.targets[j].resp.peakIn(tr.m.processed)
	if k < 0 {
		return -1, -1, 0
	}
	d = 0
	for i, v := range tr.gain[j] {
		if v > tr.gain[j][d] {
			d = i
		}
	}
	if coherentFraction(tr.sc.targets[j].t.Fluctuation) == 0 {
		// A pulse-to-pulse decorrelating echo fills the bins as noise
		// does: among the bins within rounding of its largest power, the
		// one of its own Doppler (the same SNR in each without MTI).
		own := dsp.Fold(tr.sc.targets[j].fd * tr.T)
		top, best := tr.gain[j][d], math.Inf(1)
		for i, v := range tr.gain[j] {
			if v >= top*(1-1e-9) {
				if e := math.Abs(dsp.Fold(tr.plan.BinFrequency(i) - own)); e < best {
					d, best = i, e
				}
			}
		}
	}
	return k, d, pr * tr.gain[j][d]
}

// cfar returns the detector on the map, or nil for a fixed threshold. It
// knows the noise correlation between range cells and between Doppler
// bins (docs/detection.md §9).
func (tr *train) cfar() *dsp.CFAR2D {
	if tr.cfOK {
		return tr.cf2
	}
	tr.cfOK = true
	d := tr.m.s.Receiver.Detector
	if d.Kind == DetectorFixed {
		return nil
	}
	c := &dsp.CFAR2D{PFA: d.PFA, GuardR: d.GuardCells, TrainR: d.TrainingCells, GuardD: d.DopplerGuardCells, TrainD: d.DopplerTrainingCells,
		RhoR: tr.m.noiseCorrelation(), DopplerCov: tr.noiseCov(), Variant: cfarVariant(d.Kind)}
	if d.Kind == DetectorCens {
		c.Censor = int(math.Round(float64(d.CensoredCells) / float64(d.TrainingCells) * float64(c2DCells(c))))
	}
	if d.Kind == DetectorOS {
		c.Rank = 1 + int(math.Round(float64(d.Rank-1)/float64(d.TrainingCells)*float64(c2DCells(c))))
	}
	// An equal detector of an earlier evaluation keeps the multipliers
	// it has solved (pdmemo.go).
	tr.cf2 = tr.m.memo.cfar2(c)
	return tr.cf2
}

// valid reports whether range cell k is processed.
func (tr *train) valid(k int) bool { return tr.m.processed[k] }

func c2DCells(c *dsp.CFAR2D) int {
	return (2*(c.GuardR+c.TrainR/2)+1)*(2*(c.GuardD+c.TrainD/2)+1) - (2*c.GuardR+1)*(2*c.GuardD+1)
}

// level returns the map detector's threshold at (k, d), in units of unit
// noise per pulse (the map's), with extra power p(k, d) on top of each
// training cell's own noise, tr.noise of its bin. Behind an MTI canceller
// the bins hold unequal noise: the training cells' expected power is
// their bin's noise, not 1, and the CFAR's multiplier (CFAR2D) already
// holds Pfa for the cell under test's own noise. A fixed threshold is
// set for each Doppler bin's own noise, so that every bin keeps Pfa.
func (tr *train) level(cf *dsp.CFAR2D, k, d int, p func(k, d int) float64) float64 {
	if cf == nil {
		return dsp.FixedMultiplier(tr.m.s.Receiver.Detector.PFA) * tr.noise[d]
	}
	return cf.LevelValid(func(kk, dd int) float64 { return tr.noise[dd] + p(kk, dd) }, tr.valid, k, d, tr.m.n, tr.plan.Bins())
}

// chi4Law returns the pulse weights |A_{d,p}|²·s_p of Doppler bin d (A
// the plan's linear map: MTI, window, DFT; s_p the scan's power on pulse
// p, 1 when staring) and the law of a Swerling 4 target's test in that
// bin (dsp.TrainChi4), or nil when the bin holds none of the pulses.
func (tr *train) chi4Law(d int) ([]float64, *dsp.TrainChi4) {
	np := tr.plan.Pulses()
	w := make([]float64, np)
	e := make([]complex128, np)
	y := make([]complex128, tr.plan.Bins())
	for p := range np {
		clear(e)
		e[p] = 1
		tr.plan.Apply(y, e)
		w[p] = real(y[d])*real(y[d]) + imag(y[d])*imag(y[d])
		if tr.scanPow != nil {
			w[p] *= tr.scanPow[p]
		}
	}
	law, err := dsp.NewTrainChi4(w)
	if err != nil {
		return nil, nil
	}
	return w, law
}

// judge decides target j's status on the range–Doppler map.
func (tr *train) judge(j int, cf *dsp.CFAR2D) (verdict, int) {
	sc := tr.sc
	g := sc.targets[j]
	v := verdict{culprit: -1}
	k, d, p := tr.peak(j)
	v.peakK, v.peak = k, p
	others := func(kk, dd int) float64 {
		s := 0.0
		for i := range sc.targets {
			if i != j {
				s += tr.power(i, kk, dd)
			}
		}
		for i := range sc.extras {
			if sc.extras[i].owner != j {
				s += tr.extraPower(i, kk, dd)
			}
		}
		return s
	}
	own := func(kk, dd int) float64 {
		s := tr.power(j, kk, dd)
		for i := range sc.extras {
			if sc.extras[i].owner == j {
				s += tr.extraPower(i, kk, dd)
			}
		}
		return s
	}
	if k >= 0 {
		v.noiseLevel = tr.level(cf, k, d, func(int, int) float64 { return 0 })
		v.sceneLevel = tr.level(cf, k, d, func(kk, dd int) float64 { return others(kk, dd) + own(kk, dd) })
		v.cell = others(k, d)
		v.threshold = math.Max(v.sceneLevel, v.cell)
		v.inCell = sc.cellEchoes(j, v.cell, func(i int) float64 { return tr.power(i, k, d) },
			func(i int) float64 { return tr.extraPower(i, k, d) })
		v.alone = tr.level(cf, k, d, func(kk, dd int) float64 { return tr.power(j, kk, dd) })
		if cf != nil {
			cs := cf.Cells(tr.valid, k, d, tr.m.n, tr.plan.Bins())
			v.cells = len(cs)
			if cf.Variant != dsp.CellAveraging && len(cs) > 0 {
				// The halves and the censoring as dsp.CFAR2D.LevelValid
				// forms them (docs/detection.md §5, 2-D).
				for _, q := range cs {
					if q.A < 0 || q.A == 0 && q.B < 0 {
						v.halves[0]++
					} else {
						v.halves[1]++
					}
				}
				if n2 := c2DCells(cf); n2 > 0 {
					v.censor = min(max(int(math.Round(float64(cf.Censor)*float64(len(cs))/float64(n2))), 0), len(cs)-1)
				}
			}
		}
		if swerling(g.t.Fluctuation) == dsp.Swerling4 && g.t.Kind == TargetPoint && tr.times == nil {
			v.chi4w, v.chi4 = tr.chi4Law(d)
		}
		// The verdict's powers are re the noise of the peak's own bin,
		// so that its peak is the SNR the detector sees there (an MTI
		// canceller scales a target and the noise of its bin alike).
		if nz := tr.noise[d]; nz > 0 {
			v.peak /= nz
			v.noiseLevel /= nz
			v.sceneLevel /= nz
			v.cell /= nz
			v.threshold /= nz
			v.alone /= nz
			for i := range v.inCell { // the echoes in its cell alike
				v.inCell[i].Power /= nz
			}
		}
	}
	// The eclipsing loss scales the target's map power as its range power.
	pu := g.unblankedPeak
	_, p0 := g.resp.peakIn(tr.m.processed)
	if p0 > 0 && k >= 0 {
		pu *= v.peak / p0
	}
	// Its echo reaches processed gates but the map holds none of it: the
	// MTI canceller removed it (zero Doppler exactly; docs/detection.md §6).
	v.cancelled = tr.m.s.Receiver.MTI != MTINone && g.t.Kind == TargetPoint && !g.rejected &&
		p0 > 0 && g.received > 0 && (k < 0 || v.peak <= 0)
	v.unblanked = pu
	if sc.decide(g, &v, true) == StatusMasked {
		best := 0.0
		var cells []dsp.Cell2
		if !v.byCell && cf != nil {
			cells = append(cells, cf.Cells(tr.valid, k, d, tr.m.n, tr.plan.Bins())...)
		}
		nb := tr.plan.Bins()
		for i := range sc.targets {
			var c float64
			if v.byCell || cf == nil {
				if i == j {
					continue
				}
				c = tr.power(i, k, d)
			} else {
				for _, q := range cells {
					c += tr.power(i, k+q.A, ((d+q.B)%nb+nb)%nb)
				}
			}
			if c > best {
				best, v.culprit, v.cause = c, i, ""
			}
		}
		type source struct {
			owner int
			cause string
		}
		sum := map[source]float64{}
		var order []source
		for i := range sc.extras {
			e := &sc.extras[i]
			if e.owner == j && (v.byCell || cf == nil) {
				continue
			}
			var c float64
			if v.byCell || cf == nil {
				c = tr.extraPower(i, k, d)
			} else {
				for _, q := range cells {
					c += tr.extraPower(i, k+q.A, ((d+q.B)%nb+nb)%nb)
				}
			}
			s := source{e.owner, e.cause}
			if _, ok := sum[s]; !ok {
				order = append(order, s)
			}
			sum[s] += c
		}
		for _, s := range order {
			if sum[s] > best {
				best, v.culprit, v.cause = sum[s], s.owner, s.cause
			}
		}
	}
	return v, d
}

// binHz returns the Doppler frequency of bin d in Hz.
func (tr *train) binHz(d int) float64 { return tr.plan.BinFrequency(d) / tr.T }

// simulate synthesises the pulses, compresses each, and forms the noisy
// and the expected range–Doppler maps. Pulses, then range cells, are
// shared among GOMAXPROCS workers; every random draw comes from a stream
// of its own (per pulse for noise, per target for fluctuation and
// scatterers), so the result does not depend on the number of workers.
// It returns the map, the first pulse's raw echo and the expected map in
// linear units (lin[k·nb+d]: range cell k, Doppler bin d; the caller owns
// it).
func (tr *train) simulate(ctx context.Context) (*RangeDoppler, []complex128, []float32, error) {
	m := tr.m
	r := m.s.Radar
	np, nb, n := r.Pulses, tr.plan.Bins(), m.n
	targets := tr.sc.targets
	// Fluctuation: scan-to-scan once per interval; pulse-to-pulse
	// (Swerling 2 and 4) a new amplitude and a new uniform carrier phase
	// every pulse — the echo of many scatterers that decorrelates from
	// pulse to pulse, the phase convention of the Pd laws
	// (docs/detection-probability.md §2).
	amps := make([][]complex128, np)
	for p := range amps {
		amps[p] = make([]complex128, len(targets))
	}
	for j, g := range targets {
		rng := streamOf(m.s.Seed, g.t.ID, 0x5157)
		fl := swerling(g.t.Fluctuation)
		pulsed := fl == dsp.Swerling2 || fl == dsp.Swerling4
		a := complex(math.Sqrt(dsp.SwerlingRCS(rng, 1, fl)), 0)
		if pulsed {
			a *= cmplx.Rect(1, 2*math.Pi*rng.Float64())
		}
		for p := range np {
			if p > 0 && pulsed {
				a = cmplx.Rect(math.Sqrt(dsp.SwerlingRCS(rng, 1, fl)), 2*math.Pi*rng.Float64())
			}
			amps[p][j] = a
			if tr.scanA != nil && g.t.Kind == TargetPoint {
				amps[p][j] *= complex(tr.scanA[p], 0)
			}
		}
	}
	fields := make([]*clutterField, len(targets))
	pns := make([]*pnEcho, len(targets))
	for j, g := range targets {
		if g.density != nil {
			fields[j] = tr.sc.newClutterField(g)
		}
		pns[j] = tr.sc.fe.newPNEcho(m, g, np, m.s.Seed)
		if fields[j] != nil {
			fields[j].pn = pns[j]
		}
	}
	cube := m.memo.takeScratch(np * n) // cube[p*n+k], every sample written below
	defer m.memo.putScratch(cube)
	echo0 := make([]complex128, n)
	scale := complex(1/math.Sqrt(m.noiseGain), 0)
	err := parallel(ctx, np, func(next func() (int, bool)) {
		corr := m.memo.takePlan(m.ref, m.recLen+m.lead)
		defer m.memo.putPlan(m.ref, m.recLen+m.lead, corr)
		x := make([]complex128, m.recLen+m.lead)
		y := make([]complex128, m.recLen+m.lead)
		own := make([]*clutterField, len(fields))
		for j, f := range fields {
			if f != nil {
				own[j] = f.clone()
			}
		}
		for p, ok := next(); ok; p, ok = next() {
			clear(x)
			echo := x[m.lead:]
			t := float64(p) * r.PRIS
			for j, g := range targets {
				switch {
				case g.t.Kind == TargetPoint && g.amp > 0 && tr.times != nil:
					// A stagger: every echo of an earlier pulse that lands
					// in this sweep, at its pulse's range and phase.
					m.sweepEchoes(p, g.t.RangeM, g.t.RangeRateMPS, func(_ int, rq, delay float64) {
						ph := cmplx.Rect(1, -4*math.Pi*math.Mod(rq/m.lambda, 1))
						a := complex(g.amp*math.Pow(g.t.RangeM/rq, 2), 0) * amps[p][j]
						if pns[j] != nil {
							m.addPointEchoPN(echo, pns[j], g.t.ID, p, delay-m.t0, a*ph, g.fd)
						} else {
							m.addPointEcho(echo, delay-m.t0, a*ph, g.fd)
						}
					})
				case g.t.Kind == TargetPoint && g.amp > 0:
					rp := g.t.RangeM + g.t.RangeRateMPS*t
					if rp <= 0 {
						continue
					}
					app, _ := m.fold(rp)
					ph := cmplx.Rect(1, -4*math.Pi*math.Mod(rp/m.lambda, 1))
					a := complex(g.amp*math.Pow(g.t.RangeM/rp, 2), 0) * amps[p][j]
					if pns[j] != nil {
						m.addPointEchoPN(echo, pns[j], g.t.ID, p, 2*app/C-m.t0, a*ph, g.fd)
					} else {
						m.addPointEcho(echo, 2*app/C-m.t0, a*ph, g.fd)
					}
				case own[j] != nil:
					own[j].add(echo, p)
				}
			}
			tr.sc.fe.stcShape(m, echo, 0)
			addNoise(echo, m.s.Seed, 0x4e01+uint64(p)<<24)
			tr.sc.fe.receive(echo)
			if tr.times != nil {
				m.blankSweep(echo, p)
			} else {
				tr.sc.blank(echo, 0)
			}
			if p == 0 {
				copy(echo0, echo[:n])
			}
			corr.Apply(y, x) // x holds lead zeros, then the echo: an echo at d peaks at y[d]
			row := cube[p*n : (p+1)*n]
			for k := range row {
				row[k] = y[k] * scale
			}
		}
	})
	if err != nil {
		return nil, nil, nil, err
	}
	rd := &RangeDoppler{DopplerHz: make([]float64, nb), RangeRateMPS: make([]float64, nb), DB: make([][]float32, nb), CleanDB: make([][]float32, nb)}
	lin := make([]float32, n*nb) // lin[k·nb+d]
	for d := range nb {
		rd.DopplerHz[d] = tr.binHz(d)
		rd.RangeRateMPS[d] = -rd.DopplerHz[d] * m.lambda / 2
		rd.DB[d] = make([]float32, n)
		rd.CleanDB[d] = make([]float32, n)
	}
	const chunk = 256
	err = parallel(ctx, (n+chunk-1)/chunk, func(next func() (int, bool)) {
		plan := tr.newPlan()
		col := make([]complex128, np)
		out := make([]complex128, nb)
		block := m.memo.takeScratch(chunk * np) // block[i*np+p]: cell c·chunk+i, pulse p; the rows read are written first
		defer m.memo.putScratch(block)
		for c, ok := next(); ok; c, ok = next() {
			k0, k1 := c*chunk, min((c+1)*chunk, n)
			for p := range np { // gather pulse rows in cache-friendly runs
				row := cube[p*n+k0 : p*n+k1]
				for i, v := range row {
					block[i*np+p] = v
				}
			}
			for k := k0; k < k1; k++ {
				copy(col, block[(k-k0)*np:(k-k0+1)*np])
				plan.Apply(out, col)
				for d, v := range out {
					rd.DB[d][k] = float32(toDB(real(v)*real(v) + imag(v)*imag(v)))
				}
			}
		}
	})
	if err != nil {
		return nil, nil, nil, err
	}
	for j, g := range targets {
		if gs := tr.groups[j]; gs != nil {
			for _, gr := range gs {
				for i, pw := range g.resp.pow {
					if k := g.resp.lo + i + gr.shift; k >= 0 && k < n {
						for d := range nb {
							lin[k*nb+d] += float32(pw * gr.gain[d])
						}
					}
				}
			}
			continue
		}
		for i, pw := range g.resp.pow {
			k := g.resp.lo + i
			for d := range nb {
				lin[k*nb+d] += float32(pw * tr.gain[j][d])
			}
		}
	}
	for i := range tr.sc.extras {
		e := &tr.sc.extras[i]
		for q, pw := range e.resp.pow {
			k := e.resp.lo + q
			for d := range nb {
				lin[k*nb+d] += float32(pw * e.gain[d])
			}
		}
	}
	for k := range n {
		for d, v := range lin[k*nb : (k+1)*nb] {
			rd.CleanDB[d][k] = float32(toDB(float64(v)))
		}
	}
	return rd, echo0, lin, nil
}

// parallel runs work on GOMAXPROCS goroutines (at most tasks); each
// worker takes task indices 0 … tasks−1 from next until it reports false,
// and stops early when ctx is done, which parallel then returns.
func parallel(ctx context.Context, tasks int, work func(next func() (int, bool))) error {
	var (
		mu sync.Mutex
		i  int
		wg sync.WaitGroup
	)
	next := func() (int, bool) {
		mu.Lock()
		defer mu.Unlock()
		if i >= tasks || ctx.Err() != nil {
			return 0, false
		}
		i++
		return i - 1, true
	}
	for range min(runtime.GOMAXPROCS(0), tasks) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			work(next)
		}()
	}
	wg.Wait()
	return ctx.Err()
}

// report adds the pulse-train fields to a target's report and the
// sentences on Doppler that decide its status.
func (tr *train) report(j int, v, single verdict, bin int, out *TargetReport) {
	m, g := tr.m, tr.sc.targets[j]
	r := m.s.Radar
	prf := 1 / tr.T
	fold := dsp.Fold(g.fd * tr.T)
	rate := tidy(-fold * prf * m.lambda / 2)
	out.ApparentRangeRateMPS = &rate
	binW := 1 / float64(tr.plan.Bins())
	blind := math.Abs(fold) < binW/2 && math.Abs(g.fd*tr.T) >= binW/2
	if tr.times != nil {
		// The filter bank at the true pulse times folds a Doppler onto
		// zero only at multiples of 1/Δ; near a multiple of the mean PRF
		// it leaks into the bins through the stagger's grating lobes.
		blind = tr.staggerBlind(g.fd)
	}
	out.BlindSpeed = &blind
	if v.peakK >= 0 && v.peak > 0 {
		snr := out.SNRDB + dsp.DB(tr.gain[j][bin]/tr.noise[bin])
		out.SNRIntegratedDB = &snr
	}
	if tr.scanLoss != nil && g.t.Kind == TargetPoint {
		l := tr.scanLoss[j]
		out.ScanLossDB = &l
	}
	if blind {
		what := "where stationary clutter sits"
		if m.s.Receiver.MTI != MTINone {
			what = "where the MTI canceller rejects it"
		}
		if tr.times != nil {
			d := dsp.NewSchedule(r.PRIStaggerS...).Delta
			out.Reason += fmt.Sprintf(" Blind speed of the stagger %s: its Doppler of %.0f Hz is a multiple of %.0f Hz (1/%s, the PRIs' common step), so every pulse sees it as at zero Doppler, %s.", staggerWords(r.PRIStaggerS), g.fd, 1/d, sec(d), what)
		} else {
			out.Reason += fmt.Sprintf(" Blind speed: its Doppler of %.0f Hz is a multiple of the %.0f Hz PRF, so it folds onto zero Doppler, %s.", g.fd, prf, what)
		}
	}
	switch {
	case v.status == StatusDetected && single.status == StatusMasked && single.culprit >= 0:
		o := tr.sc.targets[single.culprit]
		_, od, _ := tr.peak(single.culprit)
		out.Reason += fmt.Sprintf(" Doppler saves it: at %+.1f m/s it sits %d Doppler bins from %s (%+.1f m/s), which masks it in a single pulse.",
			rate, binDistance(bin, od, tr.plan.Bins()), o.t.ID, tidy(-tr.binHz(od)*m.lambda/2))
	case v.status == StatusMasked && v.culprit >= 0:
		_, od, _ := tr.peak(v.culprit)
		if dd := binDistance(bin, od, tr.plan.Bins()); dd <= 1 {
			out.Reason += fmt.Sprintf(" They share its Doppler (%d bin apart at %+.1f m/s), so Doppler processing cannot separate them.", dd, rate)
		}
	}
}

func binDistance(a, b, n int) int {
	d := (a - b) % n
	if d < 0 {
		d += n
	}
	return min(d, n-d)
}

// series returns the plot series of a pulse train: the range profile is
// the largest value over Doppler of each range cell, with the threshold
// at that cell's strongest expected bin, and the map itself.
func (tr *train) series(ctx context.Context) (Series, error) {
	m := tr.m
	rd, echo0, lin, err := tr.simulate(ctx)
	if err != nil {
		return Series{}, err
	}
	n, nb := m.n, tr.plan.Bins()
	s := Series{
		RangeM0:      m.rangeOf(0),
		RangeStepM:   C / (2 * m.fs),
		Echo:         echo0,
		ProfileDB:    make([]float64, n),
		CleanDB:      make([]float64, n),
		ThresholdDB:  make([]float64, n),
		RangeDoppler: rd,
	}
	clean := func(k, d int) float64 { return float64(lin[k*nb+d]) }
	cf := tr.cfar()
	// The level of a cell is kept across evaluations where the map near
	// it did not change (reuse.go).
	var cur, prev *keptProfile
	var changed []int
	hr := 0
	if cf != nil && n*nb <= levelsKeptCells && m.memo != nil {
		cur = &keptProfile{cf2: cf, n: n, nb: nb, noise: slices.Clone(tr.noise), processed: slices.Clone(m.processed),
			lin: lin, bin: make([]int, n), level: make([]float64, n)} // the kept series owns lin
		for k := range n {
			cur.bin[k] = -1
		}
		prev = m.memo.profileFor(cf, n, nb, tr.noise, m.processed, cur.lin)
		changed = make([]int, n+1) // changed[k+1] − changed[lo]: columns lo … k unlike prev's
		for k := range n {
			c := 1
			if prev != nil && sameFloat32Bits(prev.lin[k*nb:(k+1)*nb], cur.lin[k*nb:(k+1)*nb]) {
				c = 0
			}
			changed[k+1] = changed[k] + c
		}
		hr = cf.GuardR + cf.TrainR/2
	}
	level := func(k, d int) float64 {
		if cur == nil {
			return tr.level(cf, k, d, clean)
		}
		if prev != nil && prev.bin[k] == d && changed[min(k+hr, n-1)+1]-changed[max(k-hr, 0)] == 0 {
			cur.bin[k], cur.level[k] = d, prev.level[k]
			return cur.level[k]
		}
		cur.bin[k], cur.level[k] = d, tr.level(cf, k, d, clean)
		return cur.level[k]
	}
	for k := range n {
		if k%4096 == 0 && ctx.Err() != nil {
			return Series{}, ctx.Err()
		}
		best, bd := float32(-1e9), 0
		pk := float32(-1e9)
		for d := range nb {
			if rd.CleanDB[d][k] > best {
				best, bd = rd.CleanDB[d][k], d
			}
			pk = max(pk, rd.DB[d][k])
		}
		s.ProfileDB[k], s.CleanDB[k] = float64(pk), float64(best)
		if !m.processed[k] { // unprocessed gates hold no data
			s.ProfileDB[k], s.CleanDB[k], s.ThresholdDB[k] = dbFloor, dbFloor, dbFloor
			continue
		}
		th := level(k, bd)
		if math.IsInf(th, 1) {
			th = 0
		}
		s.ThresholdDB[k] = toDB(th)
	}
	if cur != nil {
		m.memo.keepProfile(cur)
	}
	s.Response = m.response()
	return s, nil
}

// tidy rounds values within a millimetre per second of zero to zero, so
// that rounding never prints as "-0.0".
func tidy(v float64) float64 {
	if math.Abs(v) < 1e-3 {
		return 0
	}
	return v
}
