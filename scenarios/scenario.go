package scenarios

import (
	"encoding/json"
	"math"
	"slices"
)

// Physical constants of the format (scenario-format.md, Units).
const (
	C  = 299792458.0  // speed of light, m/s
	K  = 1.380649e-23 // Boltzmann constant, J/K
	T0 = 290.0        // reference noise temperature, K
)

// Version is the scenario format version this package reads and writes.
const Version = 3

// Limits that guard memory and time. Each is checked before the memory it
// bounds is allocated.
const (
	MaxDocumentBytes = 4 << 20 // bytes of one scenario document
	MaxNameLen       = 200     // characters of name
	MaxNotesLen      = 10000   // characters of notes
	MaxTargets       = 256     // entries of targets
	MaxViewBytes     = 4096    // bytes of view, compact encoding
	MaxPulseSamples  = 1 << 20 // samples in one transmitted pulse
	MaxChips         = 65536   // chips in one code
	MaxWindowSamples = 1 << 20 // samples in one receive window
	MaxCPISamples    = 1 << 23 // pulses × window samples
	MaxFilterTaps    = 4096    // taps of a least-squares mismatched filter
	MaxSeed          = 1<<53 - 1
	MaxIDLen         = 40
)

// Scenario is one reproducible picture: radar, waveform, receive
// processing, targets and seed. After Decode every default is filled in, so
// each field holds the value in force.
type Scenario struct {
	Version  int      `json:"version"`
	Name     string   `json:"name"`
	Notes    string   `json:"notes"`
	Seed     int64    `json:"seed"`
	Radar    Radar    `json:"radar"`
	Waveform Waveform `json:"waveform"`
	Receiver Receiver `json:"receiver"`
	Targets  []Target `json:"targets"`
	FrontEnd FrontEnd `json:"front_end"` // optional impairments (added in version 2)
	// Propagation is the path (added in version 2): rain.
	Propagation Propagation     `json:"propagation"`
	View        json.RawMessage `json:"view,omitempty"` // compact JSON object, nil when empty

	// ReadVersion is the format version of the document the scenario was
	// read from when it was older than Version (0 otherwise), and Upgraded
	// says, one sentence each, what reading it in the current version
	// changed. Neither is part of the format: the canonical form is always
	// written in the current version.
	ReadVersion int      `json:"-"`
	Upgraded    []string `json:"-"`
}

// Radar is the transmitter, antenna, receiver front end and timing.
type Radar struct {
	CarrierHz      float64 `json:"carrier_hz"`       // centre frequency, Hz
	PeakPowerW     float64 `json:"peak_power_w"`     // transmitter peak power, W
	AntennaGainDBi float64 `json:"antenna_gain_dbi"` // one-way gain, dBi, same antenna both ways
	NoiseFigureDB  float64 `json:"noise_figure_db"`  // receiver noise figure F, dB
	SystemLossDB   float64 `json:"system_loss_db"`   // all other losses L_s, dB
	SampleRateHz   float64 `json:"sample_rate_hz"`   // complex baseband rate, Hz; also the noise bandwidth
	PRIS           float64 `json:"pri_s"`            // pulse repetition interval, s (with a stagger: its shortest PRI)
	// PRIStaggerS lists the PRIs (s) the pulses use in turn, pulse to
	// pulse (a staggered train, added in format version 2); nil for a
	// uniform train.
	PRIStaggerS    []float64 `json:"pri_stagger_s,omitempty"`
	Pulses         int       `json:"pulses"`           // pulses in one coherent processing interval
	WindowStartM   float64   `json:"window_start_m"`   // first range of the receive window, m
	WindowStopM    float64   `json:"window_stop_m"`    // last range of the receive window, m
	BeamwidthAzDeg float64   `json:"beamwidth_az_deg"` // 3-dB azimuth beamwidth, degrees
	BeamwidthElDeg float64   `json:"beamwidth_el_deg"` // 3-dB elevation beamwidth, degrees
	// AntennaHeightM is the antenna's height above the surface, m; 0 when
	// absent (no surface geometry: no grazing angle, no horizon).
	AntennaHeightM float64 `json:"antenna_height_m,omitempty"`
	// Schedule holds the CPIs after this one (a PRF schedule, added in
	// format version 2); nil for a single CPI.
	Schedule *Schedule `json:"schedule,omitempty"`
	// Scan is the beam's scan (added in format version 2); nil for a
	// staring beam.
	Scan *Scan `json:"scan,omitempty"`
}

