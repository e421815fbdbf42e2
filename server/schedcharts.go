package server

import (
	"encoding/json"
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/go-echarts/go-echarts/v2/charts"

	"github.com/pulsewright/pulsewright/scenarios"
)

// Charts of a PRF schedule (radar.schedule): the blind-zones map of the
// schedule, range × range rate, each cell coloured by how many CPIs see a
// target there (neither eclipsed by a transmit pulse nor at a blind
// speed), with every target at its true range and range rate marked by
// the schedule's M-of-N verdict; and one range–Doppler map per CPI of
// more than one pulse.

// Schedule chart names: ChartBlindZones, and ChartCPIMap + the CPI's
// number from 1 ("cpimap1", "cpimap2", …).
const (
	ChartBlindZones = "blindzones"
	ChartCPIMap     = "cpimap"
	SeriesZones     = "zones"
)

// Blind-zones map on the screen: at most bzCols × bzRows cells.
const (
	bzCols = 200
	bzRows = 80
)

// bzMissed and bzSeen colour the cells seen by fewer than M CPIs (the
// schedule misses a target there) and by M or more, darkest for the
// fewest.
var (
	bzMissed = []string{"#8e1b1b", "#c2410c", "#e07b39", "#f0a86a"}
	bzSeen   = []string{"#2b6a8f", "#6aa9a4", "#a9cfc0", "#d7e8dc", "#f4f4ee"}
)

// scheduleCharts returns the schedule's charts, none without a schedule:
// the blind-zones map, and the CPI maps while the page shows them (vw.cpiMaps)
// and res holds them (scenarios.ScheduleMaps).
func scheduleCharts(sc *scenarios.Scenario, res *scenarios.Result, vw view) []chartOut {
	sr := res.Report.Schedule
	if sr == nil || sc == nil || sc.Radar.Schedule == nil {
		return nil
	}
	var out []chartOut
	if c, ok := blindZonesChart(sc, sr); ok {
		out = append(out, c)
	}
	if !vw.cpiMaps {
		return out // the page does not show the CPI maps
	}
	// Each CPI's map over its whole window, at about two thirds of the
	// map's width.
	mv := view{width: vw.width, mapWidth: max(vw.mapWidth*2/3, 200)}
	for k, s := range res.CPISeries {
		if s == nil || s.RangeDoppler == nil || k >= len(sr.CPIs) {
			continue
		}
		c := sr.CPIs[k]
		one := &scenarios.Result{Series: *s}
		one.Report.Waveform.UnambiguousRangeM = c.UnambiguousRangeM
		for j, t := range c.Targets {
			tr := scenarios.TargetReport{ID: t.ID, Status: t.Status, Reason: t.Reason, ApparentRangeRateMPS: t.ApparentRangeRateMPS}
			if j < len(res.Report.Targets) {
				tr.RangeM, tr.RangeShiftM = res.Report.Targets[j].RangeM, res.Report.Targets[j].RangeShiftM
			}
			one.Report.Targets = append(one.Report.Targets, tr)
		}
		if m, ok := rdmapChart(one, mv); ok {
			m.name = ChartCPIMap + strconv.Itoa(k+1)
			m.key = fmt.Sprintf("cpi%d/%s", k+1, m.key)
			out = append(out, m)
		}
	}
	return out
}

