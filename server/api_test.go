package server

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"net/http"
	"strings"
	"testing"

	"github.com/pulsewright/pulsewright/scenarios"
)

// errBody decodes an error response and checks its shape.
func errBody(t *testing.T, body string) errorBody {
	t.Helper()
	var e errorBody
	if err := json.Unmarshal([]byte(body), &e); err != nil || e.Error == "" || e.Fields == nil {
		t.Fatalf("error body %q: %v", body, err)
	}
	return e
}

func TestRoutes(t *testing.T) {
	eval := &fakeEval{}
	_, ts := mustServer(t, eval, nil)
	demo := mustDemoJSON(t, "harbour-skiff")
	invalid := `{"version":2,"waveform":{"kind":"barker","length":6,"chip_s":1e-6}}`
	huge := `{"version":2,"notes":"` + strings.Repeat("x", scenarios.MaxDocumentBytes) + `"}`
	tests := []struct {
		name, method, path, body string
		hdr                      []string
		status                   int
		want                     string // substring of the body
	}{
		{"health", "GET", "/healthz", "", nil, 200, `"engine":{"version":"`},
		{"version", "GET", "/api/v1/version", "", nil, 200, `"scenario_format":3,"report_format":3,"text":"pulsewright `},
		{"evaluate names its engine", "POST", "/api/v1/evaluate", demo, nil, 200, `"engine":{"version":`},
		{"evaluate", "POST", "/api/v1/evaluate", demo, nil, 200, `"scenario":"Harbour approach`},
		{"evaluate invalid", "POST", "/api/v1/evaluate", invalid, nil, 400, `"path":"waveform.length"`},
		{"evaluate not json", "POST", "/api/v1/evaluate", `{"version":`, nil, 400, `not valid JSON`},
		{"evaluate media type", "POST", "/api/v1/evaluate", demo, []string{"Content-Type", "text/plain"}, 415, `application/json`},
		{"evaluate too large", "POST", "/api/v1/evaluate", huge, nil, 413, `larger than the limit`},
		{"evaluate GET", "GET", "/api/v1/evaluate", "", nil, 405, `method not allowed`},
		{"links", "POST", "/api/v1/links", demo, nil, 200, `"link":"/#s=`},
		{"links invalid", "POST", "/api/v1/links", invalid, nil, 400, `not a Barker length`},
		{"demos", "GET", "/api/v1/demos", "", nil, 200, `"name":"harbour-skiff"`},
		{"demo canonical", "GET", "/api/v1/demos/rocky-coast", "", nil, 200, `{"version":3,"name":"Patrol boat`},
		{"demo full", "GET", "/api/v1/demos/rocky-coast?form=full", "", nil, 200, `"sample_rate_hz":10000000`},
		{"demo bad form", "GET", "/api/v1/demos/rocky-coast?form=xml", "", nil, 400, `want canonical or full`},
		{"demo missing", "GET", "/api/v1/demos/nope", "", nil, 404, `known: closing-jet`},
		{"demo traversal", "GET", "/api/v1/demos/..%2fdemos%2frocky-coast", "", nil, 404, `not found`},
		{"no route", "GET", "/api/v1/nope", "", nil, 404, `no such endpoint`},
		{"page", "GET", "/", "", nil, 200, `<title>page</title>`},
		{"page file", "GET", "/index.html", "", nil, 301, ``},
		{"no listing", "GET", "/js/", "", nil, 404, `no such endpoint`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			resp, body := testRequest(t, ts, tt.method, tt.path, tt.body, tt.hdr...)
			if resp.StatusCode != tt.status || !strings.Contains(body, tt.want) {
				t.Fatalf("%s %s: %d %.300s; want %d and %q", tt.method, tt.path, resp.StatusCode, body, tt.status, tt.want)
			}
			if tt.status >= 400 {
				errBody(t, body)
			}
			if csp := resp.Header.Get("Content-Security-Policy"); !strings.Contains(csp, "default-src 'self'") || strings.Contains(csp, "unsafe") {
				t.Errorf("CSP %q", csp)
			}
			if resp.Header.Get("X-Content-Type-Options") != "nosniff" {
				t.Error("no nosniff header")
			}
		})
	}
	// The demos list marks the start scene.
	_, body := testRequest(t, ts, "GET", "/api/v1/demos", "")
	var demos []struct {
		Name  string `json:"name"`
		Start bool   `json:"start"`
	}
	json.Unmarshal([]byte(body), &demos)
	starts := 0
	for _, d := range demos {
		if d.Start {
			starts++
			if d.Name != scenarios.DefaultDemo {
				t.Errorf("start demo %q", d.Name)
			}
		}
	}
	if len(demos) < 5 || starts != 1 {
		t.Errorf("demos %+v", demos)
	}
	// A link round-trips to the same scenario.
	_, body = testRequest(t, ts, "POST", "/api/v1/links", demo)
	var l linkBody
	json.Unmarshal([]byte(body), &l)
	back, err := scenarios.ParseLink(l.URL)
	if err != nil || back.Name != "Harbour approach: skiff beside a tanker" {
		t.Errorf("link %q: %v", l.URL, err)
	}
}

