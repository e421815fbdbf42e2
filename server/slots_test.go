package server

import (
	"net/http"
	"strings"
	"testing"
	"time"

	"github.com/gorilla/websocket"
)

func dialStatus(t *testing.T, url string) (*websocket.Conn, int, string) {
	t.Helper()
	c, resp, err := websocket.DefaultDialer.Dial("ws"+strings.TrimPrefix(url, "http")+"/ws", nil)
	if err == nil {
		t.Cleanup(func() { c.Close() })
		return c, http.StatusSwitchingProtocols, ""
	}
	if resp == nil {
		t.Fatal(err)
	}
	var b strings.Builder
	buf := make([]byte, 512)
	n, _ := resp.Body.Read(buf)
	b.Write(buf[:n])
	return nil, resp.StatusCode, b.String()
}

// TestSessionPerClientCap checks that one client cannot hold more than
// its share of sessions while they are all in use.
func TestSessionPerClientCap(t *testing.T) {
	_, ts := mustServer(t, nil, func(c *Config) { c.MaxSessionsPerClient = 2 })
	mustDial(t, ts, nil)
	mustDial(t, ts, nil)
	_, status, body := dialStatus(t, ts.URL)
	if status != http.StatusServiceUnavailable || !strings.Contains(body, "limit is 2 per client") {
		t.Fatalf("third session of one client: %d %s", status, body)
	}
}

// TestSessionEvictsIdle fills the server with sessions that answer
// pings but send nothing: a new session (the user's own tab) closes the
// one idle longest instead of being locked out.
func TestSessionEvictsIdle(t *testing.T) {
	_, ts := mustServer(t, nil, func(c *Config) { c.MaxSessions = 2; c.EvictAfter = 100 * time.Millisecond })
	a := mustDial(t, ts, nil)
	time.Sleep(20 * time.Millisecond)
	b := mustDial(t, ts, nil)
	send(t, b, MsgView, 1, `,"width_px":800`) // b is busy, a idle
	time.Sleep(150 * time.Millisecond)
	send(t, b, MsgView, 2, `,"width_px":800`)
	if _, status, body := dialStatus(t, ts.URL); status != http.StatusSwitchingProtocols {
		t.Fatalf("new session with an idle one open: %d %s", status, body)
	}
	a.SetReadDeadline(time.Now().Add(5 * time.Second))
	_, _, err := a.ReadMessage()
	if !websocket.IsCloseError(err, websocket.CloseTryAgainLater) || !strings.Contains(err.Error(), "idle") {
		t.Fatalf("idle session: %v, want close 1013 saying it was idle", err)
	}
	// No idle one left: the next is refused.
	if _, status, _ := dialStatus(t, ts.URL); status != http.StatusServiceUnavailable {
		t.Fatalf("with two fresh sessions: %d, want 503", status)
	}
}

// TestSessionIdleTimeout checks that a session that sends nothing is
// closed after SessionTimeout.
func TestSessionIdleTimeout(t *testing.T) {
	_, ts := mustServer(t, nil, func(c *Config) { c.SessionTimeout = 200 * time.Millisecond })
	c := mustDial(t, ts, nil)
	start := time.Now()
	c.SetReadDeadline(time.Now().Add(5 * time.Second))
	_, _, err := c.ReadMessage()
	if !websocket.IsCloseError(err, websocket.CloseTryAgainLater) {
		t.Fatalf("idle session: %v, want close 1013", err)
	}
	if el := time.Since(start); el < 150*time.Millisecond || el > 2*time.Second {
		t.Errorf("closed after %v; the timeout was 200 ms", el)
	}
}
