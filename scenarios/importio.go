package scenarios

import (
	"bufio"
	"bytes"
	"crypto/sha512"
	"encoding/binary"
	"encoding/csv"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/pulsewright/pulsewright/dsp"
)

// Reading and writing imported pulses and filters (docs/scenario-format.md,
// "Imported pulses and filters").

// Recording is a sequence of complex samples read from a file, with what
// the file says of it.
type Recording struct {
	Samples     IQ
	RateHz      float64 // samples per second; 0 when the file does not say
	BandwidthHz float64 // nominal bandwidth; 0 when the file does not say
	// Interpolation is how the pulse reads between samples, when the file
	// says (pulsewright:interpolation): InterpHold or InterpBandLimited.
	Interpolation string
}

// WritePulseSigMF writes the transmitted pulse of a valid scenario, sampled
// at radar.sample_rate_hz as the evaluation samples it, as a SigMF
// recording (cf32_le, one sample per transmitted sample, unit envelope),
// with its bandwidth in pulsewright:bandwidth_hz so that ReadSigMF can
// read it back.
func WritePulseSigMF(meta, data io.Writer, s *Scenario) error {
	wave, err := buildWaveform(s.Waveform)
	if err != nil {
		return fmt.Errorf("build waveform: %w", err)
	}
	pulse := dsp.Sample(nil, wave, s.Radar.SampleRateHz, 0)
	h := sha512.New()
	bw := bufio.NewWriter(io.MultiWriter(data, h))
	var buf [8]byte
	for _, v := range pulse {
		binary.LittleEndian.PutUint32(buf[0:], math.Float32bits(float32(real(v))))
		binary.LittleEndian.PutUint32(buf[4:], math.Float32bits(float32(imag(v))))
		bw.Write(buf[:])
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("write sigmf data: %w", err)
	}
	canon, err := Canonical(s)
	if err != nil {
		return err
	}
	desc := fmt.Sprintf("The transmitted pulse of the scenario %q (%s): %d complex samples at %g Hz, unit envelope. Simulated; no signal was received.",
		s.Name, s.Waveform.Describe(), len(pulse), s.Radar.SampleRateHz)
	global := ordered{
		{"core:datatype", "cf32_le"},
		{"core:version", SigMFVersion},
		{"core:sample_rate", s.Radar.SampleRateHz},
		{"core:description", desc},
		{"core:recorder", "pulsewright"},
		{"core:num_channels", 1},
		{"core:sha512", hex.EncodeToString(h.Sum(nil))},
		{"core:extensions", []ordered{{{"name", SigMFExtension}, {"version", sigmfExtensionVersion}, {"optional", true}}}},
		{"pulsewright:bandwidth_hz", s.Waveform.Bandwidth()},
		{"pulsewright:interpolation", pulseInterpolation(s)},
		{"pulsewright:pulse_width_s", s.Waveform.PulseWidth()},
		{"pulsewright:scenario", json.RawMessage(canon)},
		{"pulsewright:engine", RunningEngine()},
	}
	doc := ordered{{"global", global}, {"captures", []ordered{{{"core:sample_start", 0}, {"core:frequency", s.Radar.CarrierHz}}}}, {"annotations", []ordered{}}}
	b, err := json.MarshalIndent(doc, "", "  ")
	if err != nil {
		return fmt.Errorf("encode sigmf metadata: %w", err)
	}
	if _, err := meta.Write(append(b, '\n')); err != nil {
		return fmt.Errorf("write sigmf metadata: %w", err)
	}
	return nil
}

