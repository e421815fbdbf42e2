package scenarios

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
)

// Read reads one scenario document from r, at most MaxDocumentBytes, and
// decodes it as Decode does.
func Read(r io.Reader) (*Scenario, error) {
	data, err := io.ReadAll(io.LimitReader(r, MaxDocumentBytes+1))
	if err != nil {
		return nil, fmt.Errorf("read scenario: %w", err)
	}
	return Decode(data)
}

// Decode parses a scenario document, fills defaults and validates it. A
// document that is not valid yields a *ValidationError listing every
// problem; a document over MaxDocumentBytes is rejected before parsing.
func Decode(data []byte) (*Scenario, error) {
	return decodeWith(data, formatUpgrades)
}

// decodeWith is Decode with a table of upgrades from older format
// versions (formatUpgrades in the program; tests pass their own).
func decodeWith(data []byte, upgrades map[int]upgrade) (*Scenario, error) {
	var errs errList
	if len(data) > MaxDocumentBytes {
		errs.add("", "document is larger than the limit of %d bytes", MaxDocumentBytes)
		return nil, errs.err()
	}
	if fe := checkEncoding(data); fe != nil {
		errs.add(fe.Path, "%s", fe.Message)
		return nil, errs.err()
	}
	top, ok := newObject("", data, &errs)
	if !ok {
		return nil, errs.err()
	}
	s := &Scenario{}
	if !top.version(&s.Version, upgrades) {
		return nil, errs.err()
	}
	if s.Version == Version-1 && readsAsCurrent[s.Version] && upgrades[s.Version] != nil {
		// A document of the previous version that names the same
		// fields: read as it is (no generic round trip; the fields it
		// lacks are refused below).
		s.Version, s.ReadVersion = Version, Version-1
	} else if s.Version != Version {
		// An older document: bring it to the current version, then read
		// it as one. Its errors then name the current fields.
		up, notes, err := upgradeDocument(data, s.Version, upgrades)
		if err != nil {
			errs.add("version", "%v", err)
			return nil, errs.err()
		}
		if top, ok = newObject("", up, &errs); !ok {
			return nil, errs.err()
		}
		top.used["version"] = true
		s.Version, s.ReadVersion, s.Upgraded = Version, s.Version, notes
	}
	top.str("name", &s.Name)
	top.str("notes", &s.Notes)
	s.Seed = 1
	top.int64("seed", &s.Seed)
	s.Radar = defaultRadar()
	if o, ok := top.child("radar"); ok {
		o.decodeRadar(&s.Radar)
	}
	if o, ok := top.child("waveform"); ok {
		o.decodeWaveform(&s.Waveform)
	} else if !errs.has("waveform") {
		errs.add("waveform", "required (an object with a kind)")
	}
	s.Receiver = defaultReceiver()
	if o, ok := top.child("receiver"); ok {
		if s.ReadVersion == 2 && o.has("integration") {
			errs.add("receiver.integration", "added in format version 3: set \"version\": 3 to use it (this document is version 2)")
		}
		o.decodeReceiver(&s.Receiver)
	}
	top.targets(&s.Targets)
	if o, ok := top.child("front_end"); ok {
		o.decodeFrontEnd(&s.FrontEnd)
	}
	s.Propagation = defaultPropagation()
	if o, ok := top.child("propagation"); ok {
		o.decodePropagation(&s.Propagation)
	}
	top.view(&s.View)
	top.finish(topFields...)
	s.fillDerived(&errs)
	s.validate(&errs)
	if err := errs.err(); err != nil {
		return nil, err
	}
	return s, nil
}

func defaultRadar() Radar {
	return Radar{
		CarrierHz:      9.5e9,
		PeakPowerW:     1000,
		AntennaGainDBi: 30,
		NoiseFigureDB:  3,
		SystemLossDB:   3,
		PRIS:           1e-3,
		Pulses:         1,
		BeamwidthAzDeg: 2,
		BeamwidthElDeg: 2,
	}
}

