package server

import (
	"net/http"
	"strings"
	"testing"
)

// TestHead: HEAD on every GET route answers as GET would, without a
// body, instead of 405.
func TestHead(t *testing.T) {
	_, ts := mustServer(t, nil, nil)
	testRequest(t, ts, "PUT", "/api/v1/scenarios/jet", mustDemoJSON(t, "closing-jet"))
	for _, path := range []string{"/healthz", "/api/v1/demos", "/api/v1/demos/closing-jet", "/api/v1/scenarios", "/api/v1/scenarios/jet", "/"} {
		resp, body := testRequest(t, ts, "HEAD", path, "")
		if resp.StatusCode != 200 || body != "" {
			t.Errorf("HEAD %s: %d, %d bytes", path, resp.StatusCode, len(body))
		}
	}
	if resp, _ := testRequest(t, ts, "HEAD", "/api/v1/scenarios/jet", ""); resp.Header.Get("ETag") == "" {
		t.Error("HEAD of a saved scenario has no ETag")
	}
}

// TestPreconditions follows RFC 9110 §13.1: If-Match lists, strong
// comparison (weak tags never match), If-None-Match: *, 412 for a
// failed precondition, 428 for a DELETE without one.
func TestPreconditions(t *testing.T) {
	_, ts := mustServer(t, nil, nil)
	demo, other := mustDemoJSON(t, "squall-line"), mustDemoJSON(t, "closing-jet")
	resp, _ := testRequest(t, ts, "PUT", "/api/v1/scenarios/s", demo, "If-None-Match", "*")
	if resp.StatusCode != 201 {
		t.Fatalf("create with If-None-Match: *: %d", resp.StatusCode)
	}
	tag := resp.Header.Get("ETag")
	for _, tt := range []struct {
		hdr    []string
		status int
		want   string
	}{
		{[]string{"If-None-Match", "*"}, 412, "already exists"},
		{[]string{"If-Match", "W/" + tag}, 412, "weak entity tag"},
		{[]string{"If-Match", `"0000000000000000", W/` + tag}, 412, "changed since"},
		{[]string{"If-Match", `"0000000000000000"`}, 412, "changed since"},
		{[]string{"If-Match", "0000000000000000"}, 400, "entity tags"},
		{[]string{"If-Match", `"unterminated`}, 400, "entity tags"},
		{[]string{"If-Match", tag, "If-None-Match", "*"}, 400, "send one"},
		{[]string{"If-None-Match", tag}, 400, "only *"},
	} {
		resp, body := testRequest(t, ts, "PUT", "/api/v1/scenarios/s", other, tt.hdr...)
		if resp.StatusCode != tt.status || !strings.Contains(body, tt.want) {
			t.Errorf("PUT %v: %d %s; want %d %q", tt.hdr, resp.StatusCode, body, tt.status, tt.want)
		}
	}
	// A list with the current tag among others matches.
	resp, body := testRequest(t, ts, "PUT", "/api/v1/scenarios/s", other, "If-Match", `"0000000000000000", `+tag+`, W/"1"`)
	if resp.StatusCode != 200 {
		t.Fatalf("PUT with a list holding the current tag: %d %s", resp.StatusCode, body)
	}
	tag = resp.Header.Get("ETag")
	// DELETE needs If-Match, as the README says.
	resp, body = testRequest(t, ts, "DELETE", "/api/v1/scenarios/s", "")
	if resp.StatusCode != http.StatusPreconditionRequired || !strings.Contains(body, "needs If-Match") {
		t.Fatalf("DELETE without If-Match: %d %s", resp.StatusCode, body)
	}
	if resp, _ := testRequest(t, ts, "GET", "/api/v1/scenarios/s", ""); resp.StatusCode != 200 {
		t.Fatal("DELETE without If-Match deleted")
	}
	if resp, body := testRequest(t, ts, "DELETE", "/api/v1/scenarios/s", "", "If-Match", "W/"+tag); resp.StatusCode != 412 {
		t.Fatalf("DELETE with a weak tag: %d %s", resp.StatusCode, body)
	}
	if resp, body := testRequest(t, ts, "DELETE", "/api/v1/scenarios/s", "", "If-Match", tag); resp.StatusCode != 204 {
		t.Fatalf("DELETE: %d %s", resp.StatusCode, body)
	}
}

// TestEncodingErrors: invalid UTF-8 is refused naming the field, a BOM
// with a message that names it, and a long name is not echoed in full.
func TestEncodingErrors(t *testing.T) {
	_, ts := mustServer(t, nil, nil)
	demo := mustDemoJSON(t, "closing-jet")
	bad := strings.Replace(demo, `"name":"`, "\"name\":\"\xff", 1)
	resp, body := testRequest(t, ts, "PUT", "/api/v1/scenarios/u", bad)
	if resp.StatusCode != 400 || !strings.Contains(body, `"path":"name"`) || !strings.Contains(body, "not valid UTF-8") {
		t.Errorf("invalid UTF-8: %d %s", resp.StatusCode, body)
	}
	if resp, _ := testRequest(t, ts, "GET", "/api/v1/scenarios/u", ""); resp.StatusCode != 404 {
		t.Errorf("invalid UTF-8 was saved: %d", resp.StatusCode)
	}
	resp, body = testRequest(t, ts, "POST", "/api/v1/evaluate", "\xEF\xBB\xBF"+demo)
	if resp.StatusCode != 400 || !strings.Contains(body, "byte order mark") {
		t.Errorf("BOM: %d %s", resp.StatusCode, body)
	}
	long := strings.Repeat("n", 5000)
	resp, body = testRequest(t, ts, "GET", "/api/v1/scenarios/"+long, "")
	if resp.StatusCode != 400 || len(body) > 400 || !strings.Contains(body, "5000 characters") {
		t.Errorf("long name: %d, %d bytes echoed: %.200s", resp.StatusCode, len(body), body)
	}
}

// TestShortTokenRefused: a token under MinTokenLen characters is refused.
func TestShortTokenRefused(t *testing.T) {
	for _, tok := range []string{"a", strings.Repeat("x", MinTokenLen-1)} {
		if _, err := New(Config{DataDir: t.TempDir(), Token: tok}, testLogger(t), (&fakeEval{}).Evaluate); err == nil || !strings.Contains(err.Error(), "at least 16") {
			t.Errorf("token %q: %v", tok, err)
		}
	}
	if _, err := New(Config{DataDir: t.TempDir(), Token: strings.Repeat("x", MinTokenLen)}, testLogger(t), (&fakeEval{}).Evaluate); err != nil {
		t.Error(err)
	}
}