// Waveform kinds.
const (
	KindRect      = "rect"
	KindLFM       = "lfm"
	KindNLFM      = "nlfm"
	KindBarker    = "barker"
	KindMPS       = "mps"
	KindMLS       = "mls"
	KindFrank     = "frank"
	KindP1        = "p1"
	KindP2        = "p2"
	KindP3        = "p3"
	KindP4        = "p4"
	KindZadoffChu = "zadoff_chu"
	KindCostas    = "costas"
	KindPhaseCode = "phase_code"
	KindSamples   = "samples" // extension: a pulse given by its I/Q samples (samples.go)
)

// Waveform is the transmitted pulse. Which fields apply depends on Kind;
// the others are zero.
type Waveform struct {
	Kind             string    `json:"kind"`
	PulseWidthS      float64   `json:"pulse_width_s,omitempty"`      // rect, lfm, nlfm: τ, s
	BandwidthHz      float64   `json:"bandwidth_hz,omitempty"`       // lfm, nlfm: swept band B, Hz
	Sweep            string    `json:"sweep,omitempty"`              // lfm: up or down
	DesignSidelobeDB float64   `json:"design_sidelobe_db,omitempty"` // nlfm: target peak sidelobe, dB (negative)
	Length           int       `json:"length,omitempty"`             // codes: chips
	Degree           int       `json:"degree,omitempty"`             // mls: register length n, 2ⁿ−1 chips
	Root             int       `json:"root,omitempty"`               // zadoff_chu: root index u
	ChipS            float64   `json:"chip_s,omitempty"`             // codes: chip length, s
	PhasesDeg        []float64 `json:"phases_deg,omitempty"`         // phase_code: one phase per chip, degrees
	Binary           string    `json:"binary,omitempty"`             // phase_code: "+" and "-" chips
	// samples (an extension): the pulse as complex samples at
	// SampleRateHz, given as I and Q or as amplitude and phase; BandwidthHz
	// is its nominal bandwidth.
	SampleRateHz  float64 `json:"sample_rate_hz,omitempty"` // samples: rate of the samples, Hz
	Interpolation string  `json:"interpolation,omitempty"`  // samples: band_limited or hold, between samples
	Samples       IQ      `json:"-"`                        // samples: the samples, in the form given
}

// IQ is a sequence of complex samples as a scenario gives them: I and Q,
// or amplitude and phase in degrees (one pair, the other nil). Each pair
// has equal lengths.
type IQ struct {
	I, Q      []float64
	Amplitude []float64
	PhaseDeg  []float64 // degrees
}

// Len returns the number of samples.
func (v IQ) Len() int {
	if v.Amplitude != nil {
		return len(v.Amplitude)
	}
	return len(v.I)
}

// Complex returns the samples as complex numbers.
func (v IQ) Complex() []complex128 {
	out := make([]complex128, v.Len())
	for k := range out {
		if v.Amplitude != nil {
			s, c := math.Sincos(v.PhaseDeg[k] * math.Pi / 180)
			out[k] = complex(v.Amplitude[k]*c, v.Amplitude[k]*s)
		} else {
			out[k] = complex(v.I[k], v.Q[k])
		}
	}
	return out
}

// Equal reports whether two sample sequences are given identically.
func (v IQ) Equal(w IQ) bool {
	return slices.Equal(v.I, w.I) && slices.Equal(v.Q, w.Q) && slices.Equal(v.Amplitude, w.Amplitude) && slices.Equal(v.PhaseDeg, w.PhaseDeg) &&
		(v.I == nil) == (w.I == nil) && (v.Amplitude == nil) == (w.Amplitude == nil)
}

// Receive filters.
const (
	FilterMatched      = "matched"
	FilterLeastSquares = "least_squares"
	FilterMinimax      = "minimax" // extension: a peak-sidelobe-optimal mismatched filter
	FilterCustom       = "custom"  // extension: the taps in Receiver.Taps
)

// Receiver is the compression filter, its weighting and the detector.
type Receiver struct {
	Filter             string   `json:"filter"`
	FilterLengthFactor int      `json:"filter_length_factor"` // least_squares: filter taps ÷ code samples
	Taps               *IQ      `json:"-"`                    // custom: the filter's taps at radar.sample_rate_hz, nil otherwise
	Window             Window   `json:"window"`
	Detector           Detector `json:"detector"`
	DopplerWindow      Window   `json:"doppler_window"`
	MTI                string   `json:"mti"` // extension: none, two_pulse or three_pulse canceller before the Doppler DFT
	// Integration says how the radar.pulses of a train are combined
	// (added in format version 3): coherent (the default: the Doppler
	// filter bank of the range–Doppler map) or noncoherent (each pulse
	// compressed and square-law detected, the radar.pulses detected
	// samples of each range gate summed before the detector: video
	// integration; docs/detection.md §17).
	Integration string `json:"integration"`
}

