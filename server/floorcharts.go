package server

import (
	"encoding/json"
	"fmt"
	"math"
	"strings"

	"github.com/go-echarts/go-echarts/v2/charts"
	"github.com/go-echarts/go-echarts/v2/opts"

	"github.com/pulsewright/pulsewright/scenarios"
)

// The Floors tab (web/static/js/floors.js): the dynamic-range view of one
// target (scenarios.Result.Floors, docs/detection.md §15), sent while the
// page shows the tab (a floors message) and left out of frames
// otherwise, so that it costs nothing then.

// ChartFloors is the chart's name in a frame.
const ChartFloors = "floors"

// floorsReq is what the page asked the Floors tab to show.
type floorsReq struct {
	target string // "": the strongest target
	row    string // pulse trains: the target whose map row to follow; "": the engine's choice
}

// floorStyle is each floor's colour, line and legend order.
var floorStyle = map[string]struct {
	colour string
	line   opts.LineStyle
}{
	scenarios.FloorResponse:  {colourProfile, opts.LineStyle{Width: 1.4}},
	scenarios.FloorUnclipped: {"#7fa7c9", opts.LineStyle{Width: 1, Type: "dashed"}},
	scenarios.FloorSkirt:     {"#d9822b", opts.LineStyle{Width: 1.4}},
	scenarios.FloorImage:     {"#8e44ad", opts.LineStyle{Width: 1.2}},
	scenarios.FloorQuantise:  {"#138a72", opts.LineStyle{Width: 1.4, Type: "dashed"}},
	scenarios.FloorDC:        {"#a0740b", opts.LineStyle{Width: 1.2, Type: "dashed"}},
	scenarios.FloorOthers:    {"#a9b3bd", opts.LineStyle{Width: 1}},
	scenarios.FloorOwn:       {"#6b5b95", opts.LineStyle{Width: 1}},
	scenarios.FloorThermal:   {colourNoise, opts.LineStyle{Width: 1.2, Type: "dotted"}},
	scenarios.FloorThreshold: {colourThreshold, opts.LineStyle{Width: 1.2, Type: "dashed"}},
}

// floorWords names a floor in a mark's legend entry and tooltip.
var floorWords = map[string]string{
	scenarios.FloorResponse:  "response (main lobe, range sidelobes)",
	scenarios.FloorSkirt:     "phase-noise skirt",
	scenarios.FloorImage:     "I/Q image",
	scenarios.FloorQuantise:  "ADC quantisation",
	scenarios.FloorDC:        "DC offset",
	scenarios.FloorOthers:    "rest of the scene",
	scenarios.FloorOwn:       "its own response",
	scenarios.FloorThermal:   "thermal noise",
	scenarios.FloorUnclipped: "unclipped response",
}

// floorsYMin is the bottom of the plot, dB re output noise: 20 dB under
// thermal noise, lower when the ADC's or the DC floor lies deeper (to
// −100 dB), in steps of 10 dB.
func floorsYMin(f *scenarios.Floors) float64 {
	lo := profileYMin
	for _, c := range f.Curves {
		if c.ID != scenarios.FloorQuantise && c.ID != scenarios.FloorDC {
			continue
		}
		m := math.Inf(1)
		for _, v := range c.DB {
			if v > -100 {
				m = math.Min(m, v)
			}
		}
		if !math.IsInf(m, 1) {
			lo = math.Min(lo, 10*math.Floor((m-10)/10))
		}
	}
	return math.Max(lo, -100)
}