// ReadSigMF reads a single-channel cf32_le SigMF recording: its metadata
// (the .sigmf-meta JSON) and its dataset (.sigmf-data). The sample rate
// comes from core:sample_rate, the bandwidth from pulsewright:bandwidth_hz
// when present. When core:sha512 is present the dataset must match it.
// At most MaxImportSamples samples are read.
func ReadSigMF(meta []byte, data io.Reader) (*Recording, error) {
	var doc struct {
		Global map[string]json.RawMessage `json:"global"`
	}
	if err := json.Unmarshal(meta, &doc); err != nil {
		return nil, fmt.Errorf("sigmf metadata: %w", err)
	}
	if doc.Global == nil {
		return nil, errors.New("sigmf metadata: no global object")
	}
	str := func(k string) string {
		var s string
		json.Unmarshal(doc.Global[k], &s)
		return s
	}
	num := func(k string) (float64, bool) {
		var f float64
		if json.Unmarshal(doc.Global[k], &f) != nil {
			return 0, false
		}
		return f, true
	}
	if dt := str("core:datatype"); dt != "cf32_le" {
		return nil, fmt.Errorf("sigmf metadata: core:datatype %q is not supported (supported: cf32_le)", dt)
	}
	if n, ok := num("core:num_channels"); ok && n != 1 {
		return nil, fmt.Errorf("sigmf metadata: core:num_channels %g: only single-channel recordings can be imported", n)
	}
	rec := &Recording{}
	var ok bool
	if rec.RateHz, ok = num("core:sample_rate"); !ok || !(rec.RateHz > 0) {
		return nil, errors.New("sigmf metadata: core:sample_rate is missing or not positive")
	}
	rec.BandwidthHz, _ = num(SigMFExtension + ":bandwidth_hz")
	switch in := str(SigMFExtension + ":interpolation"); in {
	case "", InterpBandLimited, InterpHold:
		rec.Interpolation = in
	default:
		return nil, fmt.Errorf("sigmf metadata: %s:interpolation %q is not %s or %s", SigMFExtension, in, InterpBandLimited, InterpHold)
	}
	raw, err := io.ReadAll(io.LimitReader(data, 8*MaxImportSamples+1))
	if err != nil {
		return nil, fmt.Errorf("sigmf data: %w", err)
	}
	if len(raw) > 8*MaxImportSamples {
		return nil, fmt.Errorf("sigmf data: more than %d samples; the limit is %d", MaxImportSamples, MaxImportSamples)
	}
	if len(raw)%8 != 0 || len(raw) == 0 {
		return nil, fmt.Errorf("sigmf data: %d bytes is not a whole, non-zero number of cf32 samples (8 bytes each)", len(raw))
	}
	if want := str("core:sha512"); want != "" {
		sum := sha512.Sum512(raw)
		if !strings.EqualFold(want, hex.EncodeToString(sum[:])) {
			return nil, errors.New("sigmf data: does not match core:sha512 (a different or damaged dataset)")
		}
	}
	n := len(raw) / 8
	rec.Samples.I, rec.Samples.Q = make([]float64, n), make([]float64, n)
	for k := range n {
		rec.Samples.I[k] = float64(math.Float32frombits(binary.LittleEndian.Uint32(raw[8*k:])))
		rec.Samples.Q[k] = float64(math.Float32frombits(binary.LittleEndian.Uint32(raw[8*k+4:])))
	}
	return rec, nil
}

// ReadSamplesCSV reads samples from CSV: a header row "i,q" or
// "amplitude,phase_deg" (names in any case, spaces allowed), then one row
// of two numbers per sample. Lines starting with # are skipped. At most
// MaxImportSamples rows are read.
func ReadSamplesCSV(r io.Reader) (*Recording, error) {
	cr := csv.NewReader(io.LimitReader(r, 64*MaxImportSamples+4096))
	cr.Comment = '#'
	cr.FieldsPerRecord = 2
	cr.TrimLeadingSpace = true
	head, err := cr.Read()
	if err != nil {
		return nil, fmt.Errorf("csv: header: %w", err)
	}
	form := strings.ToLower(strings.TrimSpace(head[0]) + "," + strings.TrimSpace(head[1]))
	if form != "i,q" && form != "amplitude,phase_deg" {
		return nil, fmt.Errorf("csv: header %q: want i,q or amplitude,phase_deg", strings.Join(head, ","))
	}
	var a, b []float64
	for line := 2; ; line++ {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("csv: %w", err)
		}
		if len(a) == MaxImportSamples {
			return nil, fmt.Errorf("csv: more than %d samples; the limit is %d", MaxImportSamples, MaxImportSamples)
		}
		x, errx := strconv.ParseFloat(strings.TrimSpace(rec[0]), 64)
		y, erry := strconv.ParseFloat(strings.TrimSpace(rec[1]), 64)
		if errx != nil || erry != nil || math.IsNaN(x+y) || math.IsInf(x+y, 0) {
			row, _ := cr.FieldPos(0)
			return nil, fmt.Errorf("csv: line %d: %q is not two finite numbers", row, strings.Join(rec, ","))
		}
		a, b = append(a, x), append(b, y)
	}
	if len(a) == 0 {
		return nil, errors.New("csv: no samples after the header")
	}
	if form == "i,q" {
		return &Recording{Samples: IQ{I: a, Q: b}}, nil
	}
	return &Recording{Samples: IQ{Amplitude: a, PhaseDeg: b}}, nil
}

