package scenarios

import (
	"bytes"
	"encoding/json"
	"fmt"
	"strings"
)

var (
	waveformKinds = []string{KindRect, KindLFM, KindNLFM, KindBarker, KindMPS, KindMLS, KindFrank,
		KindP1, KindP2, KindP3, KindP4, KindZadoffChu, KindCostas, KindPhaseCode, KindSamples}
	windowKinds   = []string{WindowNone, WindowHann, WindowHamming, WindowBlackman, WindowBlackmanHarris, WindowTaylor, WindowChebyshev, WindowKaiser, WindowGaussian}
	detectorKinds = []string{DetectorCA, DetectorOS, DetectorGO, DetectorSO, DetectorCens, DetectorFixed}
	targetKinds   = []string{TargetPoint, TargetExtended, TargetVolume}
	fluctuations  = []string{FluctuationNone, "swerling1", "swerling2", "swerling3", "swerling4"}
	filters       = []string{FilterMatched, FilterLeastSquares, FilterMinimax, FilterCustom}
	sweeps        = []string{"up", "down"}

	topFields      = []string{"version", "name", "notes", "seed", "radar", "waveform", "receiver", "targets", "front_end", "propagation", "view"}
	radarFields    = []string{"carrier_hz", "peak_power_w", "antenna_gain_dbi", "noise_figure_db", "system_loss_db", "sample_rate_hz", "pri_s", "pri_stagger_s", "pulses", "window_start_m", "window_stop_m", "beamwidth_az_deg", "beamwidth_el_deg", "antenna_height_m", "schedule", "scan"}
	receiverFields = []string{"filter", "filter_length_factor", "taps", "window", "detector", "doppler_window", "mti", "integration"}
	mtis           = []string{MTINone, MTITwoPulse, MTIThreePulse}
	integrations   = []string{IntegrationCoherent, IntegrationNonCoherent}
)

// waveformFields lists, per kind, the fields after "kind" in format order.
var waveformFields = map[string][]string{
	KindRect:      {"pulse_width_s"},
	KindLFM:       {"pulse_width_s", "bandwidth_hz", "sweep"},
	KindNLFM:      {"pulse_width_s", "bandwidth_hz", "design_sidelobe_db"},
	KindBarker:    {"length", "chip_s"},
	KindMPS:       {"length", "chip_s"},
	KindMLS:       {"degree", "chip_s"},
	KindFrank:     {"length", "chip_s"},
	KindP1:        {"length", "chip_s"},
	KindP2:        {"length", "chip_s"},
	KindP3:        {"length", "chip_s"},
	KindP4:        {"length", "chip_s"},
	KindZadoffChu: {"length", "root", "chip_s"},
	KindCostas:    {"length", "chip_s"},
	KindPhaseCode: {"phases_deg", "binary", "chip_s"},
	KindSamples:   append([]string{"sample_rate_hz", "bandwidth_hz", "interpolation"}, iqFields...),
}

var windowFields = map[string][]string{
	WindowTaylor:    {"sidelobe_db", "nbar"},
	WindowChebyshev: {"sidelobe_db"},
	WindowKaiser:    {"beta"},
	WindowGaussian:  {"sigma"},
}

var detectorFields = map[string][]string{
	DetectorCA:    {"pfa", "pd_required", "guard_cells", "training_cells", "doppler_guard_cells", "doppler_training_cells"},
	DetectorOS:    {"pfa", "pd_required", "guard_cells", "training_cells", "rank", "doppler_guard_cells", "doppler_training_cells"},
	DetectorGO:    {"pfa", "pd_required", "guard_cells", "training_cells", "doppler_guard_cells", "doppler_training_cells"},
	DetectorSO:    {"pfa", "pd_required", "guard_cells", "training_cells", "doppler_guard_cells", "doppler_training_cells"},
	DetectorCens:  {"pfa", "pd_required", "guard_cells", "training_cells", "censored_cells", "doppler_guard_cells", "doppler_training_cells"},
	DetectorFixed: {"pfa", "pd_required"},
}

