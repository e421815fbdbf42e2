package server

import (
	"context"
	"fmt"
	"html/template"
	"io"
	"math"
	"net/http"
	"strconv"

	"github.com/go-echarts/go-echarts/v2/charts"
	"github.com/go-echarts/go-echarts/v2/opts"

	"github.com/pulsewright/pulsewright/scenarios"
)

// The Pd curves of one target (scenarios.CoverageOf): Pd against the SNR
// its test sees, and Pd against range, side by side. The page's "Pd
// curves" tab fetches them from POST /api/v1/coverage; "pulsewright
// coverage --format html" writes them into a page of their own.

// Series ids of the Pd curves chart.
const (
	SeriesPdSNR   = "pd-snr"   // Pd against SNR, noise alone
	SeriesPdRange = "pd-range" // Pd in the scene against range
	SeriesPdAlone = "pd-alone" // Pd alone against range
)

// defaultCurvePoints is the number of ranges of the page's range curve.
const defaultCurvePoints = 120

var pdGrids = [2]opts.Grid{
	{Left: "40", Right: "55%", Top: "46", Bottom: "40"},
	{Left: "55%", Right: "16", Top: "46", Bottom: "40"},
}

// pdMark is a dashed mark line at an x or a y value with a label.
func pdMark(axis string, v float64, label, pos string) map[string]any {
	return map[string]any{axis: round4(v), "label": map[string]any{"formatter": label, "position": pos, "fontSize": 10}}
}

// raised lifts a mark's label above the one drawn at the plain distance,
// so that two vertical marks close together stay readable.
func raised(m map[string]any) map[string]any {
	m["label"].(map[string]any)["distance"] = 14
	return m
}

// CoverageOption builds the ECharts option of the Pd curves of c: Pd
// against SNR with the required Pd, the SNR it needs and the target's own
// SNR marked; Pd (in the scene and alone) against range with the
// required Pd, the target's range and the coverage range marked. The range
// axis is in metres and named "range (m)", so that the page restates it in
// the units the user chose (web/static/js/units.js, axisUnits).
func CoverageOption(c *scenarios.Coverage) map[string]any {
	l := charts.NewLine()
	l.SetGlobalOptions(
		charts.WithAnimation(false),
		charts.WithGridOpts(pdGrids[0], pdGrids[1]),
	)
	l.XAxisList, l.YAxisList = nil, nil
	for i, name := range []string{"SNR at its cell (dB)", "range (m)"} {
		l.ExtendXAxis(opts.XAxis{Type: "value", GridIndex: i, Name: name, NameLocation: "middle", NameGap: 22,
			Min: "dataMin", Max: "dataMax", SplitNumber: 4,
			AxisLabel: &opts.AxisLabel{FontSize: 10, ShowMinLabel: opts.Bool(false), ShowMaxLabel: opts.Bool(false)}})
		l.ExtendYAxis(opts.YAxis{Type: "value", GridIndex: i, Name: "Pd", Min: 0, Max: 1, SplitNumber: 5,
			NameGap: 6, AxisLabel: &opts.AxisLabel{FontSize: 10}})
	}
	l.Validate()
	opt := l.JSON()
	// Max 0 and Min 0 are dropped by omitempty; the Pd axes are 0 … 1.
	ya := []map[string]any{}
	for i := range 2 {
		ya = append(ya, map[string]any{"type": "value", "gridIndex": i, "name": "Pd", "min": 0, "max": 1, "splitNumber": 5,
			"nameGap": 4, "axisLabel": map[string]any{"fontSize": 10}})
	}
	opt["yAxis"] = ya
	title := func(text, left string) map[string]any {
		return map[string]any{"text": text, "left": left, "top": 2, "textStyle": map[string]any{"fontSize": 12, "fontWeight": "normal"}}
	}
	opt["title"] = []map[string]any{title("noise alone", pdGrids[0].Left)}
	opt["legend"] = map[string]any{"show": true, "right": 12, "top": 2, "itemWidth": 14, "itemHeight": 8, "itemGap": 6,
		"textStyle": map[string]any{"fontSize": 10}, "data": []string{"in the scene", "alone"}}
	opt["tooltip"] = tooltipJSON("axis")

	req := c.PdRequired
	var snr [][2]float64
	for _, p := range c.BySNR {
		snr = append(snr, [2]float64{round4(p.SNRDB), round4(p.Pd)})
	}
	snrMarks := []map[string]any{pdMark("yAxis", req, fmt.Sprintf("Pd %g", req), "insideEndTop")}
	if c.SNRRequiredDB != nil {
		snrMarks = append(snrMarks, pdMark("xAxis", *c.SNRRequiredDB, "needed", "end"))
	}
	if c.SNRDB != nil && len(snr) > 0 && *c.SNRDB >= snr[0][0] && *c.SNRDB <= snr[len(snr)-1][0] {
		snrMarks = append(snrMarks, raised(pdMark("xAxis", *c.SNRDB, "now", "end")))
	}
	s0 := lineSeries(SeriesPdSNR, colourProfile, 2, snr)
	s0["name"] = "Pd"
	delete(s0, "sampling")
	s0["markLine"] = map[string]any{"silent": true, "symbol": "none", "lineStyle": map[string]any{"color": "#6b7280", "type": "dashed"}, "data": snrMarks}

	var scene, alone [][2]any
	for _, p := range c.ByRange {
		x := round4(p.RangeM)
		scene = append(scene, [2]any{x, pdOrNull(p.Pd)})
		alone = append(alone, [2]any{x, pdOrNull(p.PdAlone)})
	}
	rangeMarks := []map[string]any{pdMark("yAxis", req, fmt.Sprintf("Pd %g", req), "insideEndTop"),
		pdMark("xAxis", c.RangeM, c.Target, "end")}
	if c.CoverageM != nil {
		rangeMarks = append(rangeMarks, raised(pdMark("xAxis", *c.CoverageM, "coverage", "end")))
	}
	s1 := lineSeries(SeriesPdRange, colourProfile, 2, scene)
	s1["name"] = "in the scene"
	s2 := lineSeries(SeriesPdAlone, colourClean, 1.5, alone)
	s2["name"] = "alone"
	s2["lineStyle"] = map[string]any{"color": colourClean, "width": 1.5, "type": "dashed"}
	for _, s := range []map[string]any{s1, s2} {
		delete(s, "sampling")
		s["xAxisIndex"], s["yAxisIndex"] = 1, 1
		s["connectNulls"] = false
	}
	s1["markLine"] = map[string]any{"silent": true, "symbol": "none", "lineStyle": map[string]any{"color": "#6b7280", "type": "dashed"}, "data": rangeMarks}
	opt["series"] = []map[string]any{s0, s1, s2}
	return opt
}

