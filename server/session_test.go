package server

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"net/http"
	"net/http/httptest"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"github.com/gorilla/websocket"

	"github.com/pulsewright/pulsewright/scenarios"
)

// testMsg is any server message, decoded for checks.
type testMsg struct {
	Type   string            `json:"type"`
	ID     int64             `json:"id"`
	Report *scenarios.Report `json:"report"`
	Link   string            `json:"link"`
	Charts map[string]struct {
		Replace bool            `json:"replace"`
		Option  json.RawMessage `json:"option"`
	} `json:"charts"`
	Reference *scenarios.Report      `json:"reference"`
	ComputeMS *float64               `json:"compute_ms"`
	Error     string                 `json:"error"`
	Fields    []scenarios.FieldError `json:"fields"`
}

func mustDial(tb testing.TB, ts *httptest.Server, hdr http.Header) *websocket.Conn {
	tb.Helper()
	c, resp, err := websocket.DefaultDialer.Dial("ws"+strings.TrimPrefix(ts.URL, "http")+"/ws", hdr)
	if err != nil {
		status := 0
		if resp != nil {
			status = resp.StatusCode
		}
		tb.Fatalf("dial: %v (status %d)", err, status)
	}
	tb.Cleanup(func() { c.Close() })
	return c
}

func send(tb testing.TB, c *websocket.Conn, typ string, id int64, fields string) {
	tb.Helper()
	msg := fmt.Sprintf(`{"type":%q,"id":%d%s}`, typ, id, fields)
	if err := c.WriteMessage(websocket.TextMessage, []byte(msg)); err != nil {
		tb.Fatal(err)
	}
}

func sendScenario(tb testing.TB, c *websocket.Conn, id int64, scenario string) {
	tb.Helper()
	send(tb, c, MsgScenario, id, `,"scenario":`+scenario)
}

// next reads messages until one with the given id arrives, within 10 s.
func next(tb testing.TB, c *websocket.Conn, id int64) testMsg {
	tb.Helper()
	c.SetReadDeadline(time.Now().Add(10 * time.Second))
	for {
		_, data, err := c.ReadMessage()
		if err != nil {
			tb.Fatalf("waiting for message %d: %v", id, err)
		}
		var m testMsg
		if err := json.Unmarshal(data, &m); err != nil {
			tb.Fatalf("message %.200s: %v", data, err)
		}
		// Every message has exactly the shape protocol.go defines.
		var shape any = &errorMsg{}
		if m.Type == MsgFrame {
			shape = &frameMsg{}
		}
		dec := json.NewDecoder(bytes.NewReader(data))
		dec.DisallowUnknownFields()
		if err := dec.Decode(shape); err != nil {
			tb.Fatalf("%s message does not match protocol.go: %v", m.Type, err)
		}
		if m.ID == id {
			return m
		}
	}
}

