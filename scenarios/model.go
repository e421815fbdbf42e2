package scenarios

import (
	"fmt"
	"math"

	"github.com/pulsewright/pulsewright/dsp"
)

// model is a scenario turned into the quantities the evaluation needs:
// the sampled pulse, the receive reference and the window geometry.
type model struct {
	s         *Scenario
	wave      dsp.Waveform
	fs        float64      // sample rate, Hz
	pulse     []complex128 // transmitted pulse sampled at t = i/fs from its leading edge
	ref       []complex128 // receive reference (correlating)
	lead      int          // samples the reference extends before the echo
	noiseGain float64      // Σ|ref|²: output noise power for unit input noise
	n         int          // samples in the receive window
	t0        float64      // time of window sample 0 after the leading edge, s
	tau       float64      // pulse width, s
	lambda    float64      // wavelength, m
	gasDBkm   float64      // specific attenuation of the atmosphere's gases, dB/km (0 without propagation.gas)
	noiseW    float64      // input noise power k·T0·F·fs, W
	unambM    float64      // unambiguous range c·PRI/2, m
	warnings  []string
	// refWarnings are the warnings of building the reference, carried
	// over when a later model reuses it.
	refWarnings []string
	taps        []complex128    // mismatched filter: one tap per chip (nil for the matched filter)
	cont        *contFigures    // continuous-time figures of the waveform and filter, computed once
	winCorr     *dsp.Correlator // compression plan of the whole window, kept across frames
	// The raw record and its blanking (docs/detection.md §1).
	recLen    int      // raw samples recorded: window samples 0 … recLen−1
	blanks    [][2]int // transmit intervals [lo, hi) in raw samples, within [0, recLen)
	processed []bool   // per gate: its sample time lies in no transmit interval
	cfar      *dsp.CFAR
	rho       []complex128 // noise correlation of the reference by lag, up to the CFAR span
	ncl       float64      // dsp.NoiseCorrelationLength of the reference, 0 until asked for (noiseCorrelationLength)
	memo      *pdMemo      // detection probabilities, shared with the models that follow (pdmemo.go)
}

// dopFigure is the Doppler response of the reference at one Doppler shift.
type dopFigure struct{ lossDB, shift float64 }

// sameWaveform reports whether two waveform specs describe the same pulse.
func sameWaveform(a, b Waveform) bool {
	if a.Kind != b.Kind || a.PulseWidthS != b.PulseWidthS || a.BandwidthHz != b.BandwidthHz || a.Sweep != b.Sweep ||
		a.DesignSidelobeDB != b.DesignSidelobeDB || a.Length != b.Length || a.Degree != b.Degree || a.Root != b.Root ||
		a.ChipS != b.ChipS || a.Binary != b.Binary || len(a.PhasesDeg) != len(b.PhasesDeg) ||
		a.SampleRateHz != b.SampleRateHz || a.Interpolation != b.Interpolation || !a.Samples.Equal(b.Samples) {
		return false
	}
	for i := range a.PhasesDeg {
		if a.PhasesDeg[i] != b.PhasesDeg[i] {
			return false
		}
	}
	return true
}

// buildWaveform maps the scenario's waveform onto its dsp form.
func buildWaveform(w Waveform) (dsp.Waveform, error) {
	code := func(phases []float64, err error) (dsp.Waveform, error) {
		if err != nil {
			return nil, err
		}
		return dsp.PhaseCoded{Phases: phases, Chip: w.ChipS}, nil
	}
	switch w.Kind {
	case KindRect:
		return dsp.Rect{Width: w.PulseWidthS}, nil
	case KindLFM:
		return dsp.LFM{Width: w.PulseWidthS, Band: w.BandwidthHz, Down: w.Sweep == "down"}, nil
	case KindNLFM:
		return dsp.NewNLFM(w.PulseWidthS, w.BandwidthHz, w.DesignSidelobeDB)
	case KindBarker:
		return code(dsp.Barker(w.Length))
	case KindMPS:
		return code(dsp.MPS(w.Length))
	case KindMLS:
		return code(dsp.MLS(w.Degree))
	case KindFrank:
		return code(dsp.Frank(w.Length))
	case KindP1:
		return code(dsp.P1(w.Length))
	case KindP2:
		return code(dsp.P2(w.Length))
	case KindP3:
		return code(dsp.P3(w.Length))
	case KindP4:
		return code(dsp.P4(w.Length))
	case KindZadoffChu:
		return code(dsp.ZadoffChu(w.Length, w.Root))
	case KindCostas:
		order, err := dsp.WelchCostas(w.Length)
		if err != nil {
			return nil, err
		}
		return dsp.Costas{Order: order, Chip: w.ChipS}, nil
	case KindSamples:
		return sampledWaveform(w)
	case KindPhaseCode:
		if w.Binary != "" {
			return code(dsp.BinaryPhases(w.Binary))
		}
		ph := make([]float64, len(w.PhasesDeg))
		for i, d := range w.PhasesDeg {
			ph[i] = d * math.Pi / 180
		}
		return dsp.PhaseCoded{Phases: ph, Chip: w.ChipS}, nil
	}
	return nil, fmt.Errorf("waveform kind %q: %w", w.Kind, ErrInvalid)
}