var targetFields = map[string][]string{
	TargetPoint:    {"range_m", "rcs_dbsm", "range_rate_mps", "fluctuation", "height_m"},
	TargetExtended: {"range_start_m", "range_stop_m", "rcs_dbsm_per_m", "sigma0_db", "gamma_db", "sea_state", "polarisation", "range_rate_mps", "velocity_spread_mps", "role"},
	TargetVolume:   {"range_start_m", "range_stop_m", "reflectivity_dbz", "range_rate_mps", "velocity_spread_mps", "role"},
}

func (o *object) decodeRadar(r *Radar) {
	o.float("carrier_hz", &r.CarrierHz)
	o.float("peak_power_w", &r.PeakPowerW)
	o.float("antenna_gain_dbi", &r.AntennaGainDBi)
	o.float("noise_figure_db", &r.NoiseFigureDB)
	o.float("system_loss_db", &r.SystemLossDB)
	if o.float("sample_rate_hz", &r.SampleRateHz) && r.SampleRateHz == 0 {
		o.errs.add(o.sub("sample_rate_hz"), "0 is not valid: must be at least the waveform bandwidth")
	}
	priGiven := o.float("pri_s", &r.PRIS)
	o.decodeStagger(&r.PRIStaggerS, &r.PRIS, priGiven)
	o.int("pulses", &r.Pulses)
	o.float("window_start_m", &r.WindowStartM)
	if o.float("window_stop_m", &r.WindowStopM) && r.WindowStopM == 0 {
		o.errs.add(o.sub("window_stop_m"), "0 is not valid: must be above window_start_m")
	}
	o.float("beamwidth_az_deg", &r.BeamwidthAzDeg)
	o.float("beamwidth_el_deg", &r.BeamwidthElDeg)
	if o.float("antenna_height_m", &r.AntennaHeightM) && r.AntennaHeightM == 0 {
		o.errs.add(o.sub("antenna_height_m"), "0 is not valid: must be above 0 m, at most 100000 m (leave it out for no surface geometry)")
	}
	if c, ok := o.child("schedule"); ok {
		c.decodeSchedule(r)
	}
	if c, ok := o.child("scan"); ok {
		c.decodeScan(r)
	}
	o.finish(radarFields...)
}

// kindFields reads the kind, then the fields of that kind, and reports
// any other field as not belonging to it. It returns false when the kind
// is missing or unknown; the other fields are then not examined.
func (o *object) kindFields(dst *string, kinds []string, fields map[string][]string) ([]string, bool) {
	if !o.kind("kind", dst, kinds) {
		for k := range o.raw {
			o.used[k] = true
		}
		return nil, false
	}
	return fields[*dst], true
}

func (o *object) finishKind(kind string, fields []string) {
	known := append([]string{"kind"}, fields...)
	for k := range o.raw {
		if !o.used[k] {
			o.errs.add(o.sub(Clip(k, echoLen)), "not a field of kind %q (its fields: %s)", kind, strings.Join(known, ", "))
		}
	}
}

func (o *object) decodeWaveform(w *Waveform) {
	fields, ok := o.kindFields(&w.Kind, waveformKinds, waveformFields)
	if !ok {
		return
	}
	switch w.Kind {
	case KindSamples:
		o.decodeSamples(w)
		o.finishKind(w.Kind, fields)
		return
	case KindRect:
		o.require("pulse_width_s", "the pulse width in s")
		o.float("pulse_width_s", &w.PulseWidthS)
	case KindLFM, KindNLFM:
		o.require("pulse_width_s", "the pulse width in s")
		o.float("pulse_width_s", &w.PulseWidthS)
		o.require("bandwidth_hz", "the swept bandwidth in Hz")
		o.float("bandwidth_hz", &w.BandwidthHz)
		if w.Kind == KindLFM {
			w.Sweep = "up"
			if o.str("sweep", &w.Sweep) {
				o.oneOf("sweep", w.Sweep, sweeps)
			}
		} else {
			w.DesignSidelobeDB = -40
			o.float("design_sidelobe_db", &w.DesignSidelobeDB)
		}
	case KindMLS:
		o.require("degree", "the shift-register length n (2ⁿ−1 chips)")
		o.int("degree", &w.Degree)
	case KindPhaseCode:
		switch {
		case o.has("phases_deg") && o.has("binary"):
			o.errs.add(o.sub("binary"), "give either phases_deg or binary, not both")
			o.get("binary")
			o.get("phases_deg")
		case o.has("binary"):
			if o.str("binary", &w.Binary) && len(w.Binary) > MaxChips {
				o.errs.add(o.sub("binary"), "%d chips exceed the limit of %d", len(w.Binary), MaxChips)
			}
		case o.has("phases_deg"):
			o.phases(&w.PhasesDeg)
		default:
			o.errs.add(o.sub("phases_deg"), "required: phases_deg (degrees per chip) or binary (a string of + and -)")
		}
	default:
		o.require("length", "the number of chips")
		o.int("length", &w.Length)
		if w.Kind == KindZadoffChu {
			o.require("root", "the root index, coprime to length")
			o.int("root", &w.Root)
		}
	}
	if w.Kind != KindRect && w.Kind != KindLFM && w.Kind != KindNLFM {
		o.require("chip_s", "the chip length in s")
		o.float("chip_s", &w.ChipS)
	}
	o.finishKind(w.Kind, fields)
}

