package server

import (
	"fmt"
	"html/template"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/go-echarts/go-echarts/v2/charts"
	"github.com/go-echarts/go-echarts/v2/opts"

	"github.com/pulsewright/pulsewright/scenarios"
)

// reportBuckets is the number of min/max pairs a profile keeps: about
// 4000 points, twice the width of a wide screen.
const reportBuckets = 2000

// WriteReportPage writes the customer report of one evaluated scenario: a
// single HTML file with ECharts inline and no reference to any other
// resource. It holds the scene, the waveform and its figures, the
// compressed profile with its threshold and a marker per target, the
// waveform's own response, the per-target table with reasons, the
// warnings, the share link and the RF caution note. link is the whole
// share URL.
func WriteReportPage(w io.Writer, s *scenarios.Scenario, res *scenarios.Result, link string) error {
	cs := []pageChart{
		{ID: "profile", Height: 420, Option: profileOption(res)},
		{ID: "response", Height: 320, Option: responseOption(res)},
	}
	js, err := chartScript(cs)
	if err != nil {
		return err
	}
	rep := &res.Report
	data := reportData{
		Title:    s.Name,
		Notes:    noteParagraphs(s.Notes),
		Engine:   engineLine(rep),
		Scene:    sceneRows(s),
		Figures:  figureRows(rep),
		Targets:  targetRows(rep),
		Warnings: rep.Warnings,
		Schedule: scheduleTable(rep.Schedule),
		Link:     link,
		Caution:  caution,
		Style:    template.CSS(pageStyle),
		Charts:   cs,
		Script:   js,
	}
	if data.Title == "" {
		data.Title = "Unnamed scenario"
	}
	return reportTmpl.Execute(w, data)
}

type reportData struct {
	Title          string
	Notes          []string // the scenario's notes, one entry per paragraph
	Engine         string
	Scene, Figures [][2]string
	Targets        []targetRow
	Warnings       []string
	Schedule       *scheduleData // nil without radar.schedule
	Link, Caution  string
	Style          template.CSS
	Charts         []pageChart
	Script         template.JS
}

type targetRow struct {
	ID, Status, Colour, Range, SNR, Margin, Pd, Reason string
}

// priText names the radar's PRI and pulses, or its stagger.
func priText(r scenarios.Radar) string {
	if !r.Staggered() {
		return fmt.Sprintf("%s, %d", scenarios.SI(r.PRIS, "s"), r.Pulses)
	}
	p := make([]string, len(r.PRIStaggerS))
	for i, v := range r.PRIStaggerS {
		p[i] = scenarios.SI(v, "s")
	}
	return fmt.Sprintf("stagger %s in turn, %d", strings.Join(p, " / "), r.Pulses)
}

func sceneRows(s *scenarios.Scenario) [][2]string {
	r, wf, rx := s.Radar, s.Waveform, s.Receiver
	rows := [][2]string{
		{"Carrier", scenarios.SI(r.CarrierHz, "Hz")},
		{"Peak power", scenarios.SI(r.PeakPowerW, "W")},
		{"Antenna gain", fmt.Sprintf("%.4g dBi", r.AntennaGainDBi)},
		{"Noise figure, losses", fmt.Sprintf("%.3g dB, %.3g dB", r.NoiseFigureDB, r.SystemLossDB)},
		{"Sample rate", scenarios.SI(r.SampleRateHz, "Hz")},
		{"PRI, pulses", priText(r)},
		{"Receive window", fmt.Sprintf("%.6g – %.6g m", r.WindowStartM, r.WindowStopM)},
		{"Beamwidth (az × el)", fmt.Sprintf("%.3g° × %.3g°", r.BeamwidthAzDeg, r.BeamwidthElDeg)},
		{"Waveform", wf.Describe()},
		{"Compression filter", rx.Filter},
		{"Weighting", rx.Window.Describe()},
		{"Detector", rx.Detector.Describe()},
		{"Seed", fmt.Sprint(s.Seed)},
	}
	if sc := r.Scan; sc != nil {
		rows = append(rows, [2]string{"Scan", fmt.Sprintf("%.4g °/s in %s, %s beam", sc.RateDegS, sc.Plane, sc.Pattern)})
	}
	for _, t := range s.Targets {
		rows = append(rows, [2]string{"Target " + t.ID, t.Describe()})
	}
	return rows
}

