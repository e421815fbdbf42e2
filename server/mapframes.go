package server

import (
	"math"
	"slices"
	"strconv"

	"github.com/pulsewright/pulsewright/scenarios"
)

// The heat maps of a frame on the data-only path (framecharts.go): the
// range–Doppler map, its cuts through the selected cell, the PRF
// schedule's blind-zones map and its CPI maps. While the page holds a
// map's structure (its layout, colour bounds and axes, in its key), a
// frame carries only the map's cells and markers, encoded into the
// frame's buffer with the layout and values kept in the session's cache,
// so that a frame of a drag allocates nothing. The blind-zones map's
// cells depend on the schedule alone: its key names them (bzState), and
// while the page holds them a frame carries only the markers.

// mapScratch is the storage the data-only maps reuse from frame to frame.
type mapScratch struct {
	rdl    rdLayout
	rdVals []float32
	cut    points
	cpiRes scenarios.Result // one CPI's map as a result of its own
	bz     bzState
}

// rdmapInto adds the map of res (a pulse train's, or CPI k's when k > 0)
// to f: data only when the page holds its structure, else whole.
func (c *evalCache) rdmapInto(f *frame, name string, k int, res *scenarios.Result, vw view, pending bool) {
	l := &c.maps.rdl
	if !l.reset(res, vw) {
		return
	}
	var vmin, vmax float64
	c.maps.rdVals, vmin, vmax = l.values(c.maps.rdVals)
	c.keyBuf = c.keyBuf[:0]
	if k > 0 {
		c.keyBuf = appendCPIKeyPrefix(c.keyBuf, k)
	}
	c.keyBuf = l.appendKey(c.keyBuf, vmin, vmax, vw.cell != nil)
	key, ok := c.held(name, c.keyBuf, pending)
	if !ok {
		m, _ := rdmapChart(res, vw)
		m.name = name
		m.key = string(c.keyBuf)
		f.charts = append(f.charts, m)
		return
	}
	ci := f.beginChart(name, key)
	lo := len(f.buf)
	f.buf = l.appendCells(f.buf, c.maps.rdVals, vmin, vmax)
	f.series(ci, SeriesRDMap, lo)
	lo = len(f.buf)
	f.buf = appendRDMarkers(f.buf, res, l)
	f.series(ci, SeriesMarkers, lo)
	if vw.cell != nil {
		lo = len(f.buf)
		f.buf = l.appendSelected(f.buf, *vw.cell)
		f.series(ci, SeriesCell, lo)
	}
}

// appendCPIKeyPrefix appends the key prefix of CPI k's map.
func appendCPIKeyPrefix(b []byte, k int) []byte {
	b = append(b, "cpi"...)
	b = strconv.AppendInt(b, int64(k), 10)
	return append(b, '/')
}

// rdCutsInto adds the cuts through the selected cell of res's map to f.
func (c *evalCache) rdCutsInto(f *frame, res *scenarios.Result, vw view, pending bool) {
	l := &c.maps.rdl
	if vw.cell == nil || !l.reset(res, vw) {
		return
	}
	bin, k := l.snap(*vw.cell)
	c.keyBuf = appendCutsKey(c.keyBuf[:0], bin, k)
	key, ok := c.held(ChartRDCuts, c.keyBuf, pending)
	if !ok {
		cut, _ := rdCutsChart(res, vw)
		f.charts = append(f.charts, cut)
		return
	}
	ci := f.beginChart(ChartRDCuts, key)
	rd := l.rd
	g, sp := l.cutGrid(vw)
	for i, v := range [2][]float32{rd.DB[bin][l.lo:l.hi], rd.CleanDB[bin][l.lo:l.hi]} {
		lo := len(f.buf)
		c.maps.cut = decimateInto(c.maps.cut[:0], g, func(k int) float64 { return clampDB(float64(v[k])) }, sp)
		f.buf = c.maps.cut.appendJSON(f.buf, dbDecimals)
		f.series(ci, [2]string{SeriesRangeCut, SeriesRangeClean}[i], lo)
	}
	for i, m := range [2][][]float32{rd.DB, rd.CleanDB} {
		lo := len(f.buf)
		c.maps.cut = l.appendDopplerCut(c.maps.cut[:0], m, k)
		f.buf = c.maps.cut.appendJSON(f.buf, dbDecimals)
		f.series(ci, [2]string{SeriesDopplerCut, SeriesDopplerCln}[i], lo)
	}
}

