package main

import (
	"context"
	"crypto/sha256"
	"encoding/csv"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"os"
	"runtime"
	"strings"
	"sync"
	"time"

	"github.com/pulsewright/pulsewright/scenarios"
	"github.com/pulsewright/pulsewright/server"
)

// multiFlag collects a repeated string flag.
type multiFlag []string

func (m *multiFlag) String() string     { return strings.Join(*m, " ") }
func (m *multiFlag) Set(v string) error { *m = append(*m, v); return nil }

func (e *env) sweep(args []string) error {
	fs := newFlags("sweep", e)
	var sets multiFlag
	fs.Var(&sets, "set", "PATH=START:STOP:STEP, PATH=V1,V2,… or PATH=VALUE (repeat for a grid)")
	out := fs.String("out", "", "write the CSV to this file instead of standard output")
	html := fs.String("html", "", "also write a self-contained HTML page of margin against the swept value")
	failIf := fs.String("fail-if-masked", "", "exit 3 when the target with this id is detected at no point")
	jobs := fs.Int("jobs", 0, "points evaluated at once (0: one per core)")
	shardFlag := fs.String("shard", "", "K/N: compute only shard K of N (points i with i mod N = K); join the shards with merge")
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	if len(sets) == 0 {
		return usageError{"sweep needs at least one --set PATH=START:STOP:STEP"}
	}
	if *jobs < 0 {
		return usageError{fmt.Sprintf("--jobs %d is negative", *jobs)}
	}
	var shard *scenarios.Shard
	if *shardFlag != "" {
		sh, err := scenarios.ParseShard("--shard", *shardFlag)
		if err != nil {
			return err
		}
		shard = &sh
		// Both decide on the whole grid, which one shard does not see.
		if *html != "" {
			return usageError{"--html draws the whole grid and cannot be combined with --shard; merge the shards' CSV files"}
		}
		if *failIf != "" {
			return usageError{"--fail-if-masked decides on the whole grid and cannot be combined with --shard; give it to merge instead"}
		}
	}
	// The grid is counted, with overflow checks, before anything else.
	if _, err := scenarios.CountAxes(sets); err != nil {
		return err
	}
	g := &scenarios.Grid{}
	for _, spec := range sets {
		a, err := scenarios.ParseAxis(spec)
		if err != nil {
			return err
		}
		g.Axes = append(g.Axes, a)
	}
	n, err := g.Count()
	if err != nil {
		return err
	}
	if len(pos) == 1 {
		if err := checkOutputs(pos[0], map[string]string{"--out": *out, "--html": *html}); err != nil {
			return err
		}
	}
	base, err := e.oneScenario("sweep", pos)
	if err != nil {
		return err
	}
	g.Base = base
	ids := make([]string, len(base.Targets))
	for i, t := range base.Targets {
		ids[i] = t.ID
	}
	if *failIf != "" && !contains(ids, *failIf) {
		return usageError{fmt.Sprintf("--fail-if-masked %q is not a target of the scenario (targets: %s)", *failIf, strings.Join(ids, ", "))}
	}
	// Validate before creating any file.
	if err := g.Validate(e.ctx); err != nil {
		if e.ctx.Err() != nil {
			return statusError{exitInterrupted, "sweep interrupted while checking the grid; nothing written"}
		}
		return err
	}

	var w io.Writer = e.stdout
	var outF *outFile
	if *out != "" {
		if outF, err = createOut(*out); err != nil {
			return fmt.Errorf("sweep: %w", err)
		}
		defer outF.Abort() // after Commit, a no-op
		w = outF
	}
	sw := newSweepWriter(w, g, ids)
	if shard != nil {
		if sw.stamp, err = sweepStamp(g, *shard); err != nil {
			return err
		}
	}
	if err := sw.header(); err != nil {
		return fmt.Errorf("write csv: %w", err)
	}
	workers := *jobs
	if workers == 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	sh := scenarios.Whole
	if shard != nil {
		sh = *shard
	}
	mine := sh.Len(n)
	bar := newProgress(e.rawStderr, mine)
	var points []scenarios.Point
	detected := false
	runErr := g.RunShard(e.ctx, sh, workers, func(p scenarios.Point) error {
		points = append(points, p)
		if t := findTarget(p.Report, *failIf); t != nil && t.Status == scenarios.StatusDetected {
			detected = true
		}
		bar.step()
		return sw.row(p)
	})
	bar.done()
	if *html != "" && len(points) > 0 {
		if err := writeFile(*html, func(w io.Writer) error {
			return server.WriteSweepPage(w, base, g, points)
		}); err != nil {
			return err
		}
	}
	interrupted := errors.Is(runErr, context.Canceled)
	if outF != nil && (runErr == nil || interrupted) {
		// The rows done are kept on an interrupt; on a failure the
		// previous file stays.
		if err := outF.Commit(); err != nil {
			return fmt.Errorf("sweep: %w", err)
		}
	}
	switch {
	case interrupted:
		return statusError{exitInterrupted, fmt.Sprintf("sweep interrupted: %d of %d points written", len(points), mine)}
	case runErr != nil:
		return runErr
	case *failIf != "" && !detected:
		return statusError{exitMasked, fmt.Sprintf("target %s is not detected at any of the %d points", *failIf, n)}
	}
	return nil
}

