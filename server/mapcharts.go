package server

import (
	"fmt"
	"strconv"

	"github.com/go-echarts/go-echarts/v2/charts"
	"github.com/go-echarts/go-echarts/v2/opts"

	"github.com/pulsewright/pulsewright/scenarios"
)

// Heat maps (the ambiguity surface, the range–Doppler map) and the cuts
// through them. A heat map in ECharts needs category axes; they are
// hidden, and value axes over the same grid, spanning the cells' outer
// edges, carry the ticks in physical units and the target markers.

// Heat map chart names and series ids.
const (
	ChartAmbiguityCuts = "ambcuts"
	ChartRDMap         = "rdmap"
	ChartRDCuts        = "rdcuts"

	SeriesZeroDoppler = "zero-doppler"
	SeriesZeroDelay   = "zero-delay"
	SeriesRDMap       = "rdmap"
	SeriesCell        = "cell" // the selected cell of the map
	SeriesRangeCut    = "range-cut"
	SeriesRangeClean  = "range-cut-clean"
	SeriesDopplerCut  = "doppler-cut"
	SeriesDopplerCln  = "doppler-cut-clean"
)

// Ambiguity surface: grid on the screen and colours from the floor (left
// blank) to the peak.
const (
	ambiguityCols    = 201
	ambiguityRows    = 81
	ambiguityFloorDB = -60.0
)

var ambiguityColours = []string{"#f4f4ee", "#c9ddd4", "#6aa9a4", "#2b6a8f", "#182848"}

// Range–Doppler map on the screen: at most rdMaxRows Doppler rows and
// rdMaxCells cells (a heat map of 131 k cells took 3 s to draw; 16 k
// draw in a frame or two), about one column per two pixels of the plot.
// Cells in the bottom tenth of the colour span are left out: drawn, they
// would be all but the background's colour, and each cell costs about
// 10 µs to paint in a software-rendered canvas.
const (
	rdMaxRows  = 128
	rdMaxCells = 16000
	rdSpanDB   = 80.0 // colours span at most this far under the top
	rdBlank    = 0.1  // the fraction of the colour span left blank
)

var rdColours = []string{"#f6f4ec", "#cfd8dc", "#8fa9b8", "#4f7391", "#27456a", "#10203a"}

// visualMapJSON patches the bounds of a go-echarts visual map: they are
// float32 with omitempty, so a minimum or maximum of 0 dB would vanish
// and ECharts would take its own (0 and 200).
type visualMapJSON struct {
	opts.VisualMap
	Min      float64 `json:"min"`
	Max      float64 `json:"max"`
	Realtime bool    `json:"realtime"`
	ItemW    int     `json:"itemWidth"`
}

// heat is one heat map: cols × rows cells over value axes [x0, x1] ×
// [y0, y1], cells encoded [[col,row,dB],…].
type heat struct {
	xName, yName   string
	x0, x1, y0, y1 float64
	xCats, yCats   []float64 // cell centres, for the tooltip
	vmin, vmax     float64
	colours        []string
	cells          []byte
	// pieces, when set, make the colour legend piecewise: one
	// {"value", "label", "color"} per value the cells take.
	pieces []map[string]any
}

