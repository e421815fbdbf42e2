package server

import (
	"bytes"
	"math"
	"math/cmplx"
	"strconv"
	"strings"
	"unicode/utf8"

	"github.com/pulsewright/pulsewright/scenarios"
)

// The charts of a frame, built so that a frame of a drag or of a typed
// value allocates nothing: while the page holds a chart's structure
// (its key), only the chart's series data are encoded, into the frame's
// own buffer, which the session reuses once the writer has sent the
// frame. A chart whose structure changed, or whose previous frame the
// page may never see (an unsent frame that this one will replace), is
// built whole with go-echarts as before.

// seriesRef is where one series' encoded data lies in frame.buf.
type seriesRef struct {
	chart  int    // index in frame.charts
	id     string // series id
	field  string // seriesData.field
	lo, hi int
}

// frameStore is the reusable storage of a frame's data-only charts.
type frameStore struct {
	buf   []byte       // encoded series data
	refs  []seriesRef  // where each series lies in buf
	store []seriesData // chartOut.data of the data-only charts, slices of buf
}

// chartsOf fills f.charts with the charts of res (and the pinned ref)
// for view vw. pending says the frames mailbox holds a frame the writer
// has not taken: this frame will replace it, so every chart whose
// structure that frame may have carried goes whole.
func (c *evalCache) chartsOf(f *frame, res, ref *scenarios.Result, vw view, pending bool) {
	f.charts = f.charts[:0]
	f.buf, f.refs, f.store = f.buf[:0], f.refs[:0], f.store[:0]

	c.keyBuf = appendProfileKey(c.keyBuf[:0], res, ref)
	if hasAreas(res, windowGrid(&res.Series, len(res.Series.ProfileDB))) {
		c.keyBuf = append(c.keyBuf, breakthroughKey...)
	}
	if key, ok := c.held(ChartProfile, c.keyBuf, pending); ok {
		c.appendProfileData(f, res, ref, vw, key)
	} else {
		f.charts = append(f.charts, profileChart(res, ref, vw))
	}
	if key, ok := c.held(ChartEcho, []byte(echoKey), pending); ok {
		c.appendEchoData(f, res, vw, key)
	} else {
		f.charts = append(f.charts, echoChart(res, vw))
	}
	f.charts = append(f.charts, c.response(res, ref, vw))
	c.rdmapInto(f, ChartRDMap, 0, res, vw, pending)
	c.rdCutsInto(f, res, vw, pending)
	c.scheduleInto(f, c.scn, res, vw, pending)
	if k := velocityKey(c.scn); k != c.velKey {
		c.velKey = k
		c.velOut, c.velOK = velocityChart(c.scn)
	}
	if c.velOK {
		f.charts = append(f.charts, c.settle([]chartOut{c.velOut})...)
	}
	c.floorsInto(f, res, vw, pending)
	// The data slices point into buf and store, which have stopped
	// growing; a chart's series are consecutive in refs.
	for _, r := range f.refs {
		f.store = append(f.store, seriesData{id: r.id, data: f.buf[r.lo:r.hi], field: r.field})
	}
	for i := 0; i < len(f.refs); {
		j := i
		for j < len(f.refs) && f.refs[j].chart == f.refs[i].chart {
			j++
		}
		f.charts[f.refs[i].chart].data = f.store[i:j:j]
		i = j
	}
}

// held returns the key of chart name when the page will hold a chart of
// structure key when this frame reaches it: the last frame put carried
// it and no unsent frame is about to be replaced.
func (c *evalCache) held(name string, key []byte, pending bool) (string, bool) {
	last, ok := c.lastPut[name]
	if pending || !ok || last != string(key) {
		return "", false
	}
	return last, true
}

// put records the chart keys of a frame given to the writer.
func (c *evalCache) put(f *frame) {
	if c.lastPut == nil {
		c.lastPut = map[string]string{}
	}
	for name := range c.lastPut {
		if !f.has(name) {
			delete(c.lastPut, name)
		}
	}
	for _, ch := range f.charts {
		c.lastPut[ch.name] = ch.key
	}
}