// dspWindow maps a window spec onto its dsp form; none gives nil.
func dspWindow(w Window) dsp.Window {
	switch w.Kind {
	case WindowHann:
		return dsp.Hann{}
	case WindowHamming:
		return dsp.Hamming{}
	case WindowBlackman:
		return dsp.Blackman{}
	case WindowBlackmanHarris:
		return dsp.BlackmanHarris{}
	case WindowTaylor:
		return dsp.Taylor{NBar: w.NBar, SidelobeDB: w.SidelobeDB}
	case WindowChebyshev:
		return dsp.Chebyshev{SidelobeDB: w.SidelobeDB}
	case WindowKaiser:
		return dsp.Kaiser{Beta: w.Beta}
	case WindowGaussian:
		return dsp.Gaussian{Sigma: w.Sigma}
	}
	return nil
}

// newModel prepares the evaluation of a valid scenario. When prev is not
// nil, the parts that depend only on unchanged fields (the waveform, the
// sampled pulse, the reference) are taken from it instead of rebuilt.
func newModel(s *Scenario, prev *model) (*model, error) {
	sameWave := prev != nil && sameWaveform(prev.s.Waveform, s.Waveform)
	var wave dsp.Waveform
	if sameWave {
		wave = prev.wave
	} else {
		var err error
		if wave, err = buildWaveform(s.Waveform); err != nil {
			return nil, fmt.Errorf("build waveform: %w", err)
		}
	}
	r := s.Radar
	m := &model{
		s:      s,
		wave:   wave,
		fs:     r.SampleRateHz,
		tau:    s.Waveform.PulseWidth(),
		lambda: r.Wavelength(),
		n:      s.WindowSamples(),
		t0:     2 * r.WindowStartM / C,
		unambM: C * r.PRIS / 2,
	}
	if prev != nil {
		m.memo = prev.memo
	} else {
		m.memo = new(pdMemo)
	}
	m.noiseW = dsp.NoisePower(dsp.FromDB(r.NoiseFigureDB), m.fs)
	m.gasDBkm = s.Propagation.gasGamma(r.CarrierHz)
	if sameWave && prev.fs == m.fs && sameTaps(s.Receiver.Taps, prev.s.Receiver.Taps) {
		m.pulse = prev.pulse
		rx, prx := s.Receiver, prev.s.Receiver
		if rx.Filter == prx.Filter && rx.FilterLengthFactor == prx.FilterLengthFactor && rx.Window == prx.Window {
			m.ref, m.lead, m.noiseGain, m.taps = prev.ref, prev.lead, prev.noiseGain, prev.taps
			m.cont = prev.cont
			m.ncl = prev.ncl
			m.warnings = append(m.warnings, prev.refWarnings...)
			m.refWarnings = prev.refWarnings
			if prev.rho != nil && len(prev.rho) == rhoLags(s, len(m.ref)) {
				m.rho = prev.rho
				// The detector plan keeps the multipliers it has solved.
				if s.Receiver.Detector == prev.s.Receiver.Detector {
					m.cfar = prev.cfar
				}
			}
			m.checkSampling()
			m.record()
			return m, nil
		}
	} else {
		m.pulse = dsp.Sample(nil, wave, m.fs, 0)
	}
	switch s.Receiver.Filter {
	case FilterLeastSquares, FilterMinimax:
		// Designed at one tap per chip against the chip values, realised
		// as a rect-chip filter sampled at fs (docs/figures.md §2).
		a, chip := chipValues(wave)
		taps := s.Receiver.FilterLengthFactor * len(a)
		var h []complex128
		var lead int
		var err error
		if s.Receiver.Filter == FilterMinimax {
			h, lead, err = dsp.MinimaxFilter(a, taps, 0)
		} else {
			h, lead, err = dsp.LeastSquaresFilter(a, taps)
		}
		if err != nil {
			return nil, fmt.Errorf("%s filter: %w", s.Receiver.Filter, err)
		}
		m.taps = h
		m.ref, m.lead = sampleTaps(h, lead, chip, m.fs)
		if s.Receiver.Window.Kind != WindowNone {
			m.warn("receiver.window %s is not applied: the %s filter sets its own weighting", s.Receiver.Window.Kind, s.Receiver.Filter)
			m.refWarnings = append(m.refWarnings, m.warnings[len(m.warnings)-1])
		}
	case FilterCustom:
		m.ref, m.lead = customReference(m.pulse, *s.Receiver.Taps)
		if s.Receiver.Window.Kind != WindowNone {
			m.warn("receiver.window %s is not applied: the custom filter's taps are used as given", s.Receiver.Window.Kind)
			m.refWarnings = append(m.refWarnings, m.warnings[len(m.warnings)-1])
		}
	default:
		m.ref = dsp.Reference(nil, m.pulse, dspWindow(s.Receiver.Window))
	}
	for _, v := range m.ref {
		m.noiseGain += real(v)*real(v) + imag(v)*imag(v)
	}
	if m.noiseGain == 0 || math.IsNaN(m.noiseGain) {
		return nil, fmt.Errorf("receive reference has no energy: %w", ErrInvalid)
	}
	m.checkSampling()
	m.record()
	return m, nil
}