// heatChart makes the option of a heat map; more adds series on the
// value axes (xAxisIndex and yAxisIndex 1), each with its encoded data.
func heatChart(name, key string, h heat, more ...heatSeries) chartOut {
	c := charts.NewHeatMap()
	vm := opts.VisualMap{Calculable: opts.Bool(true), Dimension: "2", Orient: "vertical", Right: "2", Top: "middle",
		Text: []string{"dB", ""}, InRange: &opts.VisualMapInRange{Color: h.colours}}
	hidden := opts.Bool(false)
	ends := &opts.AxisLabel{ShowMinLabel: opts.Bool(false), ShowMaxLabel: opts.Bool(false)}
	c.SetGlobalOptions(
		charts.WithAnimation(false),
		charts.WithLegendOpts(opts.Legend{Show: opts.Bool(false)}),
		charts.WithXAxisOpts(opts.XAxis{Type: "category", Show: hidden, Data: h.xCats}),
		charts.WithYAxisOpts(opts.YAxis{Type: "category", Show: hidden, Data: h.yCats}),
		charts.WithVisualMapOpts(vm),
	)
	c.ExtendXAxis(opts.XAxis{Type: "value", Position: "bottom", Name: h.xName, NameLocation: "middle", NameGap: 24, Min: h.x0, Max: h.x1, AxisLabel: ends,
		SplitLine: &opts.SplitLine{Show: hidden}})
	c.ExtendYAxis(opts.YAxis{Type: "value", Position: "left", Name: h.yName, NameLocation: "middle", NameGap: gridLeft - 16, Min: h.y0, Max: h.y1, AxisLabel: ends,
		SplitLine: &opts.SplitLine{Show: hidden}})
	c.AddSeries("map", nil, charts.WithSeriesId(name))
	for _, s := range more {
		c.AddSeries(s.name, nil, append([]charts.SeriesOpts{charts.WithSeriesId(s.id), charts.WithSeriesOpts(func(ss *charts.SingleSeries) {
			ss.Type, ss.XAxisIndex, ss.YAxisIndex = "scatter", 1, 1
		})}, s.opts...)...)
	}
	c.Validate()
	opt := c.JSON()
	opt["visualMap"] = []visualMapJSON{{VisualMap: vm, Min: h.vmin, Max: h.vmax, ItemW: 12}}
	if h.pieces != nil {
		opt["visualMap"] = []map[string]any{{"type": "piecewise", "dimension": 2, "pieces": h.pieces, "orient": "vertical", "right": 2, "top": "middle",
			"itemWidth": 12, "itemHeight": 10, "textStyle": map[string]any{"fontSize": 10}}}
	}
	opt["tooltip"] = tooltipJSON("item")
	// Blank cells show the grid's background: the bottom colour.
	opt["grid"] = []map[string]any{{"left": gridLeft, "right": 62, "top": 12, "bottom": 40, "show": true,
		"backgroundColor": h.colours[0], "borderWidth": 0}}
	b := &builder{data: []seriesData{{id: name, data: h.cells}}}
	zero := 0
	first := c.MultiSeries[0]
	first.Data = nil
	series := []seriesJSON{{SingleSeries: first, Data: placeholder(0), Progressive: &zero}}
	for i, s := range more {
		ss := c.MultiSeries[i+1]
		ss.Data = nil
		// Above the cells (z 2), names included: a name on a strong
		// cell was drawn under it.
		sj := seriesJSON{SingleSeries: ss, Data: placeholder(i + 1), Z: 3}
		if s.labels {
			sj.LabelLayout = mapLabelLayout
		}
		series = append(series, sj)
		b.data = append(b.data, seriesData{id: s.id, data: s.data})
	}
	opt["series"] = series
	return b.splice(name, key, opt)
}

// heatSeries is a scatter series drawn over a heat map.
type heatSeries struct {
	id, name string
	data     []byte
	opts     []charts.SeriesOpts
	// labels, when set, names the markers (mapLabel) and keeps their
	// names from overlapping (mapLabelLayout).
	labels bool
}

// appendCell appends one heat map cell [col,row,v] to an array that b,
// holding only the array's cells, opens.
func appendCell(b []byte, col, row int, v float64) []byte {
	if len(b) > 1 {
		b = append(b, ',')
	}
	return appendCellItem(b, col, row, v)
}

// appendCellItem appends one heat map cell [col,row,v].
func appendCellItem(b []byte, col, row int, v float64) []byte {
	b = append(b, '[')
	b = strconv.AppendInt(b, int64(col), 10)
	b = append(b, ',')
	b = strconv.AppendInt(b, int64(row), 10)
	b = append(b, ',')
	b = appendFixed(b, clampDB(v), 1)
	return append(b, ']')
}

// edges returns the outer edges of n uniform cells centred on v[0] and
// v[n-1].
func edges(v []float64) (float64, float64) {
	n := len(v)
	if n < 2 {
		return v[0] - 0.5, v[0] + 0.5
	}
	step := (v[n-1] - v[0]) / float64(n-1)
	return v[0] - step/2, v[n-1] + step/2
}

// ambiguityChart plots |χ(τ, f_d)| as a heat map: delay (as range) across,
// Doppler up, dB re the peak. Cells at the floor are left out.
func ambiguityChart(a *scenarios.AmbiguitySurface, version int) chartOut {
	cells := []byte{'['}
	for r, row := range a.DB {
		for col, v := range row {
			if v >= ambiguityFloorDB+0.05 { // a cell that prints as the floor (one decimal) is left out too
				cells = appendCell(cells, col, r, v)
			}
		}
	}
	cells = append(cells, ']')
	kHz := roundAll(a.DopplerHz, 1e-3, 1000)
	h := heat{xName: "delay as range (m)", yName: "Doppler (kHz)", xCats: roundAll(a.DelayM, 1, 100), yCats: kHz,
		vmin: ambiguityFloorDB, vmax: 0, colours: ambiguityColours, cells: cells}
	h.x0, h.x1 = edges(a.DelayM)
	h.y0, h.y1 = edges(kHz)
	out := heatChart(ChartAmbiguity, fmt.Sprintf("ambiguity/%d", version), h)
	out.static = true
	return out
}

