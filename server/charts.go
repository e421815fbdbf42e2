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
	scenarios.StatusDetected:    {"#1e8c4e", "circle"},
	scenarios.StatusMasked:      {"#d4651c", "diamond"},
	scenarios.StatusBelowNoise:  {"#6f7782", "emptyCircle"},
	scenarios.StatusEclipsed:    {"#7b4fb8", "triangle"},
	scenarios.StatusOutOfWindow: {"#b5a33a", "rect"},
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
		b = append(b, `,"data":`...)
		b = append(b, d.data...)
		b = append(b, '}')
	}
	return append(b, "]}"...)
}

// seriesJSON is a go-echarts series with the fields it lacks: our data
// (a placeholder until the encoded array is spliced in) and ECharts 5.6's
// peak-keeping sampling.
type seriesJSON struct {
	charts.SingleSeries
	Data     string `json:"data"`
	Sampling string `json:"sampling,omitempty"`
}

// builder assembles one line chart with go-echarts.
type builder struct {
	line *charts.Line
	data []seriesData
}

func newBuilder(title, xName, yName string, yMin any) *builder {
	c := charts.NewLine()
	c.Colors = []string{colourProfile, colourClean, colourThreshold, colourNoise, colourReference}
	c.SetGlobalOptions(
		charts.WithTitleOpts(opts.Title{Title: title, Left: "center"}),
		charts.WithAnimation(false),
		charts.WithTooltipOpts(opts.Tooltip{Show: opts.Bool(true), Trigger: "axis"}),
		charts.WithLegendOpts(opts.Legend{Show: opts.Bool(true), Top: "24"}),
		charts.WithXAxisOpts(opts.XAxis{Type: "value", Name: xName, NameLocation: "middle", NameGap: 28, Min: "dataMin", Max: "dataMax"}),
		charts.WithYAxisOpts(opts.YAxis{Type: "value", Name: yName, Min: yMin}),
		charts.WithDataZoomOpts(
			opts.DataZoom{Type: "inside", XAxisIndex: []int{0}, FilterMode: "none"},
			opts.DataZoom{Type: "slider", XAxisIndex: []int{0}, FilterMode: "none", End: 100},
		),
	)
	return &builder{line: c}
}

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
	ms := b.line.MultiSeries
	series := make([]seriesJSON, len(ms))
	for i, s := range ms {
		s.Data = nil
		series[i] = seriesJSON{SingleSeries: s, Data: placeholder(i)}
		if s.Type == "line" {
			series[i].Sampling = "minmax"
		}
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
	width  int         // px
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
	sp := plan(g, vw.rangeM, vw.width)
	b := newBuilder("Raw echo", "range (m)", "amplitude (noise rms = 1)", nil)
	thin := opts.LineStyle{Width: 1}
	b.add(SeriesI, "I", colourI, ampSeries(g, func(k int) float64 { return real(e[k]) }, sp), thin)
	b.add(SeriesQ, "Q", colourQ, ampSeries(g, func(k int) float64 { return imag(e[k]) }, sp), thin)
	b.add(SeriesMagnitude, "magnitude", colourMagnitude, ampSeries(g, func(k int) float64 { return cmplx.Abs(e[k]) }, sp), opts.LineStyle{Width: 1.5})
	return b.build(ChartEcho, "echo/1")
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
	sp := plan(g, vw.rangeM, vw.width)
	b := newBuilder("Compressed range profile", "range (m)", "dB re output noise", profileYMin)
	b.add(SeriesProfile, "profile", colourProfile, dbSeries(g, s.ProfileDB, sp), opts.LineStyle{Width: 1.2})
	b.add(SeriesClean, "noise-free", colourClean, dbSeries(windowGrid(s, len(s.CleanDB)), s.CleanDB, sp), opts.LineStyle{Width: 1})
	b.add(SeriesThreshold, "threshold", colourThreshold, dbSeries(windowGrid(s, len(s.ThresholdDB)), s.ThresholdDB, sp), opts.LineStyle{Width: 1.2, Type: "dashed"})
	last := g.x(max(g.n-1, 0))
	b.add(SeriesNoise, "noise floor", colourNoise, points{g.x0, clampDB(s.NoiseDB), last, clampDB(s.NoiseDB)}.appendJSON(nil, dbDecimals), opts.LineStyle{Width: 1, Type: "dotted"})
	key := "profile/1"
	if ref != nil {
		rs := &ref.Series
		rg := windowGrid(rs, len(rs.ProfileDB))
		b.add(SeriesReference, "pinned", colourReference, dbSeries(rg, rs.ProfileDB, plan(rg, vw.rangeM, vw.width)), opts.LineStyle{Width: 1, Opacity: opts.Float(0.8)})
		key += "+ref"
	}
	b.line.AddSeries("targets", nil,
		charts.WithSeriesId(SeriesMarkers),
		charts.WithSeriesOpts(func(s *charts.SingleSeries) { s.Type = "scatter"; s.SymbolSize = 11 }),
	)
	marks, err := json.Marshal(markers(res, g.x0, last))
	if err != nil {
		panic("server: markers not encodable: " + err.Error()) // every number in them is clamped
	}
	b.data = append(b.data, seriesData{id: SeriesMarkers, data: marks})
	return b.build(ChartProfile, key)
}

