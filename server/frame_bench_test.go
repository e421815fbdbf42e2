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
	return &session{srv: s, eval: new(scenarios.Engine).Evaluate, log: testLogger(tb)}, &evalCache{}
}

// dragEdits returns raw scenarios of demo name with its first target at
// n ranges 2 m apart, as a drag sends them.
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
			t["range_m"] = r + 2*float64(i%8)
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
	for _, name := range []string{"harbour-skiff", "rocky-coast", "hill-clutter-doppler"} {
		b.Run(name, func(b *testing.B) {
			ss, c := dragSession(b)
			edits := dragEdits(b, name, 8)
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
			for b.Loop() {
				i++
				frameOf(i)
			}
		})
	}
}