// sampleTaps realises a rect-chip filter of taps starting lead chips
// before the code at rate fs: reference sample i lies at
// t = (i − leadS)/fs from the code's leading edge, leadS = ⌈lead·chip·fs⌉,
// and holds the tap of the chip it falls in (exactly, dsp.ChipIndex).
func sampleTaps(taps []complex128, lead int, chip, fs float64) ([]complex128, int) {
	leadS := dsp.SampleLen(float64(lead)*chip, fs)
	delay := float64(leadS)/fs - float64(lead)*chip // filter start after sample 0, s
	ref := make([]complex128, dsp.SampleLen(float64(len(taps))*chip+delay, fs))
	dsp.AddEcho(ref, dsp.Held{Values: taps, Chip: chip}, fs, delay, 1, 0)
	return ref, leadS
}

// record sets the raw record's length, its transmit intervals and the
// processed gates (docs/detection.md §1): the record runs
// len(ref)−1−lead samples past the last gate, so every gate is compressed
// in full; raw sample j at t = t0 + j/fs is blanked when t lies in
// [q·PRI, q·PRI + τ) for a pulse q ≥ 0, in samples
// [⌈(q·PRI − t0)·fs⌉, ⌈(q·PRI + τ − t0)·fs⌉).
func (m *model) record() {
	m.recLen = m.n + max(len(m.ref)-1-m.lead, 0)
	pri := m.s.Radar.blankPRI()
	m.blanks = m.blanks[:0]
	tEnd := m.t0 + float64(m.recLen)/m.fs
	for q := max(math.Floor(m.t0/pri)-1, 0); q*pri < tEnd; q++ {
		lo := int(math.Max(ceilSnap((q*pri-m.t0)*m.fs), 0))
		hi := int(math.Min(math.Max(ceilSnap((q*pri+m.tau-m.t0)*m.fs), 0), float64(m.recLen)))
		if lo < hi {
			m.blanks = append(m.blanks, [2]int{lo, hi})
		}
	}
	m.processed = make([]bool, m.n)
	for k := range m.processed {
		m.processed[k] = true
	}
	for _, b := range m.blanks {
		for k := b[0]; k < min(b[1], m.n); k++ {
			m.processed[k] = false
		}
	}
}

// ceilSnap is ⌈x⌉ with x within 1e-9 (relative) of a whole number taken
// as that number, so that τ·fs = 100 does not become 101 by rounding.
func ceilSnap(x float64) float64 {
	if r := math.Round(x); math.Abs(x-r) <= 1e-9*math.Max(1, math.Abs(r)) {
		return r
	}
	return math.Ceil(x)
}

// blanked reports whether raw sample j is blanked or not recorded.
func (m *model) blanked(j int) bool {
	if j < 0 || j >= m.recLen {
		return true
	}
	for _, b := range m.blanks {
		if j >= b[0] && j < b[1] {
			return true
		}
	}
	return false
}