func TestEvaluateErrors(t *testing.T) {
	var fail error
	eval := &fakeEval{EvaluateFn: func(ctx context.Context, s *scenarios.Scenario) (*scenarios.Result, error) { return nil, fail }}
	_, ts := mustServer(t, eval, nil)
	demo := mustDemoJSON(t, "closing-jet")
	for _, tt := range []struct {
		err    error
		status int
		want   string
	}{
		{errors.New("disk on fire"), 500, `"error":"internal error"`},
		{fmt.Errorf("pulses × samples: %w", scenarios.ErrTooLarge), 413, "too large"},
		{&scenarios.ValidationError{Fields: []scenarios.FieldError{{Path: "radar.pulses", Message: "too many"}}}, 400, `"path":"radar.pulses"`},
		{context.DeadlineExceeded, 503, "took too long"},
	} {
		fail = tt.err
		resp, body := testRequest(t, ts, "POST", "/api/v1/evaluate", demo)
		if resp.StatusCode != tt.status || !strings.Contains(body, tt.want) {
			t.Errorf("%v: %d %s", tt.err, resp.StatusCode, body)
		}
		if strings.Contains(body, "disk on fire") {
			t.Error("internal error text leaked to the client")
		}
	}
}

func TestSavedScenarios(t *testing.T) {
	_, ts := mustServer(t, nil, nil)
	demo := mustDemoJSON(t, "squall-line")
	other := mustDemoJSON(t, "closing-jet")
	expect := func(resp *http.Response, body string, status int, want string) {
		t.Helper()
		if resp.StatusCode != status || !strings.Contains(body, want) {
			t.Fatalf("%s %s: %d %s; want %d %q", resp.Request.Method, resp.Request.URL.Path, resp.StatusCode, body, status, want)
		}
	}
	resp, body := testRequest(t, ts, "GET", "/api/v1/scenarios", "")
	expect(resp, body, 200, "[]")
	resp, body = testRequest(t, ts, "PUT", "/api/v1/scenarios/squall", demo)
	expect(resp, body, 201, `"name":"squall"`)
	tag1 := resp.Header.Get("ETag")
	if len(tag1) < 10 || tag1[0] != '"' {
		t.Fatalf("ETag %q", tag1)
	}
	// A second tab that did not read it first cannot overwrite it.
	resp, body = testRequest(t, ts, "PUT", "/api/v1/scenarios/squall", other)
	expect(resp, body, 409, "already exists")
	resp, body = testRequest(t, ts, "PUT", "/api/v1/scenarios/squall", other, "If-Match", tag1)
	expect(resp, body, 200, `"revision"`)
	tag2 := resp.Header.Get("ETag")
	// The first tab's revision is now stale.
	resp, body = testRequest(t, ts, "PUT", "/api/v1/scenarios/squall", demo, "If-Match", tag1)
	expect(resp, body, 412, "changed since revision")
	resp, body = testRequest(t, ts, "GET", "/api/v1/scenarios/squall", "")
	expect(resp, body, 200, `"name":"Fast closing jet`)
	if resp.Header.Get("ETag") != tag2 {
		t.Errorf("GET ETag %q, want %q", resp.Header.Get("ETag"), tag2)
	}
	resp, body = testRequest(t, ts, "GET", "/api/v1/scenarios", "")
	expect(resp, body, 200, `"revision":`+tag2)
	resp, body = testRequest(t, ts, "DELETE", "/api/v1/scenarios/squall", "", "If-Match", tag1)
	expect(resp, body, 412, "changed since")
	resp, body = testRequest(t, ts, "DELETE", "/api/v1/scenarios/squall", "", "If-Match", tag2)
	expect(resp, body, 204, "")
	for _, tt := range []struct {
		method, path, body string
		hdr                []string
		status             int
		want               string
	}{
		{"GET", "/api/v1/scenarios/squall", "", nil, 404, "not found"},
		{"DELETE", "/api/v1/scenarios/squall", "", []string{"If-Match", "*"}, 404, "not found"},
		{"PUT", "/api/v1/scenarios/gone", demo, []string{"If-Match", `"0011223344556677"`}, 412, "no longer exists"},
		{"PUT", "/api/v1/scenarios/.hidden", demo, nil, 400, "starts with '.'"},
		{"PUT", "/api/v1/scenarios/..", demo, nil, 400, "starts with '.'"},
		{"PUT", "/api/v1/scenarios/a%2Fb", demo, nil, 400, "may hold only"},
		{"PUT", "/api/v1/scenarios/" + strings.Repeat("n", 65), demo, nil, 400, "longer than 64"},
		{"GET", "/api/v1/scenarios/a%5Cb", "", nil, 400, "may hold only"},
		{"PUT", "/api/v1/scenarios/ok", demo, []string{"Content-Type", "application/x-www-form-urlencoded"}, 415, "must be JSON"},
		{"PUT", "/api/v1/scenarios/ok", `{"version":2,"waveform":{"kind":"lfm"}}`, nil, 400, `"path":"waveform.pulse_width_s"`},
		{"PUT", "/api/v1/scenarios/ok", `{"version":2,"notes":"` + strings.Repeat("y", scenarios.MaxDocumentBytes) + `"}`, nil, 413, "larger than"},
		{"POST", "/api/v1/scenarios/ok", demo, nil, 405, "not allowed"},
	} {
		resp, body := testRequest(t, ts, tt.method, tt.path, tt.body, tt.hdr...)
		if resp.StatusCode != tt.status || !strings.Contains(body, tt.want) {
			t.Errorf("%s %s: %d %s; want %d %q", tt.method, tt.path, resp.StatusCode, body, tt.status, tt.want)
		} else {
			errBody(t, body)
		}
	}
}

