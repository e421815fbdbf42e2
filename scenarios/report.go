package scenarios

// ReportVersion is the version of the report format.
const ReportVersion = 2

// Target statuses (docs/report-format.md; decided by scene.decide,
// docs/detection.md §6).
const (
	StatusDetected    = "detected"      // Pd ≥ detector.pd_required
	StatusMasked      = "masked"        // Pd < pd_required, but against noise alone it reaches it
	StatusTooWeak     = "too_weak"      // Pd < pd_required even against noise alone (version 1: below_noise)
	StatusEclipsed    = "eclipsed"      // lost to blanking while the radar transmits
	StatusOutOfWindow = "out_of_window" // its echo is not in the receive window
	StatusFolded      = "folded"        // a second-time-around echo inside the window, at the wrong range
)

// Statuses lists every status in the order the page's legend shows them.
var Statuses = []string{StatusDetected, StatusMasked, StatusTooWeak, StatusEclipsed, StatusFolded, StatusOutOfWindow, StatusClutter, StatusBelowHorizon}

// Report is what the tool concludes about one scenario: the report format
// of docs/report-format.md, version 2. A quantity that does not
// apply is a nil pointer and is left out of the JSON.
type Report struct {
	Version  int            `json:"version"`
	Scenario string         `json:"scenario"`
	Waveform WaveformReport `json:"waveform"`
	Targets  []TargetReport `json:"targets"`
	Warnings []string       `json:"warnings"`
	// Schedule is the evaluation of every CPI of radar.schedule and their
	// M-of-N combination; nil without a schedule.
	Schedule *ScheduleReport `json:"schedule,omitempty"`
	// Stagger describes the radar's own CPI's staggered PRI train (added
	// in version 2); nil for a uniform train.
	Stagger *StaggerReport `json:"stagger,omitempty"`
	// Scan holds the figures of radar.scan (scan.go); nil for a staring
	// beam. Added in version 2.
	Scan *ScanReport `json:"scan,omitempty"`
	// The detector's false-alarm rate and the scene's clutter (clutter.go).
	FalseAlarms *FalseAlarms    `json:"false_alarms,omitempty"`
	Clutter     *ClutterSummary `json:"clutter,omitempty"`
	// Engine names the build that computed the report. It is filled in
	// when the report is encoded (see MarshalJSON) if it is nil.
	Engine *EngineInfo `json:"engine,omitempty"`
}

// WaveformReport holds the figures of the compression filter's response to
// an ideal zero-Doppler echo, in continuous time (docs/figures.md): they do
// not depend on the sample rate, except the straddle losses, which state
// what sampling at the scenario's rate costs.
type WaveformReport struct {
	Kind                   string   `json:"kind"`
	PulseWidthS            float64  `json:"pulse_width_s"`
	BandwidthHz            float64  `json:"bandwidth_hz"`
	TimeBandwidth          float64  `json:"time_bandwidth"`
	CompressionGainDB      float64  `json:"compression_gain_db"`
	PSLRDB                 *float64 `json:"pslr_db,omitempty"` // absent when the response has no sidelobe
	ISLRDB                 *float64 `json:"islr_db,omitempty"` // absent when the response has no sidelobe
	Mainlobe3dBM           float64  `json:"mainlobe_3db_m"`
	MismatchLossDB         float64  `json:"mismatch_loss_db"`
	StraddleLossMaxDB      float64  `json:"straddle_loss_max_db"`  // worst loss of sampling at the scenario's rate, dB
	StraddleLossMeanDB     float64  `json:"straddle_loss_mean_db"` // mean (of dB) over the echo's fractional delay, dB
	BlindRangeM            float64  `json:"blind_range_m"`
	UnambiguousRangeM      float64  `json:"unambiguous_range_m"`
	UnambiguousVelocityMPS float64  `json:"unambiguous_velocity_mps"`
	DopplerResolutionHz    *float64 `json:"doppler_resolution_hz,omitempty"`   // pulse trains only
	VelocityResolutionMPS  *float64 `json:"velocity_resolution_mps,omitempty"` // pulse trains only
}

