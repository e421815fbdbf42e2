package main

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"strconv"
	"text/tabwriter"
	"time"

	"github.com/pulsewright/pulsewright/scenarios"
)

// maxTrialTime bounds --time-limit.
const maxTrialTime = 7 * 24 * time.Hour

// trials runs "pulsewright trials": Monte Carlo realisations of a scenario
// and each target's empirical Pd beside the analytic one
// (docs/detection-probability.md §8).
func (e *env) trials(args []string) error {
	fs := newFlags("trials", e)
	n := fs.Int("n", 1000, fmt.Sprintf("trials to run, 1 … %d", scenarios.MaxTrials))
	first := fs.Int("first", 0, "index of the first trial (trial i uses a seed drawn from the scenario's seed and i)")
	var jobs int
	fs.IntVar(&jobs, "j", 0, "trials run at once (0: one per core)")
	fs.IntVar(&jobs, "jobs", 0, "same as -j")
	format := fs.String("format", "text", "output format: text, json or csv")
	out := fs.String("o", "", "write to this file instead of standard output")
	fs.StringVar(out, "out", "", "same as -o")
	shardFlag := fs.String("shard", "", "K/N: run only block K of N of the trials (a shard file for merge)")
	randomPhase := fs.Bool("random-phase", false, "draw each point echo's carrier phase per trial (single pulses): echoes sharing a cell add with a random relative phase")
	limit := fs.Duration("time-limit", 0, "stop after this long (e.g. 90s, 10m) and write the trials done; 0: no limit")
	unitsText := unitsFlag(fs)
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	switch {
	case *n < 1 || *n > scenarios.MaxTrials:
		return usageError{fmt.Sprintf("-n %d out of range: want 1 … %d trials", *n, scenarios.MaxTrials)}
	case *first < 0 || *first > scenarios.MaxTrials*100:
		return usageError{fmt.Sprintf("--first %d out of range: want 0 … %d", *first, scenarios.MaxTrials*100)}
	case jobs < 0 || jobs > 1024:
		return usageError{fmt.Sprintf("-j %d out of range: want 0 (one per core) … 1024", jobs)}
	case *format != "text" && *format != "json" && *format != "csv":
		return usageError{fmt.Sprintf("--format %q is not text, json or csv", *format)}
	case *limit < 0 || *limit > maxTrialTime:
		return usageError{fmt.Sprintf("--time-limit %v out of range: want 0 (none) … %v", *limit, maxTrialTime)}
	}
	u, err := parseUnitsFlag(*unitsText, *format == "text" && *shardFlag == "", "it applies to --format text; json, csv and shard files keep SI")
	if err != nil {
		return err
	}
	shard := scenarios.Whole
	sharded := *shardFlag != ""
	if sharded {
		if shard, err = scenarios.ParseShard("--shard", *shardFlag); err != nil {
			return err
		}
		if *format != "text" {
			return usageError{"--format and --shard: a shard writes the file merge reads; give --format to merge"}
		}
	}
	if len(pos) == 1 {
		if err := checkOutputs(pos[0], map[string]string{"-o": *out}); err != nil {
			return err
		}
	}
	s, err := e.oneScenario("trials", pos)
	if err != nil {
		return err
	}
	t, err := scenarios.NewTrials(e.ctx, s)
	if err != nil {
		if e.ctx.Err() != nil {
			return statusError{exitInterrupted, "trials interrupted while preparing the scene; nothing written"}
		}
		return fmt.Errorf("prepare trials: %w", err)
	}
	if err := t.SetRandomPhase(*randomPhase); err != nil {
		return err
	}
	jobs, why := t.Workers(jobs)
	if why != "" {
		fmt.Fprintf(e.stderr, "pulsewright: trials run %s\n", why)
	}
	ctx := e.ctx
	if *limit > 0 {
		var cancel context.CancelFunc
		ctx, cancel = context.WithTimeout(ctx, *limit)
		defer cancel()
	}
	// A shard runs its block of the trials; trial i's seed depends on i
	// alone, so the shards' counts add up to the unsharded run's.
	bf, bn := shard.Block(*n)
	bar := newProgress(e.rawStderr, bn)
	start := time.Now()
	counts, runErr := t.Run(ctx, *first+bf, bn, jobs, func(int) { bar.step() })
	elapsed := time.Since(start)
	bar.done()
	if runErr != nil && !errors.Is(runErr, context.Canceled) && !errors.Is(runErr, context.DeadlineExceeded) {
		return runErr
	}
	sum := t.Summarise(counts, bn)
	eng := scenarios.RunningEngine()
	sum.Engine = &eng
	if counts.Trials > 0 {
		fmt.Fprintf(e.stderr, "pulsewright: %d trials in %.1f s (%.0f trials/s, %d at once)\n",
			counts.Trials, elapsed.Seconds(), float64(counts.Trials)/elapsed.Seconds(), jobs)
	}
	write := func(w io.Writer) error {
		if sharded {
			return writeTrialsShard(w, s, *first, *n, shard, sum)
		}
		return writeTrials(w, *format, sum, u)
	}
	if *out != "" {
		if err := writeFile(*out, write); err != nil {
			return err
		}
	} else if err := write(e.stdout); err != nil {
		return err
	}
	done := fmt.Sprintf("%d of %d trials (trials %d … %d) written", counts.Trials, bn, counts.First, counts.First+counts.Trials-1)
	if counts.Trials == 0 {
		done = fmt.Sprintf("none of %d trials done; nothing counted", bn)
	}
	switch {
	case e.ctx.Err() != nil:
		return statusError{exitInterrupted, "trials interrupted: " + done}
	case runErr != nil:
		return statusError{exitFailure, fmt.Sprintf("trials stopped at the time limit of %v: %s", *limit, done)}
	}
	return nil
}