// floorsChart plots the view asked for, or nothing (ok false) when the
// page did not ask, or the result cannot give it (its error is logged by
// the caller through the returned err).
func floorsChart(res *scenarios.Result, vw view) (chartOut, bool, error) {
	if vw.floors == nil {
		return chartOut{}, false, nil
	}
	f, err := res.Floors(vw.floors.target, vw.floors.row)
	if err != nil && vw.floors.target != "" {
		// The target may have just been renamed or removed: the strongest.
		f, err = res.Floors("", "")
	}
	if err != nil {
		return chartOut{}, false, err
	}
	n := 0
	if len(f.Curves) > 0 {
		n = len(f.Curves[0].DB)
	}
	g := grid{x0: f.RangeM0, dx: f.RangeStepM, n: n}
	near := floorsNear(f, g)
	detail := vw.rangeM
	if detail == nil {
		detail = near
	}
	sp := plan(g, detail, plotColumns(max(vw.width/2, minWidthPx)))
	yMin := floorsYMin(f)
	b := newBuilder("range (m)", "dB re output noise", yMin)
	key := fmt.Sprintf("floors/1/%s/%d/%g", f.Target, f.Row, yMin)
	for _, c := range f.Curves {
		st := floorStyle[c.ID]
		b.add("floor-"+c.ID, c.Name, st.colour, dbSeries(g, c.DB, sp), st.line)
		key += "/" + c.ID
	}
	// The other targets, one scatter series per floor that lies highest
	// at (or hides) them, coloured as that floor's curve.
	byFloor := map[string][]map[string]any{}
	var order []string
	for _, m := range f.Marks {
		if _, ok := byFloor[m.Floor]; !ok {
			order = append(order, m.Floor)
		}
		byFloor[m.Floor] = append(byFloor[m.Floor], markItem(m, f))
	}
	for _, id := range order {
		st := floorStyle[id]
		sid := "marks-" + id
		b.line.AddSeries("under "+floorWords[id], nil,
			charts.WithSeriesId(sid),
			charts.WithSeriesOpts(func(s *charts.SingleSeries) { s.Type = "scatter"; s.SymbolSize = 12 }),
			charts.WithItemStyleOpts(opts.ItemStyle{Color: st.colour}),
			charts.WithLabelOpts(markerLabel),
		)
		data, err := json.Marshal(byFloor[id])
		if err != nil {
			return chartOut{}, false, fmt.Errorf("floors marks: %w", err)
		}
		b.data = append(b.data, seriesData{id: sid, data: data})
		b.extra[sid] = seriesExtra{LabelLayout: map[string]any{"hideOverlap": true}, Z: 5}
		key += "/" + sid
	}
	// The level curves named at their right ends, inside the plot.
	for id, words := range map[string]string{scenarios.FloorThreshold: "threshold", scenarios.FloorThermal: "thermal noise",
		scenarios.FloorQuantise: "quantisation", scenarios.FloorDC: "DC offset"} {
		b.extra["floor-"+id] = seriesExtra{EndLabel: map[string]any{
			"show": true, "formatter": words, "color": floorStyle[id].colour, "fontSize": 11, "offset": []int{-8 - 6*len(words), -9}}}
	}
	b.line.SetGlobalOptions(charts.WithTitleOpts(opts.Title{Title: floorsTitle(f), Left: "64", Top: "0",
		TitleStyle: &opts.TextStyle{FontSize: 11, Color: "#25292e"}}),
		charts.WithLegendOpts(opts.Legend{Show: opts.Bool(true), Type: "scroll", Top: "20", Left: "64", Right: "8", ItemWidth: 18, ItemHeight: 10,
			TextStyle: &opts.TextStyle{FontSize: 11}}),
		charts.WithGridOpts(opts.Grid{Left: fmt.Sprint(gridLeft), Right: "18", Top: "50", Bottom: "62"}))
	out := b.buildZoomed(ChartFloors, key, near)
	return out, true, nil
}

// floorsNear is the span the plot opens on: where the selected target's
// own floors lie above thermal noise less 10 dB, widened by a tenth each
// side, with the other targets' marks on the shown row; nil (the whole
// window) when that is most of it.
func floorsNear(f *scenarios.Floors, g grid) *[2]float64 {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, c := range f.Curves {
		switch c.ID {
		case scenarios.FloorResponse, scenarios.FloorSkirt, scenarios.FloorImage, scenarios.FloorUnclipped:
		default:
			continue
		}
		for k, v := range c.DB {
			if v > -10 {
				lo, hi = math.Min(lo, g.x(k)), math.Max(hi, g.x(k))
			}
		}
	}
	if math.IsInf(lo, 1) {
		return nil
	}
	for _, m := range f.Marks {
		if m.OnRow && m.RangeM >= g.x0 {
			lo, hi = math.Min(lo, m.RangeM), math.Max(hi, m.RangeM)
		}
	}
	w := math.Max(hi-lo, 20*g.dx)
	lo, hi = math.Max(lo-w/10, g.x0), math.Min(hi+w/10, g.x(max(g.n-1, 0)))
	if hi-lo > 0.8*float64(g.n)*g.dx {
		return nil
	}
	return &[2]float64{round2(lo), round2(hi)}
}

