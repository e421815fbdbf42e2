package server

import (
	"fmt"
	"math"
	"strconv"
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

// floorSeries and marksSeries are the series ids of each floor's curve
// and of the marks it hides or lies highest at ("floor-<id>",
// "marks-<id>"), made once so that a frame names them without
// allocating.
var floorSeries, marksSeries = func() (map[string]string, map[string]string) {
	fs, ms := map[string]string{}, map[string]string{}
	for id := range floorStyle {
		fs[id], ms[id] = "floor-"+id, "marks-"+id
	}
	return fs, ms
}()

// seriesOf returns the id in ids of floor id, or prefix+id for a floor
// the page does not style.
func seriesOf(ids map[string]string, prefix, id string) string {
	if s, ok := ids[id]; ok {
		return s
	}
	return prefix + id
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
	f, ok, err := floorsOf(res, vw)
	if !ok {
		return chartOut{}, false, err
	}
	return floorsWhole(f, vw), true, nil
}

// floorsOf is the Floors view asked for, or nothing (ok false) when the
// page did not ask or the result cannot give it (err says why).
func floorsOf(res *scenarios.Result, vw view) (*scenarios.Floors, bool, error) {
	if vw.floors == nil {
		return nil, false, nil
	}
	f, err := res.Floors(vw.floors.target, vw.floors.row)
	if err != nil && vw.floors.target != "" {
		// The target may have just been renamed or removed: the strongest.
		f, err = res.Floors("", "")
	}
	if err != nil {
		return nil, false, err
	}
	return f, true, nil
}

// floorsGrid is the range grid of f's curves.
func floorsGrid(f *scenarios.Floors) grid {
	n := 0
	if len(f.Curves) > 0 {
		n = len(f.Curves[0].DB)
	}
	return grid{x0: f.RangeM0, dx: f.RangeStepM, n: n}
}

// floorsSpan is the decimation of f's curves for view vw: the zoom, or
// the span the plot opens on.
func floorsSpan(f *scenarios.Floors, g grid, vw view) span {
	detail := vw.rangeM
	near, ok := floorsNearSpan(f, g)
	if detail == nil && ok {
		detail = &near
	}
	return plan(g, detail, plotColumns(max(vw.width/2, minWidthPx)))
}

// appendFloorsKey appends the Floors chart's structure key: the target,
// the map row, the plot's bottom, the curves and the marks' series.
func appendFloorsKey(b []byte, f *scenarios.Floors) []byte {
	b = append(b, "floors/1/"...)
	b = append(b, f.Target...)
	b = append(b, '/')
	b = strconv.AppendInt(b, int64(f.Row), 10)
	b = append(b, '/')
	b = strconv.AppendFloat(b, floorsYMin(f), 'g', -1, 64)
	for _, c := range f.Curves {
		b = append(b, '/')
		b = append(b, c.ID...)
	}
	for i, m := range f.Marks {
		if firstOfFloor(f.Marks, i) {
			b = append(b, '/')
			b = append(b, seriesOf(marksSeries, "marks-", m.Floor)...)
		}
	}
	return b
}

// firstOfFloor says whether marks[i] is the first mark of its floor:
// the marks' series come in that order.
func firstOfFloor(marks []scenarios.FloorMark, i int) bool {
	for _, m := range marks[:i] {
		if m.Floor == marks[i].Floor {
			return false
		}
	}
	return true
}

// appendFloorMarks appends the data of the marks' series of floor id:
// the marks of f under that floor, in order.
func appendFloorMarks(b []byte, f *scenarios.Floors, id string) []byte {
	b = append(b, '[')
	first := true
	for _, m := range f.Marks {
		if m.Floor != id {
			continue
		}
		if !first {
			b = append(b, ',')
		}
		first = false
		b = appendMarkItem(b, m, f)
	}
	return append(b, ']')
}

// floorsInto puts the Floors chart of res for view vw into f: data only
// when the page holds a chart of its structure, whole otherwise. What
// keeps it from being drawn is kept in c.floorsErr.
func (c *evalCache) floorsInto(f *frame, res *scenarios.Result, vw view, pending bool) {
	c.floorsErr = nil
	if vw.floors == nil {
		return
	}
	fl, err := c.floorsFor(res, vw)
	if err != nil {
		c.floorsErr = err
		return
	}
	c.keyBuf = appendFloorsKey(c.keyBuf[:0], fl)
	key, ok := c.held(ChartFloors, c.keyBuf, pending)
	if !ok {
		f.charts = append(f.charts, floorsWhole(fl, vw))
		return
	}
	ci := f.beginChart(ChartFloors, key)
	g := floorsGrid(fl)
	sp := floorsSpan(fl, g, vw)
	for _, cv := range fl.Curves {
		c.dbInto(f, ci, seriesOf(floorSeries, "floor-", cv.ID), g, cv.DB, sp)
	}
	for i, m := range fl.Marks {
		if !firstOfFloor(fl.Marks, i) {
			continue
		}
		lo := len(f.buf)
		f.buf = appendFloorMarks(f.buf, fl, m.Floor)
		f.series(ci, seriesOf(marksSeries, "marks-", m.Floor), lo)
	}
}

// floorsFor is res's Floors view for vw, from the last two results'
// (a frame's result and the pinned or previous one) when it was asked
// for already: a view change or a frame built again does not analyse
// the result again.
func (c *evalCache) floorsFor(res *scenarios.Result, vw view) (*scenarios.Floors, error) {
	req := *vw.floors
	for i := range c.floorsMemo {
		if m := &c.floorsMemo[i]; m.res == res && m.req == req {
			return m.f, m.err
		}
	}
	f, ok, err := floorsOf(res, vw)
	if !ok && err == nil {
		err = fmt.Errorf("no floors view asked for: %w", scenarios.ErrInvalid)
	}
	c.floorsMemo[1] = c.floorsMemo[0]
	c.floorsMemo[0] = floorsMemo{res: res, req: req, f: f, err: err}
	return f, err
}

// floorsMemo is one remembered Floors view.
type floorsMemo struct {
	res *scenarios.Result
	req floorsReq
	f   *scenarios.Floors
	err error
}

// floorsWhole builds the Floors chart of f whole for view vw.
func floorsWhole(f *scenarios.Floors, vw view) chartOut {
	g := floorsGrid(f)
	var near *[2]float64
	if n, ok := floorsNearSpan(f, g); ok {
		near = &n
	}
	sp := floorsSpan(f, g, vw)
	yMin := floorsYMin(f)
	b := newBuilder("range (m)", "dB re output noise", yMin)
	key := string(appendFloorsKey(nil, f))
	for _, c := range f.Curves {
		st := floorStyle[c.ID]
		b.add(seriesOf(floorSeries, "floor-", c.ID), c.Name, st.colour, dbSeries(g, c.DB, sp), st.line)
	}
	// The other targets, one scatter series per floor that lies highest
	// at (or hides) them, coloured as that floor's curve.
	for i, m := range f.Marks {
		if !firstOfFloor(f.Marks, i) {
			continue
		}
		id := m.Floor
		st := floorStyle[id]
		sid := seriesOf(marksSeries, "marks-", id)
		b.line.AddSeries("under "+floorWords[id], nil,
			charts.WithSeriesId(sid),
			charts.WithSeriesOpts(func(s *charts.SingleSeries) { s.Type = "scatter"; s.SymbolSize = 12 }),
			charts.WithItemStyleOpts(opts.ItemStyle{Color: st.colour}),
			charts.WithLabelOpts(markerLabel),
		)
		b.data = append(b.data, seriesData{id: sid, data: appendFloorMarks(nil, f, id)})
		b.extra[sid] = seriesExtra{LabelLayout: map[string]any{"hideOverlap": true}, Z: 5}
	}
	// The level curves named at their right ends, inside the plot.
	ends := map[string]string{scenarios.FloorThreshold: "threshold", scenarios.FloorThermal: "thermal noise",
		scenarios.FloorQuantise: "quantisation", scenarios.FloorDC: "DC offset"}
	for id, words := range ends {
		b.extra["floor-"+id] = seriesExtra{EndLabel: map[string]any{
			"show": true, "formatter": words, "color": floorStyle[id].colour, "fontSize": 11, "offset": []int{-8 - 6*len(words), -9}}}
	}
	// The legend names the curves that carry no name of their own: not
	// the level curves (named at their ends) nor the other targets'
	// marks (each named by its target, coloured as its floor, explained
	// by its tooltip). With them the legend went behind a pager of six
	// pages in the 1280 px window's narrow pane.
	var entries []string
	for _, c := range f.Curves {
		if _, named := ends[c.ID]; !named {
			entries = append(entries, c.Name)
		}
	}
	// Its own grid, lower than newBuilder's for the title and the legend
	// (WithGridOpts appends: the curves sat on newBuilder's, under the
	// legend, and this one was empty).
	b.line.GridList = nil
	b.line.SetGlobalOptions(charts.WithTitleOpts(opts.Title{Title: floorsTitle(f), Left: "64", Top: "0",
		TitleStyle: &opts.TextStyle{FontSize: 11, Color: "#25292e"}}),
		charts.WithLegendOpts(opts.Legend{Show: opts.Bool(true), Type: "scroll", Top: "20", Left: "40", Right: "8", ItemWidth: 18, ItemHeight: 10,
			Data: entries, TextStyle: &opts.TextStyle{FontSize: 11}}),
		charts.WithGridOpts(opts.Grid{Left: fmt.Sprint(gridLeft), Right: "18", Top: "50", Bottom: "62"}))
	return b.buildZoomed(ChartFloors, key, near)
}

// floorsNearSpan is the span the plot opens on: where the selected target's
// own floors lie above thermal noise less 10 dB, widened by a tenth each
// side, with the other targets' marks on the shown row; ok false (the
// whole window) when that is most of it.
func floorsNearSpan(f *scenarios.Floors, g grid) ([2]float64, bool) {
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
		return [2]float64{}, false
	}
	for _, m := range f.Marks {
		if m.OnRow && m.RangeM >= g.x0 {
			lo, hi = math.Min(lo, m.RangeM), math.Max(hi, m.RangeM)
		}
	}
	w := math.Max(hi-lo, 20*g.dx)
	lo, hi = math.Max(lo-w/10, g.x0), math.Min(hi+w/10, g.x(max(g.n-1, 0)))
	if hi-lo > 0.8*float64(g.n)*g.dx {
		return [2]float64{}, false
	}
	return [2]float64{round2(lo), round2(hi)}, true
}