// phases reads the phases_deg array after counting its elements, so that
// the limit is checked before the slice is allocated.
func (o *object) phases(dst *[]float64) {
	path := o.sub("phases_deg")
	raw := o.get("phases_deg")
	if raw[0] != '[' {
		o.errs.add(path, "%s is not an array of numbers", describe(raw))
		return
	}
	if n := countElements(raw); n > MaxChips {
		o.errs.add(path, "%d chips exceed the limit of %d", n, MaxChips)
		return
	}
	var out []float64
	if err := json.Unmarshal(raw, &out); err != nil {
		for i, v := range rawElements(raw) {
			var f float64
			if json.Unmarshal(v, &f) != nil {
				o.errs.add(fmt.Sprintf("%s[%d]", path, i), "%s is not a number", describe(v))
				o.errs.mark(path)
				return
			}
		}
		o.errs.add(path, "not an array of numbers")
		return
	}
	*dst = out
}

// countElements counts the top-level elements of a JSON array without
// allocating. The array must already be known to be valid JSON.
func countElements(raw []byte) int {
	depth, n, inStr, esc, empty := 0, 0, false, false, true
	for _, c := range raw {
		switch {
		case inStr:
			switch {
			case esc:
				esc = false
			case c == '\\':
				esc = true
			case c == '"':
				inStr = false
			}
			continue
		case c == '"':
			inStr = true
		case c == '[' || c == '{':
			depth++
			if depth == 1 {
				continue
			}
		case c == ']' || c == '}':
			depth--
			continue
		case c == ',' && depth == 1:
			n++
			continue
		case c == ' ' || c == '\t' || c == '\n' || c == '\r':
			continue
		}
		if depth >= 1 {
			empty = false
		}
	}
	if empty {
		return 0
	}
	return n + 1
}

// rawElements splits a JSON array into its elements.
func rawElements(raw []byte) []json.RawMessage {
	var out []json.RawMessage
	json.Unmarshal(raw, &out)
	return out
}

func (o *object) decodeReceiver(r *Receiver) {
	if o.str("filter", &r.Filter) {
		o.oneOf("filter", r.Filter, filters)
	}
	o.int("filter_length_factor", &r.FilterLengthFactor)
	if c, ok := o.child("taps"); ok {
		c.decodeTaps(&r.Taps)
	}
	if c, ok := o.child("window"); ok {
		c.decodeWindow(&r.Window)
	}
	if c, ok := o.child("detector"); ok {
		c.decodeDetector(&r.Detector)
	}
	if c, ok := o.child("doppler_window"); ok {
		c.decodeWindow(&r.DopplerWindow)
	}
	if o.str("mti", &r.MTI) {
		o.oneOf("mti", r.MTI, mtis)
	}
	if o.str("integration", &r.Integration) {
		o.oneOf("integration", r.Integration, integrations)
	}
	o.finish(receiverFields...)
}

func (o *object) decodeWindow(w *Window) {
	var kind string
	fields, ok := o.kindFields(&kind, windowKinds, windowFields)
	if !ok {
		return
	}
	*w = defaultWindow(kind)
	o.float("sidelobe_db", &w.SidelobeDB)
	o.int("nbar", &w.NBar)
	o.float("beta", &w.Beta)
	o.float("sigma", &w.Sigma)
	o.finishKindOnly(kind, fields)
}