// markItem is one mark's data item: its place, its status's symbol, its
// floor's colour (filled when that floor hides it, hollow otherwise;
// faint when it lies off the plotted map row) and a tooltip line.
func markItem(m scenarios.FloorMark, f *scenarios.Floors) map[string]any {
	st, ok := statusStyle[m.Status]
	if !ok {
		st = statusStyle[scenarios.StatusTooWeak]
	}
	colour := floorStyle[m.Floor].colour
	style := map[string]any{"color": colour, "borderColor": colour, "borderWidth": 1.5}
	symbol := strings.TrimPrefix(st.symbol, "empty")
	if !m.Hidden {
		style["color"] = "#ffffff"
		symbol = st.symbol
	}
	var tip string
	switch {
	case m.Hidden && m.Floor == scenarios.FloorThermal:
		tip = fmt.Sprintf("%s: %s, its peak %.1f dB is too weak for thermal noise", m.ID, statusWords(m.Status), m.PeakDB)
	case m.Hidden && m.Floor == scenarios.FloorOwn:
		tip = fmt.Sprintf("%s: %s by its own response, which fills the detector's training cells (its peak %.1f dB)", m.ID, statusWords(m.Status), m.PeakDB)
	case m.Hidden && m.Floor == scenarios.FloorOthers && m.Source != "":
		tip = fmt.Sprintf("%s: %s, hidden by %s (%.1f dB at its cell; its peak %.1f dB)", m.ID, statusWords(m.Status), m.Source, m.FloorDB, m.PeakDB)
	case m.Hidden && m.Floor == scenarios.FloorQuantise, m.Hidden && m.Floor == scenarios.FloorDC:
		tip = fmt.Sprintf("%s: %s, hidden by the %s (%.1f dB at its cell; its peak %.1f dB)", m.ID, statusWords(m.Status), floorWords[m.Floor], m.FloorDB, m.PeakDB)
	case m.Hidden:
		tip = fmt.Sprintf("%s: %s, hidden by %s's %s (%.1f dB at its cell; its peak %.1f dB)", m.ID, statusWords(m.Status), f.Target, floorWords[m.Floor], m.FloorDB, m.PeakDB)
	default:
		tip = fmt.Sprintf("%s: %s, its peak %.1f dB over the highest floor at its cell, %s at %.1f dB", m.ID, statusWords(m.Status), m.PeakDB, floorWords[m.Floor], m.FloorDB)
	}
	if f.Row >= 0 && !m.OnRow {
		tip += fmt.Sprintf(" — at %+.1f m/s, off the plotted row (its floor is read on its own row)", m.RateMPS)
		style["opacity"] = 0.45
	}
	return map[string]any{
		"value": []float64{round2(m.RangeM), math.Round(clampDB(m.PeakDB)*100) / 100},
		"name":  m.ID, "id": m.ID, "status": m.Status, "floor": m.Floor, "hidden": m.Hidden,
		"symbol": symbol, "itemStyle": style, "tip": tip,
	}
}

func statusWords(s string) string { return strings.ReplaceAll(s, "_", " ") }

// floorsTitle names the selected target and, for a pulse train, the row.
func floorsTitle(f *scenarios.Floors) string {
	t := "Floors of " + plainLabel(f.Target)
	if f.Row >= 0 {
		t += fmt.Sprintf(" · map row %+.1f m/s", f.RowRateMPS)
		if f.RowTarget != f.Target {
			t += " (" + plainLabel(f.RowTarget) + ")"
		}
	}
	return t
}