func (f *frame) has(name string) bool {
	for _, ch := range f.charts {
		if ch.name == name {
			return true
		}
	}
	return false
}

// beginChart starts a data-only chart in f.
func (f *frame) beginChart(name, key string) int {
	f.charts = append(f.charts, chartOut{name: name, key: key})
	return len(f.charts) - 1
}

// series appends one series' data, written by enc, to chart ci.
func (f *frame) series(ci int, id string, lo int) {
	f.refs = append(f.refs, seriesRef{chart: ci, id: id, lo: lo, hi: len(f.buf)})
}

// echoKey is the echo chart's structure key.
const echoKey = "echo/1"

// appendProfileKey appends the profile chart's structure key: it changes
// with the series present (a pulse train's names, the pinned reference,
// the blind range's shading).
func appendProfileKey(b []byte, res, ref *scenarios.Result) []byte {
	s := &res.Series
	b = append(b, "profile/1"...)
	if s.RangeDoppler != nil {
		b = append(b, "+map"...)
	}
	if ref != nil {
		b = append(b, "+ref"...)
	}
	if end, ok := blindEnd(res); ok {
		b = append(b, "+blind"...)
		b = strconv.AppendFloat(b, end, 'f', -1, 64)
	}
	return b
}

// blindEnd is where the shaded blind range ends on the profile, and
// whether it shows at all.
func blindEnd(res *scenarios.Result) (float64, bool) {
	s := &res.Series
	g := windowGrid(s, len(s.ProfileDB))
	blind := res.Report.Waveform.BlindRangeM
	if !(blind > g.x0) || g.n == 0 {
		return 0, false
	}
	return round2(math.Min(blind, g.x(max(g.n-1, 0)))), true
}

// appendProfileData encodes the profile's series, as profileChart has
// them, into f.
func (c *evalCache) appendProfileData(f *frame, res, ref *scenarios.Result, vw view, key string) {
	s := &res.Series
	ci := f.beginChart(ChartProfile, key)
	g := windowGrid(s, len(s.ProfileDB))
	sp := plan(g, vw.rangeM, plotColumns(vw.width))
	c.dbInto(f, ci, SeriesProfile, g, s.ProfileDB, sp)
	c.dbInto(f, ci, SeriesClean, windowGrid(s, len(s.CleanDB)), s.CleanDB, sp)
	c.dbInto(f, ci, SeriesThreshold, windowGrid(s, len(s.ThresholdDB)), s.ThresholdDB, sp)
	lo := len(f.buf)
	last := g.x(max(g.n-1, 0))
	f.buf = appendNoise(f.buf, g.x0, last, s.NoiseDB)
	f.series(ci, SeriesNoise, lo)
	if ref != nil {
		rs := &ref.Series
		rg := windowGrid(rs, len(rs.ProfileDB))
		c.dbInto(f, ci, SeriesReference, rg, rs.ProfileDB, plan(rg, vw.rangeM, plotColumns(vw.width)))
	}
	if _, ok := blindEnd(res); ok {
		lo = len(f.buf)
		f.buf = append(f.buf, "[]"...)
		f.series(ci, SeriesBlind, lo)
	}
	lo = len(f.buf)
	f.buf = appendMasking(f.buf, res, g)
	f.series(ci, SeriesMasking, lo)
	if hasAreas(res, g) {
		lo = len(f.buf)
		f.buf = append(f.buf, `{"data":`...)
		f.buf, _ = appendAreas(f.buf, res, g)
		f.buf = append(f.buf, '}')
		f.refs = append(f.refs, seriesRef{chart: ci, id: SeriesBreakthrough, field: "markArea", lo: lo, hi: len(f.buf)})
	}
	lo = len(f.buf)
	f.buf = appendMarkers(f.buf, res, g.x0, last)
	f.series(ci, SeriesMarkers, lo)
}

