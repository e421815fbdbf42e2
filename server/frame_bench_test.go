package server

import (
	"bytes"
	"context"
	"encoding/json"
	"maps"
	"math"
	"slices"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/scenarios"
)

// dragSession is a session without a connection, on a real server with
// the per-session engine, for the frame path's benchmark and allocation
// test: compute's evaluate, then the writer's encode.
func dragSession(tb testing.TB) (*session, *evalCache) {
	tb.Helper()
	s, err := New(Config{DataDir: tb.TempDir()}, testLogger(tb), scenarios.Evaluate)
	if err != nil {
		tb.Fatal(err)
	}
	tb.Cleanup(func() { s.Close(context.Background()) })
	return &session{srv: s, eval: new(scenarios.Engine).Evaluate, log: testLogger(tb), frames: newMailbox[*frame](), free: make(chan *frame, 2)}, &evalCache{}
}

// firstPoint returns the first point target of a scenario decoded into
// m (a distributed one, such as hill-clutter-doppler's ridge, has no
// range_m or rcs_dbsm to drag or nudge).
func firstPoint(tb testing.TB, m map[string]any) map[string]any {
	tb.Helper()
	for _, t := range m["targets"].([]any) {
		if t := t.(map[string]any); t["kind"] == scenarios.TargetPoint || t["kind"] == nil {
			if _, ok := t["range_m"].(float64); ok {
				return t
			}
		}
	}
	tb.Fatal("no point target")
	return nil
}

// dragEdits returns raw scenarios of demo name with its first point
// target at n ranges 0.25 m apart, as a drag sends them.
func dragEdits(tb testing.TB, name string, n int) []json.RawMessage {
	tb.Helper()
	d, err := scenarios.LoadDemo(name)
	if err != nil {
		tb.Fatal(err)
	}
	var out []json.RawMessage
	for i := range n {
		var m map[string]any
		raw, err := scenarios.Canonical(d.Scenario)
		if err != nil {
			tb.Fatal(err)
		}
		json.Unmarshal(raw, &m)
		t := firstPoint(tb, m)
		t["range_m"] = t["range_m"].(float64) + 0.25*float64(i)
		raw, _ = json.Marshal(m)
		out = append(out, raw)
	}
	return out
}

// editScenes are the scenes of the single-edit benchmark: every demo and
// the page tests' 64 k-sample scene (harbour-skiff at 20 MHz over a
// 65 536-sample window, web's TestEditLatency).
func editScenes(tb testing.TB) []string {
	tb.Helper()
	demos, err := scenarios.Demos()
	if err != nil {
		tb.Fatal(err)
	}
	var out []string
	for _, d := range demos {
		out = append(out, d.Name)
	}
	return append(out, "64k-samples")
}

// nudgeEdits returns raw scenarios of scene name (a demo, or
// "64k-samples") with its first point target's RCS nudged by +1 dB and back,
// alternately, as the page's wheel sends them: [nudged, base].
func nudgeEdits(tb testing.TB, name string) []json.RawMessage {
	tb.Helper()
	demo := name
	if name == "64k-samples" {
		demo = "harbour-skiff"
	}
	d, err := scenarios.LoadDemo(demo)
	if err != nil {
		tb.Fatal(err)
	}
	raw, err := scenarios.Canonical(d.Scenario)
	if err != nil {
		tb.Fatal(err)
	}
	var out []json.RawMessage
	for _, step := range []float64{1, 0} {
		var m map[string]any
		json.Unmarshal(raw, &m)
		if name == "64k-samples" {
			r := m["radar"].(map[string]any)
			r["sample_rate_hz"], r["pri_s"], r["window_start_m"] = 20e6, 4e-3, 3500.0
			r["window_stop_m"] = 3500 + 65535*299792458/2/20e6
		}
		t := firstPoint(tb, m)
		t["rcs_dbsm"] = t["rcs_dbsm"].(float64) + step
		b, _ := json.Marshal(m)
		if _, err := scenarios.Decode(b); err != nil {
			tb.Fatalf("%s: nudged scenario: %v", name, err)
		}
		out = append(out, b)
	}
	return out
}

