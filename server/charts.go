package server

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"math/cmplx"
	"strconv"

	"github.com/go-echarts/go-echarts/v2/charts"
	"github.com/go-echarts/go-echarts/v2/opts"

	"github.com/pulsewright/pulsewright/scenarios"
)

// Chart names of a frame's charts map (DEVELOPERS.md, Websocket protocol).
const (
	ChartEcho      = "echo"
	ChartProfile   = "profile"
	ChartResponse  = "response"
	ChartAmbiguity = "ambiguity"
)

// Series ids. The page merges data updates by these ids.
const (
	SeriesI         = "i"
	SeriesQ         = "q"
	SeriesMagnitude = "magnitude"
	SeriesProfile   = "profile"
	SeriesClean     = "clean"
	SeriesThreshold = "threshold"
	SeriesNoise     = "noise"
	SeriesReference = "reference"
	SeriesMarkers   = "markers"
	SeriesResponse  = "response"
	SeriesAmbiguity = "ambiguity"
)

// Colours of our own palette, chosen for contrast on a light background.
const (
	colourProfile   = "#1f5f8b" // deep blue
	colourClean     = "#8fb8d8" // pale blue
	colourThreshold = "#c0392b" // brick red
	colourNoise     = "#8a8a8a" // grey
	colourReference = "#b07cc6" // lilac
	colourI         = "#2e86ab"
	colourQ         = "#e8a33d"
	colourMagnitude = "#33373d"
)

// statusStyle gives each target status a colour and a marker shape, so
// that status reads without colour too.
var statusStyle = map[string]struct{ colour, symbol string }{
	// The page's cards and table use the same colours and shapes
	// (web/static/css: --st-* and .dot).
	scenarios.StatusDetected:     {"#2f7d3a", "circle"},
	scenarios.StatusMasked:       {"#c2410c", "diamond"},
	scenarios.StatusTooWeak:      {"#7b8389", "emptyCircle"},
	scenarios.StatusEclipsed:     {"#6d3fc0", "triangle"},
	scenarios.StatusFolded:       {"#a16207", "pin"},
	scenarios.StatusOutOfWindow:  {"#1b6aa5", "rect"},
	scenarios.StatusClutter:      {"#8b5e3c", "roundRect"},
	scenarios.StatusBelowHorizon: {"#0f766e", "arrow"}, // hidden by the Earth's curvature
}

// chartOut is one chart of a frame: its full option, and the series data
// alone for a data-only merge when the page already holds an option of
// the same structure key. Both are encoded JSON.
type chartOut struct {
	name   string
	key    string       // changes whenever the full option must be sent
	option []byte       // the full ECharts option
	data   []seriesData // per-series data, for a merge
	// static charts change rarely (the waveform's response, the
	// ambiguity surface): their key names their data too, and a chart
	// the page holds under the same key is left out of the frame.
	static bool
}

// seriesData is one series' encoded data array.
type seriesData struct {
	id   string
	data []byte
	// field, when set, is the series option data holds instead of its
	// data array (a mark area's {"data": …}).
	field string
}

// appendMerge appends the data-only option {"series":[{"id","data"},…]},
// which ECharts merges into the held option by series id.
func (c *chartOut) appendMerge(b []byte) []byte {
	b = append(b, `{"series":[`...)
	for i, d := range c.data {
		if i > 0 {
			b = append(b, ',')
		}
		b = append(b, `{"id":`...)
		b = strconv.AppendQuote(b, d.id)
		if d.field != "" {
			b = append(b, `,"`...)
			b = append(b, d.field...)
			b = append(b, `":`...)
		} else {
			b = append(b, `,"data":`...)
		}
		b = append(b, d.data...)
		b = append(b, '}')
	}
	return append(b, "]}"...)
}

// seriesJSON is a go-echarts series with the fields it lacks: our data
// (a placeholder until the encoded array is spliced in) and progressive
// drawing. No sampling: the server decimates already (min/max per pixel).
type seriesJSON struct {
	charts.SingleSeries
	Data string `json:"data"`
	// Progressive 0 draws a series in one go: the server sends screen
	// resolution, and progressive drawing would spread it over frames.
	Progressive *int `json:"progressive,omitempty"`
	// Fields go-echarts lacks or nests (labels.go); at this depth they
	// win over SingleSeries' embedded ones of the same name.
	EndLabel    map[string]any `json:"endLabel,omitempty"`
	LabelLayout map[string]any `json:"labelLayout,omitempty"`
	MarkArea    map[string]any `json:"markArea,omitempty"`
	Z           int            `json:"z,omitempty"`
}