// twoCuts builds a chart of two line plots side by side, each with its
// own axes and a heading: the cuts through a heat map.
type cutPlot struct {
	title, xName, yName string
	yMin                any
	lines               []cutLine
}

type cutLine struct {
	id, name, colour string
	data             []byte
	width            float32
}

// cutsRightLeft is where the right plot of two cuts starts.
const cutsRightLeft = "58%"

func twoCuts(name, key string, plots [2]cutPlot) chartOut {
	c := charts.NewLine()
	ends := &opts.AxisLabel{ShowMinLabel: opts.Bool(false), ShowMaxLabel: opts.Bool(false)}
	c.SetGlobalOptions(
		charts.WithAnimation(false),
		charts.WithLegendOpts(opts.Legend{Show: opts.Bool(false)}),
		charts.WithGridOpts(
			opts.Grid{Left: strconv.Itoa(gridLeft), Right: "53%", Top: "40", Bottom: "40"},
			opts.Grid{Left: cutsRightLeft, Right: "12", Top: "40", Bottom: "40"}),
	)
	c.XAxisList = nil
	c.YAxisList = nil
	var titles []opts.Title
	for i, p := range plots {
		c.ExtendXAxis(opts.XAxis{Type: "value", GridIndex: i, Name: p.xName, NameLocation: "middle", NameGap: 24,
			Min: "dataMin", Max: "dataMax", SplitNumber: 3, AxisLabel: ends})
		yName := p.yName
		if i == 1 {
			yName = "" // the same as the left plot's
		}
		c.ExtendYAxis(opts.YAxis{Type: "value", GridIndex: i, Name: yName, NameLocation: "middle", NameGap: gridLeft - 16, Min: p.yMin})
		left := strconv.Itoa(gridLeft)
		if i == 1 {
			left = cutsRightLeft
		}
		titles = append(titles, opts.Title{Title: p.title, Left: left, Top: "2", TitleStyle: &opts.TextStyle{FontSize: 12, FontWeight: "normal"}})
	}
	b := &builder{line: c}
	for i, p := range plots {
		for _, l := range p.lines {
			b.add(l.id, l.name, l.colour, l.data, opts.LineStyle{Width: l.width},
				charts.WithSeriesOpts(func(s *charts.SingleSeries) { s.XAxisIndex, s.YAxisIndex = i, i }))
		}
	}
	b.line.Validate()
	opt := b.line.JSON()
	opt["title"] = titles
	opt["legend"] = cutsLegends(plots)
	opt["tooltip"] = tooltipJSON("axis")
	return b.spliceSeries(name, key, opt)
}

// ambiguityCutsChart plots the zero-Doppler cut (against delay) and the
// zero-delay cut (against Doppler) of the ambiguity surface.
func ambiguityCutsChart(a *scenarios.AmbiguitySurface, version int) chartOut {
	line := func(xs, ys []float64) []byte {
		p := make(points, 0, 2*len(xs))
		for i := range min(len(xs), len(ys)) {
			p = append(p, clampAmp(xs[i]), clampDB(ys[i]))
		}
		return p.appendJSON(nil, dbDecimals)
	}
	kHz := roundAll(a.DopplerHz, 1e-3, 1000)
	out := twoCuts(ChartAmbiguityCuts, fmt.Sprintf("ambcuts/%d", version), [2]cutPlot{
		{title: "zero Doppler", xName: "delay as range (m)", yName: "dB re peak", yMin: ambiguityFloorDB,
			lines: []cutLine{{SeriesZeroDoppler, "zero Doppler", colourProfile, line(a.DelayM, a.ZeroDoppler), 1.2}}},
		{title: "zero delay", xName: "Doppler (kHz)", yName: "dB re peak", yMin: ambiguityFloorDB,
			lines: []cutLine{{SeriesZeroDelay, "zero delay", colourI, line(kHz, a.ZeroDelay), 1.2}}},
	})
	out.static = true
	return out
}
