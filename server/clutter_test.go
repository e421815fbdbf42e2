package server

import (
	"context"
	"encoding/json"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/scenarios"
)

// rainDoc is a rain band under a fixed threshold: it breaks through.
const rainDoc = `{"version": 1, "radar": {"carrier_hz": 5.6e9, "peak_power_w": 2000, "antenna_gain_dbi": 34, "pri_s": 2e-4, "window_start_m": 3000, "window_stop_m": 14000},
 "waveform": {"kind": "lfm", "pulse_width_s": 1e-5, "bandwidth_hz": 2e6},
 "receiver": {"detector": {"kind": %s}},
 "targets": [{"id": "rain", "kind": "volume", "range_start_m": 8000, "range_stop_m": 10000, "reflectivity_dbz": 40}]}`

func rainProfile(t *testing.T, det string) (chartOut, map[string]any) {
	t.Helper()
	s, err := scenarios.Decode([]byte(strings.Replace(rainDoc, "%s", det, 1)))
	if err != nil {
		t.Fatal(err)
	}
	res, err := scenarios.Evaluate(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	c := profileChart(res, nil, view{width: 1000})
	var opt map[string]any
	if err := json.Unmarshal(c.option, &opt); err != nil {
		t.Fatal(err)
	}
	return c, opt
}

func TestBreakthroughShading(t *testing.T) {
	c, opt := rainProfile(t, `"fixed"`)
	var area map[string]any
	for _, s := range opt["series"].([]any) {
		if m := s.(map[string]any); m["id"] == SeriesBreakthrough {
			area, _ = m["markArea"].(map[string]any)
		}
	}
	if area == nil {
		t.Fatal("no breakthrough mark area under a fixed threshold")
	}
	data := area["data"].([]any)
	first := data[0].([]any)
	from, to := first[0].(map[string]any), first[1].(map[string]any)
	if from["name"] != "rain: false alarms" || from["xAxis"].(float64) < 8000-1500 || to["xAxis"].(float64) > 10000+1500 {
		t.Errorf("first span %v – %v, want a labelled span within the rain and a pulse length (1.5 km)", from, to)
	}
	if !strings.Contains(c.key, "+bt") {
		t.Errorf("chart key %q does not carry the spans", c.key)
	}
	// A CA-CFAR holds the rain: no shading, and the key says so.
	c, opt = rainProfile(t, `"ca_cfar", "training_cells": 32`)
	for _, s := range opt["series"].([]any) {
		if s.(map[string]any)["id"] == SeriesBreakthrough {
			t.Error("breakthrough shading without breakthrough")
		}
	}
	if strings.Contains(c.key, "+bt") {
		t.Errorf("key %q", c.key)
	}
}
