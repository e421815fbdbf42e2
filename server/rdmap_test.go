package server

import (
	"context"
	"encoding/json"
	"math"
	"testing"

	"github.com/pulsewright/pulsewright/scenarios"
)

// mustTrain evaluates the pulse-train demo.
func mustTrain(t *testing.T) *scenarios.Result {
	t.Helper()
	d, err := scenarios.LoadDemo("hill-clutter-doppler")
	if err != nil {
		t.Fatal(err)
	}
	res, err := scenarios.Evaluate(context.Background(), d.Scenario)
	if err != nil {
		t.Fatal(err)
	}
	if res.Series.RangeDoppler == nil {
		t.Fatal("the pulse-train demo has no range–Doppler map")
	}
	return res
}

// heatOpt is the part of a heat map option the tests read.
type heatOpt struct {
	VisualMap []map[string]any `json:"visualMap"`
	XAxis     []map[string]any `json:"xAxis"`
	YAxis     []map[string]any `json:"yAxis"`
	Series    []struct {
		ID   string          `json:"id"`
		Type string          `json:"type"`
		Data json.RawMessage `json:"data"`
	} `json:"series"`
}

func decodeHeat(t *testing.T, c chartOut) (heatOpt, [][3]float64) {
	t.Helper()
	var o heatOpt
	if err := json.Unmarshal(c.option, &o); err != nil {
		t.Fatalf("%s: %v: %.300s", c.name, err, c.option)
	}
	var cells [][3]float64
	if err := json.Unmarshal(o.Series[0].Data, &cells); err != nil {
		t.Fatal(err)
	}
	return o, cells
}

func TestRDMapChart(t *testing.T) {
	res := mustTrain(t)
	rd := res.Series.RangeDoppler
	nb, n := len(rd.DB), len(rd.DB[0])
	// The demo's map tops out under 80 dB: its colours start at 0 dB,
	// which omitempty would drop.
	plain, _ := rdmapChart(res, view{width: 1200, mapWidth: 800})
	o, cells := decodeHeat(t, plain)
	t.Logf("map: %d cells, option %d bytes", len(cells), len(plain.option))
	if o.VisualMap[0]["min"] != 0.0 || o.VisualMap[0]["max"] == nil {
		t.Errorf("visual map %v…%v dB, want 0…top (a 0 dropped by omitempty?)", o.VisualMap[0]["min"], o.VisualMap[0]["max"])
	}
	// A lone spike anywhere must survive the reduction (max-hold).
	spikeBin, spikeK := nb/3, n/2+7
	rd.DB[spikeBin][spikeK] = 222
	c, ok := rdmapChart(res, view{width: 1200, mapWidth: 800})
	if !ok {
		t.Fatal("no map chart")
	}
	o, cells = decodeHeat(t, c)
	if len(cells) > rdMaxCells || len(cells) == 0 {
		t.Fatalf("%d cells, want 1…%d", len(cells), rdMaxCells)
	}
	if vm := o.VisualMap[0]; vm["min"] != 150.0 || vm["max"] != 230.0 {
		t.Errorf("visual map %v…%v dB, want 150…230", vm["min"], vm["max"])
	}
	top := 0.0
	for _, cell := range cells {
		top = math.Max(top, cell[2])
	}
	if top != 222 {
		t.Errorf("largest cell %g dB, want the 222 dB spike", top)
	}
	// Category axes hidden; value axes over the cells' outer edges.
	if o.XAxis[0]["show"] != false || o.XAxis[1]["type"] != "value" || o.YAxis[1]["name"] != "range rate (m/s)" {
		t.Errorf("axes %v / %v", o.XAxis, o.YAxis)
	}
	step := res.Series.RangeStepM
	if x0 := o.XAxis[1]["min"].(float64); math.Abs(x0-(res.Series.RangeM0-step/2)) > 1e-6 {
		t.Errorf("x axis starts at %g m, want %g", x0, res.Series.RangeM0-step/2)
	}
	cols := len(o.XAxis[0]["data"].([]any))
	if cols != 400 {
		t.Errorf("%d columns for an 800 px plot, want 400", cols)
	}

	// Markers at the apparent range and range rate of the report.
	var marks []rdMarker
	if err := json.Unmarshal(o.Series[1].Data, &marks); err != nil || o.Series[1].ID != SeriesMarkers {
		t.Fatalf("markers %s: %v", o.Series[1].ID, err)
	}
	if len(marks) != len(res.Report.Targets) {
		t.Fatalf("%d markers for %d targets", len(marks), len(res.Report.Targets))
	}
	for i, m := range marks {
		tr := res.Report.Targets[i]
		if m.ID != tr.ID || m.Name != tr.ID || m.Status != tr.Status || m.Value[1] != *tr.ApparentRangeRateMPS {
			t.Errorf("marker %+v for target %s (%s, %g m/s)", m, tr.ID, tr.Status, *tr.ApparentRangeRateMPS)
		}
		if tr.ID != "ridge" && math.Abs(m.Value[0]-(tr.RangeM+tr.RangeShiftM)) > 1e-9 {
			t.Errorf("%s at %g m, want %g", m.ID, m.Value[0], tr.RangeM+tr.RangeShiftM)
		}
	}

	// Zoomed to 100 cells: every cell has a column.
	lo := res.Series.RangeM0 + 200*step
	z, _ := rdmapChart(res, view{width: 1200, mapWidth: 800, rangeM: &[2]float64{lo, lo + 99*step}})
	oz, _ := decodeHeat(t, z)
	if cols := len(oz.XAxis[0]["data"].([]any)); cols != 100 {
		t.Errorf("zoom over 100 cells: %d columns", cols)
	}
	if z.key == c.key {
		t.Error("the zoomed map has the same structure key")
	}
}

