package scenarios

import (
	"context"
	"math"
	"math/cmplx"

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
}

// Evaluate is the package function Evaluate with reuse of the previous
// scenario's waveform and reference.
func (e *Engine) Evaluate(ctx context.Context, s *Scenario) (*Result, error) {
	m, err := newModel(s, e.last)
	if err != nil {
		return nil, err
	}
	sc, err := newScene(ctx, m)
	if err != nil {
		return nil, err
	}
	// The plot series of the window (noisy echo, compression, thresholds)
	// read the scene and model without changing them, so they are
	// computed on a second goroutine while the waveform and target
	// reports, with their verified suggestions, and the pulse's response
	// are built on this one.
	series := make(chan Series, 1)
	go func() { series <- sc.series() }()
	res := &Result{}
	res.Report.Version = ReportVersion
	res.Report.Scenario = s.Name
	res.Report.Waveform = m.waveformReport()
	if ctx.Err() == nil {
		res.Report.Targets = sc.targetReports(ctx, m, true)
	}
	resp := m.response()
	res.Series = <-series
	res.Series.Response = resp
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	res.Report.Warnings = append([]string{}, m.warnings...)
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	e.last = m
	return res, nil
}

// Analyse computes the report alone, without plot series or suggestions:
// the cheaper path for sweeps.
func Analyse(ctx context.Context, s *Scenario) (*Report, error) {
	m, err := newModel(s, nil)
	if err != nil {
		return nil, err
	}
	sc, err := newScene(ctx, m)
	if err != nil {
		return nil, err
	}
	rep := &Report{Version: ReportVersion, Scenario: s.Name, Waveform: m.waveformReport()}
	rep.Targets = sc.targetReports(ctx, m, false)
	rep.Warnings = append([]string{}, m.warnings...)
	return rep, ctx.Err()
}

func (m *model) figures() dsp.Figures {
	if m.fig == nil {
		f := dsp.ResponseFigures(m.pulse, m.ref, m.lead, m.fs, m.s.Waveform.Bandwidth())
		m.fig = &f
	}
	return *m.fig
}

// doppler returns the peak loss (dB) and time shift (s) of the compressed
// response at Doppler shift fd, cached per model.
func (m *model) doppler(fd float64) dopFigure {
	if m.dop == nil {
		m.dop = make(map[float64]dopFigure)
	}
	d, ok := m.dop[fd]
	if !ok {
		if m.dopPlan == nil {
			m.dopPlan = dsp.NewDopplerPlan(m.pulse, m.ref, m.fs)
		}
		d.lossDB, d.shift = m.dopPlan.Response(fd)
		m.dop[fd] = d
	}
	return d
}

func (m *model) waveformReport() WaveformReport {
	w, r := m.s.Waveform, m.s.Radar
	fig := m.figures()
	B, tau := w.Bandwidth(), w.PulseWidth()
	rep := WaveformReport{
		Kind:                   w.Kind,
		PulseWidthS:            tau,
		BandwidthHz:            B,
		TimeBandwidth:          B * tau,
		CompressionGainDB:      dsp.DB(B * tau),
		PSLRDB:                 fig.PSLRDB,
		ISLRDB:                 fig.ISLRDB,
		Mainlobe3dBM:           fig.Mainlobe3dB * C / 2,
		MismatchLossDB:         fig.MismatchLossDB,
		BlindRangeM:            C * tau / 2,
		UnambiguousRangeM:      C * r.PRIS / 2,
		UnambiguousVelocityMPS: m.lambda / (4 * r.PRIS),
	}
	if r.Pulses > 1 {
		dres := 1 / (float64(r.Pulses) * r.PRIS)
		vres := dres * m.lambda / 2
		rep.DopplerResolutionHz, rep.VelocityResolutionMPS = &dres, &vres
	}
	return rep
}

