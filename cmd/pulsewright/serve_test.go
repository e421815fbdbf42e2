package main

import (
	"bufio"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"math/rand/v2"
	"net/http"
	"os"
	"os/exec"
	"os/signal"
	"path/filepath"
	"regexp"
	"strings"
	"sync"
	"sync/atomic"
	"syscall"
	"testing"
	"time"

	"github.com/pulsewright/pulsewright/scenarios"
)

// The crash test re-runs this test binary as the server: with
// PULSEWRIGHT_TEST_SERVE set, TestMain runs "serve" with the arguments in
// it instead of the tests.
//
// With PULSEWRIGHT_TEST_RUN set (arguments separated by newlines), it
// runs that command line as main does, signals included.
//
// With PULSEWRIGHT_TEST_ARGV=1, it runs its own command line as main
// does: the sharding tests give this binary to deploy/local/run-shards.sh
// as the program.
func TestMain(m *testing.M) {
	if os.Getenv("PULSEWRIGHT_TEST_ARGV") == "1" {
		ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
		code := run(ctx, os.Args[1:], os.Stdin, os.Stdout, os.Stderr)
		stop()
		os.Exit(code)
	}
	if args := os.Getenv("PULSEWRIGHT_TEST_RUN"); args != "" {
		ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
		code := run(ctx, strings.Split(args, "\n"), os.Stdin, os.Stdout, os.Stderr)
		stop()
		os.Exit(code)
	}
	if args := os.Getenv("PULSEWRIGHT_TEST_SERVE"); args != "" {
		ctx, stop := context.WithCancel(context.Background())
		defer stop()
		os.Exit(run(ctx, strings.Fields(args), os.Stdin, os.Stdout, io.Discard))
	}
	os.Exit(m.Run())
}

var urlLine = regexp.MustCompile(`http://[^\s]+`)

// lockedBuffer is an output stream that a test reads while run writes.
type lockedBuffer struct {
	mu sync.Mutex
	b  strings.Builder
}

func (l *lockedBuffer) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.Write(p)
}

func (l *lockedBuffer) String() string {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.String()
}

// TestServeEndToEnd runs "serve" on a free port, talks to it, and stops
// it as a signal would.
func TestServeEndToEnd(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	var out, errs lockedBuffer
	done := make(chan int)
	dir := t.TempDir()
	go func() {
		done <- run(ctx, []string{"--addr", "127.0.0.1:0", "--data-dir", dir, "--log-format", "json"}, nil, &out, &errs)
	}()
	var base string
	for deadline := time.Now().Add(10 * time.Second); base == "" && time.Now().Before(deadline); time.Sleep(10 * time.Millisecond) {
		base = urlLine.FindString(out.String())
	}
	if base == "" {
		t.Fatalf("no URL printed; stdout %q stderr %q", out.String(), errs.String())
	}
	get := func(path string) (int, string) {
		resp, err := http.Get(strings.TrimSuffix(base, "/") + path)
		if err != nil {
			t.Fatal(err)
		}
		defer resp.Body.Close()
		b, _ := io.ReadAll(resp.Body)
		return resp.StatusCode, string(b)
	}
	if code, body := get("/healthz"); code != 200 || !strings.Contains(body, "ok") {
		t.Fatalf("healthz: %d %s", code, body)
	}
	if code, body := get("/"); code != 200 || !strings.Contains(body, "<html") {
		t.Fatalf("page: %d %.200s", code, body)
	}
	// The real evaluator answers on the demo.
	doc, _ := scenarios.Canonical(mustLoad(t, scenarios.DefaultDemo))
	resp, err := http.Post(base+"api/v1/evaluate", "application/json", strings.NewReader(string(doc)))
	if err != nil {
		t.Fatal(err)
	}
	var rep scenarios.Report
	json.NewDecoder(resp.Body).Decode(&rep)
	resp.Body.Close()
	if resp.StatusCode != 200 || len(rep.Targets) == 0 || rep.Waveform.PSLRDB == nil || *rep.Waveform.PSLRDB >= 0 {
		t.Fatalf("evaluate: %d %+v", resp.StatusCode, rep)
	}
	cancel() // as SIGINT does through signal.NotifyContext
	select {
	case code := <-done:
		if code != exitOK {
			t.Fatalf("exit %d; stderr %s", code, errs.String())
		}
	case <-time.After(15 * time.Second):
		t.Fatal("serve did not stop")
	}
	if !strings.Contains(errs.String(), `"msg":"stopped"`) {
		t.Errorf("no JSON log of the stop: %s", errs.String())
	}
}

func mustLoad(tb testing.TB, name string) *scenarios.Scenario {
	tb.Helper()
	d, err := scenarios.LoadDemo(name)
	if err != nil {
		tb.Fatal(err)
	}
	return d.Scenario
}

