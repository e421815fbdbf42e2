package server

import (
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
// and res holds them (scenarios.ScheduleMaps). Frames build them with
// scheduleInto (mapframes.go), the same charts.
func scheduleCharts(sc *scenarios.Scenario, res *scenarios.Result, vw view) []chartOut {
	var c evalCache
	f := &frame{}
	c.scheduleInto(f, sc, res, vw, false)
	return f.charts
}

// bzHeat returns the bounds of the blind-zones map of spec, n CPIs:
// range in km across, range rate up.
func bzHeat(spec scenarios.BlindZoneSpec, n int) heat {
	return heat{xName: "range (km)", yName: "range rate (m/s)", vmin: 0, vmax: float64(n),
		x0: spec.RangeMinM / 1000, x1: spec.RangeMaxM / 1000, y0: -spec.RateMaxMPS, y1: spec.RateMaxMPS}
}

// appendBZKey appends the blind-zones map's key: its CPIs, rule and
// extent, and the version of its cells (bzState).
func appendBZKey(b []byte, n, m int, h heat, version int) []byte {
	b = append(b, "blindzones/1/"...)
	b = strconv.AppendInt(b, int64(n), 10)
	b = append(b, '/')
	b = strconv.AppendInt(b, int64(m), 10)
	b = append(b, '/')
	b = strconv.AppendFloat(b, h.x1, 'g', -1, 64)
	b = append(b, '/')
	b = strconv.AppendFloat(b, h.y1, 'g', -1, 64)
	b = append(b, '#')
	return strconv.AppendInt(b, int64(version), 10)
}

// blindZonesChartOf maps the schedule's blind zones bz (of spec) over the
// ranges and range rates of its targets and CPIs.
func blindZonesChartOf(sc *scenarios.Scenario, sr *scenarios.ScheduleReport, bz *scenarios.BlindZoneMap, spec scenarios.BlindZoneSpec, key string) chartOut {
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
	h := bzHeat(spec, n)
	h.xCats, h.yCats = km, roundAll(bz.Rates, 0.1, 1)
	h.colours, h.cells, h.pieces = []string{bzSeen[len(bzSeen)-1]}, cells, bzPieces(n, sr.M)
	out := heatChart(SeriesZones, key, h, heatSeries{id: SeriesMarkers, name: "targets", data: appendBZMarkers(nil, sc, sr, h),
		opts: []charts.SeriesOpts{charts.WithSeriesOpts(func(s *charts.SingleSeries) { s.SymbolSize = 13 }), charts.WithLabelOpts(mapLabel)}, labels: true})
	out.name = ChartBlindZones
	return out
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

// bzMarker is one target on the blind-zones map, as appendBZMarkers
// encodes it.
type bzMarker struct {
	Name      string         `json:"name"`
	Value     [2]float64     `json:"value"`
	ID        string         `json:"id"`
	Detected  bool           `json:"detected"`
	Reason    string         `json:"reason"`
	Symbol    string         `json:"symbol"`
	ItemStyle map[string]any `json:"itemStyle"`
}

// appendBZMarkers appends the markers series: each point target at its
// true range and range rate, clamped into the map, marked by the
// schedule's verdict; encoded by hand so that nothing is allocated.
func appendBZMarkers(b []byte, sc *scenarios.Scenario, sr *scenarios.ScheduleReport, h heat) []byte {
	b = append(b, '[')
	first := true
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
		if !first {
			b = append(b, ',')
		}
		first = false
		b = append(b, `{"name":"`...)
		for _, r := range t.ID {
			b = appendStringRune(b, r)
		}
		b = append(b, ' ')
		b = strconv.AppendInt(b, int64(st.DetectedIn), 10)
		b = append(b, '/')
		b = strconv.AppendInt(b, int64(sr.N), 10)
		b = append(b, `","value":[`...)
		b = appendNumber(b, x)
		b = append(b, ',')
		b = appendNumber(b, y)
		b = append(b, `],"id":`...)
		b = appendString(b, t.ID)
		b = append(b, `,"detected":`...)
		b = strconv.AppendBool(b, st.Detected)
		b = append(b, `,"reason":`...)
		b = appendString(b, st.Reason)
		b = append(b, `,"symbol":`...)
		b = appendString(b, style.symbol)
		b = append(b, `,"itemStyle":{"borderColor":`...)
		b = appendString(b, style.colour)
		b = append(b, `,"borderWidth":2,"color":"rgba(255,255,255,0.6)"}}`...)
	}
	return append(b, ']')
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
			if c := ct.CancelledBy(); c != "" {
				cell = "cancelled by the " + c
			}
			if ct.Detected && ct.ApparentRangeM != nil {
				cell += fmt.Sprintf(" at %.2f km", *ct.ApparentRangeM/1000)
			}
			row.Cells = append(row.Cells, cell)
		}
		d.Rows = append(d.Rows, row)
	}
	return d
}