// eclipseLossDB returns the loss of the compressed peak when only the
// part of the pulse after the transmit blanking is heard.
func (m *model) eclipseLossDB(g *tgt) float64 {
	if g.t.Kind != TargetPoint || g.received >= 1 {
		return 0
	}
	if g.received <= 0 {
		return math.Inf(1)
	}
	first := int(math.Ceil((m.tau - 2*g.apparent/C) * m.fs))
	var full, part complex128
	for i, p := range m.pulse {
		if i+m.lead < 0 || i+m.lead >= len(m.ref) {
			continue
		}
		c := p * cmplx.Conj(m.ref[i+m.lead])
		full += c
		if i >= first {
			part += c
		}
	}
	if cmplx.Abs(part) == 0 {
		return math.Inf(1)
	}
	return -dsp.DB(cmplx.Abs(part) * cmplx.Abs(part) / (cmplx.Abs(full) * cmplx.Abs(full)))
}

// targetReports builds the per-target part of the report. With suggest,
// a target that is not detected gets a verified change in its reason.
func (sc *scene) targetReports(ctx context.Context, m *model, suggest bool) []TargetReport {
	cf := m.detector()
	fig := m.figures()
	budget := suggestionBudget(m)
	out := make([]TargetReport, len(sc.targets))
	for j, g := range sc.targets {
		v := sc.judge(j, cf)
		d := m.doppler(g.fd)
		tr := TargetReport{
			ID:            g.t.ID,
			RangeM:        g.rangeM,
			DopplerHz:     g.fd,
			DopplerLossDB: d.lossDB,
			RangeShiftM:   d.shift * C / 2,
			Status:        v.status,
			MarginDB:      v.margin(),
		}
		if g.t.Kind != TargetPoint && v.peakK >= 0 {
			tr.RangeM = m.rangeOf(float64(v.peakK))
		}
		tr.SNRDB = sc.snrDB(g, tr.RangeM, fig, d.lossDB)
		if v.culprit >= 0 {
			tr.MaskedBy = sc.targets[v.culprit].t.ID
		}
		tr.Reason = sc.reason(g, v, tr, cf)
		if suggest && v.status != StatusDetected && v.status != StatusOutOfWindow && budget > 0 && ctx.Err() == nil {
			if hint := suggestFix(ctx, m, j, v, &budget); hint != "" {
				tr.Reason += " " + hint
			}
		}
		if tr.Status == StatusOutOfWindow && g.t.Kind == TargetPoint {
			m.warn("target %s at %s is outside the receive window %s–%s", g.t.ID, km(g.t.RangeM), km(m.s.Radar.WindowStartM), km(m.s.Radar.WindowStopM))
		}
		out[j] = tr
	}
	return out
}

// snrDB is the report's expected single-pulse SNR: the radar equation
// less mismatch, Doppler and eclipsing losses; per resolution cell for
// distributed targets.
func (sc *scene) snrDB(g *tgt, rangeM float64, fig dsp.Figures, dopLoss float64) float64 {
	m := sc.m
	r := m.s.Radar
	var sigma float64
	switch g.t.Kind {
	case TargetPoint:
		sigma = dsp.FromDB(g.t.RCSDBsm)
	case TargetExtended:
		sigma = dsp.FromDB(g.t.RCSDBsmPerM) * C / (2 * m.s.Waveform.Bandwidth())
	case TargetVolume:
		az, el := r.BeamwidthAzDeg*math.Pi/180, r.BeamwidthElDeg*math.Pi/180
		sigma = dsp.VolumeReflectivity(g.t.ReflectivityDBZ, m.lambda) * dsp.BeamArea(rangeM, az, el) * C / (2 * m.s.Waveform.Bandwidth())
	}
	if rangeM <= 0 {
		return dbFloor
	}
	snr := dsp.RadarSNR(r.PeakPowerW, m.tau, dsp.FromDB(r.AntennaGainDBi), m.lambda, sigma, rangeM,
		dsp.FromDB(r.NoiseFigureDB), dsp.FromDB(r.SystemLossDB))
	v := dsp.DB(snr) - fig.MismatchLossDB - dopLoss - m.eclipseLossDB(g)
	return math.Max(v, dbFloor)
}