// blindZonesChart maps the schedule's blind zones over the ranges and
// range rates of its targets and CPIs.
func blindZonesChart(sc *scenarios.Scenario, sr *scenarios.ScheduleReport) (chartOut, bool) {
	r := sc.Radar
	spec := scenarios.BlindZoneSpec{PulseS: sc.Waveform.PulseWidth(), CarrierHz: r.CarrierHz, M: sr.M,
		RangeCells: bzCols, RateCells: bzRows}
	vb := 0.0
	for _, c := range sr.CPIs {
		spec.PRIs = append(spec.PRIs, c.PRIS)
		spec.Pulses = append(spec.Pulses, c.Pulses)
		if c.PRIStaggerS != nil && spec.Staggers == nil {
			spec.Staggers = make([][]float64, len(sr.CPIs))
		}
		vb = math.Max(vb, c.BlindSpeedMPS)
	}
	for k, c := range sr.CPIs {
		if spec.Staggers != nil {
			spec.Staggers[k] = c.PRIStaggerS
		}
	}
	// Ranges: the window and every target, with room; range rates: two
	// blind speeds of the slowest-folding CPI and every target.
	hiR := r.WindowStopM
	hiV := 2 * vb
	for _, t := range sc.Targets {
		hiR = math.Max(hiR, 1.15*math.Max(t.RangeM, t.RangeStopM))
		hiV = math.Max(hiV, 1.25*math.Abs(t.RangeRateMPS))
	}
	spec.RangeMaxM = math.Min(hiR, 1e8)
	spec.RateMaxMPS = math.Min(math.Max(hiV, 1), 1e4)
	bz, err := scenarios.BlindZones(spec)
	if err != nil {
		return chartOut{}, false // a schedule the map cannot draw (a PRI below 2τ): the report still stands
	}
	n := len(spec.PRIs)
	cells := []byte{'['}
	for i := range bz.Rates {
		for j := range bz.Ranges {
			if s := bz.Seen(i, j); s < n { // seen by every CPI: the background
				cells = appendCell(cells, j, i, float64(s))
			}
		}
	}
	cells = append(cells, ']')
	km := make([]float64, len(bz.Ranges))
	for j, v := range bz.Ranges {
		km[j] = math.Round(v/10) / 100
	}
	rates := roundAll(bz.Rates, 0.1, 1)
	h := heat{xName: "range (km)", yName: "range rate (m/s)", xCats: km, yCats: rates, vmin: 0, vmax: float64(n),
		colours: []string{bzSeen[len(bzSeen)-1]}, cells: cells, pieces: bzPieces(n, sr.M)}
	h.x0, h.x1 = spec.RangeMinM/1000, spec.RangeMaxM/1000
	h.y0, h.y1 = -spec.RateMaxMPS, spec.RateMaxMPS
	marks, err := json.Marshal(bzMarkers(sc, sr, h))
	if err != nil {
		panic("server: blind-zone markers not encodable: " + err.Error()) // every number is clamped
	}
	out := heatChart(SeriesZones, fmt.Sprintf("blindzones/1/%d/%d/%g/%g", n, sr.M, h.x1, h.y1), h, heatSeries{id: SeriesMarkers, name: "targets", data: marks,
		opts: []charts.SeriesOpts{charts.WithSeriesOpts(func(s *charts.SingleSeries) { s.SymbolSize = 13 }), charts.WithLabelOpts(mapLabel)}})
	out.name = ChartBlindZones
	return out, true
}

// bzPieces are the map's legend: one piece per count of CPIs that see a
// cell, the counts below M in the missed colours.
func bzPieces(n, m int) []map[string]any {
	var out []map[string]any
	for s := 0; s <= n; s++ {
		var col string
		if s < m {
			col = bzMissed[min(s, len(bzMissed)-1)] // darkest for none
		} else {
			col = bzSeen[min(n-s, len(bzSeen)-1)]
			if s == n {
				col = bzSeen[len(bzSeen)-1]
			}
		}
		label := fmt.Sprintf("%d of %d", s, n)
		if s < m {
			label += " ✗"
		}
		out = append(out, map[string]any{"value": s, "label": label, "color": col})
	}
	return out
}

// bzMarker is one target on the blind-zones map.
type bzMarker struct {
	Name      string         `json:"name"`
	Value     [2]float64     `json:"value"`
	ID        string         `json:"id"`
	Detected  bool           `json:"detected"`
	Reason    string         `json:"reason"`
	Symbol    string         `json:"symbol"`
	ItemStyle map[string]any `json:"itemStyle"`
}

