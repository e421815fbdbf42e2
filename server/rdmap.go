package server

import (
	"fmt"
	"math"
	"slices"
	"strconv"

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
// (order), in rows rows of per bins. A layout is reused from frame to
// frame (reset), so that laying out a map allocates nothing.
type rdLayout struct {
	rd              *scenarios.RangeDoppler
	g               grid
	lo, hi          int
	cols, rows, per int
	order           []int // bins by ascending range rate
	rate0, rateStep float64
	x0, x1, y0, y1  float64 // value axis bounds: the cells' outer edges
}

// newRDLayout lays out the map of res for a view, or returns nil when
// res has no map.
func newRDLayout(res *scenarios.Result, vw view) *rdLayout {
	l := &rdLayout{}
	if !l.reset(res, vw) {
		return nil
	}
	return l
}

// reset lays out the map of res for a view in l, reusing its storage;
// false when res has no map.
func (l *rdLayout) reset(res *scenarios.Result, vw view) bool {
	rd := res.Series.RangeDoppler
	if rd == nil || len(rd.DB) == 0 || len(rd.DB[0]) == 0 || len(rd.RangeRateMPS) != len(rd.DB) {
		return false
	}
	nb, n := len(rd.DB), len(rd.DB[0])
	order := l.order[:0]
	*l = rdLayout{rd: rd, g: windowGrid(&res.Series, n)}
	sp := plan(l.g, vw.rangeM, vw.width)
	l.lo, l.hi = sp.lo, sp.hi
	for d := range nb {
		order = append(order, d)
	}
	l.order = order
	slices.SortStableFunc(l.order, func(a, b int) int { return cmpFloat(rd.RangeRateMPS[a], rd.RangeRateMPS[b]) })
	l.per = (nb + rdMaxRows - 1) / rdMaxRows
	l.rows = (nb + l.per - 1) / l.per
	px := vw.mapWidth
	if px == 0 {
		px = vw.width / 3
	}
	l.cols = max(1, min(l.hi-l.lo, max(px/2, 32), rdMaxCells/l.rows))
	dx := l.g.dx
	l.x0, l.x1 = l.g.x(l.lo)-dx/2, l.g.x(l.hi-1)+dx/2
	l.rate0 = rd.RangeRateMPS[l.order[0]]
	l.rateStep = 1
	if nb > 1 {
		l.rateStep = (rd.RangeRateMPS[l.order[nb-1]] - l.rate0) / float64(nb-1)
	}
	l.y0 = l.rate0 - l.rateStep/2
	l.y1 = l.y0 + float64(l.rows*l.per)*l.rateStep
	return true
}

// colStart and colEnd are the range cells [colStart(c), colEnd(c)) of
// screen column c.
func (l *rdLayout) colStart(c int) int { return l.lo + c*(l.hi-l.lo)/l.cols }
func (l *rdLayout) colEnd(c int) int   { return l.lo + (c+1)*(l.hi-l.lo)/l.cols }

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

// values fills vals (reused) with the max-held screen cells, row by row,
// and returns it with the colour bounds: the top rounded up to 10 dB,
// and rdSpanDB under it.
func (l *rdLayout) values(vals []float32) (out []float32, vmin, vmax float64) {
	vals = vals[:0]
	top := float32(-math.MaxFloat32)
	for r := range l.rows {
		for c := range l.cols {
			v, _, _ := l.held(c, r)
			vals = append(vals, v)
			top = max(top, v)
		}
	}
	vmax = math.Max(10, 10*math.Ceil(clampDB(float64(top))/10))
	vmin = math.Max(0, vmax-rdSpanDB)
	return vals, vmin, vmax
}

// appendCells appends the heat map's cells [[col,row,dB],…], those in
// the bottom rdBlank of the colour span left out.
func (l *rdLayout) appendCells(b []byte, vals []float32, vmin, vmax float64) []byte {
	start := len(b)
	b = append(b, '[')
	blank := vmin + rdBlank*(vmax-vmin)
	for i, v := range vals {
		if float64(v) > blank {
			if len(b) > start+1 {
				b = append(b, ',')
			}
			b = appendCellItem(b, i%l.cols, i/l.cols, float64(v))
		}
	}
	return append(b, ']')
}

// appendKey appends the map's structure key: its layout and colour
// bounds, and whether a cell is selected.
func (l *rdLayout) appendKey(b []byte, vmin, vmax float64, selected bool) []byte {
	b = append(b, "rdmap/1/"...)
	b = strconv.AppendInt(b, int64(l.lo), 10)
	b = append(b, '-')
	b = strconv.AppendInt(b, int64(l.hi), 10)
	b = append(b, '/')
	b = strconv.AppendInt(b, int64(l.cols), 10)
	b = append(b, 'x')
	b = strconv.AppendInt(b, int64(l.rows), 10)
	b = append(b, '/')
	b = strconv.AppendFloat(b, vmin, 'g', -1, 64)
	b = append(b, '-')
	b = strconv.AppendFloat(b, vmax, 'g', -1, 64)
	if selected {
		b = append(b, "+cell"...)
	}
	return b
}

// appendSelected appends the selected cell's series data: the strongest
// cell of the screen cell that holds c.
func (l *rdLayout) appendSelected(b []byte, c cell) []byte {
	bin, k := l.snap(c)
	p := [2]float64{l.g.x(k), clampAmp(l.rd.RangeRateMPS[bin])}
	return points(p[:]).appendJSON(b, 2)
}

// rdmapChart plots the range–Doppler map of a pulse train, reduced to
// the screen, with each target's marker at its apparent range and range
// rate, and the selected cell. ok is false when res has no map.
func rdmapChart(res *scenarios.Result, vw view) (chartOut, bool) {
	l := newRDLayout(res, vw)
	if l == nil {
		return chartOut{}, false
	}
	vals, vmin, vmax := l.values(nil)
	cells := l.appendCells(make([]byte, 0, 16*len(vals)/2), vals, vmin, vmax)
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
	more := []heatSeries{{id: SeriesMarkers, name: "targets", data: appendRDMarkers(nil, res, l), opts: []charts.SeriesOpts{
		charts.WithSeriesOpts(func(s *charts.SingleSeries) { s.SymbolSize = 13 }),
		charts.WithLabelOpts(mapLabel),
	}, labels: true}}
	key := string(l.appendKey(nil, vmin, vmax, vw.cell != nil))
	if vw.cell != nil {
		more = append(more, heatSeries{id: SeriesCell, name: "selected cell", data: l.appendSelected(nil, *vw.cell), opts: []charts.SeriesOpts{
			charts.WithSeriesOpts(func(s *charts.SingleSeries) { s.Symbol, s.SymbolSize = "rect", 14 }),
			charts.WithItemStyleOpts(opts.ItemStyle{Color: "transparent", BorderColor: "#b4561d", BorderWidth: 2}),
		}})
	}
	return heatChart(ChartRDMap, key, h, more...), true
}

// rdMarker is one target on the map, as appendRDMarkers encodes it.
type rdMarker struct {
	Name      string         `json:"name"` // the label
	Value     [2]float64     `json:"value"`
	ID        string         `json:"id"`
	Status    string         `json:"status"`
	Reason    string         `json:"reason"`
	Symbol    string         `json:"symbol"`
	ItemStyle map[string]any `json:"itemStyle"`
}

// appendRDMarkers appends the map's markers series: each target at its
// apparent range (folded into the unambiguous range, moved by
// range–Doppler coupling) and apparent range rate, clamped into the map;
// encoded by hand so that nothing is allocated.
func appendRDMarkers(b []byte, res *scenarios.Result, l *rdLayout) []byte {
	unamb := res.Report.Waveform.UnambiguousRangeM
	b = append(b, '[')
	first := true
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
		if !first {
			b = append(b, ',')
		}
		first = false
		b = append(b, `{"name":`...)
		b = appendString(b, t.ID)
		b = append(b, `,"value":[`...)
		b = appendNumber(b, x)
		b = append(b, ',')
		b = appendNumber(b, y)
		b = append(b, `],"id":`...)
		b = appendString(b, t.ID)
		b = append(b, `,"status":`...)
		b = appendString(b, t.Status)
		b = append(b, `,"reason":`...)
		b = appendString(b, t.Reason)
		b = append(b, `,"symbol":`...)
		b = appendString(b, st.symbol)
		b = append(b, `,"itemStyle":{"borderColor":`...)
		b = appendString(b, st.colour)
		b = append(b, `,"borderWidth":2,"color":"rgba(255,255,255,0.15)"}}`...)
	}
	return append(b, ']')
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
