package server

import (
	"io"
	"net/http"
	"strings"
	"testing"

	"github.com/gorilla/websocket"
)

// TestRebindingHostRefused forges the Host header a DNS-rebinding page
// sends (its own domain, resolved to 127.0.0.1): REST and websocket
// are refused with 421 and a message naming the host, while loopback
// names, IP literals and configured names pass.
func TestRebindingHostRefused(t *testing.T) {
	_, ts := mustServer(t, nil, func(c *Config) { c.AllowedHosts = []string{"bench.lab.example"} })
	port := ts.URL[strings.LastIndex(ts.URL, ":"):]
	for _, tt := range []struct {
		host string
		want int
	}{
		{"evil.example" + port, http.StatusMisdirectedRequest},
		{"evil.example", http.StatusMisdirectedRequest},
		{"localhost.evil.example" + port, http.StatusMisdirectedRequest},
		{"127.0.0.1.nip.io" + port, http.StatusMisdirectedRequest},
		{"localhost" + port, http.StatusOK},
		{"LOCALHOST." + port, http.StatusOK},
		{"app.localhost" + port, http.StatusOK},
		{"127.0.0.1" + port, http.StatusOK},
		{"[::1]" + port, http.StatusOK},
		{"192.168.1.20" + port, http.StatusOK},
		{"bench.lab.example" + port, http.StatusOK},
	} {
		for _, path := range []string{"/api/v1/scenarios", "/", "/healthz"} {
			req, _ := http.NewRequest("GET", ts.URL+path, nil)
			req.Host = tt.host
			resp, err := http.DefaultClient.Do(req)
			if err != nil {
				t.Fatal(err)
			}
			resp.Body.Close()
			if resp.StatusCode != tt.want {
				t.Errorf("GET %s with Host %q: %d, want %d", path, tt.host, resp.StatusCode, tt.want)
			}
		}
	}
	_, body := func() (*http.Response, string) {
		req, _ := http.NewRequest("DELETE", ts.URL+"/api/v1/scenarios/x", nil)
		req.Host = "evil.example" + port
		resp, err := http.DefaultClient.Do(req)
		if err != nil {
			t.Fatal(err)
		}
		defer resp.Body.Close()
		b, _ := io.ReadAll(resp.Body)
		return resp, string(b)
	}()
	if e := errBody(t, body); !strings.Contains(e.Error, `"evil.example`) || !strings.Contains(e.Error, "--allowed-host") {
		t.Errorf("message %q does not name the host and the remedy", e.Error)
	}

	// The websocket: Origin and Host name the same foreign domain, which
	// passes the Origin check alone.
	hdr := http.Header{"Origin": {"http://evil.example" + port}, "Host": {"evil.example" + port}}
	d := websocket.Dialer{}
	_, resp, err := d.Dial("ws"+strings.TrimPrefix(ts.URL, "http")+"/ws", hdr)
	if err == nil || resp == nil || resp.StatusCode != http.StatusMisdirectedRequest {
		st := 0
		if resp != nil {
			st = resp.StatusCode
		}
		t.Fatalf("websocket with a rebinding Host: err %v, status %d; want 421", err, st)
	}
	mustDial(t, ts, http.Header{"Host": {"localhost" + port}, "Origin": {"http://localhost" + port}})
}

func TestAllowedHostsConfig(t *testing.T) {
	for _, bad := range []string{"http://x.example", "x.example:80", "a b"} {
		if _, err := New(Config{DataDir: t.TempDir(), AllowedHosts: []string{bad}}, testLogger(t), (&fakeEval{}).Evaluate); err == nil || !strings.Contains(err.Error(), "allowed host") {
			t.Errorf("allowed host %q: %v", bad, err)
		}
	}
}
