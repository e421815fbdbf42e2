package scenarios_test

// The clutter part of the differential test: single-pulse scenes with
// extended and volume targets against testdata/diffmodel/clutter.py
// (roles, clutter statuses, breakthrough, CNR, SCR, σ⁰ surfaces, the
// false-alarm rate), committed as testdata/diffmodel/clutter.json by
// gen.py. Tolerances are explained in testdata/diffmodel/README.md.

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/scenarios"
)

type clutterCase struct {
	Scenario json.RawMessage `json:"scenario"`
	Expected struct {
		Targets     []map[string]any `json:"targets"`
		FalseAlarms map[string]any   `json:"false_alarms"`
		Clutter     map[string]any   `json:"clutter"`
	} `json:"expected"`
}

// clutterTol is the tolerance of a compared field: absolute plus relative.
var clutterTol = map[string]tol{
	"range_m":           {1e-6, 1e-9},
	"snr_db":            {0.03, 0},     // as snr_db of the main cases
	"cnr_db":            {0.03, 0},     // expected powers from sampled pulses and references
	"scr_db":            {0.03, 0},     // idem
	"cell_rcs_dbsm":     {1e-9, 0},     // closed form
	"sigma0_db":         {1e-9, 0},     // closed form
	"grazing_deg":       {1e-9, 1e-12}, // closed form
	"pfa":               {0, 1e-12},
	"independent_cells": {0, 1e-6}, // Σ|ρ|² by FFT (engine) and direct correlation (model)
	"cells_per_s":       {0, 1e-6},
	"rate_per_s":        {0, 1e-6},
	"look_s":            {0, 1e-12},
	"cnr_peak_db":       {0.03, 0},
	"cnr_peak_range_m":  {1e-6, 1e-9},
}

func TestDiffModelClutter(t *testing.T) {
	data, err := os.ReadFile("../testdata/diffmodel/clutter.json")
	if err != nil {
		t.Fatalf("read cases: %v", err)
	}
	var file struct {
		Cases []clutterCase `json:"cases"`
	}
	if err := json.Unmarshal(data, &file); err != nil {
		t.Fatalf("parse cases: %v", err)
	}
	if len(file.Cases) < 40 {
		t.Fatalf("%d clutter cases; gen.py writes 48", len(file.Cases))
	}
	var fails []string
	checked, breaking := 0, 0
	fail := func(name, field string, got, want any) {
		fails = append(fails, fmt.Sprintf("%s %s: engine %v, model %v", name, field, got, want))
	}
	cmp := func(name, prefix string, want, have map[string]any, fields ...string) {
		for _, f := range fields {
			wv, wok := want[f]
			hv, hok := have[f]
			if wok != hok {
				fail(name, prefix+f, show(hv, hok), show(wv, wok))
				continue
			}
			if !wok {
				continue
			}
			checked++
			if wx, ok := wv.(float64); ok {
				hx, ok := hv.(float64)
				tl := clutterTol[f]
				if !ok || math.Abs(hx-wx) > tl.abs+tl.rel*math.Abs(wx) {
					fail(name, prefix+f, show(hv, true), show(wv, true))
				}
				continue
			}
			if fmt.Sprint(wv) != fmt.Sprint(hv) {
				fail(name, prefix+f, hv, wv)
			}
		}
	}
	for _, c := range file.Cases {
		var raw map[string]any
		json.Unmarshal(c.Scenario, &raw)
		name := raw["name"].(string)
		s, err := scenarios.Decode(c.Scenario)
		if err != nil {
			fail(name, "decode", err, "valid")
			continue
		}
		rep, err := scenarios.Analyse(context.Background(), s)
		if err != nil {
			fail(name, "analyse", err, "a report")
			continue
		}
		enc, _ := json.Marshal(rep)
		var got struct {
			Targets     []map[string]any `json:"targets"`
			FalseAlarms map[string]any   `json:"false_alarms"`
			Clutter     map[string]any   `json:"clutter"`
		}
		json.Unmarshal(enc, &got)
		if len(got.Targets) != len(c.Expected.Targets) {
			fail(name, "targets", len(got.Targets), len(c.Expected.Targets))
			continue
		}
		for i, want := range c.Expected.Targets {
			have := got.Targets[i]
			p := fmt.Sprintf("targets[%d].", i)
			// Point targets: the clutter figures only (their statuses are
			// the main cases' business).
			cmp(name, p, want, have, "id", "range_m", "cnr_db", "scr_db")
			if want["role"] == nil {
				continue
			}
			cmp(name, p, want, have, "snr_db", "role", "status", "cell_rcs_dbsm", "sigma0_db", "grazing_deg")
			wb, _ := want["breakthrough"].(map[string]any)
			hb, _ := have["breakthrough"].(map[string]any)
			if (wb == nil) != (hb == nil) {
				fail(name, p+"breakthrough", hb, wb)
				continue
			}
			if wb == nil {
				continue
			}
			checked++
			wc, hc := wb["cells"].(float64), hb["cells"].(float64)
			if wc > 0 {
				breaking++
			}
			// A gate whose scene power sits on the level within rounding
			// can go either way: one cell per span's end.
			ws, _ := wb["spans"].([]any)
			hs, _ := hb["spans"].([]any)
			if math.Abs(hc-wc) > float64(2*len(ws)) || (wc == 0) != (hc == 0) {
				fail(name, p+"breakthrough.cells", hc, wc)
			}
			if len(ws) != len(hs) {
				fail(name, p+"breakthrough.spans", len(hs), len(ws))
				continue
			}
			step := scenarios.C / (2 * s.Radar.SampleRateHz)
			for k := range ws {
				w, h := ws[k].(map[string]any), hs[k].(map[string]any)
				for _, f := range []string{"start_m", "stop_m"} {
					if math.Abs(w[f].(float64)-h[f].(float64)) > step+1e-6 {
						fail(name, fmt.Sprintf("%sbreakthrough.spans[%d].%s", p, k, f), h[f], w[f])
					}
				}
			}
			if r, _ := have["reason"].(string); hc > 0 && !strings.Contains(r, "false alarm") {
				fail(name, p+"reason", r, "calls the crossings false alarms")
			}
		}
		cmp(name, "false_alarms.", c.Expected.FalseAlarms, got.FalseAlarms, "pfa", "tested_cells", "independent_cells", "look_s", "cells_per_s", "rate_per_s")
		if (c.Expected.Clutter == nil) != (got.Clutter == nil) {
			fail(name, "clutter", got.Clutter, c.Expected.Clutter)
		} else if c.Expected.Clutter != nil {
			cmp(name, "clutter.", c.Expected.Clutter, got.Clutter, "cnr_peak_db", "cnr_peak_range_m")
			wc, hc := c.Expected.Clutter["breakthrough_cells"].(float64), got.Clutter["breakthrough_cells"].(float64)
			if math.Abs(hc-wc) > 2+0.02*wc {
				fail(name, "clutter.breakthrough_cells", hc, wc)
			}
		}
	}
	t.Logf("clutter differential test: %d cases, %d field comparisons, %d clutter objects breaking through", len(file.Cases), checked, breaking)
	if len(fails) > 0 {
		n := min(len(fails), 40)
		t.Errorf("%d differences beyond tolerance; first %d:\n%s", len(fails), n, strings.Join(fails[:n], "\n"))
	}
}