func TestToken(t *testing.T) {
	s, ts := mustServer(t, nil, func(c *Config) { c.Addr = "0.0.0.0:0" })
	tok := s.Token()
	port := ts.URL[strings.LastIndex(ts.URL, ":")+1:]
	if len(tok) < 24 {
		t.Fatalf("token %q", tok)
	}
	// A token that differs in its last character only (never equal to the
	// real one, whatever that ends in).
	near := tok[:len(tok)-1] + "x"
	if strings.HasSuffix(tok, "x") {
		near = tok[:len(tok)-1] + "y"
	}
	for _, tt := range []struct {
		path   string
		hdr    []string
		status int
	}{
		{"/healthz", nil, 401},
		{"/api/v1/demos", nil, 401},
		{"/", nil, 401},
		{"/api/v1/demos?token=" + near, nil, 401},
		{"/api/v1/demos", []string{"Authorization", "Bearer " + tok}, 200},
		{"/api/v1/demos", []string{"Authorization", "Bearer wrong"}, 401},
		{"/api/v1/demos", []string{"Cookie", tokenCookie + "_" + port + "=" + tok}, 200},
		{"/api/v1/demos", []string{"Cookie", tokenCookie + "_1=" + tok}, 401},
		{"/api/v1/demos?token=" + tok, nil, 200},
		{"/ws", nil, 401},
	} {
		resp, body := testRequest(t, ts, "GET", tt.path, "", tt.hdr...)
		if resp.StatusCode != tt.status {
			t.Errorf("%s %v: %d %s, want %d", tt.path, tt.hdr, resp.StatusCode, body, tt.status)
		}
	}
	// The first page load sets the cookie and drops the token from the URL.
	resp, _ := testRequest(t, ts, "GET", "/?token="+tok+"&x=1", "")
	if resp.StatusCode != http.StatusSeeOther || resp.Header.Get("Location") != "/?x=1" {
		t.Fatalf("page load: %d, Location %q", resp.StatusCode, resp.Header.Get("Location"))
	}
	var c *http.Cookie
	for _, k := range resp.Cookies() {
		if k.Name == tokenCookie+"_"+port {
			c = k
		}
	}
	if c == nil || c.Value != tok || !c.HttpOnly || c.SameSite != http.SameSiteStrictMode {
		t.Fatalf("cookie %+v", c)
	}
	// A loopback server needs none.
	s2, _ := mustServer(t, nil, nil)
	if s2.Token() != "" {
		t.Error("loopback server made a token")
	}
}
