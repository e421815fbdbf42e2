package scenarios

import (
	"context"
	"math"
	"math/cmplx"

	"github.com/pulsewright/pulsewright/dsp"
)

// WavePlots are the series a waveform designer reads beside the
// compressed response: the transmitted pulse in time, its spectrum with
// the occupied bandwidth, the receive filter's taps and the waveform's
// Doppler tolerance. Every value is finite.
type WavePlots struct {
	// The transmitted pulse, one value per sample at TimeS[i] = i/fs from
	// its leading edge.
	TimeS []float64 // s
	// PhaseRad is the pulse's phase, rad: unwrapped for frequency-
	// modulated kinds, wrapped to (−π, π] for phase codes (whose jumps are
	// the point).
	PhaseRad     []float64
	PhaseWrapped bool
	// FreqHz is the instantaneous frequency (1/2π)·dφ/dt, Hz, from the
	// phase step between samples i and i+1, at FreqTimeS[i] = (i+½)/fs.
	// Empty for phase codes, whose phase steps are jumps, not a frequency.
	FreqTimeS []float64 // s
	FreqHz    []float64 // Hz

	// The pulse's energy spectrum, zero-padded, in dB re its peak
	// (floored at SpectrumFloorDB), at SpectrumHz (baseband, ascending).
	SpectrumHz []float64 // Hz
	SpectrumDB []float64 // dB re peak
	// OccupiedHz are the edges of the band holding 99 % of the pulse's
	// energy (0.5 % below, 0.5 % above: ITU Radio Regulations No. 1.153),
	// Hz; OccupiedBandwidthHz = OccupiedHz[1] − OccupiedHz[0].
	OccupiedHz          [2]float64
	OccupiedBandwidthHz float64

	// The receive filter's taps (the reference the echo is correlated
	// with), at TapTimeS[i] = (i − lead)/fs relative to the echo's
	// leading edge: amplitude re the largest tap, and phase in rad wrapped
	// to (−π, π].
	Filter      string // receiver.filter: matched, least_squares, minimax
	TapTimeS    []float64
	TapAmp      []float64
	TapPhaseRad []float64

	// The Doppler tolerance: at each Doppler shift DopplerHz[i] (ascending,
	// 0 in the middle), the loss of the compressed peak, dB (≥ 0), and the
	// shift of the peak in range, m (c/2 times its shift in time; negative
	// is nearer), as the evaluation applies to every target.
	DopplerHz     []float64 // Hz
	DopplerLossDB []float64 // dB
	DopplerShiftM []float64 // m
}

// SpectrumFloorDB is the floor of WavePlots.SpectrumDB.
const SpectrumFloorDB = -80.0

// Points of the wave plots.
const (
	spectrumMinLen = 4096 // at least this many spectrum bins (zero padding)
	dopplerPoints  = 81   // Doppler shifts of the tolerance curve, odd
)

// DopplerSpan returns the half-width, Hz, of the Doppler axis of
// WavePlots for a valid waveform: a tenth of the bandwidth for the
// frequency-modulated kinds (lfm, nlfm), which tolerate Doppler (their
// loss there is about 0.9 dB, 20·log10(1 − f_d/B): Richards, Fundamentals
// of Radar Signal Processing, 2nd ed., eq. 4.105), and 4/τ for the
// others, past which a phase code's or a Costas pulse's peak is gone
// (Barker 13 at ν·T = 1: the same book, section 4.7).
func DopplerSpan(w Waveform) float64 {
	if w.Kind == KindLFM || w.Kind == KindNLFM {
		return w.Bandwidth() / 10
	}
	return 4 / w.PulseWidth()
}

// WaveformPlots computes the wave plots of a valid scenario (as Decode
// returns it): its pulse, its receive filter and its Doppler response
// over ±DopplerSpan. It checks ctx between Doppler shifts.
func WaveformPlots(ctx context.Context, s *Scenario) (*WavePlots, error) {
	m, err := newModel(s, nil)
	if err != nil {
		return nil, err
	}
	out := &WavePlots{Filter: s.Receiver.Filter}
	m.pulsePlots(out)
	m.spectrumPlots(out)
	m.tapPlots(out)
	if err := m.dopplerPlots(ctx, out); err != nil {
		return nil, err
	}
	return out, nil
}

