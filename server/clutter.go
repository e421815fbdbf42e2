package server

import (
	"hash/fnv"
	"math"
	"strconv"

	"github.com/go-echarts/go-echarts/v2/charts"
	"github.com/go-echarts/go-echarts/v2/opts"

	"github.com/pulsewright/pulsewright/scenarios"
)

// SeriesBreakthrough is the profile's series that shades, as a mark area,
// the range spans where clutter crosses the threshold (false alarms,
// docs/detection.md §10). It holds no data; its extent is part of the
// chart key, so a frame whose spans change sends the full option.
const SeriesBreakthrough = "breakthrough"

const colourBreakthrough = "#d97706" // amber, drawn translucent

// breakthroughMarks adds the breakthrough series when some clutter object
// of the report breaks through inside the window, and returns its part
// of the chart key. Each span is widened by half a gate on each side, so
// a one-gate span shows; the first span of each object is labelled.
func breakthroughMarks(b *builder, res *scenarios.Result, g grid) string {
	last := g.x(max(g.n-1, 0))
	half := res.Series.RangeStepM / 2
	var areas [][2]map[string]any
	h := fnv.New64a()
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
			from := map[string]any{"xAxis": round2(a)}
			if first {
				from["name"] = t.ID + ": false alarms"
				first = false
			}
			areas = append(areas, [2]map[string]any{from, {"xAxis": round2(z)}})
			h.Write([]byte(t.ID + strconv.FormatFloat(round2(a), 'f', -1, 64) + "-" + strconv.FormatFloat(round2(z), 'f', -1, 64) + ";"))
		}
	}
	if len(areas) == 0 {
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
		"data":      areas,
	}}
	return "+bt" + strconv.FormatUint(h.Sum64(), 36)
}
