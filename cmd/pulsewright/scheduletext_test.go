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
