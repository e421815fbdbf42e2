package server

import (
	"context"
	"encoding/json"
	"io/fs"
	"math"
	"strconv"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/scenarios"
	"github.com/pulsewright/pulsewright/web"
)

func TestDecimateKeepsPeaks(t *testing.T) {
	const n = 100000
	g := grid{x0: 1000, dx: 0.5, n: n}
	y := make([]float64, n)
	for k := range y {
		y[k] = math.Sin(float64(k) / 50)
	}
	y[31337], y[77777] = 99, -99 // lone spikes must survive
	get := func(k int) float64 { return y[k] }

	whole := decimate(g, get, plan(g, nil, 500))
	if pts := len(whole) / 2; pts > 2*500+2 || pts < 500 {
		t.Errorf("whole window: %d points for 500 px, want about 1000", pts)
	}
	has := func(p points, x, v float64) bool {
		for i := 0; i < len(p); i += 2 {
			if p[i] == x && p[i+1] == v {
				return true
			}
		}
		return false
	}
	if !has(whole, g.x(31337), 99) || !has(whole, g.x(77777), -99) {
		t.Error("a spike was lost")
	}
	for i := 2; i < len(whole); i += 2 {
		if whole[i] <= whole[i-2] {
			t.Fatalf("x not increasing at point %d", i/2)
		}
	}

	// Zoomed to 600 samples on 500 px: every sample inside, in order.
	view := [2]float64{g.x(40000), g.x(40599)}
	zoom := decimate(g, get, plan(g, &view, 500))
	inside := 0
	for i := 0; i < len(zoom); i += 2 {
		if zoom[i] >= view[0] && zoom[i] <= view[1] {
			inside++
		}
	}
	if inside != 600 {
		t.Errorf("zoom: %d points inside, want all 600 samples", inside)
	}
	if len(zoom)/2 > 600+2*500+4 {
		t.Errorf("zoom: %d points in all", len(zoom)/2)
	}
	// Tiny inputs pass through.
	small := decimate(grid{n: 3, dx: 1}, get, plan(grid{n: 3, dx: 1}, nil, 500))
	if len(small) != 6 {
		t.Errorf("3 samples gave %d values", len(small))
	}
}

func TestPointsJSON(t *testing.T) {
	p := points{1.234567, -0.000123456789, 150000.125, clampDB(math.Inf(-1)), -3, 1234567.8949, 0.5, -0.05, 1e-9, 12}
	if got, want := string(p.appendJSON(nil, dbDecimals)), `[[1.23,0],[150000.13,-150],[-3,1234567.89],[0.5,-0.05],[0,12]]`; got != want {
		t.Errorf("dB: got %s, want %s", got, want)
	}
	if got, want := string(p.appendJSON(nil, ampDecimals)), `[[1.23,0],[150000.13,-150],[-3,1234567.895],[0.5,-0.05],[0,12]]`; got != want {
		t.Errorf("amplitude: got %s, want %s", got, want)
	}
	// Against strconv on many values: the same number to the last place.
	for k := range 20000 {
		v := (float64(k) - 10000) * 1.2345678
		got := string(appendFixed(nil, v, 3))
		want := strconv.FormatFloat(math.Round(v*1000)/1000, 'f', -1, 64)
		if got != want && !(want == "-0" && got == "0") {
			t.Fatalf("appendFixed(%v, 3) = %s, strconv gives %s", v, got, want)
		}
	}
	var back [][2]float64
	if err := json.Unmarshal(p.appendJSON(nil, ampDecimals), &back); err != nil || len(back) != 5 {
		t.Errorf("not JSON: %v", err)
	}
}