// finishKindOnly is finishKind for objects whose field readers above read
// every possible field: a field read but not of this kind is reported too.
func (o *object) finishKindOnly(kind string, fields []string) {
	allowed := map[string]bool{"kind": true}
	for _, f := range fields {
		allowed[f] = true
	}
	for k := range o.raw {
		if !allowed[k] {
			o.used[k] = false
		}
	}
	o.finishKind(kind, fields)
}

func (o *object) decodeDetector(d *Detector) {
	var kind string
	fields, ok := o.kindFields(&kind, detectorKinds, detectorFields)
	if !ok {
		return
	}
	*d = defaultDetector(kind)
	o.float("pfa", &d.PFA)
	o.float("pd_required", &d.PdRequired)
	o.int("guard_cells", &d.GuardCells)
	o.int("training_cells", &d.TrainingCells)
	if kind == DetectorOS && !o.has("rank") {
		d.Rank = (3*d.TrainingCells + 3) / 4
	}
	o.int("rank", &d.Rank)
	if kind == DetectorCens && !o.has("censored_cells") {
		d.CensoredCells = defaultCensored(d.TrainingCells)
	}
	o.int("censored_cells", &d.CensoredCells)
	o.int("doppler_guard_cells", &d.DopplerGuardCells)
	o.int("doppler_training_cells", &d.DopplerTrainingCells)
	o.finishKindOnly(kind, fields)
}

func (o *object) targets(dst *[]Target) {
	v := o.get("targets")
	if v == nil {
		return
	}
	if v[0] != '[' {
		o.errs.add("targets", "%s is not an array", describe(v))
		return
	}
	if n := countElements(v); n > MaxTargets {
		o.errs.add("targets", "%d entries exceed the limit of %d", n, MaxTargets)
		return
	}
	var out []Target
	for i, raw := range rawElements(v) {
		var t Target
		if c, ok := newObject(fmt.Sprintf("targets[%d]", i), raw, o.errs); ok {
			c.decodeTarget(&t)
		}
		out = append(out, t)
	}
	*dst = out
}

func (o *object) decodeTarget(t *Target) {
	if o.require("id", "1 to 40 letters, digits, '-', '_' or '.'") {
		o.str("id", &t.ID)
	}
	fields, ok := o.kindFields(&t.Kind, targetKinds, targetFields)
	if !ok {
		return
	}
	switch t.Kind {
	case TargetPoint:
		o.require("range_m", "the range in m")
		o.float("range_m", &t.RangeM)
		o.require("rcs_dbsm", "the radar cross-section in dBsm")
		o.float("rcs_dbsm", &t.RCSDBsm)
		t.Fluctuation = FluctuationNone
		if o.str("fluctuation", &t.Fluctuation) {
			o.oneOf("fluctuation", t.Fluctuation, fluctuations)
		}
		o.float("height_m", &t.HeightM)
	default:
		o.require("range_start_m", "the near edge in m")
		o.float("range_start_m", &t.RangeStartM)
		o.require("range_stop_m", "the far edge in m")
		o.float("range_stop_m", &t.RangeStopM)
		if t.Kind == TargetExtended {
			o.surfaceLevel(t)
		} else {
			o.require("reflectivity_dbz", "the reflectivity factor in dBZ")
			o.float("reflectivity_dbz", &t.ReflectivityDBZ)
		}
		o.float("velocity_spread_mps", &t.VelocitySpreadMPS)
		t.Role = RoleClutter
		if o.str("role", &t.Role) {
			o.oneOf("role", t.Role, roles)
		}
	}
	o.float("range_rate_mps", &t.RangeRateMPS)
	o.used["id"] = true
	o.finishKind(t.Kind, append([]string{"id"}, fields...))
}

func (o *object) view(dst *json.RawMessage) {
	v := o.get("view")
	if v == nil {
		return
	}
	if v[0] != '{' {
		o.errs.add("view", "%s is not a JSON object", describe(v))
		return
	}
	var buf bytes.Buffer
	if err := json.Compact(&buf, v); err != nil {
		o.errs.add("view", "not valid JSON: %s", jsonErrText(err))
		return
	}
	if buf.Len() > MaxViewBytes {
		o.errs.add("view", "%d bytes exceed the limit of %d bytes", buf.Len(), MaxViewBytes)
		return
	}
	if buf.String() == "{}" {
		return
	}
	*dst = buf.Bytes()
}