func contains(list []string, v string) bool {
	for _, s := range list {
		if s == v {
			return true
		}
	}
	return false
}

func findTarget(r *scenarios.Report, id string) *scenarios.TargetReport {
	for i := range r.Targets {
		if r.Targets[i].ID == id {
			return &r.Targets[i]
		}
	}
	return nil
}

// sweepWriter writes one CSV row per point and flushes it, so the rows of
// an interrupted sweep are on disk.
type sweepWriter struct {
	w      io.Writer // under c, for the comment line
	c      *csv.Writer
	g      *scenarios.Grid
	ids    []string
	trains bool // pulse trains: add each target's integrated SNR and apparent range rate
	// stamp, when not nil, is the shard line written after the engine's.
	stamp *scenarios.ShardStamp
}

// sweepStamp identifies shard sh of the grid g for merge.
func sweepStamp(g *scenarios.Grid, sh scenarios.Shard) (*scenarios.ShardStamp, error) {
	total, err := g.Count()
	if err != nil {
		return nil, err
	}
	h, err := scenarios.ScenarioHash(g.Base)
	if err != nil {
		return nil, fmt.Errorf("sweep: %w", err)
	}
	return &scenarios.ShardStamp{Shard: sh, Command: "sweep", Total: total, Unit: "points", Scenario: h, Grid: g.Hash(), Build: buildHash()}, nil
}

// buildHash identifies the running executable by the hash of its file
// (scenarios.ShardStamp.Build), scenarios.UnknownBuild when it cannot be
// read.
var buildHash = sync.OnceValue(func() string {
	exe, err := os.Executable()
	if err != nil {
		return scenarios.UnknownBuild
	}
	f, err := os.Open(exe)
	if err != nil {
		return scenarios.UnknownBuild
	}
	defer f.Close()
	h := sha256.New()
	if _, err := io.Copy(h, f); err != nil {
		return scenarios.UnknownBuild
	}
	return "sha256:" + hex.EncodeToString(h.Sum(nil))
})

func newSweepWriter(w io.Writer, g *scenarios.Grid, ids []string) *sweepWriter {
	trains := g.Base.Radar.Pulses > 1
	for _, a := range g.Axes {
		trains = trains || a.Path == "radar.pulses"
	}
	return &sweepWriter{w: w, c: csv.NewWriter(w), g: g, ids: ids, trains: trains}
}