func TestChartOptions(t *testing.T) {
	d, err := scenarios.LoadDemo("rocky-coast")
	if err != nil {
		t.Fatal(err)
	}
	res := plausibleResult(d.Scenario)
	res.Series.NoiseDB = math.NaN() // the server must not pass a NaN on
	ref := plausibleResult(d.Scenario)
	outs := buildCharts(res, ref, view{width: 800})
	for _, c := range outs {
		data := c.option
		if !json.Valid(data) {
			t.Fatalf("%s: option is not JSON: %.300s", c.name, data)
		}
		merge := c.appendMerge(nil)
		if !json.Valid(merge) {
			t.Fatalf("%s: merge is not JSON: %.300s", c.name, merge)
		}
		s := string(data)
		// No functions to eval (the page runs under a strict CSP), no NaN.
		for _, bad := range []string{"function", "__f__", "NaN", "Infinity", "null,"} {
			if strings.Contains(s, bad) {
				t.Errorf("%s option holds %q", c.name, bad)
			}
		}
		var opt struct {
			Series []struct {
				ID       string          `json:"id"`
				Type     string          `json:"type"`
				Sampling string          `json:"sampling"`
				Data     json.RawMessage `json:"data"`
			} `json:"series"`
			YAxis []map[string]any `json:"yAxis"`
		}
		if err := json.Unmarshal(data, &opt); err != nil {
			t.Fatal(err)
		}
		for _, se := range opt.Series {
			if se.ID == "" || len(se.Data) < 2 {
				t.Errorf("%s: series %+v without id or data", c.name, se.ID)
			}
			if se.Sampling != "" {
				t.Errorf("%s/%s: sampling %q; the server decimates already", c.name, se.ID, se.Sampling)
			}
		}
		if c.name == ChartResponse {
			if max, ok := opt.YAxis[0]["max"]; !ok || max != 0.0 {
				t.Errorf("response y axis max %v (a zero dropped by omitempty?)", opt.YAxis[0])
			}
		}
		if c.name == ChartProfile {
			ids := []string{}
			for _, se := range opt.Series {
				ids = append(ids, se.ID)
			}
			if got := strings.Join(ids, ","); got != "profile,clean,threshold,noise,reference,masking,markers" {
				t.Errorf("profile series %s", got)
			}
			var marks []marker
			json.Unmarshal(opt.Series[len(opt.Series)-1].Data, &marks)
			if len(marks) != 3 || marks[0].ID != "patrol-boat" || marks[0].Status == "" || marks[0].Reason == "" || marks[0].ItemStyle["color"] == "" {
				t.Errorf("markers %+v", marks)
			}
		}
	}
}

func TestAmbiguityOption(t *testing.T) {
	d, _ := scenarios.LoadDemo("harbour-skiff")
	a, err := scenarios.Ambiguity(context.Background(), d.Scenario, ambiguityCols, ambiguityRows)
	if err != nil {
		t.Fatal(err)
	}
	c := ambiguityChart(a, 7)
	var opt struct {
		VisualMap []map[string]any `json:"visualMap"`
		Series    []struct {
			ID   string       `json:"id"`
			Type string       `json:"type"`
			Data [][3]float64 `json:"data"`
		} `json:"series"`
		XAxis []struct {
			Data []float64 `json:"data"`
		} `json:"xAxis"`
	}
	if err := json.Unmarshal(c.option, &opt); err != nil {
		t.Fatalf("%v: %.300s", err, c.option)
	}
	if vm := opt.VisualMap[0]; vm["max"] != 0.0 || vm["min"] != ambiguityFloorDB {
		t.Errorf("visual map bounds %v %v (a 0 dropped by omitempty?)", vm["min"], vm["max"])
	}
	if !c.static || c.key != "ambiguity/7" || len(opt.Series) != 1 || opt.Series[0].Type != "heatmap" || len(opt.XAxis[0].Data) != len(a.DelayM) {
		t.Fatalf("chart %s %v: %+v", c.key, c.static, opt.XAxis)
	}
	peak := 0
	for _, cell := range opt.Series[0].Data {
		if cell[2] <= ambiguityFloorDB || cell[2] > 0 {
			t.Fatalf("cell %v outside (floor, 0]", cell)
		}
		if cell[2] == 0 && int(cell[0]) == len(a.DelayM)/2 && int(cell[1]) == len(a.DopplerHz)/2 {
			peak++
		}
	}
	if peak != 1 {
		t.Error("the peak is not at zero delay and zero Doppler") // |χ(0,0)| is the maximum of any ambiguity function
	}
}