// BenchmarkEditFrame: one frame of a single edit on each demo and the
// 64 k-sample scene, the first point target's RCS nudged by 1 dB up, then back
// down (the page's wheel), from the raw scenario to the bytes for the
// websocket, with the session's engine and caches warm; the bytes go into
// the writer's reused buffer and the frame back to compute, as writeLoop
// does.
func BenchmarkEditFrame(b *testing.B) {
	for _, name := range editScenes(b) {
		b.Run(name, func(b *testing.B) {
			ss, c := dragSession(b)
			edits := nudgeEdits(b, name)
			sent := map[string]string{}
			ctx := context.Background()
			gen := uint64(0)
			frameOf := func(i int) {
				gen++
				w := want{gen: gen, id: int64(gen), scn: edit{seq: gen, id: int64(gen), raw: edits[i%len(edits)]}, view: view{width: 1200}}
				f, err := ss.evaluate(ctx, w, c)
				if err != nil {
					b.Fatal(err)
				}
				ss.out = f.appendTo(ss.out[:0], sent) // as the writer does
				for _, ch := range f.charts {
					sent[ch.name] = ch.key
				}
				ss.recycle(f)
			}
			frameOf(0)
			frameOf(1)
			b.ReportAllocs()
			i := 1
			cpu0 := processCPU()
			for b.Loop() {
				i++
				frameOf(i)
			}
			b.ReportMetric(float64(processCPU()-cpu0)/float64(b.N)/1e6, "cpu-ms/op")
		})
	}
}

// BenchmarkDragFrame: one frame of a drag on each demo (its first point
// target moved, the rest unchanged), from the raw scenario to the bytes for the
// websocket, with the session's engine and caches warm (the writer's
// buffer and the frames reused, as in BenchmarkEditFrame).
func BenchmarkDragFrame(b *testing.B) {
	demos, err := scenarios.Demos()
	if err != nil {
		b.Fatal(err)
	}
	for _, d := range demos {
		name := d.Name
		b.Run(name, func(b *testing.B) {
			ss, c := dragSession(b)
			edits := dragEdits(b, name, 64) // every frame a new range: nothing repeats
			sent := map[string]string{}
			ctx := context.Background()
			gen := uint64(0)
			frameOf := func(i int) {
				gen++
				w := want{gen: gen, id: int64(gen), scn: edit{seq: gen, id: int64(gen), raw: edits[i%len(edits)]}, view: view{width: 1200}}
				f, err := ss.evaluate(ctx, w, c)
				if err != nil {
					b.Fatal(err)
				}
				ss.out = f.appendTo(ss.out[:0], sent) // as the writer does
				for _, ch := range f.charts {
					sent[ch.name] = ch.key
				}
				ss.recycle(f)
			}
			frameOf(0)
			b.ReportAllocs()
			i := 0
			cpu0 := processCPU()
			for b.Loop() {
				i++
				frameOf(i)
			}
			b.ReportMetric(float64(processCPU()-cpu0)/float64(b.N)/1e6, "cpu-ms/op")
		})
	}
}

// frameViews are the views a frame is built for in the tests: the whole
// window; zoomed, with the map's cell selected and the CPI maps shown.
func frameViews(res *scenarios.Result) []view {
	g := windowGrid(&res.Series, len(res.Series.ProfileDB))
	zoom := &[2]float64{g.x(g.n / 3), g.x(g.n / 2)}
	// The Floors tab shows: the strongest target's, then the last one's.
	vws := []view{{width: 1200, mapWidth: 560, floors: &floorsReq{}}, {width: 700, mapWidth: 500, rangeM: zoom, cpiMaps: true}}
	if len(res.Report.Targets) > 0 {
		t := res.Report.Targets[len(res.Report.Targets)-1]
		vws[1].floors = &floorsReq{target: t.ID}
		rate := 0.0
		if t.ApparentRangeRateMPS != nil {
			rate = *t.ApparentRangeRateMPS
		}
		vws[1].cell = &cell{rangeM: math.Min(math.Max(t.RangeM, zoom[0]), zoom[1]), rateMPS: rate}
	}
	return vws
}

