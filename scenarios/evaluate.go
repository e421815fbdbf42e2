package scenarios

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"
	"runtime"

	"github.com/pulsewright/pulsewright/dsp"
)

// dbFloor is the lowest dB value in series: 10·log10(0) is not a number.
const dbFloor = -100.0

func toDB(p float64) float64 {
	if !(p > 1e-10) { // at or below the floor, or NaN (as math.Max would keep it)
		if p != p {
			return p
		}
		return dbFloor
	}
	return dsp.DB(p)
}

// Evaluate computes the report and the plot series of a valid scenario
// (as Decode returns it). It checks ctx between stages and returns
// ctx.Err() when cancelled. The same scenario gives identical results.
func Evaluate(ctx context.Context, s *Scenario) (*Result, error) {
	return new(Engine).Evaluate(ctx, s)
}

// Engine evaluates a sequence of scenarios, reusing the waveform, pulse
// and reference of the previous one when they did not change: the common
// case while a user drags a target. The zero Engine is ready to use. An
// Engine is not safe for concurrent use.
type Engine struct {
	last *model
	// uncached turns the memo of detection probabilities off (pdmemo.go),
	// for the test that compares memoised results with fresh ones.
	uncached bool
}

// Evaluate is the package function Evaluate with reuse of the previous
// scenario's waveform and reference.
func (e *Engine) Evaluate(ctx context.Context, s *Scenario) (*Result, error) {
	m, err := newModel(s, e.last)
	if err != nil {
		return nil, err
	}
	if e.uncached {
		m.memo = nil
	}
	// The window's compression plan is kept across frames by the Engine
	// alone: suggestions build models of their own and must not share it.
	if p := e.last; p != nil && p.winCorr != nil && p.n == m.n && len(p.ref) > 0 && len(p.ref) == len(m.ref) && &p.ref[0] == &m.ref[0] {
		m.winCorr = p.winCorr
	}
	sc, err := newScene(ctx, m)
	if err != nil {
		return nil, err
	}
	// A single pulse's plot series (noisy window, compression,
	// thresholds) read the scene and model without changing them, so they
	// are computed on a second goroutine while the waveform and target
	// reports, with their verified suggestions, and the pulse's response
	// are built on this one.
	var window chan Series
	if sc.train == nil {
		window = make(chan Series, 1)
		// The compression takes its blocks on two goroutines, so that it
		// also uses this one's core once the reports are done.
		go func() { window <- sc.window(min(2, runtime.GOMAXPROCS(0))) }()
	}
	res := &Result{sc: sc}
	res.Report.Version = ReportVersion
	res.Report.Scenario = s.Name
	res.Report.Waveform = m.waveformReport()
	if ctx.Err() == nil {
		res.Report.Targets = sc.targetReports(ctx, m, true)
	}
	if window != nil {
		var lv Series
		sc.levels(&lv)
		resp := m.response()
		res.Series = <-window
		res.Series.CleanDB, res.Series.ThresholdDB, res.Series.Response = lv.CleanDB, lv.ThresholdDB, resp
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	if sc.train != nil {
		if res.Series, err = sc.train.series(ctx); err != nil {
			return nil, err
		}
	}
	res.Report.FalseAlarms, res.Report.Clutter = sc.falseAlarms(), sc.clutterSummary(sc.clutter)
	res.Report.Warnings = append([]string{}, m.warnings...)
	res.Report.Stagger = staggerReport(s)
	res.Report.Integration = integrationReport(s)
	res.Report.Scan = scanReport(s)
	if s.Radar.Schedule != nil {
		if res.Report.Schedule, err = evalSchedule(ctx, s, m); err != nil {
			return nil, err
		}
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	e.last = m
	return res, nil
}

// Analyse computes the report alone, without plot series or suggestions:
// the cheaper path for sweeps.
func Analyse(ctx context.Context, s *Scenario) (*Report, error) {
	return new(Engine).Analyse(ctx, s)
}

// Analyse is the package function Analyse with reuse of the previous
// scenario's waveform and reference, as in Evaluate.
func (e *Engine) Analyse(ctx context.Context, s *Scenario) (*Report, error) {
	m, err := newModel(s, e.last)
	if err != nil {
		return nil, err
	}
	if e.uncached {
		m.memo = nil
	}
	sc, err := newScene(ctx, m)
	if err != nil {
		return nil, err
	}
	rep := &Report{Version: ReportVersion, Scenario: s.Name, Waveform: m.waveformReport()}
	rep.Targets = sc.targetReports(ctx, m, false)
	rep.FalseAlarms, rep.Clutter = sc.falseAlarms(), sc.clutterSummary(sc.clutter)
	rep.Warnings = append([]string{}, m.warnings...)
	rep.Stagger = staggerReport(s)
	rep.Integration = integrationReport(s)
	rep.Scan = scanReport(s)
	if s.Radar.Schedule != nil {
		if rep.Schedule, err = evalSchedule(ctx, s, m); err != nil {
			return nil, err
		}
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	e.last = m
	return rep, nil
}

func (m *model) waveformReport() WaveformReport {
	w, r := m.s.Waveform, m.s.Radar
	cont := m.continuous()
	fig := cont.fig
	B, tau := w.Bandwidth(), w.PulseWidth()
	if w.Kind == KindNLFM && m.s.Receiver.Window.Kind == WindowNone && fig.Sidelobes && fig.PSLRDB > w.DesignSidelobeDB+3 {
		m.warn("the NLFM reaches a PSLR of %.1f dB, short of its %.0f dB design: at B·τ = %.0f the ripple of a stationary-phase design limits it; a longer pulse or more bandwidth gets closer", fig.PSLRDB, w.DesignSidelobeDB, B*tau)
	}
	straddleMax, straddleMean := m.sampling()
	if straddleMax > 1 {
		m.warn("sampling at %s costs up to %.1f dB (%.1f dB on average) of the compressed peak against the waveform's continuous response; a higher sample rate costs less", hz(m.fs), straddleMax, straddleMean)
	}
	rep := WaveformReport{
		Kind:                   w.Kind,
		PulseWidthS:            tau,
		BandwidthHz:            B,
		TimeBandwidth:          B * tau,
		CompressionGainDB:      dsp.DB(B * tau),
		Mainlobe3dBM:           fig.Mainlobe3dB * C / 2,
		MismatchLossDB:         fig.MismatchLossDB,
		StraddleLossMaxDB:      straddleMax,
		StraddleLossMeanDB:     straddleMean,
		BlindRangeM:            C * tau / 2,
		UnambiguousRangeM:      C * r.PRIS / 2,
		UnambiguousVelocityMPS: m.lambda / (4 * r.slowPRI()),
	}
	if fig.Sidelobes {
		pslr, islr := fig.PSLRDB, fig.ISLRDB
		rep.PSLRDB, rep.ISLRDB = &pslr, &islr
	}
	if m.s.CoherentTrain() {
		dres := 1 / (float64(r.Pulses) * r.slowPRI())
		vres := dres * m.lambda / 2
		rep.DopplerResolutionHz, rep.VelocityResolutionMPS = &dres, &vres
	}
	return rep
}

// eclipseLossDB returns a point target's eclipsing loss (docs/detection.md
// §3): its unblanked peak over its blanked one, in dB; ok is false when
// no sample was blanked or every one was.
func (g *tgt) eclipseLossDB(processed []bool) (db float64, ok bool) {
	if g.t.Kind != TargetPoint || !g.blankTouched {
		return 0, false
	}
	_, p := g.resp.peakIn(processed)
	if !(p > 0) || !(g.unblankedPeak > 0) || g.received <= 0 {
		return 0, false
	}
	return math.Max(dsp.DB(g.unblankedPeak/p), 0), true
}

// targetReports builds the per-target part of the report. With suggest,
// a target that is not detected gets a verified change in its reason.
func (sc *scene) targetReports(ctx context.Context, m *model, suggest bool) []TargetReport {
	cf := m.detector()
	fig := m.continuous().fig
	budget := suggestionBudget(m)
	var cf2 *dsp.CFAR2D
	if sc.train != nil {
		cf2 = sc.train.cfar()
		budget = 0 // changes are verified on single pulses only
	}
	schedBudget := scheduleBudget(m)
	out := make([]TargetReport, len(sc.targets))
	// The clutter analysis reads no verdict: it runs beside the judging.
	verdicts := sc.judgeAll(cf, func(c *dsp.CFAR) { sc.clutter = sc.analyseClutter(c, cf2) })
	for j, g := range sc.targets {
		v := verdicts[j]
		single := v
		bin := -1
		if sc.train != nil {
			v, bin = sc.train.judge(j, cf2)
		}
		clutterVerdict(g, &v)
		d := m.doppler(g.fd)
		tr := TargetReport{
			ID:                g.t.ID,
			RangeM:            g.rangeM,
			DopplerHz:         g.fd + 0, // never −0
			DopplerLossDB:     d.lossDB,
			RangeShiftM:       d.shift * C / 2,
			Status:            v.status,
			ThresholdMarginDB: v.margin(),
			DecidedOn:         v.rule,
			cancelled:         v.status == StatusTooWeak && v.cancelled,
		}
		if g.t.Kind != TargetPoint && v.peakK >= 0 {
			tr.RangeM = m.rangeOf(float64(v.peakK))
		}
		if l, ok := g.eclipseLossDB(m.processed); ok {
			tr.EclipsingLossDB = &l
		}
		if g.outOfBand && !g.rejected && g.t.Kind == TargetPoint {
			l := g.bandLossDB
			tr.BandLossDB = &l
		}
		if g.outOfBand {
			m.warn("target %s: its Doppler shift of %s is outside the receiver's band of ±%s (sample rate %s): %s", g.t.ID, hz(g.fd), hz(m.fs/2), hz(m.fs), bandWords(g))
		}
		tr.SNRDB = sc.snrDB(g, tr.RangeM, fig, d.lossDB)
		m.pdFigures(v, v.alone, &tr)
		if v.culprit >= 0 {
			tr.MaskedBy = sc.targets[v.culprit].t.ID
		}
		sc.clutterFigures(sc.clutter, j, single, v, bin, &tr)
		if v.status == StatusClutter {
			tr.MarginDB, tr.ThresholdMarginDB, tr.DecidedOn = nil, nil, ""
			tr.Reason = sc.clutterReason(g, tr)
		} else {
			tr.Reason = sc.reason(g, v, tr, cf)
		}
		if v.status == StatusTooWeak || v.status == StatusMasked {
			if d.lossDB >= 1 {
				tr.Reason += fmt.Sprintf(" Its Doppler shift of %s costs %.1f dB of compressed peak.", hz(math.Abs(g.fd)), d.lossDB)
			}
		}
		if sc.train != nil {
			sc.train.report(j, v, single, bin, &tr)
			tr.Reason += sc.train.scanWords(j, &tr)
		}
		hinted := false
		if suggest && v.status != StatusDetected && v.status != StatusOutOfWindow && v.status != StatusFolded && v.status != StatusClutter && v.status != StatusBelowHorizon && budget > 0 && ctx.Err() == nil {
			if hint := suggestFix(ctx, m, j, v, &budget); hint != "" {
				tr.Reason += " " + hint
				hinted = true
			}
		}
		if cause := sc.scheduleCause(j, &tr); suggest && !hinted && cause != "" && schedBudget > 0 && ctx.Err() == nil {
			if hint := suggestSchedule(ctx, m, sc, j, cause, &schedBudget); hint != "" {
				tr.Reason += " " + hint
			}
		}
		if m.s.ReadVersion == 1 {
			if old := v.v1Status(g); old != v1Name(v.status) || v.status == StatusFolded {
				m.warn("target %s: %s", g.t.ID, verdictChange(old, v, tr, m.s.Receiver.Detector.PdRequired))
			}
		}
		if (tr.Status == StatusOutOfWindow || tr.Status == StatusFolded) && g.t.Kind == TargetPoint {
			if g.folds > 0 {
				m.warn("target %s at %s is beyond the unambiguous range %s and folds to an apparent %s", g.t.ID, km(g.t.RangeM), km(m.unambM), km(g.apparent))
			} else {
				m.warn("target %s at %s is outside the receive window %s–%s", g.t.ID, km(g.t.RangeM), km(m.s.Radar.WindowStartM), km(m.s.Radar.WindowStopM))
			}
		}
		detectionRangeOf(g, v, &tr)
		out[j] = tr
	}
	return out
}

// snrDB is the report's expected single-pulse SNR: the radar equation
// less mismatch, Doppler and eclipsing losses; per resolution cell for
// distributed targets.
func (sc *scene) snrDB(g *tgt, rangeM float64, fig dsp.ChiFigures, dopLoss float64) float64 {
	m := sc.m
	r := m.s.Radar
	var sigma float64
	switch g.t.Kind {
	case TargetPoint:
		sigma = dsp.FromDB(g.t.RCSDBsm)
	default:
		sigma = m.perMetre(g.t, rangeM) * C / (2 * m.s.Waveform.Bandwidth())
	}
	if rangeM <= 0 {
		return dbFloor
	}
	snr := dsp.RadarSNR(r.PeakPowerW, m.tau, dsp.FromDB(r.AntennaGainDBi), m.lambda, sigma, rangeM,
		dsp.FromDB(r.NoiseFigureDB), dsp.FromDB(r.SystemLossDB))
	v := dsp.DB(snr) - fig.MismatchLossDB - dopLoss
	if l, ok := g.eclipseLossDB(m.processed); ok {
		v -= l
	}
	if g.rejected || g.hidden {
		return dbFloor
	}
	if g.outOfBand && g.t.Kind == TargetPoint {
		v -= g.bandLossDB
	}
	v -= g.stcLossDB // the STC's attenuation at its range (front_end)
	if g.t.Kind == TargetPoint {
		v -= g.rainLossDB + g.gasLossDB
		if g.multipath {
			v += g.multipathDB
		}
	} else {
		v -= m.rainLossDB(rangeM) + m.gasLossDB(rangeM)
	}
	return math.Max(v, dbFloor)
}

// series synthesises the noisy receive window, compresses it and returns
// the plot series.
func (sc *scene) series() Series {
	s := sc.window(1)
	sc.levels(&s)
	s.Response = sc.m.response()
	return s
}

// window synthesises the noisy receive window and compresses it on up to
// workers goroutines: the series but CleanDB, ThresholdDB (levels) and
// Response.
func (sc *scene) window(workers int) Series {
	m := sc.m
	s := Series{
		RangeM0:    m.rangeOf(0),
		RangeStepM: C / (2 * m.fs),
		ProfileDB:  make([]float64, m.n),
	}
	x := make([]complex128, m.recLen+m.lead)
	s.Echo = sc.windowPower(workers, x, nil, s.ProfileDB)[:m.n] // x is not used after the compression
	dsp.PowersDB(s.ProfileDB, s.ProfileDB, dbFloor)
	for k, ok := range m.processed {
		if !ok {
			s.ProfileDB[k] = dbFloor
		}
	}
	return s
}

// windowPower synthesises the noisy receive window into x (len
// recLen+lead, overwritten), compresses it into y (len recLen+lead; nil:
// allocated) and writes the compressed power re noise of gates 0 … n−1
// into p (len n), linear; it returns the echo (x past the lead zeros).
// Monte Carlo trials call it with buffers of their own and test p
// directly (no round trip through dB).
func (sc *scene) windowPower(workers int, x, y []complex128, p []float64) []complex128 {
	m := sc.m
	if m.s.NonCoherent() {
		return sc.nciPower(workers, x, y, p) // every pulse of the train, integrated
	}
	clear(x)
	echo := x[m.lead:]
	for _, g := range sc.targets {
		pn := sc.fe.newPNEcho(m, g, 1, m.s.Seed)
		switch {
		case g.t.Kind == TargetPoint && g.amp > 0:
			rng := streamOf(m.s.Seed, g.t.ID, 0x5157)
			amp := g.amp * math.Sqrt(dsp.SwerlingRCS(rng, 1, swerling(g.t.Fluctuation)))
			if pn != nil {
				m.addPointEchoPN(echo, pn, g.t.ID, 0, g.delay, complex(amp, 0)*g.phase, g.fd)
			} else {
				m.addPointEcho(echo, g.delay, complex(amp, 0)*g.phase, g.fd)
			}
		case g.density != nil:
			f := sc.newClutterField(g)
			f.pn = pn
			f.add(echo, 0)
		}
	}
	sc.fe.stcShape(m, echo, 0)
	for i, v := range m.memo.windowNoise(m.s.Seed, len(echo)) {
		echo[i] += v
	}
	sc.fe.receive(echo)
	sc.blank(echo, 0)
	// x holds lead zeros, then the echo: an echo at window sample d peaks at y[d].
	if m.winCorr == nil || m.winCorr.Len() != len(x) {
		m.winCorr = dsp.NewCorrelatorWorkers(m.ref, len(x), workers)
	}
	y = m.winCorr.Apply(y, x)
	for k := range p[:m.n] {
		v := y[k]
		p[k] = (real(v)*real(v) + imag(v)*imag(v)) / m.noiseGain
	}
	return echo
}

// levels fills the noise-free profile and the detection threshold of s
// (CleanDB, ThresholdDB): they depend on the scene alone, not on the
// noisy window, so they can be computed beside window.
func (sc *scene) levels(s *Series) {
	m := sc.m
	s.CleanDB, s.ThresholdDB = make([]float64, m.n), make([]float64, m.n)
	if cf := m.detector(); cf != nil {
		var th []float64
		if sc.clutter != nil && sc.clutter.th != nil { // the same computation, done for the breakthrough
			th = s.ThresholdDB
			copy(th, sc.clutter.th)
		} else {
			p := s.CleanDB // holds 1 + total until the dB values below
			for k := range p {
				p[k] = 1 + sc.total[k]
			}
			th = cf.ThresholdsValid(s.ThresholdDB, p, m.processed)
		}
		for k, ok := range m.processed { // no training cell: no threshold
			if !ok || math.IsInf(th[k], 1) {
				th[k] = 0
			}
		}
		dsp.PowersDB(th, th, dbFloor)
	} else {
		t := toDB(m.fixedLevel())
		for k := range s.ThresholdDB {
			s.ThresholdDB[k] = t
		}
	}
	dsp.PowersDB(s.CleanDB, sc.total, dbFloor)
	for k, ok := range m.processed { // unprocessed gates hold no data
		if !ok {
			s.CleanDB[k], s.ThresholdDB[k] = dbFloor, dbFloor
		}
	}
}

// addPointEcho adds a point echo to the raw record (dsp.AddEcho's delay,
// amplitude and Doppler) as the receiver hears it: directly when its
// Doppler is inside the band, otherwise band-limited on a local buffer.
func (m *model) addPointEcho(rec []complex128, delay float64, amp complex128, fd float64) {
	if math.Abs(fd) < m.fs/2 {
		dsp.AddEcho(rec, m.wave, m.fs, delay, amp, fd)
		return
	}
	b := int(math.Floor(delay*m.fs)) - len(m.ref)
	buf := make([]complex128, len(m.pulse)+2*len(m.ref)+2)
	m.addEcho(buf, delay-float64(b)/m.fs, amp, fd)
	for i, v := range buf {
		if k := b + i; k >= 0 && k < len(rec) {
			rec[k] += v
		}
	}
}

// bandWords says what the receiver band does to an out-of-band target.
func bandWords(g *tgt) string {
	if g.rejected {
		return "its echo is rejected"
	}
	return fmt.Sprintf("only part of its echo passes, %.1f dB lost", g.bandLossDB)
}

func newResponsePlot(t, db []float64) *Response {
	r := &Response{RangeM: make([]float64, len(t)), DB: make([]float64, len(db))}
	for i := range t {
		r.RangeM[i] = t[i] * C / 2
		r.DB[i] = math.Max(db[i], -120)
	}
	return r
}

// clutterField is a realisation of a distributed target: complex Gaussian
// reflectivity on the window grid with the expected density, each
// scatterer with its own range rate drawn from the target's velocity
// spread, convolved with the pulse and shifted by the mean Doppler.
type clutterField struct {
	m    *model
	g    *tgt
	rho  []complex128 // reflectivity per grid sample, √(noise power) units
	dphi []float64    // per-pulse phase step of each scatterer, rad
	rev  []complex128 // the time-reversed conjugate pulse: correlating with it convolves
	corr *dsp.Correlator
	x, y []complex128
	pn   *pnEcho // phase noise, nil when none
}

func (sc *scene) newClutterField(g *tgt) *clutterField {
	m := sc.m
	rng := streamOf(m.s.Seed, g.t.ID, 0xc1a7)
	np := len(m.pulse)
	n := len(g.density) + np
	f := &clutterField{m: m, g: g, rho: make([]complex128, len(g.density)), dphi: make([]float64, len(g.density))}
	for i, q := range g.density {
		f.rho[i] = complex(math.Sqrt(q), 0) * dsp.ComplexNormal(rng)
	}
	if sd := g.t.VelocitySpreadMPS; sd > 0 {
		vr := streamOf(m.s.Seed, g.t.ID, 0x5bead)
		for i := range f.dphi {
			f.dphi[i] = -4 * math.Pi * sd * vr.NormFloat64() * m.s.Radar.slowPRI() / m.lambda
		}
	}
	rev := make([]complex128, np)
	for i, p := range m.pulse {
		rev[np-1-i] = cmplx.Conj(p)
	}
	f.rev = rev
	f.corr = dsp.NewCorrelator(rev, n+np)
	f.x = make([]complex128, n+np)
	f.y = make([]complex128, n+np)
	return f
}

// clone returns a field that shares the realisation but has buffers of
// its own, for another goroutine.
func (f *clutterField) clone() *clutterField {
	c := *f
	c.corr = dsp.NewCorrelator(f.rev, len(f.x))
	c.x = make([]complex128, len(f.x))
	c.y = make([]complex128, len(f.y))
	return &c
}

// add adds pulse p's echo of the field to a receive window.
func (f *clutterField) add(echo []complex128, p int) {
	m := f.m
	np := len(m.pulse)
	clear(f.x)
	for i, r := range f.rho {
		if f.dphi[i] != 0 && p > 0 {
			r *= cmplx.Rect(1, f.dphi[i]*f.slow(p))
		}
		f.x[np-1+i] = r
	}
	f.corr.Apply(f.y, f.x)
	// y[t] = Σ_i ρ[i]·pulse[t−i]: the echo at window sample dlo + t. The
	// mean Doppler advances the carrier phase by 2π·f_d·PRI per pulse.
	t0 := m.s.Radar.pulseTime(p)
	if !m.s.Radar.Staggered() {
		t0 = float64(p) * m.s.Radar.PRIS
	}
	var psi []float64
	if f.pn != nil {
		psi = f.pn.phases(m.s.Seed, f.g.t.ID, p)
	}
	for t := 0; t < len(f.rho)+np; t++ {
		k := f.g.dlo + t
		if k >= len(echo) {
			break
		}
		ph := 2 * math.Pi * f.g.fd * (float64(k)/m.fs + t0)
		if psi != nil && t < len(psi) {
			ph += psi[t]
		}
		echo[k] += f.y[t] * cmplx.Rect(1, ph)
	}
}

func swerling(f string) int {
	switch f {
	case "swerling1":
		return dsp.Swerling1
	case "swerling2":
		return dsp.Swerling2
	case "swerling3":
		return dsp.Swerling3
	case "swerling4":
		return dsp.Swerling4
	}
	return dsp.SwerlingNone
}