// seriesExtra holds a series' fields that seriesJSON adds.
type seriesExtra struct {
	EndLabel, LabelLayout, MarkArea map[string]any
	Z                               int
}

// builder assembles one line chart with go-echarts.
type builder struct {
	line  *charts.Line
	data  []seriesData
	extra map[string]seriesExtra // by series id
}

func newBuilder(xName, yName string, yMin any) *builder {
	c := charts.NewLine()
	c.Colors = []string{colourProfile, colourClean, colourThreshold, colourNoise, colourReference}
	c.SetGlobalOptions(
		charts.WithAnimation(false),
		// One row of legend, paged when the plot is narrow: a second row
		// would sit on the plot.
		charts.WithLegendOpts(opts.Legend{Show: opts.Bool(true), Type: "scroll", Top: "2", Left: "64", Right: "8", ItemWidth: 18, ItemHeight: 10,
			TextStyle: &opts.TextStyle{FontSize: 11}}),
		charts.WithGridOpts(opts.Grid{Left: strconv.Itoa(gridLeft), Right: "18", Top: "30", Bottom: "62"}),
		charts.WithXAxisOpts(opts.XAxis{Type: "value", Name: xName, NameLocation: "middle", NameGap: 24, Min: "dataMin", Max: "dataMax",
			AxisLabel: &opts.AxisLabel{ShowMinLabel: opts.Bool(false), ShowMaxLabel: opts.Bool(false)}}),
		charts.WithYAxisOpts(opts.YAxis{Type: "value", Name: yName, NameLocation: "middle", NameGap: gridLeft - 16, Min: yMin}),
	)
	return &builder{line: c, extra: map[string]seriesExtra{}}
}

// gridLeft is the room left of a plot for the y labels and the y name
// along the axis, px.
const gridLeft = 56

// sliderJSON is the zoom slider: thin, at the very bottom, under the x
// name, and without the data shadow (ECharts would redraw it from the
// first series on every update).
// tooltipJSON is a tooltip drawn in the canvas: an HTML tooltip would
// set inline styles, which the page's Content-Security-Policy refuses.
func tooltipJSON(trigger string) map[string]any {
	return map[string]any{"show": true, "trigger": trigger, "renderMode": "richText", "confine": true}
}

// The zoom on range: the mouse wheel and drag inside the plot, and a
// slider under it. Set after JSON(): go-echarts lacks the slider's fields.
var insideJSON = map[string]any{"type": "inside", "xAxisIndex": []int{0}, "filterMode": "none"}

var sliderJSON = map[string]any{"type": "slider", "xAxisIndex": []int{0}, "filterMode": "none", "end": 100,
	"bottom": 4, "height": 16, "showDataShadow": false, "labelPrecision": 0}

// add appends a line series with its encoded data.
func (b *builder) add(id, name, colour string, data []byte, style opts.LineStyle, more ...charts.SeriesOpts) {
	style.Color = colour
	o := append([]charts.SeriesOpts{
		charts.WithSeriesId(id),
		charts.WithLineStyleOpts(style),
		charts.WithItemStyleOpts(opts.ItemStyle{Color: colour}),
		charts.WithLineChartOpts(opts.LineChart{ShowSymbol: opts.Bool(false)}),
	}, more...)
	b.line.AddSeries(name, nil, o...)
	b.data = append(b.data, seriesData{id: id, data: data})
}

// placeholder marks where series i's data goes in the encoded option.
func placeholder(i int) string { return "@@series-data-" + strconv.Itoa(i) + "@@" }

// build validates the option, encodes it, and splices in the series data.
func (b *builder) build(name, key string) chartOut {
	b.line.Validate()
	opt := b.line.JSON()
	opt["dataZoom"] = []any{insideJSON, sliderJSON}
	opt["tooltip"] = tooltipJSON("axis")
	return b.spliceSeries(name, key, opt)
}

// spliceSeries replaces the series of opt by ones whose data are
// placeholders, then splices the real data in.
func (b *builder) spliceSeries(name, key string, opt map[string]any) chartOut {
	ms := b.line.MultiSeries
	series := make([]seriesJSON, len(ms))
	for i, s := range ms {
		s.Data = nil
		x := b.extra[s.Id]
		series[i] = seriesJSON{SingleSeries: s, Data: placeholder(i), EndLabel: x.EndLabel, LabelLayout: x.LabelLayout, MarkArea: x.MarkArea, Z: x.Z}
	}
	opt["series"] = series
	return b.splice(name, key, opt)
}

