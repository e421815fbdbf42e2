package server

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"net/http/httptest"
	"runtime"
	"slices"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/gorilla/websocket"

	"github.com/pulsewright/pulsewright/scenarios"
)

// TestLoad runs 50 sessions on loopback, each sending 30 edits a second
// for 10 s across the demo scenes. Every session must end on a frame of
// its newest edit with no error; the p95 latency from an edit to its
// frame is logged; after Close the goroutine count returns to where it
// was.
func TestLoad(t *testing.T) {
	if testing.Short() {
		t.Skip("load test skipped under -short")
	}
	const (
		sessions = 50
		rate     = 30 // edits per second per session
		duration = 10 * time.Second
	)
	demos, err := scenarios.Demos()
	if err != nil {
		t.Fatal(err)
	}
	// Each demo encoded once with a seed to substitute: an edit is a new seed.
	const seedMark = "987654321"
	docs := make([]string, len(demos))
	for i, d := range demos {
		sc := *d.Scenario
		sc.Seed = 987654321
		doc, err := scenarios.Canonical(&sc)
		if err != nil || !strings.Contains(string(doc), seedMark) {
			t.Fatalf("demo %s: %v", d.Name, err)
		}
		docs[i] = string(doc)
	}
	baseline := runtime.NumGoroutine()
	s, err := New(Config{DataDir: t.TempDir(), MaxSessions: sessions, MaxSessionsPerClient: sessions}, testLogger(t), (&fakeEval{}).Evaluate)
	if err != nil {
		t.Fatal(err)
	}
	ts := httptest.NewServer(s.Handler())
	url := "ws" + strings.TrimPrefix(ts.URL, "http") + "/ws"

	var (
		mu        sync.Mutex
		latencies []time.Duration
		frames    int
		wg        sync.WaitGroup
	)
	for i := range sessions {
		wg.Go(func() {
			c, _, err := websocket.DefaultDialer.Dial(url, nil)
			if err != nil {
				t.Error(err)
				return
			}
			defer c.Close()
			sentAt := sync.Map{} // id → time.Time
			const last = int64(rate * duration / time.Second)
			done := make(chan struct{})
			go func() { // the client's reader
				defer close(done)
				var lat []time.Duration
				n := 0
				defer func() {
					mu.Lock()
					latencies = append(latencies, lat...)
					frames += n
					mu.Unlock()
				}()
				for {
					c.SetReadDeadline(time.Now().Add(duration + 60*time.Second))
					_, data, err := c.ReadMessage()
					if err != nil {
						t.Errorf("session %d: read: %v", i, err)
						return
					}
					m, err := envelope(data)
					if err != nil || m.Type != MsgFrame {
						t.Errorf("session %d: %.300s %v", i, data, err)
						return
					}
					n++
					if at, ok := sentAt.Load(m.ID); ok {
						lat = append(lat, time.Since(at.(time.Time)))
					}
					if m.ID == last {
						return
					}
				}
			}()
			send(t, c, MsgView, 0, `,"range_m":null,"width_px":900`)
			tick := time.NewTicker(time.Second / rate)
			defer tick.Stop()
			for id := int64(1); id <= last; id++ {
				<-tick.C
				// A new scene every second, a new seed every edit.
				doc := strings.Replace(docs[(i+int(id)/rate)%len(docs)], seedMark, strconv.FormatInt(id, 10), 1)
				sentAt.Store(id, time.Now())
				if err := c.WriteMessage(websocket.TextMessage, fmt.Appendf(nil, `{"type":"scenario","id":%d,"scenario":%s}`, id, doc)); err != nil {
					t.Errorf("session %d: write: %v", i, err)
					return
				}
			}
			select {
			case <-done:
			case <-time.After(60 * time.Second):
				t.Errorf("session %d: the frame of the last edit %d never came", i, last)
			}
		})
	}
	wg.Wait()
	if t.Failed() {
		return
	}
	slices.Sort(latencies)
	p := func(q float64) time.Duration { return latencies[int(q*float64(len(latencies)-1))] }
	t.Logf("%d sessions × %d edits/s × %v: %d frames, edit→frame latency p50 %v, p95 %v, max %v",
		sessions, rate, duration, frames, p(0.5).Round(time.Millisecond), p(0.95).Round(time.Millisecond), p(1).Round(time.Millisecond))

	ctx, cancel := context.WithTimeout(context.Background(), 5*time.Second)
	defer cancel()
	if err := s.Close(ctx); err != nil {
		t.Fatal(err)
	}
	ts.Close()
	deadline := time.Now().Add(5 * time.Second)
	for runtime.NumGoroutine() > baseline && time.Now().Before(deadline) {
		time.Sleep(20 * time.Millisecond)
	}
	if g := runtime.NumGoroutine(); g > baseline {
		buf := make([]byte, 1<<16)
		t.Fatalf("goroutines: %d after close, %d before\n%s", g, baseline, buf[:runtime.Stack(buf, true)])
	} else {
		t.Logf("goroutines: %d before, %d after close", baseline, g)
	}
}

// envelope decodes the type and id at the head of a message without
// scanning the rest: the server writes them first.
func envelope(data []byte) (struct {
	Type string `json:"type"`
	ID   int64  `json:"id"`
}, error) {
	var m struct {
		Type string `json:"type"`
		ID   int64  `json:"id"`
	}
	head := data
	if i := bytes.IndexByte(data, ','); i > 0 {
		if j := bytes.IndexByte(data[i+1:], ','); j > 0 {
			head = append(append([]byte{}, data[:i+1+j]...), '}')
		}
	}
	err := json.Unmarshal(head, &m)
	return m, err
}