func figureRows(r *scenarios.Report) [][2]string {
	w := r.Waveform
	rows := [][2]string{
		{"Pulse width τ", scenarios.SI(w.PulseWidthS, "s")},
		{"Bandwidth B", scenarios.SI(w.BandwidthHz, "Hz")},
		{"Time–bandwidth B·τ", fmt.Sprintf("%.4g", w.TimeBandwidth)},
		{"Compression gain", fixed(w.CompressionGainDB, 2) + " dB"},
		{"Peak sidelobe level (PSLR)", optDB(w.PSLRDB, "no sidelobes")},
		{"Integrated sidelobe level (ISLR)", optDB(w.ISLRDB, "no sidelobes")},
		{"Main lobe width at −3 dB", fixed(w.Mainlobe3dBM, 2) + " m"},
		{"Mismatch loss", fixed(w.MismatchLossDB, 2) + " dB"},
		{"Sampling (straddle) loss, worst / mean", fixed(w.StraddleLossMaxDB, 2) + " dB / " + fixed(w.StraddleLossMeanDB, 2) + " dB"},
		{"Blind range c·τ/2", fmt.Sprintf("%.0f m", w.BlindRangeM)},
		{"Unambiguous range", fmt.Sprintf("%.0f m", w.UnambiguousRangeM)},
		{"Unambiguous range rate", fmt.Sprintf("±%.2f m/s", w.UnambiguousVelocityMPS)},
	}
	if w.VelocityResolutionMPS != nil {
		rows = append(rows, [2]string{"Range-rate resolution", fmt.Sprintf("%.3g m/s", *w.VelocityResolutionMPS)})
	}
	if sc := r.Scan; sc != nil {
		rows = append(rows, [2]string{"Hits per scan N = θ·PRF/θ̇", fmt.Sprintf("%.1f (dwell %s)", sc.HitsPerScan, scenarios.SI(sc.DwellS, "s"))})
		if sc.CPILossDB != nil {
			rows = append(rows, [2]string{"Scan loss of the CPI", fmt.Sprintf("%s dB over %.2f beamwidths", fixed(*sc.CPILossDB, 2), sc.CPIBeamwidths)})
		}
		rows = append(rows, [2]string{"Beam-shape loss of the dwell, coherent / noncoherent", fixed(sc.BeamShapeLossCoherentDB, 2) + " dB / " + fixed(sc.BeamShapeLossNoncoherentDB, 2) + " dB"})
	}
	return rows
}

func targetRows(r *scenarios.Report) []targetRow {
	out := make([]targetRow, len(r.Targets))
	for i, t := range r.Targets {
		row := targetRow{
			ID:     t.ID,
			Status: strings.ReplaceAll(t.Status, "_", " "),
			Colour: statusColour[t.Status],
			Range:  fixed(t.RangeM, 1),
			SNR:    fixed(t.SNRDB, 1),
			Margin: "—",
			Pd:     "—",
			Reason: t.Reason,
		}
		if t.Pd != nil {
			row.Pd = scenarios.PdText(*t.Pd)
			if t.PdAlone != nil && scenarios.PdText(*t.PdAlone) != row.Pd {
				row.Pd += " (alone " + scenarios.PdText(*t.PdAlone) + ")"
			}
		}
		row.Status += scenarios.MaskedByWords(t.ID, t.MaskedBy)
		if t.MarginDB != nil {
			row.Margin = fixed(*t.MarginDB, 1)
			if row.Margin != "0.0" && !strings.HasPrefix(row.Margin, "-") {
				row.Margin = "+" + row.Margin
			}
		}
		out[i] = row
	}
	return out
}

// baseLine returns a line chart with our common layout.
func baseLine(title, xName, yName string) *charts.Line {
	c := charts.NewLine()
	c.SetGlobalOptions(
		charts.WithTitleOpts(opts.Title{Title: title, Left: "12"}),
		charts.WithAnimation(false),
		charts.WithTooltipOpts(opts.Tooltip{Show: opts.Bool(true), Trigger: "axis"}),
		charts.WithLegendOpts(opts.Legend{Show: opts.Bool(true), Top: "6", Right: "12"}),
		charts.WithGridOpts(opts.Grid{Left: "64", Right: "28", Top: "56", Bottom: "76"}),
		charts.WithXAxisOpts(opts.XAxis{Type: "value", Name: xName, NameLocation: "middle", NameGap: 28, Min: "dataMin", Max: "dataMax"}),
		charts.WithYAxisOpts(opts.YAxis{Type: "value", Name: yName}),
		charts.WithDataZoomOpts(
			opts.DataZoom{Type: "inside", XAxisIndex: []int{0}, FilterMode: "none"},
			opts.DataZoom{Type: "slider", XAxisIndex: []int{0}, FilterMode: "none", End: 100},
		),
	)
	c.Validate()
	return c
}