func BenchmarkFrame(b *testing.B) {
	d, _ := scenarios.LoadDemo("long-pulse-blind")
	res := plausibleResult(d.Scenario)
	b.ReportAllocs()
	for b.Loop() {
		f := &frame{id: 1, report: []byte("{}"), link: []byte(`"/#s="`), charts: buildCharts(res, nil, view{width: 1200})}
		f.encode(map[string]string{})
	}
}

func BenchmarkFakeEval(b *testing.B) {
	d, _ := scenarios.LoadDemo("long-pulse-blind")
	for b.Loop() {
		plausibleResult(d.Scenario)
	}
}

// TestFoldedMarker: the long-pulse-blind demo's airliner at 210 km lies
// beyond the 149.9 km unambiguous range; its echo folds to an apparent
// 60.1 km, inside the window. Its marker is drawn there (not clamped at the
// window's edge), with the folded status's own shape and colour.
func TestFoldedMarker(t *testing.T) {
	d, err := scenarios.LoadDemo("long-pulse-blind")
	if err != nil {
		t.Fatal(err)
	}
	res, err := scenarios.Evaluate(context.Background(), d.Scenario)
	if err != nil {
		t.Fatal(err)
	}
	lo := res.Series.RangeM0
	hi := lo + float64(len(res.Series.ProfileDB)-1)*res.Series.RangeStepM
	for _, m := range markers(res, lo, hi) {
		if m.ID != "airliner-far" {
			continue
		}
		ru := res.Report.Waveform.UnambiguousRangeM
		want := 210000 - ru
		if m.Status != scenarios.StatusFolded || math.Abs(m.Value[0]-want) > 1 || m.Value[0] <= lo || m.Value[0] >= hi {
			t.Errorf("folded airliner: %s at %.0f m, want folded at %.0f m (window %.0f–%.0f m)", m.Status, m.Value[0], want, lo, hi)
		}
		if m.Symbol != statusStyle[scenarios.StatusFolded].symbol || m.Symbol == statusStyle[scenarios.StatusOutOfWindow].symbol {
			t.Errorf("folded airliner drawn as %q", m.Symbol)
		}
		return
	}
	t.Fatal("no marker for airliner-far")
}

// TestStatusMarksMatchPage: every status of the report has one colour and
// marker shape on the plots (statusStyle), and the page's stylesheet gives
// its cards and dots the same colour (--st-STATUS) and a dot rule.
func TestStatusMarksMatchPage(t *testing.T) {
	// Every stylesheet of the page: a status added by a feature keeps its
	// rules in that feature's own file (clutter.css).
	sheets, err := fs.Glob(web.FS(), "css/*.css")
	if err != nil || len(sheets) == 0 {
		t.Fatalf("stylesheets: %v %v", sheets, err)
	}
	var css []byte
	for _, name := range sheets {
		b, err := fs.ReadFile(web.FS(), name)
		if err != nil {
			t.Fatal(err)
		}
		css = append(css, b...)
	}
	shapes := map[string]string{}
	for _, st := range scenarios.Statuses {
		s, ok := statusStyle[st]
		if !ok {
			t.Errorf("status %s has no plot style", st)
			continue
		}
		if other, dup := shapes[s.symbol]; dup {
			t.Errorf("statuses %s and %s share the marker %q", st, other, s.symbol)
		}
		shapes[s.symbol] = st
		if !strings.Contains(string(css), "--st-"+st+": "+s.colour+";") {
			t.Errorf("no stylesheet sets --st-%s: %s; (the plot's colour)", st, s.colour)
		}
		if !strings.Contains(string(css), ".dot.st-"+st+" ") {
			t.Errorf("no stylesheet has a dot for %s", st)
		}
	}
}