// appendCutsKey appends the cuts' structure key: the cell they go
// through (their titles name it).
func appendCutsKey(b []byte, bin, k int) []byte {
	b = append(b, "rdcuts/1/"...)
	b = strconv.AppendInt(b, int64(bin), 10)
	b = append(b, '/')
	b = strconv.AppendInt(b, int64(k), 10)
	return b
}

// cutGrid is the range cut's axis: the map's range (the zoom, if any),
// at half the profile's width.
func (l *rdLayout) cutGrid(vw view) (grid, span) {
	g := grid{x0: l.g.x(l.lo), dx: l.g.dx, n: l.hi - l.lo}
	return g, plan(g, nil, max(vw.width/2, minWidthPx))
}

// appendDopplerCut appends the map m's column k against range rate, in
// ascending range rate.
func (l *rdLayout) appendDopplerCut(p points, m [][]float32, k int) points {
	for _, d := range l.order {
		p = append(p, clampAmp(l.rd.RangeRateMPS[d]), clampDB(float64(m[d][k])))
	}
	return p
}

// scheduleInto adds the PRF schedule's charts of res to f: the blind
// zones, and the CPI maps while the page shows them.
func (c *evalCache) scheduleInto(f *frame, sc *scenarios.Scenario, res *scenarios.Result, vw view, pending bool) {
	sr := res.Report.Schedule
	if sr == nil || sc == nil || sc.Radar.Schedule == nil {
		return
	}
	c.blindZonesInto(f, sc, sr, pending)
	if !vw.cpiMaps {
		return
	}
	mv := cpiMapView(vw)
	one := &c.maps.cpiRes
	for k, s := range res.CPISeries {
		if s == nil || s.RangeDoppler == nil || k >= len(sr.CPIs) {
			continue
		}
		cpiResult(one, res, s, &sr.CPIs[k])
		var name string
		if k < len(cpiNames) {
			name = cpiNames[k]
		} else {
			name = ChartCPIMap + strconv.Itoa(k+1)
		}
		c.rdmapInto(f, name, k+1, one, mv, pending)
	}
}

// cpiNames are the chart names of the first CPI maps, made once.
var cpiNames = func() []string {
	out := make([]string, 32)
	for i := range out {
		out[i] = ChartCPIMap + strconv.Itoa(i+1)
	}
	return out
}()

// cpiMapView is the view of each CPI's map: its whole window, at about
// two thirds of the map's width.
func cpiMapView(vw view) view {
	return view{width: vw.width, mapWidth: max(vw.mapWidth*2/3, 200)}
}

// cpiResult makes one (reused) the result of CPI c's map s, with the
// schedule's verdicts of its targets.
func cpiResult(one, res *scenarios.Result, s *scenarios.Series, c *scenarios.CPIReport) {
	targets := one.Report.Targets[:0]
	*one = scenarios.Result{Series: *s}
	one.Report.Waveform.UnambiguousRangeM = c.UnambiguousRangeM
	for j, t := range c.Targets {
		tr := scenarios.TargetReport{ID: t.ID, Status: t.Status, Reason: t.Reason, ApparentRangeRateMPS: t.ApparentRangeRateMPS}
		if j < len(res.Report.Targets) {
			tr.RangeM, tr.RangeShiftM = res.Report.Targets[j].RangeM, res.Report.Targets[j].RangeShiftM
		}
		targets = append(targets, tr)
	}
	one.Report.Targets = targets
}

// bzState is the blind-zones map of the last schedule, kept while the
// schedule and the mapped extent stay the same: version names its cells
// in the chart's key.
type bzState struct {
	spec     scenarios.BlindZoneSpec
	bz       *scenarios.BlindZoneMap // nil: the schedule cannot be mapped
	version  int
	pris     []float64 // scratch for the spec being compared
	pulses   []int
	staggers [][]float64 // scratch: each CPI's stagger, pointing into the report
}