// splice encodes opt, whose series data are placeholders, and puts the
// encoded data of b in their places.
func (b *builder) splice(name, key string, opt map[string]any) chartOut {
	skeleton, err := json.Marshal(opt)
	if err != nil {
		panic("server: chart option not encodable: " + err.Error()) // options hold no user numbers but the axis bounds we clamp
	}
	size := len(skeleton)
	for _, d := range b.data {
		size += len(d.data)
	}
	out := make([]byte, 0, size)
	for i, d := range b.data {
		mark := []byte(strconv.Quote(placeholder(i)))
		j := bytes.Index(skeleton, mark)
		if j < 0 {
			panic("server: series placeholder lost")
		}
		out = append(out, skeleton[:j]...)
		out = append(out, d.data...)
		skeleton = skeleton[j+len(mark):]
	}
	out = append(out, skeleton...)
	return chartOut{name: name, key: key, option: out, data: b.data}
}

// view is the page's zoom and plot width.
type view struct {
	rangeM *[2]float64 // nil: the whole window
	width  int         // px, of the range profile
	cell   *cell       // the map cell to cut through; nil: none
	// mapWidth is the range–Doppler map's width, px; 0: a third of width.
	mapWidth int
	// cpiMaps: the page shows a PRF schedule's CPI maps, so frames carry
	// them (they cost a pulse-train simulation per CPI).
	cpiMaps bool
	// floors: the page shows the Floors tab, for this target (floorcharts.go).
	floors *floorsReq
}

// windowGrid is the range axis of a result's series.
func windowGrid(s *scenarios.Series, n int) grid {
	return grid{x0: s.RangeM0, dx: s.RangeStepM, n: n}
}

// dbSeries decimates and encodes a dB series.
func dbSeries(g grid, v []float64, sp span) []byte {
	return decimate(g, func(k int) float64 { return clampDB(v[k]) }, sp).appendJSON(nil, dbDecimals)
}

// ampSeries decimates and encodes a linear series.
func ampSeries(g grid, y func(k int) float64, sp span) []byte {
	return decimate(g, func(k int) float64 { return clampAmp(y(k)) }, sp).appendJSON(nil, ampDecimals)
}

// echoChart plots the raw receive window: I, Q and magnitude against range.
func echoChart(res *scenarios.Result, vw view) chartOut {
	e := res.Series.Echo
	g := windowGrid(&res.Series, len(e))
	// The echo shares the lower left pane with the range–Doppler map, so
	// it is as wide as map_px (about half the profile's width otherwise).
	sp := plan(g, vw.rangeM, plotColumns(echoWidth(vw)))
	b := newBuilder("range (m)", "amplitude (noise rms = 1)", nil)
	thin := opts.LineStyle{Width: 1}
	b.add(SeriesI, "I", colourI, ampSeries(g, func(k int) float64 { return real(e[k]) }, sp), thin)
	b.add(SeriesQ, "Q", colourQ, ampSeries(g, func(k int) float64 { return imag(e[k]) }, sp), thin)
	b.add(SeriesMagnitude, "magnitude", colourMagnitude, ampSeries(g, func(k int) float64 { return cmplx.Abs(e[k]) }, sp), opts.LineStyle{Width: 1.5})
	return b.build(ChartEcho, echoKey)
}

// profileYMin is the bottom of the profile plot, dB re output noise: the
// noise floor less 20 dB shows the noise's spread without squashing the
// targets (common practice, no source).
const profileYMin = -20.0

