package server

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/go-echarts/go-echarts/v2/charts"
	"github.com/go-echarts/go-echarts/v2/opts"

	"github.com/pulsewright/pulsewright/scenarios"
)

// The waveform designer's charts: the transmitted pulse, its spectrum,
// the receive filter's taps and the Doppler tolerance, made from
// scenarios.WavePlots. They depend on the waveform, the receiver and the
// sample rate only, so they are static charts cached like the ambiguity
// surface.

// Chart names and series ids of the designer's charts: two charts of two
// plots each, every plot with a left and a right value axis.
const (
	ChartPulse  = "pulse"  // the pulse against time | its spectrum
	ChartFilter = "filter" // the filter's taps | the Doppler tolerance

	SeriesPhase     = "phase"
	SeriesFrequency = "frequency"
	SeriesSpectrum  = "spectrum"
	SeriesTapAmp    = "tap-amplitude"
	SeriesTapPhase  = "tap-phase"
	SeriesLoss      = "doppler-loss"
	SeriesShift     = "range-shift"
)

// wavePointsPx is the plot width the designer's series are decimated for
// (min/max per column): a plot is at most a quarter of the page.
const wavePointsPx = 500

// xy encodes the pairs (xs[i]·xScale, ys[i]·yScale) as [[x,y],…] with the
// given decimals, min/max-decimated to wavePointsPx columns.
func xy(xs, ys []float64, xScale, yScale float64, xDec, yDec int) []byte {
	n := min(len(xs), len(ys))
	g := grid{n: n, xs: xs[:n]}
	p := decimate(g, func(k int) float64 { return clampAmp(ys[k] * yScale) }, span{lo: 0, hi: n, columns: wavePointsPx})
	b := make([]byte, 0, 24*len(p)/2+2)
	b = append(b, '[')
	for i := 0; i+1 < len(p); i += 2 {
		if i > 0 {
			b = append(b, ',')
		}
		b = append(b, '[')
		b = appendFixed(b, clampAmp(p[i]*xScale), xDec)
		b = append(b, ',')
		b = appendFixed(b, p[i+1], yDec)
		b = append(b, ']')
	}
	return append(b, ']')
}

func degrees(v []float64) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = x * 180 / math.Pi
	}
	return out
}

// dualPlot is one plot of a two-plot designer's chart: a heading, an x
// axis, a left and (when rightName is set) a right value axis.
type dualPlot struct {
	title, xName, leftName, rightName string
	xMin, xMax, leftMin, leftMax      any // nil: from the data
	lines                             []dualLine
}

type dualLine struct {
	id, name, colour string
	data             []byte
	right            bool // on the right axis
	width            float32
	dashed           bool
	markArea         map[string]any
}

// Layout of two plots side by side, each with axes on both sides. Each
// plot's tick labels are kept inside its own half (containLabel): the
// left plot's right-hand labels ran into the right plot's left-hand ones
// in a narrow pane ("-100" and "0.2" read "-1000.2"). From the top: the
// titles, the legends, the axis names (dualNameGap above the plots) and
// the top tick labels, each clear of the next.
var dualGrids = [2]opts.Grid{
	{Left: "18", Right: "51%", Top: "56", Bottom: "40", ContainLabel: opts.Bool(true)},
	{Left: "51%", Right: "18", Top: "56", Bottom: "40", ContainLabel: opts.Bool(true)},
}

// dualNameGap is the gap between a plot's top and its y axes' names, px.
const dualNameGap = 10