// blindZoneSpec returns the spec of the schedule's map (its slices in the
// scratch of st).
func (st *bzState) blindZoneSpec(sc *scenarios.Scenario, sr *scenarios.ScheduleReport) scenarios.BlindZoneSpec {
	r := sc.Radar
	spec := scenarios.BlindZoneSpec{PulseS: sc.Waveform.PulseWidth(), CarrierHz: r.CarrierHz, M: sr.M,
		RangeCells: bzCols, RateCells: bzRows}
	st.pris, st.pulses = st.pris[:0], st.pulses[:0]
	vb := 0.0
	for _, c := range sr.CPIs {
		st.pris = append(st.pris, c.PRIS)
		st.pulses = append(st.pulses, c.Pulses)
		vb = math.Max(vb, c.BlindSpeedMPS)
	}
	spec.PRIs, spec.Pulses = st.pris, st.pulses
	// Staggered CPIs: their patterns (nil when every CPI is uniform).
	st.staggers = st.staggers[:0]
	for _, c := range sr.CPIs {
		if c.PRIStaggerS != nil {
			for _, c := range sr.CPIs {
				st.staggers = append(st.staggers, c.PRIStaggerS)
			}
			spec.Staggers = st.staggers
			break
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
	return spec
}

// sameSpec says whether two blind-zone specs are the same.
func sameSpec(a, b scenarios.BlindZoneSpec) bool {
	return slices.Equal(a.PRIs, b.PRIs) && slices.Equal(a.Pulses, b.Pulses) &&
		(a.Staggers == nil) == (b.Staggers == nil) && slices.EqualFunc(a.Staggers, b.Staggers, slices.Equal[[]float64]) && a.PulseS == b.PulseS && a.CarrierHz == b.CarrierHz &&
		a.M == b.M && a.RangeMinM == b.RangeMinM && a.RangeMaxM == b.RangeMaxM && a.RateMaxMPS == b.RateMaxMPS &&
		a.RangeCells == b.RangeCells && a.RateCells == b.RateCells && a.EclipseFraction == b.EclipseFraction
}

// zones returns the blind-zones map of the schedule, computed only when
// its spec changed, and its version.
func (st *bzState) zones(sc *scenarios.Scenario, sr *scenarios.ScheduleReport, version *int) (*scenarios.BlindZoneMap, scenarios.BlindZoneSpec, int) {
	spec := st.blindZoneSpec(sc, sr)
	if st.version > 0 && sameSpec(spec, st.spec) {
		return st.bz, st.spec, st.version
	}
	spec.PRIs, spec.Pulses = slices.Clone(spec.PRIs), slices.Clone(spec.Pulses)
	if spec.Staggers != nil {
		st := make([][]float64, len(spec.Staggers))
		for k, p := range spec.Staggers {
			st[k] = slices.Clone(p)
		}
		spec.Staggers = st
	}
	bz, err := scenarios.BlindZones(spec)
	if err != nil {
		bz = nil // a schedule the map cannot draw (a PRI below 2τ): the report still stands
	}
	*version++
	st.spec, st.bz, st.version = spec, bz, *version
	return bz, spec, st.version
}

// blindZonesInto adds the blind-zones map to f: while the page holds its
// cells (the key names them), the markers alone.
func (c *evalCache) blindZonesInto(f *frame, sc *scenarios.Scenario, sr *scenarios.ScheduleReport, pending bool) {
	bz, spec, v := c.maps.bz.zones(sc, sr, &c.version)
	if bz == nil {
		return
	}
	h := bzHeat(spec, len(spec.PRIs))
	c.keyBuf = appendBZKey(c.keyBuf[:0], len(spec.PRIs), sr.M, h, v)
	key, ok := c.held(ChartBlindZones, c.keyBuf, pending)
	if !ok {
		f.charts = append(f.charts, blindZonesChartOf(sc, sr, bz, spec, string(c.keyBuf)))
		return
	}
	ci := f.beginChart(ChartBlindZones, key)
	lo := len(f.buf)
	f.buf = appendBZMarkers(f.buf, sc, sr, h)
	f.series(ci, SeriesMarkers, lo)
}
