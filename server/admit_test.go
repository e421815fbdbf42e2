package server

import (
	"context"
	"fmt"
	"net/http"
	"net/http/httptest"
	"runtime"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"github.com/pulsewright/pulsewright/scenarios"
)

// heavyScenario is valid but far beyond a laptop: 256 extended targets
// over a window of about a million samples.
func heavyScenario() string {
	var tg []string
	for i := range scenarios.MaxTargets {
		tg = append(tg, fmt.Sprintf(`{"id":"c%d","kind":"extended","range_start_m":6000,"range_stop_m":7000000,"rcs_dbsm_per_m":-30}`, i))
	}
	return `{"version":2,"name":"heavy","radar":{"sample_rate_hz":2e7,"pri_s":0.1,"window_start_m":5000,"window_stop_m":7000000},` +
		`"waveform":{"kind":"lfm","pulse_width_s":2e-5,"bandwidth_hz":1e7},"targets":[` + strings.Join(tg, ",") + `]}`
}

// TestHeavyScenarioRefused sends three heavy evaluations at once to a
// server with the real evaluator: each is refused at once with 422
// naming the fields that drive the cost, and the heap does not grow by
// more than a few tens of MB (the evaluation would need tens of GB).
func TestHeavyScenarioRefused(t *testing.T) {
	s, err := New(Config{DataDir: t.TempDir(), MemoryLimit: 1 << 30}, testLogger(t), scenarios.Evaluate)
	if err != nil {
		t.Fatal(err)
	}
	ts := httptest.NewServer(s.Handler())
	defer ts.Close()
	defer s.Close(context.Background())
	body := heavyScenario()
	runtime.GC()
	var before runtime.MemStats
	runtime.ReadMemStats(&before)
	var peak atomic.Uint64
	stop := make(chan struct{})
	go func() {
		var ms runtime.MemStats
		for {
			select {
			case <-stop:
				return
			case <-time.After(5 * time.Millisecond):
			}
			runtime.ReadMemStats(&ms)
			if ms.HeapAlloc > peak.Load() {
				peak.Store(ms.HeapAlloc)
			}
		}
	}()
	start := time.Now()
	var wg sync.WaitGroup
	for range 3 {
		wg.Go(func() {
			resp, b := testRequest(t, ts, "POST", "/api/v1/evaluate", body)
			if resp.StatusCode != http.StatusUnprocessableEntity {
				t.Errorf("heavy scenario: %d %.300s; want 422", resp.StatusCode, b)
				return
			}
			e := errBody(t, b)
			if !strings.Contains(e.Error, "over the limit of 1.0 GiB") || len(e.Fields) == 0 || e.Fields[0].Path != "targets" {
				t.Errorf("refusal does not name the limit and the driving field: %+v", e)
			}
		})
	}
	wg.Wait()
	close(stop)
	// At once: the estimate runs before any work. The bound allows for
	// the race detector on a loaded machine; the evaluation itself would
	// take minutes and tens of GB (the heap check below).
	if el := time.Since(start); el > 15*time.Second {
		t.Errorf("refusals took %v; want at once", el)
	}
	if grow := int64(peak.Load()) - int64(before.HeapAlloc); grow > 64<<20 {
		t.Errorf("heap grew by %d MB while refusing", grow>>20)
	}
	if u := s.adm.inUse(); u != 0 {
		t.Errorf("%d bytes still reserved", u)
	}
}

// TestAdmissionShared holds the whole budget with a websocket session's
// evaluation and checks that a REST evaluation waits for it and gives up
// at its deadline with 503, then runs once the session's is done.
func TestAdmissionShared(t *testing.T) {
	demo := mustDemoJSON(t, "harbour-skiff")
	sc, err := scenarios.Decode([]byte(demo))
	if err != nil {
		t.Fatal(err)
	}
	cost := scenarios.EstimateCost(sc).Bytes
	gate := make(chan struct{})
	entered := make(chan struct{}, 4)
	eval := &fakeEval{EvaluateFn: func(ctx context.Context, s *scenarios.Scenario) (*scenarios.Result, error) {
		entered <- struct{}{}
		if s.Name == "hold" {
			select {
			case <-gate:
			case <-ctx.Done():
				return nil, ctx.Err()
			}
		}
		return plausibleResult(s), nil
	}}
	srv, ts := mustServer(t, eval, func(c *Config) { c.MemoryLimit = cost * 3 / 2; c.APITimeout = 300 * time.Millisecond })
	c := mustDial(t, ts, nil)
	hold := strings.Replace(demo, `"name":"Harbour approach: skiff beside a tanker"`, `"name":"hold"`, 1)
	sendScenario(t, c, 1, hold)
	<-entered
	if u := srv.adm.inUse(); u != cost {
		t.Fatalf("session holds %d bytes, want its estimate %d", u, cost)
	}
	resp, b := testRequest(t, ts, "POST", "/api/v1/evaluate", demo)
	if resp.StatusCode != http.StatusServiceUnavailable || !strings.Contains(b, "busy") {
		t.Fatalf("REST evaluation while the budget is held: %d %s; want 503 busy", resp.StatusCode, b)
	}
	close(gate)
	if m := next(t, c, 1); m.Type != MsgFrame {
		t.Fatalf("session: %+v", m)
	}
	if resp, b := testRequest(t, ts, "POST", "/api/v1/evaluate", demo); resp.StatusCode != 200 {
		t.Fatalf("REST evaluation after the session's: %d %s", resp.StatusCode, b)
	}
}