// dualChart builds a chart of two plots side by side.
func dualChart(name, key string, plots [2]dualPlot) chartOut {
	c := charts.NewLine()
	ends := &opts.AxisLabel{ShowMinLabel: opts.Bool(false), ShowMaxLabel: opts.Bool(false), FontSize: 10}
	c.SetGlobalOptions(
		charts.WithAnimation(false),
		charts.WithLegendOpts(opts.Legend{Show: opts.Bool(false)}),
		charts.WithGridOpts(dualGrids[0], dualGrids[1]),
	)
	c.XAxisList, c.YAxisList = nil, nil
	var titles []opts.Title
	var legends []map[string]any
	yIndex := make([][2]int, 2) // plot → its left and right y axis indices
	for i, p := range plots {
		xMin, xMax := p.xMin, p.xMax
		if xMin == nil {
			xMin, xMax = "dataMin", "dataMax"
		}
		c.ExtendXAxis(opts.XAxis{Type: "value", GridIndex: i, Name: p.xName, NameLocation: "middle", NameGap: 24,
			Min: xMin, Max: xMax, SplitNumber: 3, AxisLabel: ends})
		yIndex[i][0] = len(c.YAxisList)
		c.ExtendYAxis(opts.YAxis{Type: "value", GridIndex: i, Position: "left", Name: p.leftName, NameLocation: "end", NameGap: dualNameGap,
			Min: p.leftMin, Max: p.leftMax, SplitNumber: 4, AxisLabel: &opts.AxisLabel{FontSize: 10}})
		yIndex[i][1] = yIndex[i][0]
		if p.rightName != "" {
			yIndex[i][1] = len(c.YAxisList)
			c.ExtendYAxis(opts.YAxis{Type: "value", GridIndex: i, Position: "right", Name: p.rightName, NameLocation: "end", NameGap: dualNameGap,
				SplitNumber: 4, SplitLine: &opts.SplitLine{Show: opts.Bool(false)}, AxisLabel: &opts.AxisLabel{FontSize: 10}})
		}
		left := dualGrids[i].Left
		titles = append(titles, opts.Title{Title: p.title, Left: left, Top: "2", TitleStyle: &opts.TextStyle{FontSize: 12, FontWeight: "normal"}})
		names := []string{}
		for _, l := range p.lines {
			names = append(names, l.name)
		}
		if len(names) < 2 {
			continue // the heading names a lone line
		}
		legends = append(legends, map[string]any{"show": true, "data": names, "left": left, "top": 18,
			"itemWidth": 14, "itemHeight": 8, "itemGap": 6, "textStyle": map[string]any{"fontSize": 10}})
	}
	b := &builder{line: c, extra: map[string]seriesExtra{}}
	for i, p := range plots {
		for _, l := range p.lines {
			y := yIndex[i][0]
			if l.right {
				y = yIndex[i][1]
			}
			style := opts.LineStyle{Width: l.width}
			if l.dashed {
				style.Type = "dashed"
			}
			b.add(l.id, l.name, l.colour, l.data, style,
				charts.WithSeriesOpts(func(s *charts.SingleSeries) { s.XAxisIndex, s.YAxisIndex = i, y }))
			if l.markArea != nil {
				b.extra[l.id] = seriesExtra{MarkArea: l.markArea}
			}
		}
	}
	b.line.Validate()
	opt := b.line.JSON()
	opt["title"] = titles
	opt["legend"] = legends
	opt["tooltip"] = tooltipJSON("axis")
	out := b.spliceSeries(name, key, opt)
	out.static = true
	return out
}