func TestSessionEdits(t *testing.T) {
	eval := &fakeEval{}
	_, ts := mustServer(t, eval, nil)
	c := mustDial(t, ts, http.Header{"Origin": {ts.URL}})
	skiff := mustDemoJSON(t, "harbour-skiff")

	sendScenario(t, c, 1, skiff)
	m := next(t, c, 1)
	if m.Type != MsgFrame || m.Report == nil || m.Report.Scenario != "Harbour approach: skiff beside a tanker" || m.ComputeMS == nil {
		t.Fatalf("first frame: %+v", m)
	}
	if !strings.HasPrefix(m.Link, "/#s=") {
		t.Errorf("link %q", m.Link)
	}
	for _, name := range []string{ChartEcho, ChartProfile, ChartResponse} {
		ch, ok := m.Charts[name]
		if !ok || !ch.Replace || !strings.Contains(string(ch.Option), `"xAxis"`) {
			t.Errorf("chart %s in the first frame: replace %v, %.100s", name, ch.Replace, ch.Option)
		}
	}

	for _, name := range []string{ChartAmbiguity, ChartAmbiguityCuts, ChartPulse, ChartFilter} {
		if _, ok := m.Charts[name]; !ok {
			t.Errorf("no %s in the first frame", name)
		}
	}
	// Another scene of the same structure: data-only merges by series id;
	// the waveform changed, so its response and surface come whole.
	sendScenario(t, c, 2, mustDemoJSON(t, "rocky-coast"))
	m = next(t, c, 2)
	for _, name := range []string{ChartResponse, ChartAmbiguity, ChartAmbiguityCuts, ChartPulse, ChartFilter} {
		if !m.Charts[name].Replace {
			t.Errorf("chart %s of a new waveform: replace false", name)
		}
		delete(m.Charts, name)
	}
	if len(m.Charts) != 2 {
		t.Errorf("charts %v, want echo and profile", len(m.Charts))
	}
	for name, ch := range m.Charts {
		var opt struct {
			Series []map[string]json.RawMessage `json:"series"`
		}
		json.Unmarshal(ch.Option, &opt)
		if ch.Replace || len(opt.Series) == 0 || strings.Contains(string(ch.Option), `"xAxis"`) {
			t.Errorf("chart %s: replace %v, %.200s", name, ch.Replace, ch.Option)
		}
		for _, s := range opt.Series {
			if len(s) != 2 || s["id"] == nil || s["data"] == nil {
				t.Errorf("chart %s: merge series has keys %v, want id and data", name, keys(s))
			}
		}
	}

	// Only the seed changes: the waveform's charts are left out.
	sendScenario(t, c, 3, strings.Replace(mustDemoJSON(t, "rocky-coast"), `"seed":23`, `"seed":24`, 1))
	m = next(t, c, 3)
	if _, ok := m.Charts[ChartResponse]; ok || len(m.Charts) != 2 {
		t.Errorf("seed change: charts %d, response sent again", len(m.Charts))
	}

	// A bad edit is answered with its problems; the session lives on.
	sendScenario(t, c, 13, `{"version":2,"waveform":{"kind":"barker","length":6,"chip_s":1e-6}}`)
	m = next(t, c, 13)
	if m.Type != MsgError || len(m.Fields) != 1 || m.Fields[0].Path != "waveform.length" {
		t.Fatalf("bad edit: %+v", m)
	}
	send(t, c, MsgPin, 14, `,"scenario":{"version":2}`)
	if m = next(t, c, 14); m.Type != MsgError || m.Error != "invalid pinned scenario" || len(m.Fields) == 0 {
		t.Fatalf("bad pin: %+v", m)
	}
	send(t, c, "bogus", 15, "")
	if m = next(t, c, 15); m.Type != MsgError || !strings.Contains(m.Error, "unknown message type") {
		t.Fatalf("unknown type: %+v", m)
	}
	// It keeps the last good scenario: a zoom re-plots rocky-coast.
	calls := eval.calls.Load()
	send(t, c, MsgView, 16, `,"range_m":[10000,12000],"width_px":400`)
	m = next(t, c, 16)
	if m.Type != MsgFrame || m.Report.Scenario != "Patrol boat off a rocky coast" {
		t.Fatalf("view after a bad edit: %+v", m)
	}
	if eval.calls.Load() != calls {
		t.Error("a view change evaluated the scenario again")
	}
	send(t, c, MsgView, 17, `,"range_m":[5,1],"width_px":400`)
	if m = next(t, c, 17); m.Type != MsgError {
		t.Fatalf("reversed range: %+v", m)
	}

	// Pinning adds the reference series and report: a structure change.
	send(t, c, MsgPin, 18, `,"scenario":`+skiff)
	m = next(t, c, 18)
	if m.Reference == nil || m.Reference.Scenario != "Harbour approach: skiff beside a tanker" || !m.Charts[ChartProfile].Replace ||
		!strings.Contains(string(m.Charts[ChartProfile].Option), `"id":"reference"`) || m.Charts[ChartEcho].Replace {
		t.Fatalf("pin: reference %v, profile replace %v", m.Reference, m.Charts[ChartProfile].Replace)
	}
	send(t, c, MsgPin, 19, `,"scenario":null`)
	m = next(t, c, 19)
	if m.Reference != nil || !m.Charts[ChartProfile].Replace || strings.Contains(string(m.Charts[ChartProfile].Option), `"id":"reference"`) {
		t.Fatalf("unpin: %+v", m.Reference)
	}
}

