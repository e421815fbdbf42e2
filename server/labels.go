package server

import (
	"encoding/json"
	"maps"
	"math"

	"github.com/go-echarts/go-echarts/v2/charts"
	"github.com/go-echarts/go-echarts/v2/opts"

	"github.com/pulsewright/pulsewright/scenarios"
)

// Labels on the profile plot, so that it tells its story without someone
// beside it: each marker named, the threshold named at its end, the blind
// range shaded, and a line from each masking target's peak to the target
// it masks, labelled.

// Annotation series ids on the profile (DEVELOPERS.md, Websocket protocol).
const (
	SeriesBlind   = "blind"   // the blind range c·τ/2, shaded (a mark area; its data is empty)
	SeriesMasking = "masking" // masker peak → masked target, one labelled segment per masked target
)

const (
	colourBlind   = "#9aa3ad" // slate grey, drawn translucent
	colourMasking = "#d4651c" // the masked status's orange
)

// markerLabel names each marker by its data item's name (the target id).
var markerLabel = opts.Label{Show: opts.Bool(true), Position: "top", Formatter: "{b}", FontSize: 11, Color: "#25292e"}

// annotate adds the threshold's end label and the blind-range and masking
// series to a profile plot on grid g (the blind range is a mark area, sent
// with the full option: appendProfileKey names it).
func annotate(b *builder, res *scenarios.Result, g grid) {
	b.extra[SeriesThreshold] = seriesExtra{EndLabel: map[string]any{
		"show": true, "formatter": "threshold", "color": colourThreshold, "fontSize": 11,
		"offset": []int{-62, -9}}} // inside the plot, above the line's end
	if end, ok := blindEnd(res); ok {
		b.line.AddSeries("blind range", nil,
			charts.WithSeriesId(SeriesBlind),
			charts.WithItemStyleOpts(opts.ItemStyle{Color: colourBlind}),
			charts.WithLineStyleOpts(opts.LineStyle{Color: colourBlind, Width: 0}),
		)
		b.data = append(b.data, seriesData{id: SeriesBlind, data: []byte("[]")})
		b.extra[SeriesBlind] = seriesExtra{MarkArea: map[string]any{
			"silent":    true,
			"itemStyle": map[string]any{"color": colourBlind, "opacity": 0.22},
			"label":     map[string]any{"show": true, "position": "insideBottom", "color": "#4b535c", "fontSize": 11},
			"data":      [][2]map[string]any{{{"name": "blind range", "xAxis": round2(g.x0)}, {"xAxis": end}}},
		}}
	}
	b.line.AddSeries("masking", nil,
		charts.WithSeriesId(SeriesMasking),
		charts.WithItemStyleOpts(opts.ItemStyle{Color: colourMasking}),
		charts.WithLineStyleOpts(opts.LineStyle{Color: colourMasking, Width: 1.2, Type: "dashed"}),
		// A line's labels hang on its symbols: shown, but a pixel wide.
		charts.WithLineChartOpts(opts.LineChart{ShowSymbol: opts.Bool(true), SymbolSize: 1}),
	)
	b.data = append(b.data, seriesData{id: SeriesMasking, data: appendMasking(nil, res, g)})
	b.extra[SeriesMasking] = seriesExtra{Z: 4}
}

func round2(v float64) float64 { return math.Round(clampAmp(v)*100) / 100 }

// The masking series' data (appendMasking): for each masked target whose
// masker is named and both lie in the window, a segment from the masker's
// peak to the masked target's range at the noise-free profile's level
// there (the masker's response plus the target's own), its masked end
// labelled "<masker>'s response masks <target>" (or its "phase-noise
// skirt" or "I/Q image" when the reason names one); a null value breaks the
// line between segments. A target masked by its own response gets no
// segment: its card and reason say so.

// plainLabel keeps a scenario's text from being read as a label template
// ({a}, {b}, … and rich-text markup).
func plainLabel(s string) string {
	out := make([]rune, 0, len(s))
	for _, r := range s {
		if r != '{' && r != '}' && r != '|' {
			out = append(out, r)
		}
	}
	return string(out)
}

