package server

import (
	"encoding/json"
	"math"

	"github.com/go-echarts/go-echarts/v2/charts"
	"github.com/go-echarts/go-echarts/v2/opts"

	"github.com/pulsewright/pulsewright/scenarios"
)

// SeriesBreakthrough is the profile's series that shades, as a mark area,
// the range spans where clutter crosses the threshold (false alarms,
// docs/detection.md §10). It holds no data; the profile's key says only
// whether it is there, and a data-only frame carries its mark area's
// data (appendBreakthroughMerge).
const SeriesBreakthrough = "breakthrough"

const colourBreakthrough = "#d97706" // amber, drawn translucent

// appendAreas appends the breakthrough mark area's data: each span of a
// clutter object breaking through inside the window, widened by half a
// gate on each side so that a one-gate span shows, the first span of
// each object labelled; encoded by hand so that nothing is allocated.
// n is the number of areas.
func appendAreas(b []byte, res *scenarios.Result, g grid) (_ []byte, n int) {
	last := g.x(max(g.n-1, 0))
	half := res.Series.RangeStepM / 2
	b = append(b, '[')
	for _, t := range res.Report.Targets {
		if t.Breakthrough == nil {
			continue
		}
		first := true
		for _, sp := range t.Breakthrough.Spans {
			a, z := math.Max(sp.StartM-half, g.x0), math.Min(sp.StopM+half, last)
			if z < a {
				continue
			}
			if n > 0 {
				b = append(b, ',')
			}
			n++
			b = append(b, "[{"...)
			if first {
				b = append(b, `"name":"`...)
				for _, r := range t.ID {
					b = appendStringRune(b, r)
				}
				b = append(b, `: false alarms",`...)
				first = false
			}
			b = append(b, `"xAxis":`...)
			b = appendNumber(b, round2(a))
			b = append(b, `},{"xAxis":`...)
			b = appendNumber(b, round2(z))
			b = append(b, "}]"...)
		}
	}
	return append(b, ']'), n
}

// hasAreas says whether res shades breakthrough areas in the window.
func hasAreas(res *scenarios.Result, g grid) bool {
	if !hasBreakthrough(res) {
		return false
	}
	last := g.x(max(g.n-1, 0))
	half := res.Series.RangeStepM / 2
	for _, t := range res.Report.Targets {
		if t.Breakthrough == nil {
			continue
		}
		for _, sp := range t.Breakthrough.Spans {
			if math.Min(sp.StopM+half, last) >= math.Max(sp.StartM-half, g.x0) {
				return true
			}
		}
	}
	return false
}

// breakthroughKey is the profile key's part for the breakthrough areas.
const breakthroughKey = "+bt"

// breakthroughMarks adds the breakthrough series when some clutter object
// of the report breaks through inside the window, and returns its part
// of the chart key.
func breakthroughMarks(b *builder, res *scenarios.Result, g grid) string {
	areas, n := appendAreas(nil, res, g)
	if n == 0 {
		return ""
	}
	b.line.AddSeries("clutter breakthrough", nil,
		charts.WithSeriesId(SeriesBreakthrough),
		charts.WithItemStyleOpts(opts.ItemStyle{Color: colourBreakthrough}),
		charts.WithLineStyleOpts(opts.LineStyle{Color: colourBreakthrough, Width: 0}),
	)
	b.data = append(b.data, seriesData{id: SeriesBreakthrough, data: []byte("[]")})
	b.extra[SeriesBreakthrough] = seriesExtra{MarkArea: map[string]any{
		"silent":    true,
		"itemStyle": map[string]any{"color": colourBreakthrough, "opacity": 0.2},
		"label":     map[string]any{"show": true, "position": "insideBottom", "color": "#92400e", "fontSize": 11}, // markers label the top
		"data":      json.RawMessage(areas),
	}}
	return breakthroughKey
}