func lineSeries(name, colour string, width float64, data any) map[string]any {
	return map[string]any{
		"type": "line", "id": name, "name": name, "data": data,
		"showSymbol": false, "sampling": "minmax",
		"lineStyle": map[string]any{"color": colour, "width": width},
		"itemStyle": map[string]any{"color": colour},
	}
}

// profileOption is the compressed range profile: noisy output, noise-free
// output and threshold, in dB re output noise, with a marker per target.
func profileOption(res *scenarios.Result) map[string]any {
	s := &res.Series
	c := baseLine("Compressed range profile", "range (m)", "dB re noise")
	opt := c.JSON()
	prof := roundPairs(minMaxPairs(s.RangeM0, s.RangeStepM, s.ProfileDB, reportBuckets, -40))
	clean := roundPairs(minMaxPairs(s.RangeM0, s.RangeStepM, s.CleanDB, reportBuckets, -40))
	thr := roundPairs(minMaxPairs(s.RangeM0, s.RangeStepM, s.ThresholdDB, reportBuckets, -40))
	var marks []map[string]any
	for _, t := range res.Report.Targets {
		k := int(math.Round((t.RangeM - s.RangeM0) / s.RangeStepM))
		if t.Status == scenarios.StatusOutOfWindow || k < 0 || k >= len(s.CleanDB) {
			continue
		}
		y := math.Max(s.CleanDB[k], -40)
		marks = append(marks, map[string]any{
			"name":      t.ID + " · " + t.Status,
			"value":     []float64{round4(t.RangeM), round4(y)},
			"itemStyle": map[string]any{"color": statusColour[t.Status], "borderColor": "#fff", "borderWidth": 1},
			"label":     map[string]any{"show": true, "formatter": t.ID, "position": "top", "color": statusColour[t.Status], "fontWeight": "bold"},
		})
	}
	opt["series"] = []map[string]any{
		lineSeries("received (with noise)", "#9aa5b1", 1, prof),
		lineSeries("noise-free", "#0b5394", 1.5, clean),
		lineSeries("threshold", "#c2410c", 1.5, thr),
		{"type": "scatter", "id": "targets", "name": "targets", "data": marks, "symbolSize": 12, "symbol": "diamond", "z": 5,
			"itemStyle": map[string]any{"color": "#374151"},
			"tooltip":   map[string]any{"trigger": "item", "formatter": "{b}: {c}"}},
	}
	opt["yAxis"] = []map[string]any{{"type": "value", "name": "dB re noise", "min": -40}}
	setXBounds(opt, "range (m)", s.RangeM0, s.RangeM0+float64(len(s.ProfileDB)-1)*s.RangeStepM)
	return opt
}

// responseOption is the waveform's own zero-Doppler compressed response.
func responseOption(res *scenarios.Result) map[string]any {
	r := &res.Series.Response
	c := baseLine("Compressed response of the waveform (zero Doppler)", "range from peak (m)", "dB re peak")
	opt := c.JSON()
	var pts [][2]float64
	if n := len(r.RangeM); n > 1 {
		step := (r.RangeM[n-1] - r.RangeM[0]) / float64(n-1)
		pts = roundPairs(minMaxPairs(r.RangeM[0], step, r.DB, reportBuckets, -120))
	}
	floor := -60.0 // no sidelobes
	if p := res.Report.Waveform.PSLRDB; p != nil {
		floor = math.Max(-100, math.Floor((*p-30)/10)*10)
	}
	opt["series"] = []map[string]any{lineSeries("response", "#0b5394", 1.2, pts)}
	opt["yAxis"] = []map[string]any{{"type": "value", "name": "dB re peak", "min": floor, "max": 0}}
	if len(pts) > 1 {
		setXBounds(opt, "range from peak (m)", pts[0][0], pts[len(pts)-1][0])
	}
	return opt
}