func defaultReceiver() Receiver {
	return Receiver{
		Filter:             FilterMatched,
		FilterLengthFactor: 3,
		Window:             Window{Kind: WindowNone},
		Detector:           defaultDetector(DetectorCA),
		DopplerWindow:      Window{Kind: WindowHann},
		MTI:                MTINone,
		Integration:        IntegrationCoherent,
	}
}

// DefaultPdRequired is the default receiver.detector.pd_required: common
// practice in radar specifications, no single source.
const DefaultPdRequired = 0.9

// defaultCensored is the censored CFAR's default: an eighth of the
// training cells, at least one (common practice, no source: room for a
// few interferers while keeping most cells).
func defaultCensored(training int) int { return max(1, training/8) }

func defaultDetector(kind string) Detector {
	d := Detector{Kind: kind, PFA: 1e-6, PdRequired: DefaultPdRequired}
	if kind != DetectorFixed {
		d.GuardCells = 2
		d.TrainingCells = 16
		d.DopplerGuardCells = 1
		d.DopplerTrainingCells = 4
	}
	if kind == DetectorOS {
		d.Rank = 12 // 3/4 of the training cells: common practice, no source
	}
	if kind == DetectorCens {
		d.CensoredCells = defaultCensored(d.TrainingCells)
	}
	return d
}

func defaultWindow(kind string) Window {
	w := Window{Kind: kind}
	switch kind {
	case WindowTaylor:
		w.SidelobeDB, w.NBar = -35, 5
	case WindowChebyshev:
		w.SidelobeDB = -50
	case WindowKaiser:
		w.Beta = 6
	case WindowGaussian:
		w.Sigma = 0.4
	}
	return w
}

// fillDerived sets the defaults that depend on other fields.
func (s *Scenario) fillDerived(errs *errList) {
	if s.Radar.SampleRateHz == 0 && !errs.has("radar.sample_rate_hz") {
		s.Radar.SampleRateHz = 2 * s.Waveform.Bandwidth()
	}
	if s.Radar.WindowStopM == 0 && !errs.has("radar.window_stop_m") {
		s.Radar.WindowStopM = C * s.Radar.PRIS / 2
	}
}

// object reads the fields of one JSON object, remembering which were used
// so that finish can report the unknown ones.
type object struct {
	path string
	raw  map[string]json.RawMessage
	used map[string]bool
	errs *errList
}

func newObject(path string, data []byte, errs *errList) (*object, bool) {
	data = bytes.TrimSpace(data)
	if len(data) == 0 || data[0] != '{' {
		errs.add(path, "%s is not a JSON object", describe(data))
		return nil, false
	}
	var raw map[string]json.RawMessage
	if err := json.Unmarshal(data, &raw); err != nil {
		errs.add(path, "not valid JSON: %s", jsonErrText(err))
		return nil, false
	}
	return &object{path: path, raw: raw, used: make(map[string]bool), errs: errs}, true
}

func jsonErrText(err error) string {
	return strings.TrimPrefix(err.Error(), "json: ")
}

// describe renders a JSON value for an error message, shortened.
func describe(v []byte) string {
	v = bytes.TrimSpace(v)
	if len(v) == 0 {
		return "empty input"
	}
	if len(v) > 40 {
		return string(v[:37]) + "…"
	}
	return string(v)
}

func (o *object) sub(name string) string {
	if o.path == "" {
		return name
	}
	return o.path + "." + name
}

// get returns the raw value of a field, or nil when it is absent or null.
func (o *object) get(name string) json.RawMessage {
	v, ok := o.raw[name]
	if !ok {
		return nil
	}
	o.used[name] = true
	if string(v) == "null" {
		return nil
	}
	return v
}

func (o *object) has(name string) bool {
	v, ok := o.raw[name]
	return ok && string(v) != "null"
}

