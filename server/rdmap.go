package server

import (
	"encoding/json"
	"fmt"
	"math"
	"slices"

	"github.com/go-echarts/go-echarts/v2/charts"
	"github.com/go-echarts/go-echarts/v2/opts"

	"github.com/pulsewright/pulsewright/scenarios"
)

// cell is the place on the range–Doppler map that the page asked cuts
// through (a cell message); the server snaps it to the strongest cell of
// the screen cell it falls in.
type cell struct {
	rangeM  float64 // m
	rateMPS float64 // m/s
}

// rdLayout reduces a range–Doppler map to the screen: range cells [lo,
// hi) in cols columns, and the Doppler bins, in ascending range rate
// (order), in rows rows of per bins.
type rdLayout struct {
	rd               *scenarios.RangeDoppler
	g                grid
	lo, hi           int
	cols, rows, per  int
	order            []int // bins by ascending range rate
	rate0, rateStep  float64
	x0, x1, y0, y1   float64 // value axis bounds: the cells' outer edges
	colStart, colEnd func(c int) int
}

// newRDLayout lays out the map of res for a view, or returns nil when
// res has no map.
func newRDLayout(res *scenarios.Result, vw view) *rdLayout {
	rd := res.Series.RangeDoppler
	if rd == nil || len(rd.DB) == 0 || len(rd.DB[0]) == 0 || len(rd.RangeRateMPS) != len(rd.DB) {
		return nil
	}
	nb, n := len(rd.DB), len(rd.DB[0])
	l := &rdLayout{rd: rd, g: windowGrid(&res.Series, n)}
	sp := plan(l.g, vw.rangeM, vw.width)
	l.lo, l.hi = sp.lo, sp.hi
	l.order = make([]int, nb)
	for d := range l.order {
		l.order[d] = d
	}
	slices.SortStableFunc(l.order, func(a, b int) int { return cmpFloat(rd.RangeRateMPS[a], rd.RangeRateMPS[b]) })
	l.per = (nb + rdMaxRows - 1) / rdMaxRows
	l.rows = (nb + l.per - 1) / l.per
	px := vw.mapWidth
	if px == 0 {
		px = vw.width / 3
	}
	l.cols = max(1, min(l.hi-l.lo, max(px/2, 32), rdMaxCells/l.rows))
	span := l.hi - l.lo
	l.colStart = func(c int) int { return l.lo + c*span/l.cols }
	l.colEnd = func(c int) int { return l.lo + (c+1)*span/l.cols }
	dx := l.g.dx
	l.x0, l.x1 = l.g.x(l.lo)-dx/2, l.g.x(l.hi-1)+dx/2
	l.rate0 = rd.RangeRateMPS[l.order[0]]
	l.rateStep = 1
	if nb > 1 {
		l.rateStep = (rd.RangeRateMPS[l.order[nb-1]] - l.rate0) / float64(nb-1)
	}
	l.y0 = l.rate0 - l.rateStep/2
	l.y1 = l.y0 + float64(l.rows*l.per)*l.rateStep
	return l
}