// wholeCharts returns every chart of a frame of res built whole, by name.
func wholeCharts(scn *scenarios.Scenario, res, ref *scenarios.Result, vw view) map[string]chartOut {
	whole := map[string]chartOut{ChartProfile: profileChart(res, ref, vw), ChartEcho: echoChart(res, vw)}
	if m, ok := rdmapChart(res, vw); ok {
		whole[m.name] = m
	}
	if c, ok := rdCutsChart(res, vw); ok {
		whole[c.name] = c
	}
	for _, c := range scheduleCharts(scn, res, vw) {
		whole[c.name] = c
	}
	if c, ok, _ := floorsChart(res, vw); ok {
		whole[c.name] = c
	}
	return whole
}

// omitted are the series a data-only chart leaves out, by chart: the page
// holds them (their data is named by the chart's key).
var omitted = map[string]string{ChartBlindZones: SeriesZones}

// TestFrameDataMatchesFullOption: the data-only path encodes each series
// exactly as the whole chart carries it, for every chart of every demo
// (the profile with its breakthrough areas, the echo, the range–Doppler
// map and its cuts, the blind zones, the CPI maps and the Floors tab's
// curves and marks), pinned or not, zoomed or not.
func TestFrameDataMatchesFullOption(t *testing.T) {
	demos, err := scenarios.Demos()
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	for _, d := range demos {
		res, err := scenarios.Evaluate(ctx, d.Scenario)
		if err != nil {
			t.Fatal(err)
		}
		if d.Scenario.Radar.Schedule != nil {
			if err := scenarios.ScheduleMaps(ctx, d.Scenario, res); err != nil {
				t.Fatal(err)
			}
		}
		for _, ref := range []*scenarios.Result{nil, res} {
			for _, vw := range frameViews(res) {
				c := &evalCache{scn: d.Scenario}
				f := &frame{}
				c.chartsOf(f, res, ref, vw, false)
				c.put(f)
				c.chartsOf(f, res, ref, vw, false) // now data only
				whole := wholeCharts(d.Scenario, res, ref, vw)
				for _, ch := range f.charts {
					w, ok := whole[ch.name]
					if !ok {
						continue // the response: static, checked by its own tests
					}
					delete(whole, ch.name)
					if ch.name == ChartBlindZones {
						// The version of its cells is the cache's own.
						w.key = w.key[:strings.LastIndexByte(w.key, '#')] + ch.key[strings.LastIndexByte(ch.key, '#'):]
					}
					if ch.option != nil || ch.key != w.key {
						t.Errorf("%s %s: data-only chart has option %v, key %q (whole: %q)", d.Name, ch.name, ch.option != nil, ch.key, w.key)
						continue
					}
					ids := map[string]bool{}
					for _, sd := range ch.data {
						ids[sd.id] = true
						i := slices.IndexFunc(w.data, func(x seriesData) bool { return x.id == sd.id })
						switch {
						case i < 0:
							t.Errorf("%s %s: series %s not in the whole chart", d.Name, ch.name, sd.id)
						case sd.field != "":
							// A mark area: its data as the whole option has it.
							inner := bytes.TrimSuffix(bytes.TrimPrefix(sd.data, []byte(`{"data":`)), []byte("}"))
							if !bytes.Contains(w.option, inner) {
								t.Errorf("%s %s series %s: %s %.120s… not in the whole option", d.Name, ch.name, sd.id, sd.field, sd.data)
							}
						case string(sd.data) != string(w.data[i].data):
							t.Errorf("%s %s series %s: data-only %.80s… whole %.80s…", d.Name, ch.name, sd.id, sd.data, w.data[i].data)
						}
					}
					for _, wd := range w.data {
						if !ids[wd.id] && omitted[ch.name] != wd.id {
							t.Errorf("%s %s: series %s left out of the data-only chart", d.Name, ch.name, wd.id)
						}
					}
				}
				if len(whole) != 0 {
					t.Errorf("%s: charts %v not in the frame", d.Name, slices.Collect(maps.Keys(whole)))
				}
			}
		}
	}
}