// Integration modes of receiver.integration (added in format version 3).
const (
	IntegrationCoherent    = "coherent"
	IntegrationNonCoherent = "noncoherent"
)

// NonCoherent reports whether the scenario integrates a train of several
// pulses non-coherently (receiver.integration noncoherent, radar.pulses
// ≥ 2): the evaluation then tests an integrated range profile and forms
// no range–Doppler map.
func (s *Scenario) NonCoherent() bool {
	return s.Receiver.Integration == IntegrationNonCoherent && s.Radar.Pulses > 1
}

// CoherentTrain reports whether the scenario forms a range–Doppler map:
// several pulses integrated coherently.
func (s *Scenario) CoherentTrain() bool {
	return s.Radar.Pulses > 1 && !s.NonCoherent()
}

// MTI cancellers (an extension of the format).
const (
	MTINone       = "none"
	MTITwoPulse   = "two_pulse"
	MTIThreePulse = "three_pulse"
)

// Window kinds.
const (
	WindowNone           = "none"
	WindowHann           = "hann"
	WindowHamming        = "hamming"
	WindowBlackman       = "blackman"
	WindowBlackmanHarris = "blackman_harris"
	WindowTaylor         = "taylor"
	WindowChebyshev      = "chebyshev"
	WindowKaiser         = "kaiser"
	WindowGaussian       = "gaussian"
)

// Window is an amplitude weighting. Parameters apply to their kind only.
type Window struct {
	Kind       string  `json:"kind"`
	SidelobeDB float64 `json:"sidelobe_db,omitempty"` // taylor, chebyshev: design sidelobe level, dB (negative)
	NBar       int     `json:"nbar,omitempty"`        // taylor: n̄
	Beta       float64 `json:"beta,omitempty"`        // kaiser: β
	Sigma      float64 `json:"sigma,omitempty"`       // gaussian: σ as a fraction of half the length
}

// Detector kinds.
const (
	DetectorCA    = "ca_cfar"
	DetectorOS    = "os_cfar"
	DetectorGO    = "go_cfar"       // greatest-of the two half means
	DetectorSO    = "so_cfar"       // smallest-of the two half means
	DetectorCens  = "censored_cfar" // mean after dropping the largest training cells
	DetectorFixed = "fixed"
)

// Detector sets the detection threshold. Cells are range samples.
type Detector struct {
	Kind string  `json:"kind"`
	PFA  float64 `json:"pfa"` // probability of false alarm per cell
	// PdRequired is the probability of detection a target must reach
	// (0.01 … 0.9999; default 0.9, common practice in radar
	// specifications, no single source). Reported against as
	// snr_required_db and pd_margin_db.
	PdRequired    float64 `json:"pd_required,omitempty"`
	GuardCells    int     `json:"guard_cells,omitempty"`    // CFAR: cells skipped on each side of the cell under test
	TrainingCells int     `json:"training_cells,omitempty"` // CFAR: reference cells, both sides together
	Rank          int     `json:"rank,omitempty"`           // os_cfar: 1-based rank of the ordered training cell used
	CensoredCells int     `json:"censored_cells,omitempty"` // censored_cfar: largest training cells dropped, both sides together
	// Extensions for range–Doppler maps (pulses > 1): Doppler bins.
	DopplerGuardCells    int `json:"doppler_guard_cells,omitempty"`    // CFAR: guard bins on each side in Doppler
	DopplerTrainingCells int `json:"doppler_training_cells,omitempty"` // CFAR: training bins in Doppler, both sides together
}

// Target kinds and fluctuation models.
const (
	TargetPoint    = "point"
	TargetExtended = "extended"
	TargetVolume   = "volume"

	FluctuationNone = "none"
)