// TestEvalDeadline checks that an evaluation that runs past EvalTimeout
// is cancelled, over REST and in a session, with a message that says so.
func TestEvalDeadline(t *testing.T) {
	eval := &fakeEval{EvaluateFn: func(ctx context.Context, s *scenarios.Scenario) (*scenarios.Result, error) {
		<-ctx.Done()
		return nil, ctx.Err()
	}}
	_, ts := mustServer(t, eval, func(c *Config) { c.EvalTimeout = 200 * time.Millisecond })
	start := time.Now()
	resp, b := testRequest(t, ts, "POST", "/api/v1/evaluate", mustDemoJSON(t, "closing-jet"))
	if resp.StatusCode != http.StatusServiceUnavailable || !strings.Contains(b, "longer than the limit of 200ms") {
		t.Fatalf("REST: %d %s", resp.StatusCode, b)
	}
	if el := time.Since(start); el > 2*time.Second {
		t.Errorf("REST deadline honoured after %v", el)
	}
	c := mustDial(t, ts, nil)
	sendScenario(t, c, 1, mustDemoJSON(t, "closing-jet"))
	if m := next(t, c, 1); m.Type != MsgError || !strings.Contains(m.Error, "longer than the limit") {
		t.Fatalf("session: %+v", m)
	}
}

// TestRealEvaluationHonoursDeadline runs a real evaluation of a scene
// that takes seconds under a short deadline: it must stop within a
// fraction of its full time.
func TestRealEvaluationHonoursDeadline(t *testing.T) {
	if testing.Short() {
		t.Skip("seconds of CPU")
	}
	var tg []string
	for i := range 96 {
		tg = append(tg, fmt.Sprintf(`{"id":"c%d","kind":"extended","range_start_m":6000,"range_stop_m":900000,"rcs_dbsm_per_m":-30}`, i))
	}
	doc := `{"version":2,"radar":{"sample_rate_hz":2e7,"pri_s":0.1,"window_start_m":5000,"window_stop_m":900000},` +
		`"waveform":{"kind":"lfm","pulse_width_s":2e-5,"bandwidth_hz":1e7},"targets":[` + strings.Join(tg, ",") + `]}`
	s, err := New(Config{DataDir: t.TempDir(), EvalTimeout: 300 * time.Millisecond}, testLogger(t), scenarios.Evaluate)
	if err != nil {
		t.Fatal(err)
	}
	ts := httptest.NewServer(s.Handler())
	defer ts.Close()
	defer s.Close(context.Background())
	start := time.Now()
	resp, b := testRequest(t, ts, "POST", "/api/v1/evaluate", doc)
	el := time.Since(start)
	if resp.StatusCode != http.StatusServiceUnavailable {
		t.Fatalf("%d %.200s", resp.StatusCode, b)
	}
	// The same scene evaluated in full, in the same run (so the race
	// detector and the machine's load slow both alike): the stop must come
	// within a fraction of it.
	sc, err := scenarios.Decode([]byte(doc))
	if err != nil {
		t.Fatal(err)
	}
	start = time.Now()
	if _, err := scenarios.Evaluate(context.Background(), sc); err != nil {
		t.Fatal(err)
	}
	full := time.Since(start)
	if el > full/2 {
		t.Errorf("stopped after %v; the deadline was 300 ms and the whole evaluation takes %v", el, full)
	}
	t.Logf("stopped after %v; whole evaluation %v", el, full)
}

// TestSessionIdleRelease checks that an idle session drops its
// evaluation and evaluator, and evaluates again on the next message.
func TestSessionIdleRelease(t *testing.T) {
	eval := &fakeEval{}
	var made atomic.Int64
	_, ts := mustServer(t, eval, func(c *Config) {
		c.SessionIdle = time.Second
		c.SessionEvaluator = func() Evaluator { made.Add(1); return eval.Evaluate }
	})
	c := mustDial(t, ts, nil)
	sendScenario(t, c, 1, mustDemoJSON(t, "closing-jet"))
	next(t, c, 1)
	send(t, c, MsgView, 2, `,"width_px":800`)
	next(t, c, 2)
	if n := eval.calls.Load(); n != 1 {
		t.Fatalf("a view change evaluated again (%d calls)", n)
	}
	// The release comes after a second idle; on a loaded machine the
	// sweep can run late, so wait for it (and never for less than the
	// idle time).
	time.Sleep(1500 * time.Millisecond)
	for deadline := time.Now().Add(20 * time.Second); made.Load() < 2 && time.Now().Before(deadline); {
		time.Sleep(50 * time.Millisecond)
	}
	if n := made.Load(); n != 2 {
		t.Fatalf("evaluators made: %d, want a fresh one after the idle release", n)
	}
	send(t, c, MsgView, 3, `,"width_px":900`)
	if m := next(t, c, 3); m.Type != MsgFrame || m.Report == nil {
		t.Fatalf("after release: %+v", m)
	}
	if n := eval.calls.Load(); n != 2 {
		t.Fatalf("%d evaluations; want the scenario evaluated again after the release", n)
	}
}