// setXBounds sets the x axis to [lo, hi] widened to round numbers (a
// fiftieth of a power of ten of the span), so the end labels stay short.
func setXBounds(opt map[string]any, name string, lo, hi float64) {
	step := math.Pow(10, math.Floor(math.Log10(math.Max(hi-lo, 1e-9)))) / 50
	opt["xAxis"] = []map[string]any{{"type": "value", "name": name, "nameLocation": "middle", "nameGap": 28,
		"min": math.Floor(lo/step) * step, "max": math.Ceil(hi/step) * step}}
}

var reportTmpl = template.Must(template.New("report").Parse(`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>{{.Title}} · Pulsewright report</title>
<style>{{.Style}}</style>
</head>
<body>
<main>
<header>
<div class="brand">Pulsewright · scenario report</div>
<h1>{{.Title}}</h1>
</header>
{{if .Notes}}<section class="scenario-notes">
<h2>Notes</h2>
{{range .Notes}}<p>{{.}}</p>
{{end}}</section>
{{end}}
<h2>Targets</h2>
<table>
<tr><th>Target</th><th>Status</th><th class="num">Range (m)</th><th class="num">SNR (dB)</th><th class="num">Margin (dB)</th><th class="num">Pd</th><th>Why</th></tr>
{{range .Targets}}<tr><td><b>{{.ID}}</b></td><td><span class="status" style="background:{{.Colour}}">{{.Status}}</span></td><td class="num">{{.Range}}</td><td class="num">{{.SNR}}</td><td class="num">{{.Margin}}</td><td class="num">{{.Pd}}</td><td>{{.Reason}}</td></tr>
{{else}}<tr><td colspan="7">No targets in this scene.</td></tr>{{end}}
</table>
{{range .Warnings}}<p class="warn">⚠ {{.}}</p>{{end}}
{{with .Schedule}}<h2>PRF schedule</h2>
<p>{{.Head}}</p>
<table>
<tr><th>Target</th>{{range .CPIs}}<th>{{.}}</th>{{end}}<th class="num">Seen</th><th>{{.Rule}}</th><th class="num">Pd</th><th class="num">Range (km)</th><th class="num">Range rate (m/s)</th><th>Why</th></tr>
{{range .Rows}}<tr><td><b>{{.ID}}</b></td>{{range .Cells}}<td>{{.}}</td>{{end}}<td class="num">{{.Seen}}</td><td>{{.Verdict}}</td><td class="num">{{.Pd}}</td><td class="num">{{.Range}}</td><td class="num">{{.Rate}}</td><td>{{.Reason}}</td></tr>
{{end}}</table>
{{end}}
{{range .Charts}}<div class="chart" id="{{.ID}}" style="height:{{.Height}}px"></div>
{{end}}
<p class="notes">SNR is the expected single-pulse SNR at the compression filter's output; Pd is how often the target is seen at the detector's false-alarm rate; a target is detected when its Pd reaches the required Pd. The margin is its SNR at its cell over the SNR the required Pd needs against noise alone (negative: too weak even alone). Profiles are drawn from per-pixel minimum and maximum, so no peak is lost.</p>

<div class="grid2">
<section>
<h2>Scene</h2>
<table class="kv">{{range .Scene}}<tr><th>{{index . 0}}</th><td>{{index . 1}}</td></tr>{{end}}</table>
</section>
<section>
<h2>Waveform figures</h2>
<table class="kv">{{range .Figures}}<tr><th>{{index . 0}}</th><td>{{index . 1}}</td></tr>{{end}}</table>
</section>
</div>

<h2>Open this scene in the workbench</h2>
<p>The link carries the whole scenario; it opens the same picture in any Pulsewright workbench (start it with <code>pulsewright serve</code>).</p>
<div class="link">{{.Link}}</div>

<div class="caution"><b>Caution.</b> {{.Caution}}</div>
<footer>Made with Pulsewright. Every figure here is computed from the scenario above and can be reproduced from the link with the same engine: <span class="engine">{{.Engine}}</span>.</footer>
</main>
<script type="module">{{.Script}}</script>
</body>
</html>
`))

// optDB formats a figure the report may leave out, or says why it is out.
func optDB(v *float64, none string) string {
	if v == nil {
		return none
	}
	return fixed(*v, 2) + " dB"
}

// fixed formats v with prec decimals, never as a negative zero.
func fixed(v float64, prec int) string {
	t := strconv.FormatFloat(v, 'f', prec, 64)
	if strings.Trim(t, "-0.") == "" {
		return strings.TrimPrefix(t, "-")
	}
	return t
}