// appendEchoData encodes the echo's series, as echoChart has them.
func (c *evalCache) appendEchoData(f *frame, res *scenarios.Result, vw view, key string) {
	e := res.Series.Echo
	ci := f.beginChart(ChartEcho, key)
	g := windowGrid(&res.Series, len(e))
	sp := plan(g, vw.rangeM, plotColumns(echoWidth(vw)))
	lo := len(f.buf)
	c.scratch = decimateInto(c.scratch[:0], g, func(k int) float64 { return clampAmp(real(e[k])) }, sp)
	f.buf = c.scratch.appendJSON(f.buf, ampDecimals)
	f.series(ci, SeriesI, lo)
	lo = len(f.buf)
	c.scratch = decimateInto(c.scratch[:0], g, func(k int) float64 { return clampAmp(imag(e[k])) }, sp)
	f.buf = c.scratch.appendJSON(f.buf, ampDecimals)
	f.series(ci, SeriesQ, lo)
	lo = len(f.buf)
	c.scratch = decimateInto(c.scratch[:0], g, func(k int) float64 { return clampAmp(cmplx.Abs(e[k])) }, sp)
	f.buf = c.scratch.appendJSON(f.buf, ampDecimals)
	f.series(ci, SeriesMagnitude, lo)
}

// dbInto decimates and encodes a dB series into f.
func (c *evalCache) dbInto(f *frame, ci int, id string, g grid, v []float64, sp span) {
	lo := len(f.buf)
	c.scratch = decimateInto(c.scratch[:0], g, func(k int) float64 { return clampDB(v[k]) }, sp)
	f.buf = c.scratch.appendJSON(f.buf, dbDecimals)
	f.series(ci, id, lo)
}

// response returns the waveform's response chart: the one the page
// holds when its data and structure are unchanged (the common case: an
// edit that moves a target), else a new one.
func (c *evalCache) response(res, ref *scenarios.Result, vw view) chartOut {
	var near *[2]float64
	span, ok := responseNearSpan(res)
	if ok {
		near = &span
	}
	c.respBuf = appendResponseYKey(c.respBuf[:0], res)
	if ref != nil {
		c.respBuf = append(c.respBuf, "+ref"...)
	}
	c.respBuf = appendResponseData(c.respBuf, &res.Series.Response, vw.width, near, &c.scratch)
	if ref != nil {
		c.respBuf = appendResponseData(c.respBuf, &ref.Series.Response, vw.width, near, &c.scratch)
	}
	if last, ok := c.statics[ChartResponse]; ok && bytes.Equal(c.respBuf, c.respLast) {
		return last
	}
	c.respLast = append(c.respLast[:0], c.respBuf...)
	cs := c.settle([]chartOut{responseChart(res, ref, vw)})
	return cs[0]
}

// appendResponseYKey appends what fixes the response plot's axis: its
// bottom.
func appendResponseYKey(b []byte, res *scenarios.Result) []byte {
	pslr := 0.0
	if p := res.Report.Waveform.PSLRDB; p != nil {
		pslr = *p
	}
	return strconv.AppendFloat(b, responseYMin(pslr), 'g', -1, 64)
}

// appendResponseData appends the decimated response as responseSeries
// encodes it.
func appendResponseData(b []byte, r *scenarios.Response, width int, near *[2]float64, scratch *points) []byte {
	n := min(len(r.RangeM), len(r.DB))
	if n == 0 {
		return append(b, "[]"...)
	}
	g := grid{n: n, xs: r.RangeM[:n]}
	if n > 1 && r.RangeM[n-1] > r.RangeM[0] {
		g = grid{x0: r.RangeM[0], dx: (r.RangeM[n-1] - r.RangeM[0]) / float64(n-1), n: n}
	}
	db := r.DB
	*scratch = decimateInto((*scratch)[:0], g, func(k int) float64 { return clampDB(db[k]) }, plan(g, near, width))
	return scratch.appendJSON(b, dbDecimals)
}