// TargetReport says whether one target is seen, and why.
type TargetReport struct {
	ID            string  `json:"id"`
	RangeM        float64 `json:"range_m"`
	SNRDB         float64 `json:"snr_db"`
	DopplerHz     float64 `json:"doppler_hz"`
	DopplerLossDB float64 `json:"doppler_loss_db"`
	RangeShiftM   float64 `json:"range_shift_m"`
	Status        string  `json:"status"`
	MaskedBy      string  `json:"masked_by,omitempty"`
	// MarginDB is the tested SNR over snr_required_db (≥ 0: against
	// noise alone the target reaches pd_required); omitted where no Pd is
	// computed. ThresholdMarginDB is its expected (noise-free) peak over
	// the threshold at its cell, dB (version 1's margin_db).
	MarginDB             *float64 `json:"margin_db,omitempty"`
	ThresholdMarginDB    *float64 `json:"threshold_margin_db,omitempty"`
	Reason               string   `json:"reason"`
	SNRIntegratedDB      *float64 `json:"snr_integrated_db,omitempty"`       // pulse trains only
	ApparentRangeRateMPS *float64 `json:"apparent_range_rate_mps,omitempty"` // pulse trains only
	BlindSpeed           *bool    `json:"blind_speed,omitempty"`             // pulse trains only
	// Stated physical losses (docs/detection.md §3), omitted when they
	// do not apply.
	EclipsingLossDB *float64 `json:"eclipsing_loss_db,omitempty"` // point target partly inside a transmit interval
	BandLossDB      *float64 `json:"band_loss_db,omitempty"`      // point target with |Doppler| ≥ fs/2: energy outside the receiver's band
	// ScanLossDB is the loss of a point target's peak on the range–Doppler
	// map to the beam's scan (radar.scan, pulse trains): its peak with
	// every pulse at the beam's peak over its peak with the pulses
	// weighted by the two-way pattern. Added in version 2.
	ScanLossDB *float64 `json:"scan_loss_db,omitempty"`
	// DetectionRangeM is the range at which the tested SNR falls to
	// snr_required_db by the R⁴ law from the target's range (its RCS
	// kept; docs/detection-probability.md §9). Added in version 2.
	DetectionRangeM *float64 `json:"detection_range_m,omitempty"`
	// Probability of detection (docs/detection-probability.md §6), point
	// targets only; omitted where no closed form applies.
	Pd            *float64 `json:"pd,omitempty"`              // in the scene, at the scenario's pfa
	PdAlone       *float64 `json:"pd_alone,omitempty"`        // with the other targets removed
	SNRRequiredDB *float64 `json:"snr_required_db,omitempty"` // tested SNR that pd_required needs against noise alone
	// DecidedOn says what decided the status: "pd" (Pd against
	// pd_required) or "threshold" (the noise-free peak against the
	// threshold, where no Pd series applies); omitted for statuses that
	// neither decides (out_of_window, folded, wholly eclipsed).
	DecidedOn string `json:"decided_on,omitempty"`
	// cancelled: too_weak because the MTI canceller removes it (zero
	// Doppler; docs/detection.md §6 step 3). Not in the report format:
	// the reason says so; a PRF schedule's summary uses it.
	cancelled bool
	ClutterFigures
}

// Result is a report with the series the page plots.
type Result struct {
	Report Report
	Series Series
	// CPISeries holds, when ScheduleMaps filled it in, the plot series of
	// every CPI of radar.schedule of more than one pulse (its
	// range–Doppler map), nil for the others; index 0 is the first CPI,
	// whose series are Series.
	CPISeries []*Series
	// sc is the noise-free scene the result was evaluated on, kept for
	// the dynamic-range view (Floors); nil for results made otherwise.
	sc *scene
}

// Series are the plot data of one evaluation over the receive window, one
// value per range sample: sample k lies at range RangeM0 + k·RangeStepM.
// Powers are in dB relative to the thermal noise power at the compression
// filter's output, so the noise floor is 0 dB and a target's peak height
// is its SNR.
type Series struct {
	RangeM0     float64      // m
	RangeStepM  float64      // m, c/(2·fs)
	Echo        []complex128 // raw receive window, echoes plus noise, scaled so that noise has unit power per sample
	ProfileDB   []float64    // compressed output power, echoes plus noise, dB re output noise
	CleanDB     []float64    // compressed output power of the noise-free scene, dB re output noise
	ThresholdDB []float64    // detection threshold, dB re output noise (detector level or scene level, the larger)
	NoiseDB     float64      // the noise floor, dB re output noise (0)
	Response    Response     // the waveform alone
	// RangeDoppler is the range–Doppler map when radar.pulses > 1; the
	// profile series then hold, per range cell, the largest value over
	// Doppler, and Echo the first pulse.
	RangeDoppler *RangeDoppler
}

// Response is the zero-Doppler compressed response of the waveform alone
// in continuous time, as its figures measure it (docs/figures.md §4: exact
// between chip lags for rect-chip codes, at least 16 points per 1/B for
// FM), normalised to 0 dB at its peak, on a range axis centred on the
// peak.
type Response struct {
	RangeM []float64 // m, negative before the peak
	DB     []float64 // dB re peak, floored at −120 dB
}

// MaskedByWords is what follows a status in a table: " by ID" for a
// target masked by another, " by its own sidelobes" for one whose own
// response masks it (masked_by equal to its own id), and nothing when
// maskedBy is empty.
func MaskedByWords(id, maskedBy string) string {
	switch maskedBy {
	case "":
		return ""
	case id:
		return " by its own sidelobes"
	}
	return " by " + maskedBy
}