func keys(m map[string]json.RawMessage) []string {
	var out []string
	for k := range m {
		out = append(out, k)
	}
	return out
}

func TestSessionForeignOrigin(t *testing.T) {
	_, ts := mustServer(t, nil, nil)
	_, resp, err := websocket.DefaultDialer.Dial("ws"+strings.TrimPrefix(ts.URL, "http")+"/ws", http.Header{"Origin": {"http://evil.example"}})
	if err == nil || resp == nil || resp.StatusCode != http.StatusForbidden {
		t.Fatalf("foreign origin: err %v, resp %v", err, resp)
	}
}

// TestSessionCancelsStale checks that a new edit cancels the computation
// in flight and that only the newest edit's frame arrives.
func TestSessionCancelsStale(t *testing.T) {
	var cancelled atomic.Int64
	started := make(chan string, 10)
	eval := &fakeEval{EvaluateFn: func(ctx context.Context, s *scenarios.Scenario) (*scenarios.Result, error) {
		started <- s.Name
		if s.Name == "slow" {
			<-ctx.Done() // only a cancel ends it
			cancelled.Add(1)
			return nil, ctx.Err()
		}
		return plausibleResult(s), nil
	}}
	// A long starvation bound keeps the test independent of the machine's
	// speed: here every new edit must cancel the one in flight.
	_, ts := mustServer(t, eval, func(c *Config) { c.StarveAfter = time.Minute })
	c := mustDial(t, ts, nil)
	sendScenario(t, c, 0, `{"version":2,"name":"first","waveform":{"kind":"p4","length":16,"chip_s":1e-7}}`)
	<-started
	next(t, c, 0) // edits cancel computations only while frames flow (starveAfter)
	sendScenario(t, c, 1, `{"version":2,"name":"slow","waveform":{"kind":"p4","length":16,"chip_s":1e-7}}`)
	<-started
	sendScenario(t, c, 2, `{"version":2,"name":"quick","waveform":{"kind":"p4","length":16,"chip_s":1e-7}}`)
	m := next(t, c, 2)
	if m.Type != MsgFrame || m.Report.Scenario != "quick" || cancelled.Load() != 1 {
		t.Fatalf("frame %+v, cancelled %d", m, cancelled.Load())
	}
}

// TestSessionStarvation: once the page has waited StarveAfter for a frame,
// a new edit no longer cancels the computation in flight; its frame is
// sent, then the newest edit's, so a fast slider still animates.
func TestSessionStarvation(t *testing.T) {
	release := make(chan struct{})
	started := make(chan string, 10)
	eval := &fakeEval{EvaluateFn: func(ctx context.Context, s *scenarios.Scenario) (*scenarios.Result, error) {
		started <- s.Name
		if s.Name == "slow" {
			select {
			case <-release:
			case <-ctx.Done():
				return nil, ctx.Err()
			}
		}
		return plausibleResult(s), nil
	}}
	_, ts := mustServer(t, eval, func(c *Config) { c.StarveAfter = time.Nanosecond })
	c := mustDial(t, ts, nil)
	sendScenario(t, c, 0, `{"version":2,"name":"first","waveform":{"kind":"p4","length":16,"chip_s":1e-7}}`)
	<-started
	next(t, c, 0)
	sendScenario(t, c, 1, `{"version":2,"name":"slow","waveform":{"kind":"p4","length":16,"chip_s":1e-7}}`)
	<-started
	sendScenario(t, c, 2, `{"version":2,"name":"quick","waveform":{"kind":"p4","length":16,"chip_s":1e-7}}`)
	time.Sleep(20 * time.Millisecond) // let the reader hand the edit over; a cancel would end "slow" now
	close(release)
	if m := next(t, c, 1); m.Report.Scenario != "slow" {
		t.Fatalf("first frame after the slow edit is %q, want the slow one", m.Report.Scenario)
	}
	if m := next(t, c, 2); m.Report.Scenario != "quick" {
		t.Fatalf("then %q, want quick", m.Report.Scenario)
	}
}