// WithSamplesWaveform returns a copy of s whose waveform is the recording,
// validated as Decode validates. rate and band override the recording's
// own when positive.
func WithSamplesWaveform(s *Scenario, rec *Recording, rate, band float64) (*Scenario, error) {
	if rate <= 0 {
		rate = rec.RateHz
	}
	if band <= 0 {
		band = rec.BandwidthHz
	}
	if rate <= 0 {
		return nil, fmt.Errorf("the sample rate of the samples is not known: give it (--rate): %w", ErrInvalid)
	}
	if band <= 0 {
		return nil, fmt.Errorf("the pulse's bandwidth is not known: give it (--bandwidth): %w", ErrInvalid)
	}
	out := *s
	interp := rec.Interpolation
	if interp == "" {
		interp = InterpBandLimited
	}
	out.Waveform = Waveform{Kind: KindSamples, SampleRateHz: rate, BandwidthHz: band, Interpolation: interp, Samples: rec.Samples}
	// A sample rate the old waveform implied by default follows the new one.
	if s.Radar.SampleRateHz == 2*s.Waveform.Bandwidth() {
		out.Radar.SampleRateHz = 2 * band
	}
	return redecode(&out)
}

// WithCustomFilter returns a copy of s whose receive filter is the
// recording's taps, validated. A recording that states its rate must be at
// radar.sample_rate_hz.
func WithCustomFilter(s *Scenario, rec *Recording, rate float64) (*Scenario, error) {
	if rate <= 0 {
		rate = rec.RateHz
	}
	if rate > 0 && rate != s.Radar.SampleRateHz {
		return nil, fmt.Errorf("the taps are at %g Hz but radar.sample_rate_hz is %g Hz: a filter's taps must be at the scenario's rate: %w", rate, s.Radar.SampleRateHz, ErrInvalid)
	}
	out := *s
	taps := rec.Samples
	out.Receiver.Filter, out.Receiver.Taps = FilterCustom, &taps
	return redecode(&out)
}

// redecode validates a scenario changed in code the way Decode would,
// through its canonical form, so that derived defaults are filled again.
func redecode(s *Scenario) (*Scenario, error) {
	data, err := Canonical(s)
	if err != nil {
		return nil, err
	}
	return Decode(bytes.TrimSpace(data))
}

// pulseInterpolation says how an exported pulse should be read between its
// samples: held, when it is made of constant pieces that the samples
// resolve exactly (a rect pulse or a phase code at a whole number of
// samples per chip), and band-limited otherwise.
func pulseInterpolation(s *Scenario) string {
	w := s.Waveform
	if w.Kind == KindSamples && w.Interpolation != "" {
		// An imported pulse goes out read as it came in: a held code
		// re-exported and re-imported stays held (band-limited reading of
		// held samples changes its figures: Barker 13's PSLR by 1.7 dB).
		return w.Interpolation
	}
	if w.Kind != KindRect && !w.IsPhaseCode() {
		return InterpBandLimited
	}
	piece := w.ChipS
	if w.Kind == KindRect {
		piece = w.PulseWidthS
	}
	per := piece * s.Radar.SampleRateHz
	if math.Abs(per-math.Round(per)) <= 1e-9*per && math.Round(per) >= 1 {
		return InterpHold
	}
	return InterpBandLimited
}