// series synthesises the noisy receive window, compresses it and returns
// the plot series but the pulse's response (model.response).
func (sc *scene) series() Series {
	m := sc.m
	x := make([]complex128, m.n+m.lead)
	echo := x[m.lead:]
	for _, g := range sc.targets {
		switch {
		case g.t.Kind == TargetPoint && g.amp > 0:
			rng := streamOf(m.s.Seed, g.t.ID, 0x5157)
			amp := g.amp * math.Sqrt(dsp.SwerlingRCS(rng, 1, swerling(g.t.Fluctuation)))
			dsp.AddEcho(echo, m.wave, m.fs, g.delay, complex(amp, 0)*g.phase, g.fd)
		case g.density != nil:
			sc.clutter(echo, g)
		}
	}
	noise := streamOf(m.s.Seed, "", 0x4e01)
	for i := range echo {
		echo[i] += dsp.ComplexNormal(noise)
	}
	sc.blank(echo, 0)
	y := dsp.NewCorrelator(m.ref, len(x)).Apply(nil, x)
	// With lead zeros in front of the echo, an echo at window sample d peaks at y[d].
	s := Series{
		RangeM0:     m.rangeOf(0),
		RangeStepM:  C / (2 * m.fs),
		Echo:        echo, // x is not used after the compression
		ProfileDB:   make([]float64, m.n),
		CleanDB:     make([]float64, m.n),
		ThresholdDB: make([]float64, m.n),
	}
	for k := range m.n {
		v := y[k]
		s.ProfileDB[k] = toDB((real(v)*real(v) + imag(v)*imag(v)) / m.noiseGain)
	}
	if cf := m.detector(); cf != nil {
		p := s.CleanDB // holds 1 + total until the dB values below
		for k := range p {
			p[k] = 1 + sc.total[k]
		}
		th := cf.Thresholds(s.ThresholdDB, p) // in place, converted to dB below
		last, lastDB := math.NaN(), 0.0
		for k, t := range th {
			if t != last { // constant away from the targets: skip the logarithm
				last, lastDB = t, toDB(t)
			}
			th[k] = lastDB
		}
	} else {
		t := toDB(dsp.FixedMultiplier(m.s.Receiver.Detector.PFA))
		for k := range s.ThresholdDB {
			s.ThresholdDB[k] = t
		}
	}
	for k, v := range sc.total {
		s.CleanDB[k] = toDB(v)
	}
	for k := 0; k < m.blankEnd(); k++ {
		s.ProfileDB[k], s.CleanDB[k] = dbFloor, dbFloor
	}
	return s
}

// response returns the plot of the pulse's compressed response.
func (m *model) response() Response {
	t, db := dsp.Response(m.pulse, m.ref, m.lead, m.fs, m.s.Waveform.Bandwidth())
	r := Response{RangeM: make([]float64, len(t)), DB: make([]float64, len(db))}
	for i := range t {
		r.RangeM[i] = t[i] * C / 2
		r.DB[i] = math.Max(db[i], -120)
	}
	return r
}

// clutter adds a realisation of a distributed target: complex Gaussian
// reflectivity on the window grid with the expected density, convolved
// with the pulse and shifted by the target's Doppler.
func (sc *scene) clutter(echo []complex128, g *tgt) {
	m := sc.m
	rng := streamOf(m.s.Seed, g.t.ID, 0xc1a7)
	np := len(m.pulse)
	n := len(g.density) + np
	x := make([]complex128, n+np)
	for i, q := range g.density {
		x[np-1+i] = complex(math.Sqrt(q), 0) * dsp.ComplexNormal(rng)
	}
	rev := make([]complex128, np)
	for i, p := range m.pulse {
		rev[np-1-i] = cmplx.Conj(p)
	}
	y := dsp.NewCorrelator(rev, len(x)).Apply(nil, x)
	// y[t] = Σ_i ρ[i]·pulse[t−i]: the echo at window sample dlo + t.
	for t := 0; t < n; t++ {
		k := g.dlo + t
		if k >= len(echo) {
			break
		}
		ph := cmplx.Rect(1, 2*math.Pi*g.fd*float64(k)/m.fs)
		echo[k] += y[t] * ph
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