// Target is one scatterer or region of the scene. Fields apply to their
// kind only.
type Target struct {
	ID                string  `json:"id"`
	Kind              string  `json:"kind"`
	RangeM            float64 `json:"range_m,omitempty"`             // point: range, m
	RangeStartM       float64 `json:"range_start_m,omitempty"`       // extended, volume: near edge, m
	RangeStopM        float64 `json:"range_stop_m,omitempty"`        // extended, volume: far edge, m
	RCSDBsm           float64 `json:"rcs_dbsm,omitempty"`            // point: radar cross-section, dBsm
	RCSDBsmPerM       float64 `json:"rcs_dbsm_per_m,omitempty"`      // extended: RCS per metre of range, dBsm/m
	ReflectivityDBZ   float64 `json:"reflectivity_dbz,omitempty"`    // volume: reflectivity factor, dBZ
	RangeRateMPS      float64 `json:"range_rate_mps,omitempty"`      // m/s, > 0 receding
	VelocitySpreadMPS float64 `json:"velocity_spread_mps,omitempty"` // extended, volume: rms spread, m/s
	Fluctuation       string  `json:"fluctuation,omitempty"`         // point: none, swerling1 … swerling4
	// Surface reflectivity of an extended target (clutter.go): Level says
	// which of RCSDBsmPerM, Sigma0DB and GammaDB is given ("" is
	// rcs_dbsm_per_m).
	Sigma0DB float64 `json:"sigma0_db,omitempty"` // extended: σ⁰, dB m²/m²
	GammaDB  float64 `json:"gamma_db,omitempty"`  // extended: γ of σ⁰ = γ·sin ψ, dB
	SeaState float64 `json:"sea_state,omitempty"` // extended: sea state of the NRL sea model (sea.go)
	// Polarisation of the NRL sea model: horizontal (default) or vertical.
	Polarisation string `json:"polarisation,omitempty"`
	Level        string `json:"-"`
	// Role is "clutter" or "target" for extended and volume targets
	// (clutter.go; "" reads as clutter), "" for point targets.
	Role    string  `json:"role,omitempty"`
	HeightM float64 `json:"height_m,omitempty"` // point: height above the surface, m (default 0)
}

// Wavelength returns λ = c / carrier, m.
func (r Radar) Wavelength() float64 { return C / r.CarrierHz }

// Bandwidth returns the waveform's bandwidth B in Hz as the format defines
// it: the swept band for lfm and nlfm, 1/τ for rect, 1/chip_s for phase
// codes, and the occupied band length/chip_s for costas (its hops are
// 1/chip_s apart).
func (w Waveform) Bandwidth() float64 {
	switch w.Kind {
	case KindRect:
		return 1 / w.PulseWidthS
	case KindLFM, KindNLFM:
		return w.BandwidthHz
	case KindCostas:
		return float64(w.Length) / w.ChipS
	case KindSamples:
		return w.BandwidthHz
	}
	if w.ChipS > 0 {
		return 1 / w.ChipS
	}
	return 0
}

// Chips returns the number of chips of a coded waveform, 0 for rect, lfm
// and nlfm.
func (w Waveform) Chips() int {
	switch w.Kind {
	case KindRect, KindLFM, KindNLFM:
		return 0
	case KindMLS:
		if w.Degree < 1 || w.Degree > 62 {
			return 0
		}
		return 1<<w.Degree - 1
	case KindPhaseCode:
		if w.Binary != "" {
			return len(w.Binary)
		}
		return len(w.PhasesDeg)
	case KindSamples:
		return 0
	}
	return w.Length
}

// PulseWidth returns τ in s.
func (w Waveform) PulseWidth() float64 {
	switch w.Kind {
	case KindRect, KindLFM, KindNLFM:
		return w.PulseWidthS
	case KindSamples:
		if w.SampleRateHz > 0 {
			return float64(w.Samples.Len()) / w.SampleRateHz
		}
		return 0
	}
	return float64(w.Chips()) * w.ChipS
}

// IsPhaseCode reports whether the kind is a phase code, the kinds a
// least-squares mismatched filter applies to.
func (w Waveform) IsPhaseCode() bool {
	switch w.Kind {
	case KindBarker, KindMPS, KindMLS, KindFrank, KindP1, KindP2, KindP3, KindP4, KindZadoffChu, KindPhaseCode:
		return true
	}
	return false
}

// WindowSamples returns the number of samples in the receive window.
func (s *Scenario) WindowSamples() int {
	n := (s.Radar.WindowStopM - s.Radar.WindowStartM) * 2 / C * s.Radar.SampleRateHz
	if !(n >= 0) || n > 1<<40 {
		return 1 << 40
	}
	return int(n) + 1
}

// PulseSamples returns the number of samples spanned by the transmitted
// pulse at the scenario's sample rate.
func (s *Scenario) PulseSamples() int {
	n := s.Waveform.PulseWidth() * s.Radar.SampleRateHz
	if !(n >= 0) || n > 1<<40 {
		return 1 << 40
	}
	return int(n) + 1
}