// profileChart plots the compressed profile, the noise-free profile, the
// threshold, the noise floor, the pinned reference and one marker per
// target.
func profileChart(res *scenarios.Result, ref *scenarios.Result, vw view) chartOut {
	s := &res.Series
	g := windowGrid(s, len(s.ProfileDB))
	sp := plan(g, vw.rangeM, plotColumns(vw.width))
	b := newBuilder("range (m)", "dB re output noise", profileYMin)
	profileName, cleanName := "profile", "noise-free"
	if s.RangeDoppler != nil {
		// A pulse train's profile is the largest value over Doppler of each
		// range cell: its noise sits a few dB above the 0 dB floor.
		// The noise-free line is too; the legend says it once, so that
		// its entries fit one row of a 1280 px window.
		profileName, cleanName = "profile, max over Doppler", "noise-free"
	}
	b.add(SeriesProfile, profileName, colourProfile, dbSeries(g, s.ProfileDB, sp), opts.LineStyle{Width: 1.2})
	b.add(SeriesClean, cleanName, colourClean, dbSeries(windowGrid(s, len(s.CleanDB)), s.CleanDB, sp), opts.LineStyle{Width: 1})
	b.add(SeriesThreshold, "threshold", colourThreshold, dbSeries(windowGrid(s, len(s.ThresholdDB)), s.ThresholdDB, sp), opts.LineStyle{Width: 1.2, Type: "dashed"})
	last := g.x(max(g.n-1, 0))
	b.add(SeriesNoise, "noise floor", colourNoise, points{g.x0, clampDB(s.NoiseDB), last, clampDB(s.NoiseDB)}.appendJSON(nil, dbDecimals), opts.LineStyle{Width: 1, Type: "dotted"})
	if ref != nil {
		rs := &ref.Series
		rg := windowGrid(rs, len(rs.ProfileDB))
		b.add(SeriesReference, "pinned", colourReference, dbSeries(rg, rs.ProfileDB, plan(rg, vw.rangeM, plotColumns(vw.width))), opts.LineStyle{Width: 1, Opacity: opts.Float(0.8)})
	}
	annotate(b, res, g)
	key := string(appendProfileKey(nil, res, ref)) + breakthroughMarks(b, res, g)
	b.line.AddSeries("targets", nil,
		charts.WithSeriesId(SeriesMarkers),
		charts.WithSeriesOpts(func(s *charts.SingleSeries) { s.Type = "scatter"; s.SymbolSize = 11 }),
		charts.WithLabelOpts(markerLabel),
	)
	b.extra[SeriesMarkers] = seriesExtra{LabelLayout: map[string]any{"hideOverlap": true}, Z: 5}
	b.data = append(b.data, seriesData{id: SeriesMarkers, data: appendMarkers(nil, res, g.x0, last)})
	// The legend names the lines and areas. The markers carry their
	// names and status colours, and each masking segment its own label,
	// so neither has an entry: "targets" showed one blue dot for markers
	// of every colour, "masking" stood there with nothing masked, and
	// with them the entries went behind a pager at 1280 px.
	var entries []string
	for _, s := range b.line.MultiSeries {
		if s.Id != SeriesMarkers && s.Id != SeriesMasking {
			entries = append(entries, s.Name)
		}
	}
	b.line.Legend.Data = entries
	return b.build(ChartProfile, key)
}

// responseYMin puts the bottom of the response plot 20 dB under the
// peak sidelobe, in steps of 10 dB, between −120 and −40 dB.
func responseYMin(pslr float64) float64 {
	if math.IsNaN(pslr) || pslr > 0 {
		pslr = 0
	}
	return math.Max(-120, math.Min(-40, 10*math.Floor((pslr-20)/10)))
}

// responseChart plots the waveform's own compressed response, and the
// pinned one's when pinned.
func responseChart(res *scenarios.Result, ref *scenarios.Result, vw view) chartOut {
	pslr := 0.0 // no sidelobes: the default span
	if p := res.Report.Waveform.PSLRDB; p != nil {
		pslr = *p
	}
	yMin := responseYMin(pslr)
	b := newBuilder("range from peak (m)", "dB re peak", yMin)
	b.line.YAxisList[0].Max = 0.0
	near := responseNear(res)
	b.add(SeriesResponse, "response", colourProfile, responseSeries(&res.Series.Response, vw.width, near), opts.LineStyle{Width: 1.2})
	key := fmt.Sprintf("response/2/%g", yMin)
	if ref != nil {
		b.add(SeriesReference, "pinned", colourReference, responseSeries(&ref.Series.Response, vw.width, near), opts.LineStyle{Width: 1, Opacity: opts.Float(0.8)})
		key += "+ref"
	}
	out := b.buildZoomed(ChartResponse, key, near)
	out.static = true
	return out
}

func responseSeries(r *scenarios.Response, width int, near *[2]float64) []byte {
	n := min(len(r.RangeM), len(r.DB))
	if n == 0 {
		return []byte("[]")
	}
	g := grid{n: n, xs: r.RangeM[:n]}
	if n > 1 && r.RangeM[n-1] > r.RangeM[0] {
		// A uniform axis (as scenarios makes it): every sample near the
		// main lobe, an outline beyond.
		g = grid{x0: r.RangeM[0], dx: (r.RangeM[n-1] - r.RangeM[0]) / float64(n-1), n: n}
	}
	return dbSeries(g, r.DB, plan(g, near, width))
}

// roundAll returns v·scale rounded to 1/per, as axis labels.
func roundAll(v []float64, scale, per float64) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = math.Round(clampAmp(x*scale)*per) / per
	}
	return out
}

// buildCharts makes every chart of a frame.
func buildCharts(res, ref *scenarios.Result, vw view) []chartOut {
	out := []chartOut{
		profileChart(res, ref, vw),
		echoChart(res, vw),
		responseChart(res, ref, vw),
	}
	if m, ok := rdmapChart(res, vw); ok {
		out = append(out, m)
	}
	if c, ok := rdCutsChart(res, vw); ok {
		out = append(out, c)
	}
	return out
}
