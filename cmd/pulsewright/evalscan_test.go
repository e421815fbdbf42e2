package main

import (
	"bytes"
	"context"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/scenarios"
)

// TestReportTextShowsScan: with radar.scan the text report gives the hits
// per scan (2°/(250°/s)/1 ms = 8), the CPI's loss, the beam-shape losses
// and each target's scan loss on its map.
func TestReportTextShowsScan(t *testing.T) {
	s, err := scenarios.Decode([]byte(`{"version": 2, "name": "scan",
 "radar": {"pulses": 16, "pri_s": 1e-3, "beamwidth_az_deg": 2, "window_start_m": 2000, "window_stop_m": 12000, "scan": {"rate_deg_s": 250}},
 "waveform": {"kind": "lfm", "pulse_width_s": 1e-5, "bandwidth_hz": 1e6},
 "targets": [{"id": "jet", "kind": "point", "range_m": 8000, "rcs_dbsm": 0}]}`))
	if err != nil {
		t.Fatal(err)
	}
	res, err := scenarios.Evaluate(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := writeReportText(&b, &res.Report); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	for _, want := range []string{"scan: 8.0 hits per scan (gaussian beam scanning in azimuth, dwell 8 ms, one turn 1.44 s)", "spans 2.00 beamwidths and loses 2.26 dB centred on the target (16.66 dB half a CPI off), longer than the dwell", "beam-shape loss", "scan loss on the map: jet 2.26 dB"} {
		if !strings.Contains(out, want) {
			t.Errorf("text report lacks %q:\n%s", want, out)
		}
	}
}
