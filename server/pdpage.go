package server

import (
	"html/template"
	"io"

	"github.com/pulsewright/pulsewright/scenarios"
)

// PdCurve is one line of a detection-probability page: points (x, Pd).
type PdCurve struct {
	Name   string
	Points [][2]float64
}

// PdPage is the content of a self-contained detection-probability page.
type PdPage struct {
	Title     string    // what the curves describe (model, pulses, Pfa, detector)
	Lines     []string  // summary lines printed above the chart
	XName     string    // x-axis name, e.g. "SNR per pulse (dB)" or "range (m)"
	Curves    []PdCurve // Pd against x
	PdMarked  float64   // the required Pd, drawn as a dashed line (0: none)
	XMarked   *float64  // an x (required SNR, coverage range) drawn as a dashed line
	XMarkName string    // label of XMarked
}

// WritePdPage writes a self-contained HTML page with one chart of Pd
// against the x of p, built like the sweep page.
func WritePdPage(w io.Writer, p PdPage) error {
	c := baseLine("Probability of detection", p.XName, "Pd")
	opt := c.JSON()
	opt["xAxis"] = []map[string]any{{"type": "value", "name": p.XName, "nameLocation": "middle", "nameGap": 28, "scale": true}}
	opt["yAxis"] = []map[string]any{{"type": "value", "name": "Pd", "min": 0, "max": 1}}
	opt["legend"] = map[string]any{"show": true, "top": 28, "type": "scroll"}
	opt["grid"] = []map[string]any{{"left": 64, "right": 28, "top": 72, "bottom": 76}}
	var series []map[string]any
	for i, cv := range p.Curves {
		data := make([][2]any, len(cv.Points))
		for k, pt := range cv.Points {
			data[k] = [2]any{round4(pt[0]), round4(pt[1])}
		}
		s := lineSeries(cv.Name, sweepPalette[i%len(sweepPalette)], 2, data)
		delete(s, "sampling")
		if i == 0 {
			var marks []map[string]any
			if p.PdMarked > 0 {
				marks = append(marks, map[string]any{"yAxis": p.PdMarked,
					"label": map[string]any{"formatter": "required Pd", "position": "insideStartTop"}})
			}
			if p.XMarked != nil {
				marks = append(marks, map[string]any{"xAxis": round4(*p.XMarked),
					"label": map[string]any{"formatter": p.XMarkName, "position": "insideEndTop"}})
			}
			if len(marks) > 0 {
				s["markLine"] = map[string]any{"silent": true, "symbol": "none",
					"lineStyle": map[string]any{"color": "#6b7280", "type": "dashed"}, "data": marks}
			}
		}
		series = append(series, s)
	}
	opt["series"] = series
	cs := []pageChart{{ID: "pd", Height: 440, Option: opt}}
	js, err := chartScript(cs)
	if err != nil {
		return err
	}
	return pdTmpl.Execute(w, map[string]any{
		"Title":   p.Title,
		"Lines":   p.Lines,
		"Style":   template.CSS(pageStyle),
		"Charts":  cs,
		"Script":  js,
		"Caution": caution,
		"Engine":  scenarios.RunningEngine().String(),
	})
}

var pdTmpl = template.Must(template.New("pd").Parse(`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>Detection probability · Pulsewright</title>
<style>{{.Style}}</style>
</head>
<body>
<main>
<header>
<div class="brand">Pulsewright · detection probability</div>
<h1>{{.Title}}</h1>
{{range .Lines}}<p class="notes">{{.}}</p>
{{end}}</header>
{{range .Charts}}<div class="chart" id="{{.ID}}" style="height:{{.Height}}px"></div>
{{end}}
<p class="notes">Square-law detector; SNR is the mean signal-to-noise ratio of one pulse after the matched filter. Methods and sources: docs/detection-probability.md.</p>
<div class="caution"><b>Caution.</b> {{.Caution}}</div>
<footer>Made with Pulsewright: <span class="engine">{{.Engine}}</span>.</footer>
</main>
<script type="module">{{.Script}}</script>
</body>
</html>
`))
