package main

import (
	"context"
	"errors"
	"fmt"
	"log/slog"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"time"

	"github.com/pulsewright/pulsewright/scenarios"
	"github.com/pulsewright/pulsewright/server"
)

// shutdownGrace bounds how long serve waits, after a signal, for requests
// in flight (saves included) and sessions to finish.
const shutdownGrace = 10 * time.Second

// serveConfig is what the serve flags and environment decide.
type serveConfig struct {
	server.Config
	logFormat string
	open      bool
}

// envOr returns the environment variable key, or def when it is unset or
// empty.
func envOr(key, def string) string {
	if v := os.Getenv(key); v != "" {
		return v
	}
	return def
}

// parseServe reads the serve flags; each falls back to an environment
// variable, and a flag given on the command line wins.
func (e *env) parseServe(args []string) (serveConfig, error) {
	var c serveConfig
	dataDir := ""
	if dir, err := os.UserConfigDir(); err == nil {
		dataDir = filepath.Join(dir, "pulsewright", "scenarios")
	}
	open, err := strconv.ParseBool(envOr("PULSEWRIGHT_OPEN", "false"))
	if err != nil {
		return c, usageError{fmt.Sprintf("PULSEWRIGHT_OPEN=%q: want true or false", os.Getenv("PULSEWRIGHT_OPEN"))}
	}
	fs := newFlags("serve", e)
	fs.StringVar(&c.Addr, "addr", envOr("PULSEWRIGHT_ADDR", server.DefaultAddr), "`host:port` to listen on; port 0 picks a free one; a non-loopback host requires the access token (env PULSEWRIGHT_ADDR)")
	fs.StringVar(&c.DataDir, "data-dir", envOr("PULSEWRIGHT_DATA_DIR", dataDir), "`directory` of saved scenarios (env PULSEWRIGHT_DATA_DIR)")
	fs.StringVar(&c.logFormat, "log-format", envOr("PULSEWRIGHT_LOG_FORMAT", "text"), "log format on standard error: text or json (env PULSEWRIGHT_LOG_FORMAT)")
	fs.BoolVar(&c.open, "open", open, "open the page in the browser (env PULSEWRIGHT_OPEN)")
	fs.BoolVar(&c.Dev, "dev", false, "serve the page from web/static on disk (for work on the page)")
	memMiB, err := strconv.ParseInt(envOr("PULSEWRIGHT_MEMORY_LIMIT_MIB", "0"), 10, 64)
	if err != nil || memMiB < 0 {
		return c, usageError{fmt.Sprintf("PULSEWRIGHT_MEMORY_LIMIT_MIB=%q: want a whole number of MiB", os.Getenv("PULSEWRIGHT_MEMORY_LIMIT_MIB"))}
	}
	fs.Int64Var(&memMiB, "memory-limit", memMiB, "memory budget of the evaluations in flight, in `MiB`; one that would need more is refused (0: half the machine's memory, at most 4096) (env PULSEWRIGHT_MEMORY_LIMIT_MIB)")
	var hosts multiFlag
	fs.Var(&hosts, "allowed-host", "a `name` the page may be reached by besides localhost and IP addresses (repeat for more; env PULSEWRIGHT_ALLOWED_HOSTS, comma-separated)")
	fs.StringVar(&c.Token, "token", os.Getenv("PULSEWRIGHT_TOKEN"), "access `token` to require instead of a generated one (env PULSEWRIGHT_TOKEN)")
	pos, err := parseFlags(fs, args)
	if err != nil {
		return c, err
	}
	if len(hosts) == 0 {
		for _, h := range strings.Split(os.Getenv("PULSEWRIGHT_ALLOWED_HOSTS"), ",") {
			if h = strings.TrimSpace(h); h != "" {
				hosts = append(hosts, h)
			}
		}
	}
	c.AllowedHosts = hosts
	if memMiB < 0 || memMiB > 1<<30 {
		return c, usageError{fmt.Sprintf("--memory-limit %d: want 0 (automatic) or a number of MiB", memMiB)}
	}
	c.MemoryLimit = memMiB << 20
	switch {
	case len(pos) > 0:
		return c, usageError{fmt.Sprintf("serve takes no arguments, got %q", pos)}
	case c.logFormat != "text" && c.logFormat != "json":
		return c, usageError{fmt.Sprintf("--log-format %q: want text or json", c.logFormat)}
	case c.Token != "" && len(c.Token) < server.MinTokenLen:
		return c, usageError{fmt.Sprintf("--token of %d characters is too easy to guess: use at least %d, or leave it unset to have one generated", len(c.Token), server.MinTokenLen)}
	case c.DataDir == "":
		return c, usageError{"no --data-dir given and no user config directory to default to"}
	}
	return c, nil
}

// serve runs the workbench until the context is cancelled (SIGINT or
// SIGTERM), then shuts down: sessions closed, requests and saves finished.
func (e *env) serve(args []string) error {
	c, err := e.parseServe(args)
	if err != nil {
		return err
	}
	level := new(slog.LevelVar)
	opts := &slog.HandlerOptions{Level: level}
	var h slog.Handler = slog.NewTextHandler(e.stderr, opts)
	if c.logFormat == "json" {
		h = slog.NewJSONHandler(e.stderr, opts)
	}
	log := slog.New(h)
	// Each session keeps an engine that reuses the waveform and reference
	// while only the targets change.
	c.SessionEvaluator = func() server.Evaluator { return new(scenarios.Engine).Evaluate }
	srv, err := server.New(c.Config, log, scenarios.Evaluate)
	if err != nil {
		return err
	}
	if err := srv.Open(); err != nil {
		return err
	}
	url := srv.URL()
	fmt.Fprintf(e.stdout, "Pulsewright workbench: %s\n", url)
	if c.open {
		openBrowser(log, url)
	}
	<-e.ctx.Done()
	log.Info("shutting down")
	ctx, cancel := context.WithTimeout(context.Background(), shutdownGrace)
	defer cancel()
	if err := srv.Close(ctx); err != nil && !errors.Is(err, context.Canceled) {
		return fmt.Errorf("shut down: %w", err)
	}
	log.Info("stopped")
	return nil
}

// openBrowser asks the desktop to open url; a failure is only logged.
func openBrowser(log *slog.Logger, url string) {
	var cmd *exec.Cmd
	switch runtime.GOOS {
	case "darwin":
		cmd = exec.Command("open", url)
	case "windows":
		cmd = exec.Command("rundll32", "url.dll,FileProtocolHandler", url)
	default:
		cmd = exec.Command("xdg-open", url)
	}
	if err := cmd.Start(); err != nil {
		log.Warn("open browser", "err", err)
		return
	}
	go cmd.Wait() // reap it
}
