package scenarios_test

// Differential test: every report field of several hundred random waveforms
// and scenes against an independent NumPy/SciPy model of the same
// definitions (docs/figures.md, docs/detection.md), committed as
// testdata/diffmodel/cases.json by testdata/diffmodel/gen.py. Each
// tolerance, and each difference the engine still has, is explained in
// testdata/diffmodel/README.md.

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"sort"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/scenarios"
)

type diffCase struct {
	Scenario json.RawMessage `json:"scenario"`
	Expected struct {
		Error    string           `json:"error"` // the scenario must be refused
		Waveform map[string]any   `json:"waveform"`
		Targets  []map[string]any `json:"targets"`
	} `json:"expected"`
}

type diffFile struct {
	Numpy string     `json:"numpy"`
	Scipy string     `json:"scipy"`
	Cases []diffCase `json:"cases"`
}

// A known difference: the engine still differs from the model in this
// field of this case, for a reason written in README.md. The test logs it
// and fails when it is gone (so the list stays current).
type knownDiff struct {
	Case   string `json:"case"`
	Field  string `json:"field"`
	Reason string `json:"reason"`
}

// tol is an absolute tolerance plus a relative one (of the expected value).
type tol struct{ abs, rel float64 }

// waveClass says how the model and the engine compute a waveform's
// figures: "exact" (rect-chip code with a chip-constant filter: closed
// form on both sides), "held" (windowed code: the engine holds K samples
// per chip, the model a finer K), "minimax" (an optimal filter is not
// unique: only its PSLR is), "fm" (lfm, nlfm, costas: interpolated).
func waveClass(sc map[string]any) string {
	w := sc["waveform"].(map[string]any)
	rx, _ := sc["receiver"].(map[string]any)
	filter, _ := rx["filter"].(string)
	win := "none"
	if wm, ok := rx["window"].(map[string]any); ok {
		win, _ = wm["kind"].(string)
	}
	switch w["kind"] {
	case "nlfm":
		return "nlfm"
	case "lfm", "costas":
		return "fm"
	}
	if filter == "minimax" {
		return "minimax"
	}
	if win != "none" && filter != "least_squares" {
		return "held"
	}
	return "exact"
}

// tolerance of a field for a waveform class; ok false means the field is
// compared for presence only (see README.md).
func tolerance(field, class string, bwHz float64) (tol, bool) {
	res := scenarios.C / (2 * bwHz) // range resolution, m
	switch field {
	case "pulse_width_s", "bandwidth_hz", "time_bandwidth", "compression_gain_db",
		"blind_range_m", "unambiguous_range_m", "unambiguous_velocity_mps",
		"range_m", "doppler_hz":
		return tol{1e-12, 1e-9}, true
	case "pslr_db":
		switch class {
		case "exact", "minimax":
			return tol{0.01, 0}, true
		case "held":
			return tol{0.15, 0}, true
		}
		return tol{0.1, 0}, true
	case "islr_db":
		switch class {
		case "exact":
			return tol{0.01, 0}, true
		case "minimax":
			return tol{}, false
		case "held":
			return tol{0.1, 0}, true
		}
		return tol{0.1, 0}, true
	case "mainlobe_3db_m":
		switch class {
		case "exact":
			return tol{1e-6, 1e-6}, true
		case "minimax":
			return tol{}, false
		}
		return tol{0, 0.005}, true
	case "mismatch_loss_db":
		switch class {
		case "exact":
			return tol{1e-6, 0}, true
		case "minimax":
			return tol{}, false
		}
		return tol{0.01, 0}, true
	case "straddle_loss_max_db", "straddle_loss_mean_db":
		if class == "minimax" {
			return tol{}, false
		}
		return tol{0.02, 0}, true
	case "snr_db":
		if class == "minimax" {
			return tol{}, false
		}
		return tol{0.03, 0}, true
	case "doppler_loss_db":
		return tol{0.02, 0.01}, true
	case "range_shift_m":
		return tol{0.03 * res, 0.01}, true
	case "eclipsing_loss_db":
		// A mostly eclipsed echo's peak is the correlation of a short
		// fragment: relative errors of the reference's samples weigh
		// more the more is lost. Beyond 100 dB what remains is rounding.
		return tol{0.05, 0.03}, true
	case "band_loss_db":
		// Checked against the closed form ∫sinc² of a rect pulse: the
		// model's FFT band filter is within 0.25 dB of it.
		return tol{bandLossTol, 0}, true
	case "margin_db", "threshold_margin_db":
		if class == "minimax" {
			return tol{}, false
		}
		return tol{0.1, 0}, true
	case "snr_required_db":
		// The same series on both sides (the model integrates it with
		// scipy's quad): bisection and integration error only.
		return tol{0.01, 0}, true
	case "pd":
		// Pd moves with the tested SNR (up to about 0.3 per dB near 0.9
		// behind a CFAR): the SNR's tolerance, 0.1 dB, times that slope.
		if class == "minimax" {
			return tol{}, false
		}
		return tol{0.03, 0}, true
	}
	return tol{}, false
}