func cmpFloat(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// rowBins returns the bins of row r.
func (l *rdLayout) rowBins(r int) []int {
	return l.order[r*l.per : min((r+1)*l.per, len(l.order))]
}

// held returns the largest value of screen cell (c, r): max-hold, so no
// peak vanishes, and the bin and range cell it came from.
func (l *rdLayout) held(c, r int) (v float32, bin, k int) {
	v = -math.MaxFloat32
	for _, d := range l.rowBins(r) {
		row := l.rd.DB[d]
		for kk := l.colStart(c); kk < l.colEnd(c); kk++ {
			if row[kk] > v {
				v, bin, k = row[kk], d, kk
			}
		}
	}
	return v, bin, k
}

// rdmapChart plots the range–Doppler map of a pulse train, reduced to
// the screen, with each target's marker at its apparent range and range
// rate, and the selected cell. ok is false when res has no map.
func rdmapChart(res *scenarios.Result, vw view) (chartOut, bool) {
	l := newRDLayout(res, vw)
	if l == nil {
		return chartOut{}, false
	}
	vals := make([]float32, l.rows*l.cols)
	top := float32(-math.MaxFloat32)
	for r := range l.rows {
		for c := range l.cols {
			v, _, _ := l.held(c, r)
			vals[r*l.cols+c] = v
			top = max(top, v)
		}
	}
	vmax := math.Max(10, 10*math.Ceil(clampDB(float64(top))/10))
	vmin := math.Max(0, vmax-rdSpanDB)
	cells := make([]byte, 0, 16*len(vals)/2)
	cells = append(cells, '[')
	blank := vmin + rdBlank*(vmax-vmin)
	for i, v := range vals {
		if float64(v) > blank {
			cells = appendCell(cells, i%l.cols, i/l.cols, float64(v))
		}
	}
	cells = append(cells, ']')
	xCats := make([]float64, l.cols)
	for c := range xCats {
		xCats[c] = math.Round((l.g.x(l.colStart(c))+l.g.x(l.colEnd(c)-1))/2*10) / 10
	}
	yCats := make([]float64, l.rows)
	for r := range yCats {
		yCats[r] = math.Round((l.y0+(float64(r)+0.5)*float64(l.per)*l.rateStep)*100) / 100
	}
	h := heat{xName: "range (m)", yName: "range rate (m/s)", x0: l.x0, x1: l.x1, y0: l.y0, y1: l.y1,
		xCats: xCats, yCats: yCats, vmin: vmin, vmax: vmax, colours: rdColours, cells: cells}
	marks, err := json.Marshal(rdMarkers(res, l))
	if err != nil {
		panic("server: map markers not encodable: " + err.Error()) // every number in them is clamped
	}
	more := []heatSeries{{id: SeriesMarkers, name: "targets", data: marks, opts: []charts.SeriesOpts{
		charts.WithSeriesOpts(func(s *charts.SingleSeries) { s.SymbolSize = 13 }),
		charts.WithLabelOpts(mapLabel),
	}}}
	key := fmt.Sprintf("rdmap/1/%d-%d/%dx%d/%g-%g", l.lo, l.hi, l.cols, l.rows, vmin, vmax)
	if vw.cell != nil {
		bin, k := l.snap(*vw.cell)
		at := points{l.g.x(k), clampAmp(l.rd.RangeRateMPS[bin])}.appendJSON(nil, 2)
		more = append(more, heatSeries{id: SeriesCell, name: "selected cell", data: at, opts: []charts.SeriesOpts{
			charts.WithSeriesOpts(func(s *charts.SingleSeries) { s.Symbol, s.SymbolSize = "rect", 14 }),
			charts.WithItemStyleOpts(opts.ItemStyle{Color: "transparent", BorderColor: "#b4561d", BorderWidth: 2}),
		}})
		key += "+cell"
	}
	return heatChart(ChartRDMap, key, h, more...), true
}

// rdMarker is one target on the map.
type rdMarker struct {
	Name      string         `json:"name"` // the label
	Value     [2]float64     `json:"value"`
	ID        string         `json:"id"`
	Status    string         `json:"status"`
	Reason    string         `json:"reason"`
	Symbol    string         `json:"symbol"`
	ItemStyle map[string]any `json:"itemStyle"`
}

// rdMarkers places each target at its apparent range (folded into the
// unambiguous range, moved by range–Doppler coupling) and apparent range
// rate, clamped into the map.
func rdMarkers(res *scenarios.Result, l *rdLayout) []rdMarker {
	unamb := res.Report.Waveform.UnambiguousRangeM
	out := make([]rdMarker, 0, len(res.Report.Targets))
	for _, t := range res.Report.Targets {
		if t.ApparentRangeRateMPS == nil {
			continue
		}
		st, ok := statusStyle[t.Status]
		if !ok {
			st = statusStyle[scenarios.StatusTooWeak]
		}
		r := t.RangeM
		if unamb > 0 && r >= unamb {
			r = math.Mod(r, unamb)
		}
		r += t.RangeShiftM
		x := math.Min(math.Max(clampAmp(r), l.x0), l.x1)
		y := math.Min(math.Max(clampAmp(*t.ApparentRangeRateMPS), l.y0), l.y1)
		out = append(out, rdMarker{Name: t.ID, Value: [2]float64{x, y}, ID: t.ID, Status: t.Status, Reason: t.Reason, Symbol: st.symbol,
			ItemStyle: map[string]any{"color": "rgba(255,255,255,0.15)", "borderColor": st.colour, "borderWidth": 2}})
	}
	return out
}

// snap returns the bin and range cell of the strongest value in the
// screen cell that holds c.
func (l *rdLayout) snap(c cell) (bin, k int) {
	kk := min(max(l.g.index(c.rangeM), l.lo), l.hi-1)
	col := 0
	for col+1 < l.cols && l.colStart(col+1) <= kk {
		col++
	}
	row := int(math.Floor((c.rateMPS - l.y0) / (float64(l.per) * l.rateStep)))
	row = min(max(row, 0), l.rows-1)
	_, bin, k = l.held(col, row)
	return bin, k
}

// rdCutsChart plots the cuts through the selected cell: the map's row
// against range (at the cell's Doppler bin, over the map's range: the
// zoom, at full resolution inside it) and its column against range rate (every bin), noisy and
// noise-free. ok is false without a map or a selected cell.
func rdCutsChart(res *scenarios.Result, vw view) (chartOut, bool) {
	l := newRDLayout(res, vw)
	if l == nil || vw.cell == nil {
		return chartOut{}, false
	}
	bin, k := l.snap(*vw.cell)
	rd := l.rd
	// The range cut spans the map's range: the zoom, if any.
	g := grid{x0: l.g.x(l.lo), dx: l.g.dx, n: l.hi - l.lo}
	sp := plan(g, nil, max(vw.width/2, minWidthPx))
	row, clean := rd.DB[bin][l.lo:l.hi], rd.CleanDB[bin][l.lo:l.hi]
	rangeCut := dbSeries32(g, row, sp)
	rangeClean := dbSeries32(g, clean, sp)
	var dop, dopClean points
	for _, d := range l.order {
		dop = append(dop, clampAmp(rd.RangeRateMPS[d]), clampDB(float64(rd.DB[d][k])))
		dopClean = append(dopClean, clampAmp(rd.RangeRateMPS[d]), clampDB(float64(rd.CleanDB[d][k])))
	}
	rate := rd.RangeRateMPS[bin]
	key := fmt.Sprintf("rdcuts/1/%d/%d", bin, k)
	return twoCuts(ChartRDCuts, key, [2]cutPlot{
		{title: fmt.Sprintf("at %+.1f m/s (%.0f Hz)", noNegZero(rate), noNegZero(rd.DopplerHz[bin])), xName: "range (m)", yName: "dB re noise", yMin: profileYMin,
			lines: []cutLine{
				{SeriesRangeCut, "map", colourProfile, rangeCut, 1.2},
				{SeriesRangeClean, "noise-free", colourClean, rangeClean, 1}}},
		{title: fmt.Sprintf("at %.0f m", l.g.x(k)), xName: "range rate (m/s)", yName: "dB re noise", yMin: profileYMin,
			lines: []cutLine{
				{SeriesDopplerCut, "map", colourProfile, dop.appendJSON(nil, dbDecimals), 1.2},
				{SeriesDopplerCln, "noise-free", colourClean, dopClean.appendJSON(nil, dbDecimals), 1}}},
	}), true
}

// dbSeries32 decimates and encodes a dB series held as float32.
func dbSeries32(g grid, v []float32, sp span) []byte {
	return decimate(g, func(k int) float64 { return clampDB(float64(v[k])) }, sp).appendJSON(nil, dbDecimals)
}

// noNegZero turns −0 (and values that print as it) into 0.
func noNegZero(v float64) float64 {
	if math.Abs(v) < 5e-3 {
		return 0
	}
	return v
}
