package scenarios

import (
	"bytes"
	"context"
	"crypto/sha512"
	"encoding/binary"
	"encoding/hex"
	"encoding/json"
	"math"
	"regexp"
	"strings"
	"testing"
)

// checkSigMF checks a metadata document against the rules of the SigMF
// specification v1.2 (https://sigmf.org, sigmf-spec.md; the same rules as
// its JSON schema sigmf-schema.json), which could not be vendored: no
// package registry we may use carries it. Sections cited are those of the
// specification.
func checkSigMF(t *testing.T, meta []byte, data []byte) map[string]any {
	t.Helper()
	var doc map[string]any
	dec := json.NewDecoder(bytes.NewReader(meta))
	dec.UseNumber()
	if err := dec.Decode(&doc); err != nil {
		t.Fatalf("metadata is not JSON: %v", err)
	}
	// "Metadata Format": the top level holds exactly global, captures and
	// annotations (schema: required, additionalProperties false).
	if len(doc) != 3 || doc["global"] == nil || doc["captures"] == nil || doc["annotations"] == nil {
		t.Fatalf("top-level keys %v, want exactly global, captures, annotations", keys(doc))
	}
	global, ok := doc["global"].(map[string]any)
	if !ok {
		t.Fatal("global is not an object")
	}
	// "Global Object": core:datatype and core:version are required.
	dt, _ := global["core:datatype"].(string)
	if !regexp.MustCompile(`^(c|r)(f32|f64|i32|i16|u32|u16|i8|u8)(_le|_be)?$`).MatchString(dt) {
		t.Errorf("core:datatype %q is not a dataset format (\"Dataset Format\")", dt)
	}
	if v, _ := global["core:version"].(string); !regexp.MustCompile(`^\d+\.\d+\.\d+$`).MatchString(v) {
		t.Errorf("core:version %q is not X.Y.Z", v)
	}
	if sr := num(t, global["core:sample_rate"]); sr < 1 || sr > 1e12 {
		t.Errorf("core:sample_rate %v outside 1…1e12", sr)
	}
	for _, k := range []string{"core:description", "core:recorder", "core:hw", "core:author"} {
		if v, ok := global[k]; ok {
			if _, isStr := v.(string); !isStr {
				t.Errorf("%s is not a string", k)
			}
		}
	}
	if nc, ok := global["core:num_channels"]; ok && num(t, nc) != 1 {
		t.Errorf("core:num_channels %v", nc)
	}
	// "Extension Namespaces": every extension object has exactly name,
	// version and optional; every namespace used must be core or declared.
	declared := map[string]bool{"core": true}
	exts, _ := global["core:extensions"].([]any)
	for _, e := range exts {
		m, _ := e.(map[string]any)
		_, n := m["name"].(string)
		_, v := m["version"].(string)
		_, o := m["optional"].(bool)
		if len(m) != 3 || !n || !v || !o {
			t.Errorf("extension object %v must hold exactly name, version, optional", m)
		}
		declared[m["name"].(string)] = true
	}
	checkNS := func(where string, m map[string]any) {
		for k := range m {
			ns, _, ok := strings.Cut(k, ":")
			if !ok || !declared[ns] {
				t.Errorf("%s: key %q is not in a declared namespace", where, k)
			}
		}
	}
	checkNS("global", global)
	if sha, ok := global["core:sha512"].(string); ok {
		sum := sha512.Sum512(data)
		if sha != hex.EncodeToString(sum[:]) {
			t.Error("core:sha512 does not match the dataset")
		}
	}
	// "Dataset Format": cf32 is two float32 per sample.
	if dt != "cf32_le" {
		t.Fatalf("datatype %s, this check handles cf32_le", dt)
	}
	if len(data)%8 != 0 {
		t.Fatalf("dataset length %d is not a whole number of cf32 samples", len(data))
	}
	total := len(data) / 8
	// "Captures Array": each segment has core:sample_start, sorted.
	caps, _ := doc["captures"].([]any)
	prev := -1.0
	for i, c := range caps {
		m, _ := c.(map[string]any)
		s := num(t, m["core:sample_start"])
		if s != math.Trunc(s) || s < 0 || s < prev || s >= float64(total) {
			t.Errorf("captures[%d].core:sample_start %v", i, s)
		}
		prev = s
		if f, ok := m["core:frequency"]; ok && math.Abs(num(t, f)) > 1e12 {
			t.Errorf("captures[%d].core:frequency %v", i, f)
		}
		checkNS("captures", m)
	}
	// "Annotations Array": core:sample_start required, sorted; sample_count
	// an integer; both frequency edges or neither.
	anns, _ := doc["annotations"].([]any)
	prev = -1
	for i, a := range anns {
		m, _ := a.(map[string]any)
		s := num(t, m["core:sample_start"])
		n := num(t, m["core:sample_count"])
		if s != math.Trunc(s) || n != math.Trunc(n) || s < prev || n < 0 || s+n > float64(total) {
			t.Errorf("annotations[%d]: sample_start %v, sample_count %v, dataset %d samples", i, s, n, total)
		}
		prev = s
		_, lo := m["core:freq_lower_edge"]
		_, hi := m["core:freq_upper_edge"]
		if lo != hi {
			t.Errorf("annotations[%d]: one frequency edge without the other", i)
		}
		if _, ok := m["core:label"].(string); !ok {
			t.Errorf("annotations[%d]: core:label missing", i)
		}
		checkNS("annotations", m)
	}
	return doc
}