// appendNoise appends the noise floor: a flat line across the window.
func appendNoise(b []byte, x0, x1, db float64) []byte {
	p := [4]float64{x0, clampDB(db), x1, clampDB(db)}
	return points(p[:]).appendJSON(b, dbDecimals)
}

// marker is one target on the profile, as appendMarkers encodes it:
// where its echo appears (a point target beyond the unambiguous range at
// its folded, apparent range; otherwise its range clamped into the
// window), with the true range beside it, and its expected peak SNR.
type marker struct {
	Value     [2]float64     `json:"value"`
	Name      string         `json:"name"` // the label on the plot
	ID        string         `json:"id"`
	Status    string         `json:"status"`
	Reason    string         `json:"reason"`
	RangeM    float64        `json:"range_m"`
	Symbol    string         `json:"symbol"`
	ItemStyle map[string]any `json:"itemStyle"`
}

// appendMarkers appends the markers series' data: one marker per target,
// encoded by hand so that nothing is allocated.
func appendMarkers(b []byte, res *scenarios.Result, lo, hi float64) []byte {
	b = append(b, '[')
	for i, t := range res.Report.Targets {
		if i > 0 {
			b = append(b, ',')
		}
		st, ok := statusStyle[t.Status]
		if !ok {
			st = statusStyle[scenarios.StatusTooWeak]
		}
		x := clampAmp(t.RangeM)
		at := x
		if ru := res.Report.Waveform.UnambiguousRangeM; ru > 0 && x >= ru {
			at = x - math.Floor(x/ru)*ru // where the folded echo appears
		}
		b = append(b, `{"value":[`...)
		b = appendNumber(b, math.Min(math.Max(at, lo), hi))
		b = append(b, ',')
		b = appendNumber(b, clampDB(t.SNRDB))
		b = append(b, `],"name":`...)
		b = appendString(b, t.ID)
		b = append(b, `,"id":`...)
		b = appendString(b, t.ID)
		b = append(b, `,"status":`...)
		b = appendString(b, t.Status)
		b = append(b, `,"reason":`...)
		b = appendString(b, t.Reason)
		b = append(b, `,"range_m":`...)
		b = appendNumber(b, x)
		b = append(b, `,"symbol":`...)
		b = appendString(b, st.symbol)
		b = append(b, `,"itemStyle":{"borderColor":`...)
		b = appendString(b, st.colour)
		b = append(b, `,"color":`...)
		b = appendString(b, st.colour)
		b = append(b, "}}"...)
	}
	return append(b, ']')
}

// maskingItem is one end of a masking segment, as appendMasking encodes
// it; the masked end carries a label, and a null value breaks the line
// between segments.
type maskingItem struct {
	Value [2]any         `json:"value"`
	Label map[string]any `json:"label,omitempty"`
}