func TestSessionCap(t *testing.T) {
	_, ts := mustServer(t, nil, func(c *Config) { c.MaxSessions = 2 })
	mustDial(t, ts, nil)
	mustDial(t, ts, nil)
	_, resp, err := websocket.DefaultDialer.Dial("ws"+strings.TrimPrefix(ts.URL, "http")+"/ws", nil)
	if err == nil || resp.StatusCode != http.StatusServiceUnavailable {
		t.Fatalf("third session: %v", err)
	}
}

// TestSessionShutdown checks that Close ends open sessions with a close
// frame.
func TestSessionShutdown(t *testing.T) {
	s, ts := mustServer(t, nil, nil)
	c := mustDial(t, ts, nil)
	sendScenario(t, c, 1, mustDemoJSON(t, "closing-jet"))
	next(t, c, 1)
	ctx, cancel := context.WithTimeout(context.Background(), 5*time.Second)
	defer cancel()
	if err := s.Close(ctx); err != nil {
		t.Fatal(err)
	}
	c.SetReadDeadline(time.Now().Add(5 * time.Second))
	_, _, err := c.ReadMessage()
	if !websocket.IsCloseError(err, websocket.CloseGoingAway) {
		t.Fatalf("after Close: %v, want a going-away close", err)
	}
}

// TestSessionReadLimit checks that an oversized message ends the session
// instead of filling memory.
func TestSessionReadLimit(t *testing.T) {
	_, ts := mustServer(t, nil, nil)
	c := mustDial(t, ts, nil)
	big := `{"type":"scenario","id":1,"scenario":{"version":2,"notes":"` + strings.Repeat("z", maxMessage) + `"}}`
	c.WriteMessage(websocket.TextMessage, []byte(big))
	c.SetReadDeadline(time.Now().Add(5 * time.Second))
	_, _, err := c.ReadMessage()
	if !websocket.IsCloseError(err, websocket.CloseMessageTooBig) {
		t.Fatalf("oversized message: %v, want close 1009", err)
	}
}

// TestSessionRealEvaluator runs every demo through a session with the
// real evaluation: each gives a frame whose charts are valid JSON.
func TestSessionRealEvaluator(t *testing.T) {
	s, err := New(Config{DataDir: t.TempDir(), SessionEvaluator: func() Evaluator { return new(scenarios.Engine).Evaluate }}, testLogger(t), scenarios.Evaluate)
	if err != nil {
		t.Fatal(err)
	}
	ts := httptest.NewServer(s.Handler())
	defer ts.Close()
	defer s.Close(context.Background())
	c := mustDial(t, ts, nil)
	demos, err := scenarios.Demos()
	if err != nil {
		t.Fatal(err)
	}
	for i, d := range demos {
		id := int64(i + 1)
		sendScenario(t, c, id, mustDemoJSON(t, d.Name))
		m := next(t, c, id)
		if m.Type != MsgFrame || m.Report == nil || len(m.Report.Targets) != len(d.Scenario.Targets) {
			t.Fatalf("%s: %+v", d.Name, m)
		}
		for name, ch := range m.Charts {
			if !json.Valid(ch.Option) {
				t.Errorf("%s: chart %s is not JSON", d.Name, name)
			}
		}
	}
}