// writeTrialsText prints a summary as a table a person reads, ranges in
// u's range unit.
func writeTrialsText(w io.Writer, s scenarios.TrialSummary, u scenarios.Units) error {
	fmt.Fprintf(w, "%s: %d Monte Carlo trials (trials %d … %d of seed %d)\n", s.Scenario, s.Trials, s.FirstTrial, s.FirstTrial+s.Trials-1, s.Seed)
	if s.RandomPhase {
		fmt.Fprintln(w, "carrier phases drawn per trial (--random-phase)")
	}
	if !s.Complete {
		fmt.Fprintf(w, "stopped early: %d of the %d trials asked for\n", s.Trials, s.Requested)
	}
	fmt.Fprintf(w, "Pd: detections / trials at each target's tested cell, %g %% exact binomial interval (Clopper–Pearson 1934); analytic Pd from the report (Pfa %g)\n\n",
		100*s.Confidence, s.Pfa)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintf(tw, "ID\tSTATUS\tTESTED AT %s\tSNR dB\tDETECTIONS\tPD\t95 %% INTERVAL\tANALYTIC PD\tINSIDE\t\n", u.Range)
	for _, t := range s.Targets {
		at, snr, pd, ci, an, in := "—", "—", "—", "—", "—", "—"
		if t.TestedM != nil {
			at = u.Number(scenarios.QRange, *t.TestedM, 1)
		}
		if t.TestedSNR != nil {
			snr = fx(*t.TestedSNR, 2)
		}
		if t.Pd != nil {
			pd = prob(*t.Pd)
			ci = fmt.Sprintf("%s … %s", prob(*t.PdLow), prob(*t.PdHigh))
		}
		if t.PdAnalytic != nil {
			an = prob(*t.PdAnalytic)
		}
		if t.Inside != nil {
			in = map[bool]string{true: "yes", false: "no"}[*t.Inside]
		}
		det := "—"
		if t.TestedM != nil {
			det = fmt.Sprintf("%d/%d", t.Detections, s.Trials)
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t\n", t.ID, t.Status, at, snr, det, pd, ci, an, in)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	fa := s.FalseAlarms
	fmt.Fprintf(w, "\nfalse alarms: %d in %d noise-only cells, expected %.3g (Pfa %g × cells)", fa.Count, fa.Cells, fa.Expected, s.Pfa)
	if fa.Rate != nil {
		fmt.Fprintf(w, "; rate %.3g, 95 %% interval %.3g … %.3g", *fa.Rate, *fa.RateLow, *fa.RateHigh)
	}
	_, err := fmt.Fprintf(w, "\n\n%s\n", trialsEngine(s))
	return err
}

// trialsEngine is the engine that counted the trials of s: for a merged
// run the shards' (merge checked they are one), not the merging
// program's; the running engine when s names none.
func trialsEngine(s scenarios.TrialSummary) scenarios.EngineInfo {
	if s.Engine != nil {
		return *s.Engine
	}
	return scenarios.RunningEngine()
}

// writeTrialsCSV writes one row per target and one for the false alarms:
// what, id, status, tested_range_m, tested_snr_db, count, of (trials or cells), rate
// (empirical Pd or false-alarm rate), low, high, expected (analytic Pd or
// Pfa), inside.
func writeTrialsCSV(w io.Writer, s scenarios.TrialSummary) error {
	// The engine that counted: a merged run's is its shards' (merge checked
	// they are one), not the merging program's.
	if _, err := io.WriteString(w, "# "+trialsEngine(s).String()+"\n"); err != nil {
		return err
	}
	c := csv.NewWriter(w)
	c.Write([]string{"what", "id", "status", "tested_range_m", "tested_snr_db", "count", "of", "rate", "low", "high", "expected", "inside"})
	opt := func(v *float64, prec int) string {
		if v == nil {
			return ""
		}
		return strconv.FormatFloat(*v, 'g', prec, 64)
	}
	yes := func(b *bool) string {
		if b == nil {
			return ""
		}
		return strconv.FormatBool(*b)
	}
	for _, t := range s.Targets {
		of := ""
		if t.TestedM != nil {
			of = strconv.Itoa(s.Trials)
		}
		c.Write([]string{"target", t.ID, t.Status, opt(t.TestedM, 10), opt(t.TestedSNR, 6), strconv.FormatInt(t.Detections, 10), of,
			opt(t.Pd, 8), opt(t.PdLow, 8), opt(t.PdHigh, 8), opt(t.PdAnalytic, 8), yes(t.Inside)})
	}
	fa := s.FalseAlarms
	pfa := s.Pfa
	c.Write([]string{"false_alarms", "", "", "", "", strconv.FormatInt(fa.Count, 10), strconv.FormatInt(fa.Cells, 10),
		opt(fa.Rate, 8), opt(fa.RateLow, 8), opt(fa.RateHigh, 8), opt(&pfa, 8), yes(fa.Inside)})
	c.Flush()
	return c.Error()
}

// prob prints a probability to four decimals: the resolution of a few
// thousand trials.
func prob(p float64) string { return strconv.FormatFloat(p, 'f', 4, 64) }

// trialsStamp identifies shard sh of n trials from first of scenario s
// (with or without --random-phase, which changes every trial).
func trialsStamp(s *scenarios.Scenario, first, n int, randomPhase bool, sh scenarios.Shard) (scenarios.ShardStamp, error) {
	h, err := scenarios.ScenarioHash(s)
	if err != nil {
		return scenarios.ShardStamp{}, err
	}
	run, _ := json.Marshal(map[string]any{"first_trial": first, "trials": n, "random_phase": randomPhase})
	return scenarios.ShardStamp{Shard: sh, Command: "trials", Total: n, Unit: "trials", Scenario: h, Grid: scenarios.Hash(run), Build: buildHash()}, nil
}

// writeTrialsShard writes a trials shard file: the engine line, the shard
// line, then the shard's summary as JSON (its counts are what merge sums).
func writeTrialsShard(w io.Writer, s *scenarios.Scenario, first, n int, sh scenarios.Shard, sum scenarios.TrialSummary) error {
	st, err := trialsStamp(s, first, n, sum.RandomPhase, sh)
	if err != nil {
		return err
	}
	if _, err := io.WriteString(w, scenarios.CSVComment()+st.Line()); err != nil {
		return err
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(sum)
}

// writeTrials writes a summary in a format of trials --format; the text
// gives ranges in u (JSON and CSV keep SI).
func writeTrials(w io.Writer, format string, sum scenarios.TrialSummary, u scenarios.Units) error {
	switch format {
	case "json":
		enc := json.NewEncoder(w)
		enc.SetIndent("", "  ")
		return enc.Encode(sum)
	case "csv":
		return writeTrialsCSV(w, sum)
	}
	return writeTrialsText(w, sum, u)
}