// header writes the comment line naming the engine (docs/report-format.md,
// "Other outputs") and the header row.
func (s *sweepWriter) header() error {
	if _, err := io.WriteString(s.w, scenarios.CSVComment()); err != nil {
		return err
	}
	if s.stamp != nil {
		if _, err := io.WriteString(s.w, s.stamp.Line()); err != nil {
			return err
		}
	}
	var h []string
	for _, a := range s.g.Axes {
		h = append(h, a.Path)
	}
	h = append(h, "pslr_db", "islr_db", "mainlobe_3db_m", "mismatch_loss_db", "straddle_loss_max_db", "straddle_loss_mean_db")
	for _, id := range s.ids {
		h = append(h, id+".status", id+".snr_db", id+".pd", id+".margin_db", id+".threshold_margin_db")
		if s.trains {
			h = append(h, id+".snr_integrated_db", id+".apparent_range_rate_mps")
		}
	}
	s.c.Write(h)
	s.c.Flush()
	return s.c.Error()
}

func (s *sweepWriter) row(p scenarios.Point) error {
	var r []string
	for k, a := range s.g.Axes {
		r = append(r, a.Label(p.Values[k]))
	}
	wf := p.Report.Waveform
	r = append(r, optFig(wf.PSLRDB), optFig(wf.ISLRDB), num(wf.Mainlobe3dBM), num(wf.MismatchLossDB), num(wf.StraddleLossMaxDB), num(wf.StraddleLossMeanDB))
	for _, id := range s.ids {
		t := findTarget(p.Report, id)
		if t == nil {
			r = append(r, "", "", "", "", "")
		} else {
			r = append(r, t.Status, num(t.SNRDB), optNum(t, func(t *scenarios.TargetReport) *float64 { return t.Pd }),
				optNum(t, func(t *scenarios.TargetReport) *float64 { return t.MarginDB }),
				optNum(t, func(t *scenarios.TargetReport) *float64 { return t.ThresholdMarginDB }))
		}
		if s.trains {
			r = append(r, optNum(t, func(t *scenarios.TargetReport) *float64 { return t.SNRIntegratedDB }),
				optNum(t, func(t *scenarios.TargetReport) *float64 { return t.ApparentRangeRateMPS }))
		}
	}
	s.c.Write(r)
	s.c.Flush()
	return s.c.Error()
}

// num formats a figure to 0.001 (dB, m), which is below any tolerance
// that matters and keeps the CSV readable.
func num(v float64) string { return fx(v, 3) }

// optFig formats a waveform figure that a report may leave out (no
// sidelobes), "" when it does.
func optFig(v *float64) string {
	if v == nil {
		return ""
	}
	return num(*v)
}

// optNum formats a figure that a report may leave out, "" when it does.
func optNum(t *scenarios.TargetReport, f func(*scenarios.TargetReport) *float64) string {
	if t == nil || f(t) == nil {
		return ""
	}
	return num(*f(t))
}

// progress draws a bar with an ETA on a terminal and nothing otherwise.
type progress struct {
	w     io.Writer
	n, i  int
	start time.Time
	last  time.Time
}

func newProgress(w io.Writer, n int) *progress {
	if !isTerminal(w) {
		return &progress{}
	}
	return &progress{w: w, n: n, start: time.Now()}
}

// isTerminal reports whether w is a character device (a terminal).
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	st, err := f.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}

func (p *progress) step() {
	if p.w == nil {
		return
	}
	p.i++
	now := time.Now()
	if now.Sub(p.last) < 100*time.Millisecond && p.i < p.n {
		return
	}
	p.last = now
	const width = 30
	fill := width * p.i / p.n
	el := now.Sub(p.start)
	eta := time.Duration(float64(el) / float64(p.i) * float64(p.n-p.i)).Round(time.Second)
	fmt.Fprintf(p.w, "\r[%s%s] %d/%d  ETA %s ", strings.Repeat("#", fill), strings.Repeat(".", width-fill), p.i, p.n, eta)
}

func (p *progress) done() {
	if p.w != nil {
		fmt.Fprintln(p.w)
	}
}
