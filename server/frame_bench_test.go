package server

import (
	"context"
	"encoding/json"
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

// dragEdits returns raw scenarios of demo name with its first target at
// n ranges 0.25 m apart, as a drag sends them.
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
		t := m["targets"].([]any)[0].(map[string]any)
		if r, ok := t["range_m"].(float64); ok {
			t["range_m"] = r + 0.25*float64(i)
		}
		raw, _ = json.Marshal(m)
		out = append(out, raw)
	}
	return out
}

// BenchmarkDragFrame: one frame of a drag on each demo (a target moved,
// the rest unchanged), from the raw scenario to the bytes for the
// websocket, with the session's engine and caches warm.
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
				f.encode(sent)
				for _, ch := range f.charts {
					sent[ch.name] = ch.key
				}
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

// TestFrameDataMatchesFullOption: the data-only path encodes each series
// exactly as the whole chart carries it, for every demo, pinned or not,
// zoomed or not.
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
		g := windowGrid(&res.Series, len(res.Series.ProfileDB))
		zoom := &[2]float64{g.x(g.n / 3), g.x(g.n / 2)}
		for _, ref := range []*scenarios.Result{nil, res} {
			for _, vw := range []view{{width: 1200}, {width: 700, mapWidth: 500, rangeM: zoom}} {
				c := &evalCache{}
				f := &frame{}
				c.chartsOf(f, res, ref, vw, false)
				c.put(f)
				c.chartsOf(f, res, ref, vw, false) // now data only
				whole := map[string]chartOut{ChartProfile: profileChart(res, ref, vw), ChartEcho: echoChart(res, vw)}
				if hasBreakthrough(res) {
					delete(whole, ChartProfile) // built whole: its key names the breakthrough spans
				}
				for _, ch := range f.charts {
					w, ok := whole[ch.name]
					if !ok || ch.option != nil && hasBreakthrough(res) && ch.name == ChartProfile {
						continue
					}
					if ch.option != nil || ch.key != w.key {
						t.Fatalf("%s %s: data-only chart has option %v, key %q (whole: %q)", d.Name, ch.name, ch.option != nil, ch.key, w.key)
					}
					if len(ch.data) != len(w.data) {
						t.Fatalf("%s %s: %d series, whole chart %d", d.Name, ch.name, len(ch.data), len(w.data))
					}
					for i := range ch.data {
						if ch.data[i].id != w.data[i].id || string(ch.data[i].data) != string(w.data[i].data) {
							t.Errorf("%s %s series %s: data-only %.80s… whole %.80s…", d.Name, ch.name, ch.data[i].id, ch.data[i].data, w.data[i].data)
						}
					}
					delete(whole, ch.name)
				}
				if len(whole) != 0 {
					t.Errorf("%s: charts %v not built data-only", d.Name, whole)
				}
			}
		}
	}
}

// TestFrameAllocs: once the page holds every chart's structure, a frame
// of a drag (a target moved: a new evaluation, the same chart keys)
// allocates nothing between the evaluation's result and the bytes for the
// websocket: the cached surfaces and designer plots are looked up, the
// series decimated and encoded into the frame's reused buffer, the
// response recognised as the one the page holds, and the frame encoded
// into the writer's reused buffer. (The evaluation itself, the report's
// and link's encoding for a new scenario, allocate: see BenchmarkDragFrame.)
func TestFrameAllocs(t *testing.T) {
	if testing.Short() {
		t.Skip("evaluates demos")
	}
	for _, name := range []string{"harbour-skiff", "rocky-coast", "long-pulse-blind"} {
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
			results = append(results, c.res)
		}
		if c.scn.Radar.Schedule != nil {
			// A PRF schedule's charts are built whole every frame.
			t.Logf("%s: PRF schedule, its charts built whole", name)
			continue
		}
		if hasBreakthrough(c.res) {
			// Its profile is built whole (the key names the breakthrough
			// spans): not a steady state of this path.
			t.Logf("%s: clutter breakthrough, profile built whole", name)
			continue
		}
		sent := map[string]string{}
		vw := view{width: 1200, mapWidth: 560}
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
			t.Errorf("%s: %.1f allocations per frame in steady state, want 0", name, a)
		}
		var m struct {
			Charts map[string]chartMsg `json:"charts"`
		}
		if err := json.Unmarshal(ss.out, &m); err != nil {
			t.Fatalf("%s: last frame is not JSON: %v", name, err)
		}
		if p, ok := m.Charts[ChartProfile]; !ok || p.Replace {
			t.Errorf("%s: profile %+v, want a data-only merge", name, p)
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
