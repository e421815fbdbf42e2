package server

import (
	"encoding/json"
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/pulsewright/pulsewright/scenarios"
)

// The velocity response of a scenario's staggered CPIs (radar.pri_stagger_s
// or a schedule CPI's): each CPI's best-bin response against range rate,
// dB re its mean, from 0 to 1.25 times the largest first blind speed,
// with each stagger's first true blind speed λ/(2Δ) marked, and the
// blind speeds of its PRIs alone as dashed marks (docs/detection.md §16).
// The page shows it under the schedule editor (web/static/js/stagger.js).

// ChartVelocity is the velocity response chart's name; its series ids are
// "velocity" + the CPI's number from 1.
const ChartVelocity = "velocity"

// velocityPoints is the number of range rates per curve.
const velocityPoints = 361

// velocityFloorDB is the lowest response drawn, dB: deeper nulls sit on it.
const velocityFloorDB = -40

var velocityColours = []string{"#1f5f8b", "#b45309", "#2f7d3a", "#7c3aed", "#be123c"}

// velocityKey names what the chart depends on: the carrier, the
// receiver's slow-time processing and every CPI's pulses and stagger;
// "" when no CPI is staggered.
func velocityKey(sc *scenarios.Scenario) string {
	if sc == nil {
		return ""
	}
	r := sc.Radar
	staggered := r.Staggered()
	if s := r.Schedule; s != nil {
		for _, c := range s.CPIs {
			staggered = staggered || len(c.PRIStaggerS) > 0
		}
	}
	if !staggered { // no allocation on a frame without a stagger
		return ""
	}
	var b strings.Builder
	fmt.Fprintf(&b, "%g/%s/%+v/%d:%v", r.CarrierHz, sc.Receiver.MTI, sc.Receiver.DopplerWindow, r.Pulses, r.PRIStaggerS)
	if s := r.Schedule; s != nil {
		for _, c := range s.CPIs {
			fmt.Fprintf(&b, "/%d:%v", c.Pulses, c.PRIStaggerS)
		}
	}
	return b.String()
}

// velocityChart returns the chart, false when no CPI is staggered.
func velocityChart(sc *scenarios.Scenario) (chartOut, bool) {
	if sc == nil {
		return chartOut{}, false
	}
	type curve struct {
		k       int
		pattern []float64
		c       scenarios.VelocityCurve
	}
	var cs []curve
	ks := []int{}
	if sc.Radar.Staggered() {
		ks = append(ks, 0)
	}
	if s := sc.Radar.Schedule; s != nil {
		for i, c := range s.CPIs {
			if len(c.PRIStaggerS) > 0 {
				ks = append(ks, i+1)
			}
		}
	}
	span := 0.0
	for _, k := range ks {
		pat := sc.Radar.PRIStaggerS
		if k > 0 {
			pat = sc.Radar.Schedule.CPIs[k-1].PRIStaggerS
		}
		c, ok := scenarios.CPIVelocityCurve(sc, k, velocityPoints)
		if !ok {
			continue
		}
		cs = append(cs, curve{k, pat, c})
		span = math.Max(span, c.RateMPS[len(c.RateMPS)-1])
	}
	if len(cs) == 0 {
		return chartOut{}, false
	}
	var series []map[string]any
	var key strings.Builder
	key.WriteString("velocity")
	for i, c := range cs {
		col := velocityColours[i%len(velocityColours)]
		data := make([][2]float64, len(c.c.RateMPS))
		for j, v := range c.c.RateMPS {
			data[j] = [2]float64{round4(v), math.Round(math.Max(c.c.DB[j], velocityFloorDB)*100) / 100}
		}
		pris := make([]string, len(c.pattern))
		for j, p := range c.pattern {
			pris[j] = strconv.FormatFloat(p*1e6, 'g', 6, 64)
		}
		name := fmt.Sprintf("CPI %d · %s µs", c.k+1, strings.Join(pris, "/"))
		marks := []map[string]any{{"xAxis": round4(c.c.FirstBlindMPS), "lineStyle": map[string]any{"color": col, "type": "solid", "width": 1.5},
			"label": map[string]any{"formatter": fmt.Sprintf("blind %.1f m/s", c.c.FirstBlindMPS), "position": "insideEndTop", "fontSize": 10, "color": col}}}
		for _, v := range c.c.SinglePRIBlindMPS {
			if v < span {
				marks = append(marks, map[string]any{"xAxis": round4(v), "lineStyle": map[string]any{"color": col, "type": "dashed", "width": 1, "opacity": 0.6},
					"label": map[string]any{"show": false}})
			}
		}
		series = append(series, map[string]any{"type": "line", "id": "velocity" + strconv.Itoa(c.k+1), "name": name, "showSymbol": false,
			"lineStyle": map[string]any{"color": col, "width": 1.5}, "itemStyle": map[string]any{"color": col}, "data": data,
			"markLine": map[string]any{"symbol": "none", "silent": true, "data": marks}})
		fmt.Fprintf(&key, "/%d:%v", c.k, c.pattern)
	}
	opt := map[string]any{
		"animation": false,
		"grid":      map[string]any{"left": gridLeft, "right": 14, "top": 30, "bottom": 40},
		"legend":    map[string]any{"show": true, "type": "scroll", "top": 2, "left": 64, "right": 8, "itemWidth": 18, "itemHeight": 10, "textStyle": map[string]any{"fontSize": 11}},
		"tooltip":   tooltipJSON("axis"),
		"xAxis": []map[string]any{{"type": "value", "name": "range rate (m/s)", "nameLocation": "middle", "nameGap": 24, "min": 0, "max": round4(span),
			"axisLabel": map[string]any{"showMaxLabel": false}}},
		"yAxis": []map[string]any{{"type": "value", "name": "response (dB re mean)", "nameLocation": "middle", "nameGap": gridLeft - 16,
			"min": velocityFloorDB}},
		"series": series,
	}
	b, err := json.Marshal(opt)
	if err != nil {
		panic("server: velocity chart not encodable: " + err.Error()) // every number is floored and finite
	}
	return chartOut{name: ChartVelocity, key: key.String(), option: b, static: true}, true
}