func TestRDCutsChart(t *testing.T) {
	res := mustTrain(t)
	var heli scenarios.TargetReport
	for _, tr := range res.Report.Targets {
		if tr.ID == "helicopter" {
			heli = tr
		}
	}
	if heli.Status != scenarios.StatusDetected {
		t.Fatalf("helicopter %s: %s", heli.Status, heli.Reason)
	}
	if _, ok := rdCutsChart(res, view{width: 800}); ok {
		t.Error("cuts without a selected cell")
	}
	// A click near the helicopter snaps to its peak.
	vw := view{width: 800, cell: &cell{rangeM: heli.RangeM + 10, rateMPS: *heli.ApparentRangeRateMPS + 0.5}}
	c, ok := rdCutsChart(res, vw)
	if !ok {
		t.Fatal("no cuts")
	}
	var o struct {
		Title  []struct{ Text string } `json:"title"`
		XAxis  []map[string]any        `json:"xAxis"`
		Series []struct {
			ID         string       `json:"id"`
			XAxisIndex int          `json:"xAxisIndex"`
			Data       [][2]float64 `json:"data"`
		} `json:"series"`
	}
	if err := json.Unmarshal(c.option, &o); err != nil {
		t.Fatal(err)
	}
	if len(o.Series) != 4 || o.Series[2].ID != SeriesDopplerCut || o.Series[2].XAxisIndex != 1 || len(o.Title) != 2 {
		t.Fatalf("cuts chart: %d series, titles %v", len(o.Series), o.Title)
	}
	peak := func(d [][2]float64) [2]float64 {
		best := d[0]
		for _, p := range d {
			if p[1] > best[1] {
				best = p
			}
		}
		return best
	}
	// The Doppler cut through the helicopter's range peaks at its range
	// rate, within a bin; the range cut through its bin at its range,
	// within a resolution cell.
	vres := *res.Report.Waveform.VelocityResolutionMPS
	if p := peak(o.Series[3].Data); math.Abs(p[0]-*heli.ApparentRangeRateMPS) > vres {
		t.Errorf("noise-free Doppler cut peaks at %g m/s, want %g ± %g", p[0], *heli.ApparentRangeRateMPS, vres)
	}
	if p := peak(o.Series[1].Data); math.Abs(p[0]-heli.RangeM) > res.Report.Waveform.Mainlobe3dBM {
		t.Errorf("noise-free range cut peaks at %g m, want %g", p[0], heli.RangeM)
	}
	// Zoomed, the range cut spans the zoom only, every sample.
	zoom := [2]float64{heli.RangeM - 150, heli.RangeM + 150}
	vz := vw
	vz.rangeM = &zoom
	cz, _ := rdCutsChart(res, vz)
	var oz struct {
		Series []struct {
			Data [][2]float64 `json:"data"`
		} `json:"series"`
	}
	if err := json.Unmarshal(cz.option, &oz); err != nil {
		t.Fatal(err)
	}
	step := res.Series.RangeStepM
	rc := oz.Series[0].Data
	if first, last := rc[0][0], rc[len(rc)-1][0]; first < zoom[0]-step || last > zoom[1]+step || math.Abs(rc[1][0]-rc[0][0]-step) > 0.01 {
		t.Errorf("zoomed range cut over %g…%g m in steps of %g m, want %g…%g m in steps of %g m", first, last, rc[1][0]-rc[0][0], zoom[0], zoom[1], step)
	}

	// The map marks the selected cell.
	m, _ := rdmapChart(res, vw)
	om, _ := decodeHeat(t, m)
	if last := om.Series[len(om.Series)-1]; last.ID != SeriesCell {
		t.Errorf("last map series %q, want the selected cell", last.ID)
	}
}

func TestApplyCell(t *testing.T) {
	st, stale, err := apply(want{}, []byte(`{"type":"cell","id":3,"cell":{"range_m":7100,"range_rate_mps":-25}}`))
	if err != nil || stale || st.view.cell == nil || *st.view.cell != (cell{7100, -25}) {
		t.Fatalf("cell: %+v stale %v err %v", st.view.cell, stale, err)
	}
	st, _, err = apply(st, []byte(`{"type":"cell","id":4,"cell":null}`))
	if err != nil || st.view.cell != nil {
		t.Errorf("cell null: %+v %v", st.view.cell, err)
	}
}