// mustJSON encodes v, which holds only clamped numbers and strings.
func mustJSON(v any) []byte {
	b, err := json.Marshal(v)
	if err != nil {
		panic("server: chart data not encodable: " + err.Error())
	}
	return b
}

// mapLabel names a marker on a heat map: dark text on a pale, rounded
// plate, readable over the darkest cells.
// Its line height is given, so that the box ECharts keeps the names
// apart by (mapLabelLayout) is the plate drawn, whatever the fonts'
// metrics.
var mapLabel = opts.Label{Show: opts.Bool(true), Position: "right", Formatter: "{b}", FontSize: 11, LineHeight: 14, Color: "#10202c",
	BackgroundColor: "rgba(255,255,255,0.85)", BorderRadius: 3}

// mapLabelLayout keeps the names of markers that lie close on a map from
// being drawn over each other: as on the profile, a name that would
// overlap one already placed is left out (ECharts sorts them by symbol
// area, then in data order: the scene's order of targets).
var mapLabelLayout = map[string]any{"hideOverlap": true}

// cutsLegends gives each plot of a twoCuts chart its own legend, under
// its heading, at the plot's left.
func cutsLegends(plots [2]cutPlot) []map[string]any {
	out := make([]map[string]any, 0, 2)
	for i, p := range plots {
		names := make([]string, 0, len(p.lines))
		for _, l := range p.lines {
			names = append(names, l.name)
		}
		left := any(gridLeft)
		if i == 1 {
			left = cutsRightLeft
		}
		out = append(out, map[string]any{"show": true, "data": names, "left": left, "top": 19,
			"itemWidth": 16, "itemHeight": 8, "textStyle": map[string]any{"fontSize": 11}})
	}
	return out
}

// responseNearLobes is how many −3 dB main-lobe widths either side of the
// peak the Response plot opens on: the main lobe and the nearest
// sidelobes of an LFM (about one per 1/B) or a code (one per chip).
// Common practice, no source.
const responseNearLobes = 12

// responseNear is the range span, m, the Response plot opens on; nil when
// the report has no main-lobe width.
func responseNear(res *scenarios.Result) *[2]float64 {
	if near, ok := responseNearSpan(res); ok {
		return &near
	}
	return nil
}

// responseNearSpan is responseNear as a value, and whether there is one.
func responseNearSpan(res *scenarios.Result) ([2]float64, bool) {
	w := res.Report.Waveform.Mainlobe3dBM
	r := res.Series.Response.RangeM
	if !(w > 0) || math.IsInf(w, 0) || len(r) < 2 {
		return [2]float64{}, false
	}
	half := responseNearLobes * w
	if half >= r[len(r)-1] && -half <= r[0] {
		return [2]float64{}, false // the whole response is near
	}
	return [2]float64{round2(-half), round2(half)}, true
}

// buildZoomed is build with the zoom opened on near (nil: everything).
// The wheel and the slider zoom on from there.
func (b *builder) buildZoomed(name, key string, near *[2]float64) chartOut {
	b.line.Validate()
	opt := b.line.JSON()
	inside, slider := maps.Clone(insideJSON), maps.Clone(sliderJSON)
	if near != nil {
		for _, z := range []map[string]any{inside, slider} {
			delete(z, "end")
			z["startValue"], z["endValue"] = near[0], near[1]
		}
	}
	opt["dataZoom"] = []any{inside, slider}
	opt["tooltip"] = tooltipJSON("axis")
	return b.spliceSeries(name, key, opt)
}

// echoWidth is the raw echo plot's width, px: the lower left pane's
// (map_px), or half the profile's when the page did not say.
func echoWidth(vw view) int {
	if vw.mapWidth > 0 {
		return vw.mapWidth
	}
	return max(vw.width/2, 1)
}

// plotColumns is the number of min/max columns for a line plot width px
// wide: one per two pixels of its plot area (a min and a max each, so
// about one point per pixel: the point count the plot can show).
func plotColumns(width int) int {
	return max((width-gridLeft-18)/2, 16)
}
