package main

import (
	"bytes"
	"context"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/scenarios"
)

// TestReportTextShowsSchedule: the long-pulse demo's schedule (PRIs of 1.0
// and 1.1 ms) lists both CPIs, the combined unambiguous range c·11 ms/2 =
// 1648.86 km, and the airliner at 210 km seen at 60.11 km and 45.12 km
// (the gates nearest 60.10 and 45.11 km moved by its range–Doppler
// shift; Skolnik, Introduction to Radar Systems, 3rd ed., ch. 3) and
// unfolded to 210.00 km.
func TestReportTextShowsSchedule(t *testing.T) {
	d, err := scenarios.LoadDemo("long-pulse-blind")
	if err != nil {
		t.Fatal(err)
	}
	res, err := scenarios.Evaluate(context.Background(), d.Scenario)
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := writeReportText(&b, &res.Report); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	for _, want := range []string{
		"PRF schedule: 2 CPIs, 2-of-2, combined unambiguous range 1648.86 km",
		"CPI 2  PRI 1.1 ms",
		"detected @ 60.11 km", "detected @ 45.12 km",
		"airliner-far (schedule): 2 of 2 CPIs detect it, 2-of-2 detects it. Its range unfolds to 210.00 km",
		"drone (schedule): 0 of 2 CPIs detect it, 2-of-2 misses it (CPI 1 " + scenarios.StatusEclipsed + ", CPI 2 " + scenarios.StatusEclipsed + ")",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("text report lacks %q:\n%s", want, out)
		}
	}
}

// TestScheduleTextNamesCancellation: the schedule's text table and summary
// call a zero-Doppler target behind an MTI canceller cancelled, naming the
// canceller, as the report's reason does (docs/detection.md §6 step 3),
// not too_weak.
func TestScheduleTextNamesCancellation(t *testing.T) {
	doc := `{"version":2,"radar":{"peak_power_w":1000,"sample_rate_hz":4e7,"pri_s":1e-4,"pulses":32,"window_start_m":3000,"window_stop_m":9000,
		"schedule":{"cpis":[{"pri_s":1.2e-4}]}},
		"waveform":{"kind":"lfm","pulse_width_s":1e-5,"bandwidth_hz":1e7},
		"receiver":{"mti":"two_pulse","window":{"kind":"none"},"detector":{"kind":"fixed","pfa":1e-6}},
		"targets":[{"id":"still","kind":"point","range_m":6000,"rcs_dbsm":10}]}`
	s, err := scenarios.Decode([]byte(doc))
	if err != nil {
		t.Fatal(err)
	}
	r, err := scenarios.Analyse(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	if r.Schedule == nil {
		t.Fatal("no schedule report")
	}
	var b bytes.Buffer
	writeScheduleText(&b, r.Schedule, scenarios.SIUnits(), scenarios.Typed{})
	out := b.String()
	row := ""
	for _, l := range strings.Split(out, "\n") {
		if strings.HasPrefix(strings.TrimSpace(l), "still ") && !strings.Contains(l, "(schedule)") {
			row = l // the table's row, not the reason's line
		}
	}
	if strings.Count(row, "cancelled") != 2 || strings.Contains(row, "too_weak") {
		t.Errorf("table row %q: want both CPIs cancelled\n%s", row, out)
	}
	if !strings.Contains(out, "CPI 1 cancelled by the two-pulse MTI canceller, CPI 2 cancelled by the two-pulse MTI canceller") {
		t.Errorf("summary does not name the canceller:\n%s", out)
	}
}
