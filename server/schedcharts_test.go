package server

import (
	"context"
	"encoding/json"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/scenarios"
)

// TestScheduleCharts: the hill demo's 3-CPI schedule gives a blind-zones
// map whose cells count the CPIs that see them (0 … 3, the fully seen
// cells left to the background) with a marker per point target at its
// true range (km) and range rate, and one range–Doppler map per CPI; a
// scene without a schedule gives none.
func TestScheduleCharts(t *testing.T) {
	d, err := scenarios.LoadDemo("hill-clutter-doppler")
	if err != nil {
		t.Fatal(err)
	}
	res, err := scenarios.Evaluate(context.Background(), d.Scenario)
	if err != nil {
		t.Fatal(err)
	}
	// Without the CPI maps tab: the blind-zones map alone.
	if cs := scheduleCharts(d.Scenario, res, view{width: 900, mapWidth: 300}); len(cs) != 1 || cs[0].name != ChartBlindZones {
		t.Errorf("without cpi_maps: %d charts, want the blind-zones map alone", len(cs))
	}
	if err := scenarios.ScheduleMaps(context.Background(), d.Scenario, res); err != nil {
		t.Fatal(err)
	}
	cs := scheduleCharts(d.Scenario, res, view{width: 900, mapWidth: 300, cpiMaps: true})
	names := map[string]chartOut{}
	for _, c := range cs {
		names[c.name] = c
	}
	for _, want := range []string{ChartBlindZones, "cpimap1", "cpimap2", "cpimap3"} {
		if _, ok := names[want]; !ok {
			t.Errorf("no chart %q among %v", want, len(cs))
		}
	}
	var opt struct {
		Series []struct {
			ID   string            `json:"id"`
			Data []json.RawMessage `json:"data"`
		} `json:"series"`
		VisualMap []struct {
			Pieces []struct {
				Value int `json:"value"`
			} `json:"pieces"`
		} `json:"visualMap"`
	}
	if err := json.Unmarshal(names[ChartBlindZones].option, &opt); err != nil {
		t.Fatalf("blind-zones option: %v", err)
	}
	if len(opt.VisualMap) != 1 || len(opt.VisualMap[0].Pieces) != 4 {
		t.Errorf("legend %+v, want pieces 0 … 3", opt.VisualMap)
	}
	counts := map[int]int{}
	for _, raw := range opt.Series[0].Data {
		var cell [3]float64
		if err := json.Unmarshal(raw, &cell); err != nil {
			t.Fatalf("cell %s: %v", raw, err)
		}
		counts[int(cell[2])]++
	}
	// Zero Doppler is blind in every CPI; a CPI's own blind speeds in one.
	if counts[0] == 0 || counts[2] == 0 || counts[3] != 0 {
		t.Errorf("cells by CPIs seeing them %v: want some 0 and 2, no 3 (background)", counts)
	}
	var marks []bzMarker
	for _, raw := range opt.Series[1].Data {
		var m bzMarker
		if err := json.Unmarshal(raw, &m); err != nil {
			t.Fatal(err)
		}
		marks = append(marks, m)
	}
	if len(marks) != 3 || marks[1].ID != "jet" || !marks[1].Detected || marks[1].Value[0] != 7.65 || marks[1].Value[1] != -157.786 {
		t.Errorf("markers %+v, want helicopter, jet (detected 2/3, at 7.65 km, −157.786 m/s), car", marks)
	}
	// No schedule: no charts.
	d.Scenario.Radar.Schedule = nil
	res, err = scenarios.Evaluate(context.Background(), d.Scenario)
	if err != nil {
		t.Fatal(err)
	}
	if cs := scheduleCharts(d.Scenario, res, view{width: 900}); len(cs) != 0 {
		t.Errorf("%d schedule charts without a schedule", len(cs))
	}
}

// TestReportPageSchedule: the HTML report of the long-pulse demo has the
// schedule's table, the airliner seen at 60.11 km and 45.12 km (the gates
// nearest 60.10 and 45.11 km, moved by its range–Doppler shift) and
// unfolded to 210.00 km.
func TestReportPageSchedule(t *testing.T) {
	d, err := scenarios.LoadDemo("long-pulse-blind")
	if err != nil {
		t.Fatal(err)
	}
	res, err := scenarios.Evaluate(context.Background(), d.Scenario)
	if err != nil {
		t.Fatal(err)
	}
	var b strings.Builder
	if err := WriteReportPage(&b, d.Scenario, res, "/#s=x"); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"<h2>PRF schedule</h2>", "combined unambiguous range 1648.86 km", "<th>CPI 2 (1.1 ms × 1)</th>",
		"detected at 60.11 km", "detected at 45.12 km", `<td class="num">210.00</td>`} {
		if !strings.Contains(b.String(), want) {
			t.Errorf("report page lacks %q", want)
		}
	}
}