// pdOrNull is a Pd for a chart, or null (a gap) where none applies.
func pdOrNull(p *float64) any {
	if p == nil || math.IsNaN(*p) {
		return nil
	}
	return round4(*p)
}

// coverageBody is the answer of POST /api/v1/coverage.
type coverageBody struct {
	Coverage *scenarios.Coverage `json:"coverage"`
	Option   map[string]any      `json:"option"` // the chart, for setOption
}

// handleCoverage computes the Pd curves of the target ?target=ID of the
// scenario in the body (?points=N ranges, 2 … 2000, default 120).
func (s *Server) handleCoverage(w http.ResponseWriter, r *http.Request) {
	sc, err := s.decodeScenario(w, r)
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	points := defaultCurvePoints
	if v := r.URL.Query().Get("points"); v != "" {
		n, err := strconv.Atoi(v)
		if err != nil || n < 2 || n > scenarios.MaxCurvePoints {
			s.writeError(w, r, fmt.Errorf("points %q: want a whole number 2 … %d: %w", v, scenarios.MaxCurvePoints, scenarios.ErrInvalid))
			return
		}
		points = n
	}
	id := r.URL.Query().Get("target")
	var cov *scenarios.Coverage
	_, err = s.admitted(r.Context(), sc, false, func(ctx context.Context, sc *scenarios.Scenario) (*scenarios.Result, error) {
		var err error
		cov, err = scenarios.CoverageOf(ctx, sc, id, 0, 0, points)
		return &scenarios.Result{}, err
	})
	if err != nil {
		s.writeError(w, r, fmt.Errorf("Pd curves of %q: %w", id, err))
		return
	}
	writeJSON(w, http.StatusOK, coverageBody{Coverage: cov, Option: CoverageOption(cov)})
}

// WriteCoveragePage writes a self-contained HTML page with the Pd curves
// of c and lines of text above them.
func WriteCoveragePage(w io.Writer, c *scenarios.Coverage, lines []string) error {
	cs := []pageChart{{ID: "pdcurves", Height: 420, Option: CoverageOption(c)}}
	js, err := chartScript(cs)
	if err != nil {
		return err
	}
	return pdTmpl.Execute(w, map[string]any{
		"Title":   fmt.Sprintf("%s: Pd curves of %s", c.Scenario, c.Target),
		"Lines":   lines,
		"Style":   template.CSS(pageStyle),
		"Charts":  cs,
		"Script":  js,
		"Caution": caution,
		"Engine":  scenarios.RunningEngine().String(),
	})
}