// appendMarkItem appends one mark's data item: its place, its status's
// symbol, its floor's colour (filled when that floor hides it, hollow
// otherwise; faint when it lies off the plotted map row) and a tooltip
// line; encoded by hand, its keys in encoding/json's order, so that
// nothing is allocated.
func appendMarkItem(b []byte, m scenarios.FloorMark, f *scenarios.Floors) []byte {
	st, ok := statusStyle[m.Status]
	if !ok {
		st = statusStyle[scenarios.StatusTooWeak]
	}
	colour := floorStyle[m.Floor].colour
	fill, symbol := colour, strings.TrimPrefix(st.symbol, "empty")
	if !m.Hidden {
		fill, symbol = "#ffffff", st.symbol
	}
	b = append(b, `{"floor":`...)
	b = appendString(b, m.Floor)
	b = append(b, `,"hidden":`...)
	b = strconv.AppendBool(b, m.Hidden)
	b = append(b, `,"id":`...)
	b = appendString(b, m.ID)
	b = append(b, `,"itemStyle":{"borderColor":`...)
	b = appendString(b, colour)
	b = append(b, `,"borderWidth":1.5,"color":`...)
	b = appendString(b, fill)
	off := f.Row >= 0 && !m.OnRow
	if off {
		b = append(b, `,"opacity":0.45`...)
	}
	b = append(b, `},"name":`...)
	b = appendString(b, m.ID)
	b = append(b, `,"status":`...)
	b = appendString(b, m.Status)
	b = append(b, `,"symbol":`...)
	b = appendString(b, symbol)
	b = append(b, `,"tip":"`...)
	b = appendMarkTip(b, m, f)
	if off {
		b = appendText(b, " — at ")
		b = appendSigned1(b, m.RateMPS)
		b = appendText(b, " m/s, off the plotted row (its floor is read on its own row)")
	}
	b = append(b, `","value":[`...)
	b = appendNumber(b, round2(m.RangeM))
	b = append(b, ',')
	b = appendNumber(b, math.Round(clampDB(m.PeakDB)*100)/100)
	return append(b, "]}"...)
}

