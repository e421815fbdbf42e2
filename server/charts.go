package server

import (
	"fmt"
	"math"
	"math/cmplx"

	"github.com/go-echarts/go-echarts/v2/charts"
	"github.com/go-echarts/go-echarts/v2/opts"

	"github.com/pulsewright/pulsewright/scenarios"
)

// Chart names of a frame's charts map (DEVELOPERS.md, Websocket protocol).
const (
	ChartEcho     = "echo"
	ChartProfile  = "profile"
	ChartResponse = "response"
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

// chartOut is one chart of a frame: its full option, and the data-only
// update that suffices when the page already holds an option of the same
// structure key.
type chartOut struct {
	name   string
	key    string         // changes whenever the full option must be sent
	option map[string]any // full ECharts option
	data   []seriesData   // per-series data, for a merge
}

type seriesData struct {
	ID   string `json:"id"`
	Data any    `json:"data"`
}

// merge returns the data-only option, merged by series id.
func (c *chartOut) merge() map[string]any {
	return map[string]any{"series": c.data}
}

// seriesJSON is a go-echarts series with the fields it lacks: data in
// our compact form and ECharts 5.6's peak-keeping sampling.
type seriesJSON struct {
	charts.SingleSeries
	Data     any    `json:"data"`
	Sampling string `json:"sampling,omitempty"`
}

// builder assembles one line chart with go-echarts.
type builder struct {
	line  *charts.Line
	extra []seriesData
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

// add appends a line series with its data.
func (b *builder) add(id, name, colour string, data any, style opts.LineStyle, more ...charts.SeriesOpts) {
	style.Color = colour
	o := append([]charts.SeriesOpts{
		charts.WithSeriesId(id),
		charts.WithLineStyleOpts(style),
		charts.WithItemStyleOpts(opts.ItemStyle{Color: colour}),
		charts.WithLineChartOpts(opts.LineChart{ShowSymbol: opts.Bool(false)}),
	}, more...)
	b.line.AddSeries(name, nil, o...)
	b.extra = append(b.extra, seriesData{ID: id, Data: data})
}

// build validates the option and returns it with our series data.
func (b *builder) build(name, key string) chartOut {
	b.line.Validate()
	opt := b.line.JSON()
	ms := b.line.MultiSeries
	series := make([]seriesJSON, len(ms))
	for i, s := range ms {
		s.Data = nil
		series[i] = seriesJSON{SingleSeries: s, Data: b.extra[i].Data}
		if _, ok := b.extra[i].Data.(points); ok && s.Type == "line" {
			series[i].Sampling = "minmax"
		}
	}
	opt["series"] = series
	return chartOut{name: name, key: key, option: opt, data: b.extra}
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

func dbSeries(g grid, v []float64, sp span) points {
	return decimate(g, func(k int) float64 { return clampDB(v[k]) }, sp)
}

// echoChart plots the raw receive window: I, Q and magnitude against range.
func echoChart(res *scenarios.Result, vw view) chartOut {
	e := res.Series.Echo
	g := windowGrid(&res.Series, len(e))
	sp := plan(g, vw.rangeM, vw.width)
	b := newBuilder("Raw echo", "range (m)", "amplitude (noise rms = 1)", nil)
	thin := opts.LineStyle{Width: 1}
	b.add(SeriesI, "I", colourI, decimate(g, func(k int) float64 { return clampAmp(real(e[k])) }, sp), thin)
	b.add(SeriesQ, "Q", colourQ, decimate(g, func(k int) float64 { return clampAmp(imag(e[k])) }, sp), thin)
	b.add(SeriesMagnitude, "magnitude", colourMagnitude, decimate(g, func(k int) float64 { return clampAmp(cmplx.Abs(e[k])) }, sp), opts.LineStyle{Width: 1.5})
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
	b.add(SeriesNoise, "noise floor", colourNoise, points{g.x0, clampDB(s.NoiseDB), last, clampDB(s.NoiseDB)}, opts.LineStyle{Width: 1, Type: "dotted"})
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
	b.extra = append(b.extra, seriesData{ID: SeriesMarkers, Data: markers(res, g.x0, last)})
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
	return b.build(ChartResponse, key)
}

func responseSeries(r *scenarios.Response, width int) points {
	n := min(len(r.RangeM), len(r.DB))
	if n == 0 {
		return points{}
	}
	g := grid{n: n, xs: r.RangeM[:n]}
	return dbSeries(g, r.DB, plan(g, nil, width))
}

// buildCharts makes every chart of a frame.
func buildCharts(res, ref *scenarios.Result, vw view) []chartOut {
	return []chartOut{
		profileChart(res, ref, vw),
		echoChart(res, vw),
		responseChart(res, ref, vw),
	}
}