func (o *object) float(name string, dst *float64) bool {
	v := o.get(name)
	if v == nil {
		return false
	}
	if len(v) == 0 || !(v[0] == '-' || v[0] >= '0' && v[0] <= '9') {
		o.errs.add(o.sub(name), "%s is not a number", describe(v))
		return false
	}
	f, err := strconv.ParseFloat(string(v), 64)
	if err != nil || math.IsInf(f, 0) {
		o.errs.add(o.sub(name), "%s is out of the range of a 64-bit float", describe(v))
		return false
	}
	*dst = f
	return true
}

func (o *object) intIn(name string, dst *int64, lo, hi int64) bool {
	var f float64
	if !o.float(name, &f) {
		return false
	}
	if f != math.Trunc(f) {
		o.errs.add(o.sub(name), "%v is not an integer", f)
		return false
	}
	if f < float64(lo) || f > float64(hi) {
		o.errs.add(o.sub(name), "%v is outside the valid range %d … %d", f, lo, hi)
		return false
	}
	*dst = int64(f)
	return true
}

func (o *object) int(name string, dst *int) bool {
	v := int64(*dst)
	ok := o.intIn(name, &v, math.MinInt32, math.MaxInt32)
	if ok {
		*dst = int(v)
	}
	return ok
}

func (o *object) int64(name string, dst *int64) bool {
	return o.intIn(name, dst, 0, MaxSeed)
}

func (o *object) str(name string, dst *string) bool {
	v := o.get(name)
	if v == nil {
		return false
	}
	if v[0] != '"' {
		o.errs.add(o.sub(name), "%s is not a string", describe(v))
		return false
	}
	if err := json.Unmarshal(v, dst); err != nil {
		o.errs.add(o.sub(name), "not a valid string: %s", jsonErrText(err))
		return false
	}
	return true
}

// kind reads a required enumerated string.
func (o *object) kind(name string, dst *string, valid []string) bool {
	if !o.has(name) {
		o.errs.add(o.sub(name), "required, one of %s", strings.Join(valid, ", "))
		return false
	}
	if !o.str(name, dst) {
		return false
	}
	return o.oneOf(name, *dst, valid)
}

func (o *object) oneOf(name, v string, valid []string) bool {
	for _, k := range valid {
		if v == k {
			return true
		}
	}
	o.errs.add(o.sub(name), "%s is not one of %s", clipQ(v), strings.Join(valid, ", "))
	return false
}

func (o *object) require(name, what string) bool {
	if !o.has(name) {
		o.errs.add(o.sub(name), "required: %s", what)
		return false
	}
	return true
}

func (o *object) child(name string) (*object, bool) {
	v := o.get(name)
	if v == nil {
		return nil, false
	}
	return newObject(o.sub(name), v, o.errs)
}

// finish reports every field of the object that was not read.
func (o *object) finish(known ...string) {
	var unknown []string
	for k := range o.raw {
		if !o.used[k] {
			unknown = append(unknown, k)
		}
	}
	sort.Strings(unknown)
	for _, k := range unknown {
		if len(known) > 0 {
			o.errs.add(o.sub(Clip(k, echoLen)), "unknown field (fields here: %s)", strings.Join(known, ", "))
		} else {
			o.errs.add(o.sub(Clip(k, echoLen)), "unknown field")
		}
	}
}

// version reads the version field first: another version's fields may mean
// other things, so nothing else is read when it is wrong. It accepts the
// current version and every older one that upgrades lead from.
func (o *object) version(dst *int, upgrades map[int]upgrade) bool {
	supported := supportedVersions(upgrades)
	if !o.has("version") {
		o.errs.add("version", "required: the format version, supported: %s", joinInts(supported))
		return false
	}
	v := int64(0)
	if !o.intIn("version", &v, math.MinInt32, math.MaxInt32) {
		return false
	}
	ok := false
	for _, s := range supported {
		ok = ok || int64(s) == v
	}
	if !ok {
		o.errs.add("version", "%d is not supported (supported versions: %s)", v, joinInts(supported))
		return false
	}
	*dst = int(v)
	return true
}