// bandLossTol is the tolerance of band_loss_db, dB (README.md).
const bandLossTol = 0.3

type worst struct {
	field string
	diff  float64 // |got − want| − allowed, or +Inf for a mismatch of kind
	got   string
	want  string
	cases int // cases beyond tolerance
	name  string
}

// readKnownDiffs reads a list of known differences (known.json,
// known_train.json) into a map keyed "case/field"; a missing file is an
// empty list.
func readKnownDiffs(t *testing.T, path string) map[string]string {
	t.Helper()
	known := map[string]string{}
	kd, err := os.ReadFile(path)
	if err != nil {
		return known
	}
	var list []knownDiff
	if err := json.Unmarshal(kd, &list); err != nil {
		t.Fatalf("parse %s: %v", path, err)
	}
	for _, k := range list {
		known[k.Case+"/"+k.Field] = k.Reason
	}
	return known
}

func TestDiffModel(t *testing.T) {
	data, err := os.ReadFile("../testdata/diffmodel/cases.json")
	if err != nil {
		t.Fatalf("read cases: %v", err)
	}
	var file diffFile
	if err := json.Unmarshal(data, &file); err != nil {
		t.Fatalf("parse cases: %v", err)
	}
	if len(file.Cases) < 500 {
		t.Fatalf("%d cases; gen.py writes at least 500", len(file.Cases))
	}
	known := readKnownDiffs(t, "../testdata/diffmodel/known.json")
	// DIFF_DUMP=FILE writes the engine's reports (one JSON object per
	// case, keyed by name) for study next to the model's expectations.
	dump := map[string]json.RawMessage{}
	seenKnown := map[string]bool{}
	// DIFF_KNOWN_WRITE=FILE writes every difference beyond tolerance (case,
	// field, engine, model) for known.py, which turns it into known.json.
	var current []map[string]string
	worstOf := map[string]*worst{}
	var failures []string
	checked := 0
	record := func(name, field, got, want string, excess float64) {
		key := name + "/" + strings.SplitN(field, ".", 2)[len(strings.SplitN(field, ".", 2))-1]
		base := field
		if i := strings.LastIndex(field, "."); i >= 0 {
			base = field[i+1:]
		}
		w := worstOf[base]
		if w == nil {
			w = &worst{field: base}
			worstOf[base] = w
		}
		w.cases++
		if excess > w.diff || w.name == "" {
			w.diff, w.got, w.want, w.name = excess, got, want, name+" "+field
		}
		current = append(current, map[string]string{"case": name, "field": field, "engine": got, "model": want})
		if _, ok := known[name+"/"+field]; ok {
			seenKnown[name+"/"+field] = true
			return
		}
		_ = key
		failures = append(failures, fmt.Sprintf("%s %s: got %s, model %s", name, field, got, want))
	}
	for _, c := range file.Cases {
		var raw map[string]any
		if err := json.Unmarshal(c.Scenario, &raw); err != nil {
			t.Fatalf("case scenario: %v", err)
		}
		name := raw["name"].(string)
		s, err := scenarios.Decode(c.Scenario)
		if c.Expected.Error != "" {
			if err == nil {
				_, err = scenarios.Analyse(context.Background(), s)
			}
			if err == nil {
				record(name, "error", "accepted", c.Expected.Error, math.Inf(1))
			}
			continue
		}
		if err != nil {
			record(name, "decode", err.Error(), "valid", math.Inf(1))
			continue
		}
		rep, err := scenarios.Analyse(context.Background(), s)
		if err != nil {
			record(name, "analyse", err.Error(), "a report", math.Inf(1))
			continue
		}
		enc, err := json.Marshal(rep)
		if err != nil {
			record(name, "encode", err.Error(), "JSON", math.Inf(1))
			continue
		}
		dump[name] = enc
		var got struct {
			Waveform map[string]any   `json:"waveform"`
			Targets  []map[string]any `json:"targets"`
			Warnings []string         `json:"warnings"`
		}
		if err := json.Unmarshal(enc, &got); err != nil {
			t.Fatalf("%s: report JSON: %v", name, err)
		}
		class := waveClass(raw)
		bw := c.Expected.Waveform["bandwidth_hz"].(float64)
		bandScene := false
		compare := func(prefix string, want, have map[string]any, fields []string) {
			for _, f := range fields {
				wv, wok := want[f]
				hv, hok := have[f]
				path := prefix + f
				if !wok && !hok {
					continue
				}
				if wok != hok {
					record(name, path, show(hv, hok), show(wv, wok), math.Inf(1))
					continue
				}
				checked++
				switch wx := wv.(type) {
				case float64:
					hx, ok := hv.(float64)
					if !ok {
						record(name, path, show(hv, true), show(wv, true), math.Inf(1))
						continue
					}
					tl, cmp := tolerance(f, class, bw)
					if !cmp || f == "eclipsing_loss_db" && wx > 100 {
						continue
					}
					// Beyond 100 dB of eclipsing loss the peak left is
					// rounding: so is its SNR over snr_required_db.
					if el, _ := want["eclipsing_loss_db"].(float64); f == "margin_db" && el > 100 {
						continue
					}
					// Beyond 3 dB of Doppler loss the ambiguity cut of a
					// short pulse breaks into near-equal humps: where the
					// peak sits is ill-conditioned (README.md).
					if dl, _ := want["doppler_loss_db"].(float64); f == "range_shift_m" && dl > 3 {
						continue
					}
					allowed := tl.abs + tl.rel*math.Abs(wx)
					// An echo beyond the receiver band is heard through the
					// far tail of its spectrum, which both sides compute on
					// an internal grid (aliasing of a rect-edged spectrum):
					// its SNR, and every margin of a scene that holds one,
					// carry the band loss's tolerance too (README.md, S4).
					if _, ob := want["band_loss_db"]; f == "snr_db" && ob || (f == "margin_db" || f == "threshold_margin_db") && bandScene {
						allowed += bandLossTol
					}
					if d := math.Abs(hx - wx); d > allowed {
						record(name, path, show(hv, true), show(wv, true), d-allowed)
					}
				default:
					if fmt.Sprint(wv) != fmt.Sprint(hv) {
						record(name, path, show(hv, true), show(wv, true), math.Inf(1))
					}
				}
			}
		}
		compare("waveform.", c.Expected.Waveform, got.Waveform, []string{
			"kind", "pulse_width_s", "bandwidth_hz", "time_bandwidth", "compression_gain_db",
			"pslr_db", "islr_db", "mainlobe_3db_m", "mismatch_loss_db", "blind_range_m",
			"unambiguous_range_m", "unambiguous_velocity_mps", "straddle_loss_max_db",
			"straddle_loss_mean_db",
		})
		if len(got.Targets) != len(c.Expected.Targets) {
			record(name, "targets", fmt.Sprint(len(got.Targets)), fmt.Sprint(len(c.Expected.Targets)), math.Inf(1))
			continue
		}
		for i, want := range c.Expected.Targets {
			if i == 0 {
				bandScene = false
				for _, w := range c.Expected.Targets {
					if _, ob := w["band_loss_db"]; ob {
						bandScene = true
					}
				}
			}
			have := got.Targets[i]
			prefix := fmt.Sprintf("targets[%d].", i)
			compare(prefix, want, have, []string{
				"id", "range_m", "snr_db", "doppler_hz", "doppler_loss_db", "range_shift_m",
				"eclipsing_loss_db", "band_loss_db", "status", "masked_by", "margin_db",
				"threshold_margin_db", "decided_on", "pd", "snr_required_db",
			})
			// The reason is free text: it must be there, say nothing
			// infinite, and name the loss that the fields state.
			reason, _ := have["reason"].(string)
			switch {
			case reason == "":
				record(name, prefix+"reason", "empty", "a sentence", math.Inf(1))
			case strings.Contains(reason, "Inf") || strings.Contains(reason, "NaN"):
				record(name, prefix+"reason", reason, "finite numbers", math.Inf(1))
			case want["eclipsing_loss_db"] != nil && want["status"] != "out_of_window" && want["status"] != "folded" && !strings.Contains(strings.ToLower(reason), "eclips"):
				record(name, prefix+"reason", reason, "names the eclipsing loss", math.Inf(1))
			case want["status"] == "masked" && want["masked_by"] == want["id"] && !strings.Contains(strings.ToLower(reason), "own"):
				record(name, prefix+"reason", reason, "says it masks itself (its own sidelobes)", math.Inf(1))
			}
		}
	}
	if path := os.Getenv("DIFF_KNOWN_WRITE"); path != "" {
		b, err := json.MarshalIndent(current, "", " ")
		if err == nil {
			err = os.WriteFile(path, b, 0o644)
		}
		if err != nil {
			t.Errorf("DIFF_KNOWN_WRITE: %v", err)
		}
	}
	if path := os.Getenv("DIFF_DUMP"); path != "" {
		b, err := json.Marshal(dump)
		if err == nil {
			err = os.WriteFile(path, b, 0o644)
		}
		if err != nil {
			t.Errorf("DIFF_DUMP: %v", err)
		}
	}
	// Summary: the worst difference beyond tolerance per field.
	var ws []*worst
	for _, w := range worstOf {
		ws = append(ws, w)
	}
	sort.Slice(ws, func(i, j int) bool { return ws[i].field < ws[j].field })
	t.Logf("differential test: %d cases, %d field comparisons; model from numpy %s, scipy %s", len(file.Cases), checked, file.Numpy, file.Scipy)
	if len(ws) == 0 {
		t.Logf("every field within tolerance")
	}
	t.Logf("%d differences beyond tolerance: %d known (testdata/diffmodel/known.json), %d new", len(current), len(seenKnown), len(failures))
	for _, w := range ws {
		t.Logf("%-24s %4d cases beyond tolerance; worst %s: engine %s, model %s (excess %.3g)", w.field, w.cases, w.name, w.got, w.want, w.diff)
	}
	var gone []string
	for k := range known {
		if !seenKnown[k] {
			gone = append(gone, k)
		}
	}
	if len(gone) > 0 {
		sort.Strings(gone)
		t.Errorf("%d known differences are gone (first: %s): rebuild testdata/diffmodel/known.json with known.py", len(gone), gone[0])
	}
	if len(failures) > 0 {
		max := 40
		if len(failures) < max {
			max = len(failures)
		}
		t.Errorf("%d differences beyond tolerance; first %d:\n%s", len(failures), max, strings.Join(failures[:max], "\n"))
	}
}

func show(v any, ok bool) string {
	if !ok {
		return "absent"
	}
	if f, isF := v.(float64); isF {
		return fmt.Sprintf("%.6g", f)
	}
	return fmt.Sprint(v)
}