// bzMarkers places each point target at its true range and range rate,
// clamped into the map, marked by the schedule's verdict.
func bzMarkers(sc *scenarios.Scenario, sr *scenarios.ScheduleReport, h heat) []bzMarker {
	out := []bzMarker{}
	for j, t := range sc.Targets {
		if t.Kind != scenarios.TargetPoint || j >= len(sr.Targets) {
			continue
		}
		st := sr.Targets[j]
		style := statusStyle[scenarios.StatusDetected]
		if !st.Detected {
			style = statusStyle[scenarios.StatusMasked]
		}
		x := math.Min(math.Max(clampAmp(t.RangeM/1000), h.x0), h.x1)
		y := math.Min(math.Max(clampAmp(t.RangeRateMPS), h.y0), h.y1)
		out = append(out, bzMarker{Name: fmt.Sprintf("%s %d/%d", t.ID, st.DetectedIn, sr.N), Value: [2]float64{x, y}, ID: t.ID, Detected: st.Detected,
			Reason: st.Reason, Symbol: style.symbol, ItemStyle: map[string]any{"color": "rgba(255,255,255,0.6)", "borderColor": style.colour, "borderWidth": 2}})
	}
	return out
}

// scheduleData is the HTML report's PRF schedule table.
type scheduleData struct {
	Head, Rule string
	CPIs       []string // column heads: "CPI 1 (1 ms × 1)"
	Rows       []scheduleRow
}

type scheduleRow struct {
	ID                                     string
	Cells                                  []string // status per CPI, with the apparent range where detected
	Seen, Verdict, Pd, Range, Rate, Reason string
}

// scheduleTable lays out a report's schedule for the HTML report; nil
// without one.
func scheduleTable(sr *scenarios.ScheduleReport) *scheduleData {
	if sr == nil {
		return nil
	}
	d := &scheduleData{Rule: fmt.Sprintf("%d-of-%d", sr.M, sr.N)}
	head := []string{fmt.Sprintf("%d CPIs, a target detected when %d of them detect it", sr.N, sr.M)}
	if sr.UnambiguousRangeM != nil {
		head = append(head, fmt.Sprintf("combined unambiguous range %.2f km", *sr.UnambiguousRangeM/1000))
	}
	if sr.FirstBlindSpeedMPS != nil {
		head = append(head, fmt.Sprintf("first speed blind in every CPI %.1f m/s", *sr.FirstBlindSpeedMPS))
	}
	d.Head = strings.Join(head, "; ") + "."
	for k, c := range sr.CPIs {
		if c.PRIStaggerS != nil {
			pris := make([]string, len(c.PRIStaggerS))
			for i, p := range c.PRIStaggerS {
				pris[i] = scenarios.SI(p, "s")
			}
			d.CPIs = append(d.CPIs, fmt.Sprintf("CPI %d (stagger %s × %d, blind %.1f m/s)", k+1, strings.Join(pris, " / "), c.Pulses, c.BlindSpeedMPS))
			continue
		}
		d.CPIs = append(d.CPIs, fmt.Sprintf("CPI %d (%s × %d)", k+1, scenarios.SI(c.PRIS, "s"), c.Pulses))
	}
	for j, t := range sr.Targets {
		row := scheduleRow{ID: t.ID, Seen: fmt.Sprintf("%d/%d", t.DetectedIn, sr.N), Verdict: "missed", Pd: "—", Range: "—", Rate: "—", Reason: t.Reason}
		if t.Detected {
			row.Verdict = "detected"
		}
		if t.Pd != nil {
			row.Pd = scenarios.PdText(*t.Pd)
		}
		if t.RangeM != nil {
			row.Range = fixed(*t.RangeM/1000, 2)
		}
		if t.RangeRateMPS != nil {
			row.Rate = fixed(*t.RangeRateMPS, 1)
		}
		for _, c := range sr.CPIs {
			ct := c.Targets[j]
			cell := strings.ReplaceAll(ct.Status, "_", " ")
			if ct.Detected && ct.ApparentRangeM != nil {
				cell += fmt.Sprintf(" at %.2f km", *ct.ApparentRangeM/1000)
			}
			row.Cells = append(row.Cells, cell)
		}
		d.Rows = append(d.Rows, row)
	}
	return d
}