// marker is one target on the profile: at its range (clamped into the
// window, with the true range beside it) and its expected peak SNR.
type marker struct {
	Value     [2]float64     `json:"value"`
	ID        string         `json:"id"`
	Status    string         `json:"status"`
	Reason    string         `json:"reason"`
	RangeM    float64        `json:"range_m"`
	Symbol    string         `json:"symbol"`
	ItemStyle map[string]any `json:"itemStyle"`
}

func markers(res *scenarios.Result, lo, hi float64) []marker {
	out := make([]marker, 0, len(res.Report.Targets))
	for _, t := range res.Report.Targets {
		st, ok := statusStyle[t.Status]
		if !ok {
			st = statusStyle[scenarios.StatusBelowNoise]
		}
		x := clampAmp(t.RangeM)
		out = append(out, marker{
			Value:     [2]float64{math.Min(math.Max(x, lo), hi), clampDB(t.SNRDB)},
			ID:        t.ID,
			Status:    t.Status,
			Reason:    t.Reason,
			RangeM:    x,
			Symbol:    st.symbol,
			ItemStyle: map[string]any{"color": st.colour, "borderColor": st.colour},
		})
	}
	return out
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
	yMin := responseYMin(res.Report.Waveform.PSLRDB)
	b := newBuilder("Waveform response", "range from peak (m)", "dB re peak", yMin)
	b.line.YAxisList[0].Max = 0.0
	b.add(SeriesResponse, "response", colourProfile, responseSeries(&res.Series.Response, vw.width), opts.LineStyle{Width: 1.2})
	key := fmt.Sprintf("response/1/%g", yMin)
	if ref != nil {
		b.add(SeriesReference, "pinned", colourReference, responseSeries(&ref.Series.Response, vw.width), opts.LineStyle{Width: 1, Opacity: opts.Float(0.8)})
		key += "+ref"
	}
	out := b.build(ChartResponse, key)
	out.static = true
	return out
}

func responseSeries(r *scenarios.Response, width int) []byte {
	n := min(len(r.RangeM), len(r.DB))
	if n == 0 {
		return []byte("[]")
	}
	g := grid{n: n, xs: r.RangeM[:n]}
	return dbSeries(g, r.DB, plan(g, nil, width))
}

// Ambiguity surface: grid on the screen and colours from the floor (left
// blank) to the peak.
const (
	ambiguityCols    = 201
	ambiguityRows    = 81
	ambiguityFloorDB = -60.0
)

var ambiguityColours = []string{"#f4f4ee", "#c9ddd4", "#6aa9a4", "#2b6a8f", "#182848"}

// visualMapJSON patches the bounds of a go-echarts visual map: they are
// float32 with omitempty, so a maximum of 0 dB would vanish and ECharts
// would take 200.
type visualMapJSON struct {
	opts.VisualMap
	Min float64 `json:"min"`
	Max float64 `json:"max"`
}

// ambiguityChart plots |χ(τ, f_d)| as a heat map: delay (as range) across,
// Doppler up, dB re the peak. Cells at the floor are left out.
func ambiguityChart(a *scenarios.AmbiguitySurface, version int) chartOut {
	c := charts.NewHeatMap()
	vm := opts.VisualMap{Calculable: opts.Bool(true), Dimension: "2", Orient: "vertical", Right: "0", Top: "middle",
		InRange: &opts.VisualMapInRange{Color: ambiguityColours}}
	c.SetGlobalOptions(
		charts.WithTitleOpts(opts.Title{Title: "Ambiguity surface (dB re peak)", Left: "center"}),
		charts.WithAnimation(false),
		charts.WithTooltipOpts(opts.Tooltip{Show: opts.Bool(true), Trigger: "item"}),
		charts.WithXAxisOpts(opts.XAxis{Type: "category", Name: "delay as range (m)", NameLocation: "middle", NameGap: 28, Data: roundAll(a.DelayM, 1, 10)}),
		charts.WithYAxisOpts(opts.YAxis{Type: "category", Name: "Doppler (kHz)", Data: roundAll(a.DopplerHz, 1e-3, 100)}),
		charts.WithVisualMapOpts(vm),
	)
	c.AddSeries("|χ|", nil, charts.WithSeriesId(SeriesAmbiguity))
	c.Validate()
	opt := c.JSON()
	opt["visualMap"] = []visualMapJSON{{VisualMap: vm, Min: ambiguityFloorDB, Max: 0}}
	ms := c.MultiSeries
	ms[0].Data = nil
	opt["series"] = []seriesJSON{{SingleSeries: ms[0], Data: placeholder(0)}}
	var cells []byte
	cells = append(cells, '[')
	for r, row := range a.DB {
		for col, v := range row {
			if !(v > ambiguityFloorDB) {
				continue
			}
			if len(cells) > 1 {
				cells = append(cells, ',')
			}
			cells = append(cells, '[')
			cells = strconv.AppendInt(cells, int64(col), 10)
			cells = append(cells, ',')
			cells = strconv.AppendInt(cells, int64(r), 10)
			cells = append(cells, ',')
			cells = appendFixed(cells, clampDB(v), 1)
			cells = append(cells, ']')
		}
	}
	cells = append(cells, ']')
	b := &builder{data: []seriesData{{id: SeriesAmbiguity, data: cells}}}
	out := b.splice(ChartAmbiguity, fmt.Sprintf("ambiguity/%d", version), opt)
	out.static = true
	return out
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
	return []chartOut{
		profileChart(res, ref, vw),
		echoChart(res, vw),
		responseChart(res, ref, vw),
	}
}
