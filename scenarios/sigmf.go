package scenarios

import (
	"bufio"
	"crypto/sha512"
	"encoding/binary"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
)

// SigMF output. The recording follows the SigMF specification (Signal
// Metadata Format, https://sigmf.org, core namespace v1.2): a metadata
// file with the global object, one capture and one annotation per target,
// and a dataset of interleaved little-endian float32 I/Q (cf32_le).
//
// Scaling: the samples are the raw receive window of Series.Echo, in units
// where the thermal noise has unit power per complex sample (E|n|² = 1,
// variance ½ in I and in Q). A target's echo power per sample over 1 is
// therefore its SNR before pulse compression. The same statement is
// written into core:description and the pulsewright:noise_power field.
//
// pulsewright:engine names the engine and format versions that simulated
// the recording (EngineInfo), beside pulsewright:scenario, the canonical
// scenario: together they say how to reproduce it.

const (
	// SigMFVersion is the SigMF specification version the metadata
	// follows.
	SigMFVersion = "1.2.0"
	// SigMFExtension is the namespace of our own metadata fields, declared
	// in core:extensions as optional.
	SigMFExtension = "pulsewright"
	// sigmfExtensionVersion is the version of our namespace: 1.1.0 added
	// pulsewright:engine.
	sigmfExtensionVersion = "1.1.0"
)

// Gate is the span of receive-window samples that hold one target's echo:
// Start is the first sample, Count the number of samples (0 when the echo
// misses the window).
type Gate struct {
	ID           string
	Start, Count int
}

// EchoGates returns, for each target in order, the window samples its echo
// occupies: from the leading edge at its apparent (folded) range to the
// trailing edge a pulse width later, clipped to the window. A distributed
// target's gate spans its near edge to its far edge plus a pulse.
func EchoGates(s *Scenario) []Gate {
	r := s.Radar
	fs, tau := r.SampleRateHz, s.Waveform.PulseWidth()
	n := s.WindowSamples()
	unamb := C * r.PRIS / 2
	sample := func(rng float64) float64 { return (rng - r.WindowStartM) * 2 / C * fs }
	out := make([]Gate, len(s.Targets))
	for i, t := range s.Targets {
		near, far := t.RangeM, t.RangeM
		if t.Kind != TargetPoint {
			near, far = t.RangeStartM, t.RangeStopM
		}
		fold := math.Floor(near/unamb) * unamb
		a := sample(near - fold)
		b := sample(far-fold) + tau*fs
		if far-near >= unamb {
			a, b = 0, float64(n) // the echo wraps: it covers the window
		}
		lo := int(math.Max(math.Floor(a), 0))
		hi := int(math.Min(math.Ceil(b), float64(n)))
		g := Gate{ID: t.ID}
		if hi > lo {
			g.Start, g.Count = lo, hi-lo
		}
		out[i] = g
	}
	return out
}