func keys(m map[string]any) []string {
	var ks []string
	for k := range m {
		ks = append(ks, k)
	}
	return ks
}

func num(t *testing.T, v any) float64 {
	t.Helper()
	n, ok := v.(json.Number)
	if !ok {
		t.Fatalf("%v is not a number", v)
	}
	f, err := n.Float64()
	if err != nil {
		t.Fatal(err)
	}
	return f
}

func exportSigMF(t *testing.T, s *Scenario) (*Result, []byte, []byte) {
	t.Helper()
	res, err := Evaluate(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	var meta, data bytes.Buffer
	if err := WriteSigMF(&meta, &data, s, res); err != nil {
		t.Fatal(err)
	}
	return res, meta.Bytes(), data.Bytes()
}

func samples(data []byte) []complex128 {
	out := make([]complex128, len(data)/8)
	for i := range out {
		re := math.Float32frombits(binary.LittleEndian.Uint32(data[8*i:]))
		im := math.Float32frombits(binary.LittleEndian.Uint32(data[8*i+4:]))
		out[i] = complex(float64(re), float64(im))
	}
	return out
}

func TestSigMFHarbour(t *testing.T) {
	s := demoScenario(t, "harbour-skiff")
	res, meta, data := exportSigMF(t, s)
	doc := checkSigMF(t, meta, data)
	if len(data) != 8*len(res.Series.Echo) || len(res.Series.Echo) != s.WindowSamples() {
		t.Errorf("dataset %d bytes for %d samples (window %d)", len(data), len(res.Series.Echo), s.WindowSamples())
	}
	g := doc["global"].(map[string]any)
	if num(t, g["core:sample_rate"]) != s.Radar.SampleRateHz || g["core:datatype"] != "cf32_le" {
		t.Errorf("global %v", g)
	}
	c := doc["captures"].([]any)[0].(map[string]any)
	if num(t, c["core:frequency"]) != 9.41e9 || num(t, c["core:sample_start"]) != 0 {
		t.Errorf("capture %v", c)
	}
	anns := doc["annotations"].([]any)
	if len(anns) != 3 {
		t.Fatalf("%d annotations, want one per target", len(anns))
	}
	// Samples round-trip through float32.
	x := samples(data)
	for i, v := range res.Series.Echo {
		if complex64(v) != complex64(x[i]) {
			t.Fatalf("sample %d: %v written, %v read", i, v, x[i])
		}
	}
	// The tanker's echo is in its gate: 6000 m is (6000−3500)·2/c·20 MHz =
	// 333.6 samples into the window, and its pulse lasts 20 µs·20 MHz = 400
	// samples, clipped by the window end at sample 733.
	tk := anns[0].(map[string]any)
	if tk["core:label"] != "tanker" || num(t, tk["core:sample_start"]) != 333 || num(t, tk["core:sample_count"]) != 734-333 {
		t.Errorf("tanker annotation %v", tk)
	}
	if tk["pulsewright:status"] != "detected" {
		t.Errorf("tanker status %v", tk["pulsewright:status"])
	}
	sk := anns[1].(map[string]any)
	if sk["core:label"] != "skiff" || sk["pulsewright:status"] != "masked" || sk["pulsewright:masked_by"] != "tanker" {
		t.Errorf("skiff annotation %v", sk)
	}
	// In unit-noise scaling the tanker's mean power in its gate is its
	// single-sample SNR P_r/(k·T0·F·fs): the report's compressed SNR
	// P_r·τ/(k·T0·F) (scenario-format.md, point-target SNR) divided by τ·fs
	// = 400 samples, plus the unit noise (negligible at 25 dB).
	var in float64
	for _, v := range x[333:734] {
		in += real(v)*real(v) + imag(v)*imag(v)
	}
	in /= float64(734 - 333)
	snr := 10 * math.Log10(math.Pow(10, (res.Report.Targets[0].SNRDB-10*math.Log10(400))/10)+1)
	if got := 10 * math.Log10(in); math.Abs(got-snr) > 0.2 {
		t.Errorf("tanker power in its gate %.2f dB re noise, want %.2f dB", got, snr)
	}
}

// TestSigMFNoiseScaling: with no target the samples are noise alone, and
// the documented scaling says E|n|² = 1. With N samples the mean of |n|²
// (exponential, unit mean) has standard deviation 1/√N; allow 5σ.
func TestSigMFNoiseScaling(t *testing.T) {
	s, err := Decode([]byte(`{"version":2,"waveform":{"kind":"lfm","pulse_width_s":1e-5,"bandwidth_hz":5e6},"radar":{"window_start_m":2000,"window_stop_m":30000}}`))
	if err != nil {
		t.Fatal(err)
	}
	_, meta, data := exportSigMF(t, s)
	doc := checkSigMF(t, meta, data)
	if anns := doc["annotations"].([]any); len(anns) != 0 {
		t.Errorf("%d annotations without targets", len(anns))
	}
	x := samples(data)
	var p, re2, im2 float64
	for _, v := range x {
		p += real(v)*real(v) + imag(v)*imag(v)
		re2 += real(v) * real(v)
		im2 += imag(v) * imag(v)
	}
	n := float64(len(x))
	if tol := 5 / math.Sqrt(n); math.Abs(p/n-1) > tol {
		t.Errorf("mean power %.4f over %d samples, want 1 ± %.4f", p/n, len(x), tol)
	}
	if math.Abs(re2/n-0.5) > 0.05 || math.Abs(im2/n-0.5) > 0.05 {
		t.Errorf("I power %.3f, Q power %.3f, want ½ each", re2/n, im2/n)
	}
}

func TestEchoGatesFold(t *testing.T) {
	// A point beyond c·PRI/2 = 29 979 m folds: at 31 000 m it appears at
	// 1021 m, (1021 − 0)·2/c·20 MHz = 136.2 samples into the window.
	s, err := Decode([]byte(`{"version":2,"radar":{"pri_s":2e-4},"waveform":{"kind":"lfm","pulse_width_s":1e-6,"bandwidth_hz":1e7},
		"targets":[{"id":"far","kind":"point","range_m":31000,"rcs_dbsm":10},{"id":"sea","kind":"extended","range_start_m":500,"range_stop_m":800,"rcs_dbsm_per_m":-20}]}`))
	if err != nil {
		t.Fatal(err)
	}
	g := EchoGates(s)
	unamb := C * 2e-4 / 2
	wantStart := int(math.Floor((31000 - unamb) * 2 / C * 2e7))
	if g[0].Start != wantStart || g[0].Count != 21 {
		t.Errorf("far gate %+v, want start %d count 21", g[0], wantStart)
	}
	if g[1].Start != int(math.Floor(500*2/C*2e7)) || g[1].Count < 40 {
		t.Errorf("sea gate %+v", g[1])
	}
}