func TestServeFlags(t *testing.T) {
	t.Setenv("PULSEWRIGHT_LOG_FORMAT", "yaml")
	code, _, errs := runCmd(t, "", "serve")
	if code != exitInvalid || !strings.Contains(errs, `--log-format "yaml"`) {
		t.Errorf("env log format: exit %d %s", code, errs)
	}
	t.Setenv("PULSEWRIGHT_LOG_FORMAT", "")
	t.Setenv("PULSEWRIGHT_OPEN", "maybe")
	if code, _, errs := runCmd(t, "", "serve"); code != exitInvalid || !strings.Contains(errs, "PULSEWRIGHT_OPEN") {
		t.Errorf("env open: exit %d %s", code, errs)
	}
	t.Setenv("PULSEWRIGHT_OPEN", "")
	if code, _, errs := runCmd(t, "", "serve", "--addr", "nonsense", "--data-dir", t.TempDir()); code != exitFailure || !strings.Contains(errs, "nonsense") {
		t.Errorf("bad address: exit %d %s", code, errs)
	}
	if code, _, errs := runCmd(t, "", "serve", "extra"); code != exitInvalid || !strings.Contains(errs, "no arguments") {
		t.Errorf("argument: exit %d %s", code, errs)
	}
}

// TestServeCrashMidSave kills the server with SIGKILL while clients save
// scenarios, 20 times over the same directory. Every file left must be a
// whole scenario: atomic writes leave the old or the new one.
func TestServeCrashMidSave(t *testing.T) {
	if testing.Short() {
		t.Skip("crash test skipped under -short")
	}
	dir := t.TempDir()
	exe, err := os.Executable()
	if err != nil {
		t.Fatal(err)
	}
	base := mustLoad(t, "rocky-coast")
	base.Notes = strings.Repeat("Notes near their limit make each file bigger. ", 400)[:scenarios.MaxNotesLen]
	var saved atomic.Int64
	rng := rand.New(rand.NewPCG(5, 5))
	for iter := range 20 {
		cmd := exec.Command(exe)
		cmd.Env = append(os.Environ(), "PULSEWRIGHT_TEST_SERVE=serve --addr 127.0.0.1:0 --data-dir "+dir)
		stdout, _ := cmd.StdoutPipe()
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		line, err := bufio.NewReader(stdout).ReadString('\n')
		url := urlLine.FindString(line)
		if err != nil || url == "" {
			cmd.Process.Kill()
			cmd.Wait()
			t.Fatalf("iteration %d: no URL: %q %v", iter, line, err)
		}
		var wg sync.WaitGroup
		stop := make(chan struct{})
		for w := range 4 {
			wg.Go(func() {
				client := &http.Client{Timeout: 5 * time.Second}
				for seed := int64(1); ; seed++ {
					select {
					case <-stop:
						return
					default:
					}
					s := *base
					s.Seed = int64(iter*1_000_000+w*10_000) + seed
					doc, _ := scenarios.Canonical(&s)
					req, _ := http.NewRequest("PUT", fmt.Sprintf("%sapi/v1/scenarios/s%d", url, w), strings.NewReader(string(doc)))
					req.Header.Set("Content-Type", "application/json")
					req.Header.Set("If-Match", "*")
					if _, err := os.Stat(filepath.Join(dir, fmt.Sprintf("s%d.json", w))); err != nil {
						req.Header.Del("If-Match") // not created yet (a kill came first): create it
					}
					resp, err := client.Do(req)
					if err != nil {
						return // killed
					}
					io.Copy(io.Discard, resp.Body)
					resp.Body.Close()
					if resp.StatusCode < 300 {
						saved.Add(1)
					}
				}
			})
		}
		// Kill at a random moment, but only once this iteration has
		// completed a save: on a loaded machine (or under -race) the first
		// save can take longer than the random delay, and a kill before it
		// would test nothing.
		before := saved.Load()
		time.Sleep(time.Duration(30+rng.IntN(150)) * time.Millisecond)
		for deadline := time.Now().Add(10 * time.Second); saved.Load() == before && time.Now().Before(deadline); {
			time.Sleep(5 * time.Millisecond)
		}
		time.Sleep(time.Duration(rng.IntN(20)) * time.Millisecond)
		cmd.Process.Signal(syscall.SIGKILL)
		cmd.Wait()
		close(stop)
		wg.Wait()
		checkSaved(t, dir, iter)
	}
	if saved.Load() < 20 {
		t.Fatalf("only %d saves completed: the test did not exercise saving", saved.Load())
	}
	t.Logf("%d saves completed across 20 kills", saved.Load())
	// Reopening clears what interrupted writes left.
	if _, err := scenarios.OpenStore(dir); err != nil {
		t.Fatal(err)
	}
	if tmp, _ := filepath.Glob(filepath.Join(dir, ".*.tmp")); len(tmp) != 0 {
		t.Errorf("temporary files left after reopening: %v", tmp)
	}
}

func checkSaved(t *testing.T, dir string, iter int) {
	t.Helper()
	files, err := filepath.Glob(filepath.Join(dir, "*.json"))
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range files {
		data, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		if _, err := scenarios.Decode(data); err != nil {
			t.Fatalf("iteration %d: %s does not parse after a kill (%d bytes): %v", iter, f, len(data), err)
		}
	}
}