func (m *model) pulsePlots(out *WavePlots) {
	u := m.pulse
	out.TimeS = make([]float64, len(u))
	out.PhaseRad = make([]float64, len(u))
	out.PhaseWrapped = m.s.Waveform.IsPhaseCode()
	phase := 0.0
	for i, v := range u {
		out.TimeS[i] = float64(i) / m.fs
		switch {
		case out.PhaseWrapped || i == 0:
			phase = cmplx.Phase(v)
		default:
			phase += cmplx.Phase(v * cmplx.Conj(u[i-1]))
		}
		out.PhaseRad[i] = phase
	}
	if out.PhaseWrapped || len(u) < 2 {
		return
	}
	out.FreqTimeS = make([]float64, len(u)-1)
	out.FreqHz = make([]float64, len(u)-1)
	for i := range out.FreqHz {
		out.FreqTimeS[i] = (float64(i) + 0.5) / m.fs
		out.FreqHz[i] = cmplx.Phase(u[i+1]*cmplx.Conj(u[i])) * m.fs / (2 * math.Pi)
	}
}

func (m *model) spectrumPlots(out *WavePlots) {
	l := dsp.SpectrumLen(len(m.pulse), spectrumMinLen)
	p := dsp.PowerSpectrum(make([]float64, l), m.pulse)
	lo, hi := dsp.OccupiedBand(p, 0.99)
	df := m.fs / float64(l)
	h := float64(l / 2)
	if !math.IsNaN(lo) {
		out.OccupiedHz = [2]float64{(lo - h) * df, (hi - h) * df}
		out.OccupiedBandwidthHz = (hi - lo) * df
	}
	peak := 0.0
	for _, v := range p {
		peak = math.Max(peak, v)
	}
	out.SpectrumHz = make([]float64, l)
	out.SpectrumDB = make([]float64, l)
	for i, v := range p {
		out.SpectrumHz[i] = (float64(i) - h) * df
		db := SpectrumFloorDB
		if peak > 0 && v > 0 {
			db = math.Max(dsp.DB(v/peak), SpectrumFloorDB)
		}
		out.SpectrumDB[i] = db
	}
}

func (m *model) tapPlots(out *WavePlots) {
	big := 0.0
	for _, v := range m.ref {
		big = math.Max(big, cmplx.Abs(v))
	}
	out.TapTimeS = make([]float64, len(m.ref))
	out.TapAmp = make([]float64, len(m.ref))
	out.TapPhaseRad = make([]float64, len(m.ref))
	for i, v := range m.ref {
		out.TapTimeS[i] = float64(i-m.lead) / m.fs
		if big > 0 {
			out.TapAmp[i] = cmplx.Abs(v) / big
		}
		out.TapPhaseRad[i] = cmplx.Phase(v)
	}
}

func (m *model) dopplerPlots(ctx context.Context, out *WavePlots) error {
	span := DopplerSpan(m.s.Waveform)
	out.DopplerHz = make([]float64, dopplerPoints)
	out.DopplerLossDB = make([]float64, dopplerPoints)
	out.DopplerShiftM = make([]float64, dopplerPoints)
	mid := dopplerPoints / 2
	for i := range out.DopplerHz {
		if err := ctx.Err(); err != nil {
			return err
		}
		fd := 0.0
		if i != mid {
			fd = span * float64(i-mid) / float64(mid)
		}
		d := m.doppler(fd)
		out.DopplerHz[i] = fd
		out.DopplerLossDB[i] = finiteOr(d.lossDB, 0)
		out.DopplerShiftM[i] = finiteOr(d.shift*C/2, 0)
	}
	return nil
}

// finiteOr returns v, or alt when v is NaN or infinite.
func finiteOr(v, alt float64) float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return alt
	}
	return v
}