// TestFrameAllocs: once the page holds every chart's structure, a frame
// of a drag (a target moved: a new evaluation, the same chart keys)
// allocates nothing between the evaluation's result and the bytes for the
// websocket, on every demo: the cached surfaces and designer plots are
// looked up, the series, the range–Doppler map and its cuts, the
// breakthrough areas, the blind zones' markers, the CPI maps and the
// Floors tab's curves and marks decimated and encoded into the frame's
// reused buffer (the Floors analysis of a result, like the evaluation,
// allocates, once per result: see floorsFor), the response recognised as
// the one the page holds, and the frame encoded into the writer's reused
// buffer. (The evaluation itself, the report's and link's encoding for a
// new scenario, allocate: see BenchmarkDragFrame.)
func TestFrameAllocs(t *testing.T) {
	if testing.Short() {
		t.Skip("evaluates demos")
	}
	demos, err := scenarios.Demos()
	if err != nil {
		t.Fatal(err)
	}
	for _, d := range demos {
		name := d.Name
		ss, c := dragSession(t)
		ctx := context.Background()
		edits := dragEdits(t, name, 2)
		var results []*scenarios.Result
		for i, raw := range edits {
			gen := uint64(i + 1)
			w := want{gen: gen, id: int64(gen), scn: edit{seq: gen, id: int64(gen), raw: raw}, view: view{width: 1200}}
			f, err := ss.evaluate(ctx, w, c)
			if err != nil {
				t.Fatal(err)
			}
			c.put(f)
			ss.recycle(f)
			if c.scn.Radar.Schedule != nil {
				if err := scenarios.ScheduleMaps(ctx, c.scn, c.res); err != nil {
					t.Fatal(err)
				}
			}
			results = append(results, c.res)
		}
		for vi, vw := range frameViews(results[0]) {
			sent := map[string]string{}
			i := 0
			frameOnce := func() {
				i++
				res := results[i%len(results)]
				if err := ss.ambiguity(ctx, c); err != nil {
					t.Fatal(err)
				}
				if err := ss.wavePlots(ctx, c); err != nil {
					t.Fatal(err)
				}
				f := ss.newFrame()
				f.id, f.report, f.link = int64(i), c.report, c.link
				c.chartsOf(f, res, nil, vw, len(ss.frames.ch) > 0)
				c.put(f)
				ss.out = f.appendTo(ss.out[:0], sent)
				for _, ch := range f.charts {
					sent[ch.name] = ch.key
				}
				ss.recycle(f)
			}
			for range 3 { // the page takes the structures; buffers reach their size
				frameOnce()
			}
			if a := testing.AllocsPerRun(20, frameOnce); a != 0 {
				t.Errorf("%s view %d: %.1f allocations per frame in steady state, want 0", name, vi, a)
			}
			var m struct {
				Charts map[string]chartMsg `json:"charts"`
			}
			if err := json.Unmarshal(ss.out, &m); err != nil {
				t.Fatalf("%s: last frame is not JSON: %v", name, err)
			}
			for n, ch := range m.Charts {
				if ch.Replace {
					t.Errorf("%s view %d: chart %s sent whole in steady state, want a data-only merge", name, vi, n)
				}
			}
			if p, ok := m.Charts[ChartProfile]; !ok || p.Replace {
				t.Errorf("%s: profile %+v, want a data-only merge", name, p)
			}
			t.Logf("%s view %d: %d charts, %d bytes a frame", name, vi, len(m.Charts), len(ss.out))
		}
	}
}

// markers decodes the markers series as appendMarkers encodes it.
func markers(res *scenarios.Result, lo, hi float64) []marker {
	var out []marker
	if err := json.Unmarshal(appendMarkers(nil, res, lo, hi), &out); err != nil {
		panic("markers are not JSON: " + err.Error())
	}
	return out
}
