package server

import (
	"bufio"
	"bytes"
	"fmt"
	"log/slog"
	"net"
	"net/http"
	"net/http/httptest"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// mountTmpfs mounts a tmpfs with the given options on a new directory,
// or skips the test where mounting is not allowed (not root, no
// capability).
func mountTmpfs(t *testing.T, opts string) string {
	t.Helper()
	dir := t.TempDir()
	if out, err := exec.Command("mount", "-t", "tmpfs", "-o", opts, "tmpfs", dir).CombinedOutput(); err != nil {
		t.Skipf("cannot mount a tmpfs here: %v %s", err, out)
	}
	t.Cleanup(func() { exec.Command("umount", dir).Run() })
	return dir
}

// TestSaveDiskFull fills the data directory's file system: a save gets
// 507 with a message that says the disk is full, and the previous
// revision stays.
func TestSaveDiskFull(t *testing.T) {
	dir := mountTmpfs(t, "size=64k")
	_, ts := mustServer(t, nil, func(c *Config) { c.DataDir = dir })
	demo := mustDemoJSON(t, "closing-jet")
	if resp, b := testRequest(t, ts, "PUT", "/api/v1/scenarios/jet", demo); resp.StatusCode != 201 {
		t.Fatalf("first save: %d %s", resp.StatusCode, b)
	}
	f, _ := os.Create(filepath.Join(dir, "filler"))
	f.Write(make([]byte, 1<<20)) // stops at the size of the file system
	f.Close()
	bigger := strings.Replace(demo, `"seed":`, `"notes":"`+strings.Repeat("n", 9000)+`","seed":`, 1)
	resp, b := testRequest(t, ts, "PUT", "/api/v1/scenarios/jet", bigger, "If-Match", "*")
	if resp.StatusCode != http.StatusInsufficientStorage || !strings.Contains(b, "is full: free some space") {
		t.Fatalf("save on a full disk: %d %s; want 507 saying the disk is full", resp.StatusCode, b)
	}
	if resp, b := testRequest(t, ts, "GET", "/api/v1/scenarios/jet", ""); resp.StatusCode != 200 || strings.Contains(b, "nnnn") {
		t.Fatalf("the previous revision: %d %.100s", resp.StatusCode, b)
	}
}

// TestReadOnlyDataDir starts on a read-only data directory: a warning at
// start, and a save gets 507 saying the directory is read-only.
func TestReadOnlyDataDir(t *testing.T) {
	dir := mountTmpfs(t, "ro,size=64k")
	var logs bytes.Buffer
	s, err := New(Config{DataDir: dir}, slog.New(slog.NewTextHandler(&logs, nil)), (&fakeEval{}).Evaluate)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(logs.String(), "saved scenarios cannot be written") || !strings.Contains(logs.String(), "read-only") {
		t.Errorf("no warning at start: %q", logs.String())
	}
	ts := httptest.NewServer(s.Handler())
	defer ts.Close()
	resp, b := testRequest(t, ts, "PUT", "/api/v1/scenarios/jet", mustDemoJSON(t, "closing-jet"))
	if resp.StatusCode != http.StatusInsufficientStorage || !strings.Contains(b, "read-only") || !strings.Contains(b, "--data-dir") {
		t.Fatalf("save on a read-only directory: %d %s", resp.StatusCode, b)
	}
}

// TestSlowBody sends the headers of a PUT and a trickle of its body: the
// server answers 408 once its body deadline passes.
func TestSlowBody(t *testing.T) {
	_, ts := mustServer(t, nil, func(c *Config) { c.BodyTimeout = 300 * time.Millisecond })
	conn, err := net.Dial("tcp", ts.Listener.Addr().String())
	if err != nil {
		t.Fatal(err)
	}
	defer conn.Close()
	fmt.Fprintf(conn, "POST /api/v1/evaluate HTTP/1.1\r\nHost: %s\r\nContent-Type: application/json\r\nContent-Length: 5000\r\n\r\n{\"version\":", ts.Listener.Addr())
	start := time.Now()
	conn.SetReadDeadline(time.Now().Add(5 * time.Second))
	resp, err := http.ReadResponse(bufio.NewReader(conn), nil)
	if err != nil {
		t.Fatal(err)
	}
	defer resp.Body.Close()
	if resp.StatusCode != http.StatusRequestTimeout {
		t.Fatalf("slow body: %d, want 408", resp.StatusCode)
	}
	if el := time.Since(start); el > 3*time.Second {
		t.Errorf("answered after %v", el)
	}
}

// TestSymlinkInDataDir puts a symbolic link to a file outside the data
// directory among the saved scenarios: it is neither listed, served nor
// deleted.
func TestSymlinkInDataDir(t *testing.T) {
	s, ts := mustServer(t, nil, nil)
	outside := filepath.Join(t.TempDir(), "secret.json")
	os.WriteFile(outside, []byte(mustDemoJSON(t, "closing-jet")), 0o600)
	if err := os.Symlink(outside, filepath.Join(s.store.Dir(), "passwd.json")); err != nil {
		t.Fatal(err)
	}
	resp, b := testRequest(t, ts, "GET", "/api/v1/scenarios/passwd", "")
	if resp.StatusCode != http.StatusForbidden || !strings.Contains(b, "not a regular file") || strings.Contains(b, "version") {
		t.Fatalf("GET through a symlink: %d %s; want 403", resp.StatusCode, b)
	}
	if _, b := testRequest(t, ts, "GET", "/api/v1/scenarios", ""); strings.Contains(b, "passwd") {
		t.Errorf("list shows the link: %s", b)
	}
	if resp, _ := testRequest(t, ts, "DELETE", "/api/v1/scenarios/passwd", "", "If-Match", "*"); resp.StatusCode != http.StatusForbidden {
		t.Errorf("DELETE through a symlink: %d", resp.StatusCode)
	}
	if _, err := os.Stat(outside); err != nil {
		t.Errorf("the link's target: %v", err)
	}
}