// WriteSigMF writes the receive window of an evaluated scenario as a SigMF
// recording: the metadata JSON to meta and the cf32_le samples to data.
// res must come from Evaluate(s).
func WriteSigMF(meta, data io.Writer, s *Scenario, res *Result) error {
	h := sha512.New()
	bw := bufio.NewWriter(io.MultiWriter(data, h))
	var buf [8]byte
	for _, v := range res.Series.Echo {
		binary.LittleEndian.PutUint32(buf[0:], math.Float32bits(float32(real(v))))
		binary.LittleEndian.PutUint32(buf[4:], math.Float32bits(float32(imag(v))))
		if _, err := bw.Write(buf[:]); err != nil {
			return fmt.Errorf("write sigmf data: %w", err)
		}
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("write sigmf data: %w", err)
	}
	canon, err := Canonical(s)
	if err != nil {
		return err
	}
	r := s.Radar
	train := ""
	if r.Pulses > 1 {
		train = fmt.Sprintf("The first of the %d pulses of the coherent processing interval. ", r.Pulses)
	}
	desc := train + fmt.Sprintf("Simulated raw receive window of the scenario %q: %d complex samples from %.6g m to %.6g m of range. "+
		"Samples are scaled so that the thermal noise has unit power per complex sample; an echo's power per sample is its SNR before pulse compression. "+
		"Simulated data; no signal was received.", s.Name, len(res.Series.Echo), r.WindowStartM, r.WindowStopM)
	global := ordered{
		{"core:datatype", "cf32_le"},
		{"core:version", SigMFVersion},
		{"core:sample_rate", r.SampleRateHz},
		{"core:description", desc},
		{"core:recorder", "pulsewright"},
		{"core:hw", "none: simulated by Pulsewright"},
		{"core:num_channels", 1},
		{"core:sha512", hex.EncodeToString(h.Sum(nil))},
		{"core:extensions", []ordered{{{"name", SigMFExtension}, {"version", sigmfExtensionVersion}, {"optional", true}}}},
		{"pulsewright:noise_power", 1.0},
		{"pulsewright:range_start_m", res.Series.RangeM0},
		{"pulsewright:range_step_m", res.Series.RangeStepM},
		{"pulsewright:scenario", json.RawMessage(canon)},
		{"pulsewright:engine", RunningEngine()},
	}
	captures := []ordered{{{"core:sample_start", 0}, {"core:frequency", r.CarrierHz}}}

	gates := EchoGates(s)
	B := s.Waveform.Bandwidth()
	var anns []ordered
	for i, g := range gates {
		if g.Count == 0 || i >= len(res.Report.Targets) {
			continue // the echo misses the window: nothing to annotate
		}
		t := res.Report.Targets[i]
		a := ordered{
			{"core:sample_start", g.Start},
			{"core:sample_count", g.Count},
			{"core:freq_lower_edge", r.CarrierHz + t.DopplerHz - B/2},
			{"core:freq_upper_edge", r.CarrierHz + t.DopplerHz + B/2},
			{"core:label", t.ID},
			{"core:comment", t.Reason},
			{"core:generator", "pulsewright"},
			{"pulsewright:status", t.Status},
			{"pulsewright:range_m", t.RangeM},
			{"pulsewright:snr_db", t.SNRDB},
		}
		if t.MarginDB != nil {
			a = append(a, member{"pulsewright:margin_db", *t.MarginDB})
		}
		if t.MaskedBy != "" {
			a = append(a, member{"pulsewright:masked_by", t.MaskedBy})
		}
		anns = append(anns, a)
	}
	// The specification requires annotations sorted by sample_start.
	sort.SliceStable(anns, func(i, j int) bool { return anns[i][0].val.(int) < anns[j][0].val.(int) })
	if anns == nil {
		anns = []ordered{}
	}
	doc := ordered{{"global", global}, {"captures", captures}, {"annotations", anns}}
	b, err := json.MarshalIndent(doc, "", "  ")
	if err != nil {
		return fmt.Errorf("encode sigmf metadata: %w", err)
	}
	if _, err := meta.Write(append(b, '\n')); err != nil {
		return fmt.Errorf("write sigmf metadata: %w", err)
	}
	return nil
}

// WriteProfileCSV writes the compressed profile of an evaluated scenario,
// one row per range sample: range_m, profile_db (with noise), clean_db
// (noise-free) and threshold_db, all in dB re the output noise power.
//
// The first line is a comment naming the engine ("# pulsewright …"), as
// in every CSV the program writes; CSV readers skip it with their comment
// option.
func WriteProfileCSV(w io.Writer, res *Result) error {
	bw := bufio.NewWriter(w)
	s := &res.Series
	bw.WriteString(CSVComment())
	bw.WriteString("range_m,profile_db,clean_db,threshold_db\n")
	f := func(v float64, prec int) string { return strconv.FormatFloat(v, 'f', prec, 64) }
	for k := range s.ProfileDB {
		r := s.RangeM0 + float64(k)*s.RangeStepM
		bw.WriteString(f(r, 3) + "," + f(s.ProfileDB[k], 3) + "," + f(s.CleanDB[k], 3) + "," + f(s.ThresholdDB[k], 3) + "\n")
	}
	return bw.Flush()
}