// waveCharts makes the designer's two charts; version keeps keys unique.
func waveCharts(w *scenarios.WavePlots, version int) []chartOut {
	key := func(name string) string { return fmt.Sprintf("%s/%d", name, version) }
	// The pulse: phase (left) and instantaneous frequency (right) against
	// time; its spectrum with the occupied band.
	phaseName, phaseY, phase := "phase", "rad", xy(w.TimeS, w.PhaseRad, 1e6, 1, 4, 3)
	if w.PhaseWrapped {
		phaseName, phaseY, phase = "phase", "°", xy(w.TimeS, degrees(w.PhaseRad), 1e6, 1, 4, 1)
	}
	pulseLines := []dualLine{{id: SeriesPhase, name: phaseName, colour: colourQ, data: phase, width: 1.2}}
	freqAxis := ""
	if len(w.FreqHz) > 0 {
		freqAxis = "MHz"
		pulseLines = append(pulseLines, dualLine{id: SeriesFrequency, name: "frequency", colour: colourProfile,
			data: xy(w.FreqTimeS, w.FreqHz, 1e6, 1e-6, 4, 4), right: true, width: 1.4})
	}
	spec := dualLine{id: SeriesSpectrum, name: "energy spectrum", colour: colourProfile,
		data: xy(w.SpectrumHz, w.SpectrumDB, 1e-6, 1, 4, 2), width: 1}
	specTitle := "spectrum"
	var xMin, xMax any
	if bw := w.OccupiedBandwidthHz; bw > 0 {
		lo, hi := w.OccupiedHz[0]*1e-6, w.OccupiedHz[1]*1e-6
		specTitle = "99 %: " + siHz(bw)
		spec.markArea = map[string]any{
			"silent":    true,
			"itemStyle": map[string]any{"color": colourClean, "opacity": 0.3},
			"data":      [][2]map[string]any{{{"name": "99 %", "xAxis": math.Round(lo*1e4) / 1e4}, {"xAxis": math.Round(hi*1e4) / 1e4}}},
			"label":     map[string]any{"show": true, "position": "insideBottom", "color": "#1f3b52", "fontSize": 10},
		}
		// Open on the occupied band and its own width each side.
		c := (lo + hi) / 2
		edge := slices.Max(w.SpectrumHz) * 1e-6
		xMin = math.Round(math.Max(c-1.5*(hi-lo), -edge)*1e3) / 1e3
		xMax = math.Round(math.Min(c+1.5*(hi-lo), edge)*1e3) / 1e3
	}
	pulse := dualChart(ChartPulse, key(ChartPulse), [2]dualPlot{
		{title: "transmitted pulse", xName: "time (µs)", leftName: phaseY, rightName: freqAxis, lines: pulseLines},
		{title: specTitle, xName: "MHz re carrier", leftName: "dB", leftMin: scenarios.SpectrumFloorDB, leftMax: 0.0,
			xMin: xMin, xMax: xMax, lines: []dualLine{spec}},
	})
	// The filter's taps and the Doppler tolerance.
	filter := dualChart(ChartFilter, key(ChartFilter), [2]dualPlot{
		{title: strings.ReplaceAll(w.Filter, "_", " ") + " filter taps", xName: "µs re echo", leftName: "re max", rightName: "°", leftMin: 0.0,
			lines: []dualLine{
				{id: SeriesTapAmp, name: "amplitude", colour: colourProfile, data: xy(w.TapTimeS, w.TapAmp, 1e6, 1, 4, 4), width: 1.4},
				{id: SeriesTapPhase, name: "phase", colour: colourQ, data: xy(w.TapTimeS, degrees(w.TapPhaseRad), 1e6, 1, 4, 1), right: true, width: 1},
			}},
		{title: "Doppler tol.", xName: "Doppler (kHz)", leftName: "dB", rightName: "m", leftMin: 0.0,
			lines: []dualLine{
				{id: SeriesLoss, name: "loss", colour: colourThreshold, data: xy(w.DopplerHz, w.DopplerLossDB, 1e-3, 1, 3, 3), width: 1.4},
				{id: SeriesShift, name: "shift", colour: colourProfile, data: xy(w.DopplerHz, w.DopplerShiftM, 1e-3, 1, 3, 3), right: true, width: 1.2, dashed: true},
			}},
	})
	return []chartOut{pulse, filter}
}

// siHz formats a frequency with three significant digits and an SI prefix.
func siHz(v float64) string {
	switch a := math.Abs(v); {
	case a >= 1e9:
		return fmt.Sprintf("%.3g GHz", v/1e9)
	case a >= 1e6:
		return fmt.Sprintf("%.3g MHz", v/1e6)
	case a >= 1e3:
		return fmt.Sprintf("%.3g kHz", v/1e3)
	}
	return fmt.Sprintf("%.3g Hz", v)
}

// wavePlots finds the designer's charts of the last good scenario when its
// waveform, receiver or sample rate changed, from the server's cache or by
// computing them. Charts that cannot be computed are logged and left out;
// only cancellation is an error.
func (ss *session) wavePlots(ctx context.Context, c *evalCache) error {
	if c.scn == c.waveScn {
		return nil
	}
	w, err := json.Marshal(c.scn.Waveform)
	if err != nil {
		return err
	}
	rx, err := json.Marshal(c.scn.Receiver)
	if err != nil {
		return err
	}
	key := string(w) + "|" + string(rx) + "@" + strconv.FormatFloat(c.scn.Radar.SampleRateHz, 'g', -1, 64)
	if key == c.waveKey {
		c.waveScn = c.scn
		return nil
	}
	ch, ok := ss.srv.waves.get(key)
	if !ok {
		// The evaluation's deadline holds here too; past it, the charts are
		// left out rather than holding the frame.
		wctx, cancel := context.WithTimeout(ctx, ss.srv.cfg.EvalTimeout)
		p, err := scenarios.WaveformPlots(wctx, c.scn)
		cancel()
		switch {
		case ctx.Err() != nil:
			return ctx.Err()
		case err != nil:
			ss.log.Warn("waveform plots", "err", err)
			ch = nil
		default:
			ch = waveCharts(p, ss.srv.waves.version())
		}
		ss.srv.waves.put(key, ch)
	}
	c.wave, c.waveKey, c.waveScn = ch, key, c.scn
	return nil
}