// appendMasking appends the masking series' data (see labels.go),
// encoded by hand so that nothing is allocated.
func appendMasking(b []byte, res *scenarios.Result, g grid) []byte {
	s := &res.Series
	last := g.x(max(g.n-1, 0))
	in := func(r float64) bool { return r >= g.x0 && r <= last }
	start := len(b)
	b = append(b, '[')
	items := 0
	for _, t := range res.Report.Targets {
		if t.Status != scenarios.StatusMasked || t.MaskedBy == t.ID || !in(t.RangeM) || len(s.CleanDB) == 0 {
			continue
		}
		var m *scenarios.TargetReport
		for j := range res.Report.Targets {
			if res.Report.Targets[j].ID == t.MaskedBy {
				m = &res.Report.Targets[j]
				break
			}
		}
		if m == nil || !in(m.RangeM) {
			continue
		}
		k := min(g.index(t.RangeM), len(s.CleanDB)-1)
		if items > 0 {
			b = append(b, `,{"value":[`...)
			b = appendNumber(b, round2(t.RangeM))
			b = append(b, ",null]},"...)
		}
		b = append(b, `{"value":[`...)
		b = appendNumber(b, round2(m.RangeM))
		b = append(b, ',')
		b = appendNumber(b, math.Round(clampDB(m.SNRDB)*100)/100)
		b = append(b, `]},{"value":[`...)
		b = appendNumber(b, round2(t.RangeM))
		b = append(b, ',')
		b = appendNumber(b, math.Round(clampDB(s.CleanDB[k])*100)/100)
		b = append(b, `],"label":{"backgroundColor":"rgba(255,255,255,0.85)","borderRadius":3,"color":`...)
		b = appendString(b, colourMasking)
		b = append(b, `,"distance":10,"fontSize":11,"fontWeight":"bold","formatter":`...)
		b = append(b, '"')
		b = appendLabelRunes(b, m.ID)
		b = append(b, maskWords(t.Reason, m.ID)...)
		b = appendLabelRunes(b, t.ID)
		b = append(b, `","position":"right","show":true}}`...)
		items++
	}
	if items == 0 {
		return append(b[:start], "[]"...)
	}
	return append(b, ']')
}

// maskWords is what of masker id masks a target, by its reason (the
// engine names an impairment there, docs/detection.md §12): "'s
// phase-noise skirt masks ", "'s I/Q image masks " or "'s response
// masks ". It does not allocate.
func maskWords(reason, id string) string {
	const by = "Masked by "
	if !strings.HasPrefix(reason, by) || !strings.HasPrefix(reason[len(by):], id) {
		return "'s response masks "
	}
	switch rest := reason[len(by)+len(id):]; {
	case strings.HasPrefix(rest, "'s phase-noise skirt"):
		return "'s phase-noise skirt masks "
	case strings.HasPrefix(rest, "'s I/Q image"):
		return "'s I/Q image masks "
	}
	return "'s response masks "
}

// appendLabelRunes appends plainLabel(s) inside a JSON string.
func appendLabelRunes(b []byte, s string) []byte {
	for _, r := range s {
		if r != '{' && r != '}' && r != '|' {
			b = appendStringRune(b, r)
		}
	}
	return b
}

// appendNumber appends a finite number as JSON.
func appendNumber(b []byte, v float64) []byte {
	return strconv.AppendFloat(b, v, 'g', -1, 64)
}

// appendString appends s as a JSON string.
func appendString(b []byte, s string) []byte {
	b = append(b, '"')
	for _, r := range s {
		b = appendStringRune(b, r)
	}
	return append(b, '"')
}

const hexDigits = "0123456789abcdef"

// appendStringRune appends one rune of a JSON string, escaped where JSON
// requires it (and <, >, & as encoding/json does).
func appendStringRune(b []byte, r rune) []byte {
	switch {
	case r == '"' || r == '\\':
		return append(b, '\\', byte(r))
	case r == '\n':
		return append(b, '\\', 'n')
	case r == '\r':
		return append(b, '\\', 'r')
	case r == '\t':
		return append(b, '\\', 't')
	case r < 0x20 || r == '<' || r == '>' || r == '&' || r == '\u2028' || r == '\u2029':
		return append(b, '\\', 'u', hexDigits[r>>12&0xf], hexDigits[r>>8&0xf], hexDigits[r>>4&0xf], hexDigits[r&0xf])
	case r == utf8.RuneError:
		return append(b, `\ufffd`...)
	}
	return utf8.AppendRune(b, r)
}

// hasBreakthrough says whether a target of res has clutter breakthrough
// spans (breakthroughMarks shades them).
func hasBreakthrough(res *scenarios.Result) bool {
	for _, t := range res.Report.Targets {
		if t.Breakthrough != nil {
			return true
		}
	}
	return false
}
