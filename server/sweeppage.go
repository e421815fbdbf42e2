package server

import (
	"fmt"
	"html/template"
	"io"
	"strconv"
	"strings"

	"github.com/pulsewright/pulsewright/scenarios"
)

// sweepPalette colours the series of the sweep page: our own choice.
var sweepPalette = []string{"#0b5394", "#c2410c", "#1b7f3b", "#7c3aed", "#0e7490", "#b45309", "#be185d", "#4d7c0f"}

// WriteSweepPage writes a self-contained HTML page of a sweep: each
// target's margin over the threshold against the swept value (one line
// per target and per value of the other swept paths), and the waveform's
// PSLR and mismatch loss. pts are the points computed, in grid order; an
// interrupted sweep draws what it has.
func WriteSweepPage(w io.Writer, base *scenarios.Scenario, g *scenarios.Grid, pts []scenarios.Point) error {
	xa := 0 // the x axis: the first path with more than one value
	for k, a := range g.Axes {
		if len(a.Values) > 1 {
			xa = k
			break
		}
	}
	axis := g.Axes[xa]
	numeric := true
	xs := make([]float64, len(axis.Values))
	for i := range axis.Values {
		v, err := strconv.ParseFloat(axis.Label(i), 64)
		if err != nil {
			numeric = false
			break
		}
		xs[i] = v
	}
	xval := func(p scenarios.Point) any {
		if numeric {
			return xs[p.Values[xa]]
		}
		return axis.Label(p.Values[xa])
	}
	// Series key: the values of the other multi-valued axes.
	other := func(p scenarios.Point) string {
		var parts []string
		for k, a := range g.Axes {
			if k != xa && len(a.Values) > 1 {
				parts = append(parts, a.Path+"="+a.Label(p.Values[k]))
			}
		}
		return strings.Join(parts, ", ")
	}
	type line struct {
		name string
		data [][2]any
	}
	var margins, figs []*line
	find := func(ls *[]*line, name string) *line {
		for _, l := range *ls {
			if l.name == name {
				return l
			}
		}
		l := &line{name: name}
		*ls = append(*ls, l)
		return l
	}
	for _, p := range pts {
		key := other(p)
		suffix := ""
		if key != "" {
			suffix = " (" + key + ")"
		}
		for _, t := range p.Report.Targets {
			var y any // null: no margin (out of window)
			if t.ThresholdMarginDB != nil {
				y = round4(*t.ThresholdMarginDB)
			}
			l := find(&margins, t.ID+suffix)
			l.data = append(l.data, [2]any{xval(p), y})
		}
		wf := p.Report.Waveform
		l := find(&figs, "PSLR"+suffix)
		var pslr any // no sidelobes: a gap in the line
		if wf.PSLRDB != nil {
			pslr = round4(*wf.PSLRDB)
		}
		l.data = append(l.data, [2]any{xval(p), pslr})
		l = find(&figs, "mismatch loss"+suffix)
		l.data = append(l.data, [2]any{xval(p), round4(wf.MismatchLossDB)})
	}
	build := func(title, yName string, ls []*line, zeroLine bool) map[string]any {
		c := baseLine(title, axis.Path, yName)
		opt := c.JSON()
		xt := "value"
		if !numeric {
			xt = "category"
		}
		opt["xAxis"] = []map[string]any{{"type": xt, "name": axis.Path, "nameLocation": "middle", "nameGap": 28, "scale": true}}
		opt["yAxis"] = []map[string]any{{"type": "value", "name": yName, "scale": true}}
		opt["legend"] = map[string]any{"show": true, "top": 28, "type": "scroll"}
		opt["grid"] = []map[string]any{{"left": 64, "right": 28, "top": 72, "bottom": 76}}
		var series []map[string]any
		for i, l := range ls {
			s := lineSeries(l.name, sweepPalette[i%len(sweepPalette)], 2, l.data)
			s["showSymbol"] = true
			s["symbolSize"] = 7
			delete(s, "sampling")
			if zeroLine && i == 0 {
				s["markLine"] = map[string]any{"silent": true, "symbol": "none",
					"lineStyle": map[string]any{"color": "#6b7280", "type": "dashed"},
					"label":     map[string]any{"formatter": "detection threshold", "position": "insideEndTop"},
					"data":      []map[string]any{{"yAxis": 0}}}
			}
			series = append(series, s)
		}
		opt["series"] = series
		return opt
	}
	cs := []pageChart{
		{ID: "margin", Height: 440, Option: build("Margin over the detection threshold", "margin (dB)", margins, true)},
		{ID: "figures", Height: 320, Option: build("Waveform figures", "dB", figs, false)},
	}
	js, err := chartScript(cs)
	if err != nil {
		return err
	}
	var axes []string
	for _, a := range g.Axes {
		labels := make([]string, len(a.Values))
		for i := range a.Values {
			labels[i] = a.Label(i)
		}
		axes = append(axes, a.Path+" = "+strings.Join(labels, ", "))
	}
	title := base.Name
	if title == "" {
		title = "Unnamed scenario"
	}
	return sweepTmpl.Execute(w, map[string]any{
		"Title":   title,
		"Axes":    axes,
		"Count":   fmt.Sprintf("%d of %d points", len(pts), g.Len()),
		"Style":   template.CSS(pageStyle),
		"Charts":  cs,
		"Script":  js,
		"Caution": caution,
		"Engine":  scenarios.RunningEngine().String(),
	})
}

var sweepTmpl = template.Must(template.New("sweep").Parse(`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>Sweep · {{.Title}} · Pulsewright</title>
<style>{{.Style}}</style>
</head>
<body>
<main>
<header>
<div class="brand">Pulsewright · sweep</div>
<h1>{{.Title}}</h1>
<p class="notes">{{.Count}}. Swept: {{range $i, $a := .Axes}}{{if $i}}; {{end}}<code>{{$a}}</code>{{end}}</p>
</header>
{{range .Charts}}<div class="chart" id="{{.ID}}" style="height:{{.Height}}px"></div>
{{end}}
<p class="notes">A target's expected peak clears the threshold where this margin is at or above 0 dB; whether it is detected is decided on its probability of detection against the required one (the report's status). Missing points are targets outside the receive window.</p>
<div class="caution"><b>Caution.</b> {{.Caution}}</div>
<footer>Made with Pulsewright: <span class="engine">{{.Engine}}</span>.</footer>
</main>
<script type="module">{{.Script}}</script>
</body>
</html>
`))