// heardFraction returns the fraction of an echo that starts at time
// start after the transmit edge (s) and lasts τ which falls outside every
// transmit interval [q·PRI, q·PRI + τ).
func (m *model) heardFraction(start float64) float64 {
	pri, tau := m.s.Radar.blankPRI(), m.tau
	lost := 0.0
	for q := math.Floor(start/pri) - 1; q*pri < start+tau; q++ {
		lo, hi := math.Max(q*pri, start), math.Min(q*pri+tau, start+tau)
		if hi > lo {
			lost += hi - lo
		}
	}
	return math.Max(0, 1-lost/tau)
}

// rhoLags returns how many lags of the noise correlation the detector
// needs: its training span, at most the reference length.
func rhoLags(s *Scenario, refLen int) int {
	d := s.Receiver.Detector
	return min(2*(d.GuardCells+d.TrainingCells/2)+1, refLen)
}

// noiseCorrelation returns ρ(m) of the reference over the detector's span.
func (m *model) noiseCorrelation() []complex128 {
	if m.rho == nil {
		m.rho = dsp.NoiseCorrelation(make([]complex128, rhoLags(m.s, len(m.ref))), m.ref)
	}
	return m.rho
}

// noiseCorrelationLength returns dsp.NoiseCorrelationLength of the
// reference, computed once per reference (a later model that reuses the
// reference reuses it).
func (m *model) noiseCorrelationLength() float64 {
	if m.ncl == 0 {
		m.ncl = dsp.NoiseCorrelationLength(m.ref)
	}
	return m.ncl
}

func (m *model) warn(format string, args ...any) {
	m.warnings = append(m.warnings, fmt.Sprintf(format, args...))
}

// checkSampling warns about sample rates that cost accuracy.
func (m *model) checkSampling() {
	B := m.s.Waveform.Bandwidth()
	if m.fs < 1.2*B {
		m.warn("sample rate %s is only %.2f× the bandwidth %s: expect aliasing and straddle loss; 2× is usual", hz(m.fs), m.fs/B, hz(B))
	}
	if m.s.Waveform.Kind == KindCostas && m.fs < 2*B {
		m.warn("costas hops span %s; sample at twice that or more to avoid aliasing the outer hops", hz(B))
	}
	if d := m.s.Receiver.Detector; d.Kind != DetectorFixed && float64(d.GuardCells+1) < m.fs/B {
		m.warn("the CFAR's %d guard cells do not cover the main lobe, about %.0f samples to the null on each side at %.1f samples per 1/B: a target's own main lobe enters its training cells and masks it (self-masking); use at least %d guard cells", d.GuardCells, m.fs/B, m.fs/B, int(math.Ceil(m.fs/B))-1)
	}
	if start := m.s.Radar.WindowStartM; start > 0 && start < C*m.tau/2 {
		m.warn("the receive window starts at %.0f m, inside the %.0f m blind range of the %s pulse: the receiver is blanked there", m.s.Radar.WindowStartM, C*m.tau/2, sec(m.tau))
	}
}

// rangeOf returns the range in m of window sample k.
func (m *model) rangeOf(k float64) float64 { return C * (m.t0 + k/m.fs) / 2 }

// sampleOf returns the (fractional) window sample of a range in m.
func (m *model) sampleOf(r float64) float64 { return (2*r/C - m.t0) * m.fs }

// fold returns the apparent range of a true range r and the number of
// PRIs it folds by.
func (m *model) fold(r float64) (float64, int) {
	n := math.Floor(r / m.unambM)
	return r - n*m.unambM, int(n)
}

func hz(v float64) string  { return SI(v, "Hz") }
func sec(v float64) string { return SI(v, "s") }

func km(r float64) string {
	if math.Abs(r) >= 1000 {
		return fmt.Sprintf("%.2f km", r/1000)
	}
	return fmt.Sprintf("%.0f m", r)
}

// addEcho adds a point echo to dst (dsp.AddEcho's arguments) as the
// receiver hears it and returns the fraction of its energy inside the
// receiver's band: 1 when |f_d| < fs/2 (sampled directly); otherwise the
// echo is first limited to the band [−fs/2, fs/2) (docs/detection.md §2).
func (m *model) addEcho(dst []complex128, delay float64, amp complex128, fd float64) float64 {
	if math.Abs(fd) < m.fs/2 {
		dsp.AddEcho(dst, m.wave, m.fs, delay, amp, fd)
		return 1
	}
	return dsp.AddEchoInBand(dst, m.wave, m.fs, delay, amp, fd, m.s.Waveform.Bandwidth())
}