// appendMarkTip appends the body of a mark's tooltip line (JSON string
// escapes, no quotes): what hides the mark, or by how much it clears the
// highest floor at its cell.
func appendMarkTip(b []byte, m scenarios.FloorMark, f *scenarios.Floors) []byte {
	b = appendText(b, m.ID)
	b = appendText(b, ": ")
	for _, r := range m.Status {
		if r == '_' {
			r = ' '
		}
		b = appendStringRune(b, r)
	}
	peak := func(b []byte) []byte {
		b = appendText(b, "its peak ")
		b = strconv.AppendFloat(b, m.PeakDB, 'f', 1, 64)
		return appendText(b, " dB")
	}
	at := func(b []byte) []byte { // " (F dB at its cell; its peak P dB)"
		b = appendText(b, " (")
		b = strconv.AppendFloat(b, m.FloorDB, 'f', 1, 64)
		b = appendText(b, " dB at its cell; ")
		b = peak(b)
		return appendText(b, ")")
	}
	switch {
	case m.Hidden && m.Floor == scenarios.FloorThermal:
		b = appendText(b, ", ")
		b = peak(b)
		b = appendText(b, " is too weak for thermal noise")
	case m.Hidden && m.Floor == scenarios.FloorOwn:
		b = appendText(b, " by its own response, which fills the detector's training cells (")
		b = peak(b)
		b = appendText(b, ")")
	case m.Hidden && m.Floor == scenarios.FloorOthers && m.Source != "":
		b = appendText(b, ", hidden by ")
		b = appendText(b, m.Source)
		b = at(b)
	case m.Hidden && m.Floor == scenarios.FloorQuantise, m.Hidden && m.Floor == scenarios.FloorDC:
		b = appendText(b, ", hidden by the ")
		b = appendText(b, floorWords[m.Floor])
		b = at(b)
	case m.Hidden:
		b = appendText(b, ", hidden by ")
		b = appendText(b, f.Target)
		b = appendText(b, "'s ")
		b = appendText(b, floorWords[m.Floor])
		b = at(b)
	default:
		b = appendText(b, ", ")
		b = peak(b)
		b = appendText(b, " over the highest floor at its cell, ")
		b = appendText(b, floorWords[m.Floor])
		b = appendText(b, " at ")
		b = strconv.AppendFloat(b, m.FloorDB, 'f', 1, 64)
		b = appendText(b, " dB")
	}
	return b
}

// appendText appends s escaped as in a JSON string, without quotes.
func appendText(b []byte, s string) []byte {
	for _, r := range s {
		b = appendStringRune(b, r)
	}
	return b
}

// appendSigned1 appends v with one decimal and its sign, as %+.1f does.
func appendSigned1(b []byte, v float64) []byte {
	n := len(b)
	b = strconv.AppendFloat(b, v, 'f', 1, 64)
	if b[n] != '-' && b[n] != '+' {
		b = append(b, 0)
		copy(b[n+1:], b[n:])
		b[n] = '+'
	}
	return b
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
