package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/pulsewright/pulsewright/scenarios"
)

// merge joins the outputs of the shards of one run (sweep --shard K/N)
// into the output the unsharded run writes, byte for byte. Every shard
// output opens with the engine's comment line and a shard line
// (scenarios.ShardStamp); the shard line says which command wrote it,
// and so how its outputs are joined.
func (e *env) merge(args []string) error {
	fs := newFlags("merge", e)
	out := fs.String("out", "", "write the merged output to this file instead of standard output")
	failIf := fs.String("fail-if-masked", "", "sweep: exit 3 when the target with this id is detected at no point of the merged grid")
	format := fs.String("format", "text", "trials: output format, text, json or csv")
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	if len(pos) == 0 {
		return usageError{"merge needs the shard outputs: pulsewright merge SHARD… [--out FILE]"}
	}
	if pos, err = expandPatterns(pos); err != nil {
		return err
	}
	if *out != "" {
		for _, p := range pos {
			if sameFile(p, *out) {
				return usageError{fmt.Sprintf("--out %s is one of the shard outputs being merged: choose another output file", *out)}
			}
		}
	}
	files := make([]shardFile, 0, len(pos))
	for _, name := range pos {
		f, err := readShardFile(name)
		if err != nil {
			return err
		}
		files = append(files, f)
	}
	// Shards of different commands are refused before their bodies are
	// read; each command's merge then checks the set with
	// scenarios.CheckShards.
	for _, f := range files[1:] {
		if f.part.Stamp.Command != files[0].part.Stamp.Command {
			return fmt.Errorf("merge: %s and %s are shards of different commands (%s and %s); merge only the shards of one run: %w",
				files[0].part.Name, f.part.Name, files[0].part.Stamp.Command, f.part.Stamp.Command, scenarios.ErrInvalid)
		}
	}
	switch cmd := files[0].part.Stamp.Command; cmd {
	case "sweep":
		return e.mergeSweep(files, *out, *failIf)
	case "trials":
		if *format != "text" && *format != "json" && *format != "csv" {
			return usageError{fmt.Sprintf("--format %q is not text, json or csv", *format)}
		}
		return e.mergeTrials(files, *out, *format)
	default:
		return fmt.Errorf("merge: %s is a shard of %q, which merge does not know (it joins sweep and trials shards): %w", files[0].part.Name, cmd, scenarios.ErrInvalid)
	}
}

// shardFile is one shard output read whole: its part for
// scenarios.CheckShards, and its body after the two comment lines.
type shardFile struct {
	part   scenarios.ShardPart
	engine string // the engine comment line, with its newline
	body   []byte
}

// readShardFile reads a shard output and its two comment lines.
func readShardFile(name string) (shardFile, error) {
	data, err := os.ReadFile(name)
	if err != nil {
		return shardFile{}, fmt.Errorf("merge: %w", err)
	}
	engine, rest, ok1 := bytes.Cut(data, []byte("\n"))
	stampLine, body, ok2 := bytes.Cut(rest, []byte("\n"))
	if !ok1 || !bytes.HasPrefix(engine, []byte("# pulsewright ")) {
		return shardFile{}, fmt.Errorf("merge: %s does not open with the engine line (# pulsewright …): it is not an output of pulsewright: %w", name, scenarios.ErrInvalid)
	}
	if !ok2 || !bytes.HasPrefix(stampLine, []byte("# shard ")) {
		return shardFile{}, fmt.Errorf("merge: %s has no shard line (# shard K/N of …) after the engine line: it is not a shard output (an unsharded or merged file?); write shards with --shard K/N: %w", name, scenarios.ErrInvalid)
	}
	st, err := scenarios.ParseShardStamp(string(stampLine))
	if err != nil {
		return shardFile{}, fmt.Errorf("merge: %s: %w", name, err)
	}
	f := shardFile{engine: string(engine) + "\n", body: body}
	f.part = scenarios.ShardPart{Name: name, Engine: string(engine), Stamp: st}
	return f, nil
}

// expandPatterns expands the arguments that hold *, ? or [ and name no
// file, as a shell would (where there is none: a container, or Windows),
// each pattern's matches sorted. A pattern that matches nothing is an
// error.
func expandPatterns(args []string) ([]string, error) {
	var out []string
	for _, a := range args {
		if !strings.ContainsAny(a, "*?[") {
			out = append(out, a)
			continue
		}
		if _, err := os.Stat(a); err == nil {
			out = append(out, a)
			continue
		}
		m, err := filepath.Glob(a)
		if err != nil {
			return nil, usageError{fmt.Sprintf("merge: pattern %q: %v", a, err)}
		}
		if len(m) == 0 {
			return nil, fmt.Errorf("merge: pattern %q matches no file: %w", a, scenarios.ErrInvalid)
		}
		out = append(out, m...)
	}
	return out, nil
}

// sweepShard is a sweep shard's CSV split into its header line and its
// rows, each the exact bytes written (newline included), so that the
// merge reproduces them byte for byte.
type sweepShard struct {
	header []string
	head   []byte
	rows   [][]byte
}

// splitSweepCSV splits the body of a sweep shard (after the comment
// lines) into records, keeping each record's bytes.
func splitSweepCSV(name string, body []byte) (sweepShard, error) {
	r := csv.NewReader(bytes.NewReader(body))
	var s sweepShard
	prev := int64(0)
	for {
		rec, err := r.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) { // count the two comment lines
				pe.StartLine += 2
				pe.Line += 2
			}
			return sweepShard{}, fmt.Errorf("merge: %s: %w (a damaged shard: re-run it): %w", name, err, scenarios.ErrInvalid)
		}
		off := r.InputOffset()
		raw := body[prev:off]
		prev = off
		if s.header == nil {
			s.header, s.head = rec, raw
			r.FieldsPerRecord = len(rec)
			continue
		}
		s.rows = append(s.rows, raw)
	}
	if s.header == nil {
		return sweepShard{}, fmt.Errorf("merge: %s has no header row: re-run the shard: %w", name, scenarios.ErrInvalid)
	}
	if prev != int64(len(body)) || (len(body) > 0 && body[len(body)-1] != '\n') {
		return sweepShard{}, fmt.Errorf("merge: %s ends in an incomplete row: re-run the shard: %w", name, scenarios.ErrInvalid)
	}
	return s, nil
}

// mergeSweep interleaves the rows of sweep shards: point i of the grid is
// row i div N of shard i mod N (scenarios.Shard).
func (e *env) mergeSweep(files []shardFile, out, failIf string) error {
	shards := make([]sweepShard, len(files))
	parts := make([]scenarios.ShardPart, len(files))
	for i, f := range files {
		s, err := splitSweepCSV(f.part.Name, f.body)
		if err != nil {
			return err
		}
		shards[i] = s
		parts[i] = f.part
		parts[i].Done = len(s.rows)
	}
	ordered, err := scenarios.CheckShards(parts, scenarios.Shard.Len)
	if err != nil {
		return err
	}
	// One scenario and grid make one header; a file edited by hand may not.
	for i, s := range shards[1:] {
		if !bytes.Equal(s.head, shards[0].head) {
			return fmt.Errorf("merge: %s and %s have different columns (%s and %s): %w",
				files[0].part.Name, files[i+1].part.Name, scenarios.Clip(string(bytes.TrimSpace(shards[0].head)), 200), scenarios.Clip(string(bytes.TrimSpace(s.head)), 200), scenarios.ErrInvalid)
		}
	}
	byK := make([]*sweepShard, len(ordered))
	for i, f := range files {
		byK[f.part.Stamp.Shard.K] = &shards[i]
	}
	st := ordered[0].Stamp
	n := st.Shard.N

	statusCol := -1
	if failIf != "" {
		for c, h := range shards[0].header {
			if h == failIf+".status" {
				statusCol = c
			}
		}
		if statusCol < 0 {
			return usageError{fmt.Sprintf("--fail-if-masked %q is not a target of the merged sweep (no column %s.status)", failIf, failIf)}
		}
	}
	detected := false
	write := func(w io.Writer) error {
		if _, err := io.WriteString(w, files[0].engine); err != nil {
			return err
		}
		if _, err := w.Write(shards[0].head); err != nil {
			return err
		}
		for i := range st.Total {
			k, j := scenarios.Owner(i, n)
			row := byK[k].rows[j]
			if statusCol >= 0 && !detected {
				rec, err := csv.NewReader(bytes.NewReader(row)).Read()
				if err == nil && rec[statusCol] == scenarios.StatusDetected {
					detected = true
				}
			}
			if _, err := w.Write(row); err != nil {
				return err
			}
		}
		return nil
	}
	if out == "" {
		if err := write(e.stdout); err != nil {
			return fmt.Errorf("merge: %w", err)
		}
	} else if err := writeFile(out, write); err != nil {
		return fmt.Errorf("merge: %w", err)
	}
	if failIf != "" && !detected {
		return statusError{exitMasked, fmt.Sprintf("target %s is not detected at any of the %d points", failIf, st.Total)}
	}
	return nil
}

// mergeTrials sums the counts of trials shards (blocks of consecutive
// trials, scenarios.Shard.Block) and writes the summary of the whole run,
// its intervals recomputed from the summed counts: what trials -n TOTAL
// writes in that format.
func (e *env) mergeTrials(files []shardFile, out, format string) error {
	sums := make([]scenarios.TrialSummary, len(files))
	parts := make([]scenarios.ShardPart, len(files))
	for i, f := range files {
		dec := json.NewDecoder(bytes.NewReader(f.body))
		dec.DisallowUnknownFields()
		if err := dec.Decode(&sums[i]); err != nil {
			return fmt.Errorf("merge: %s: the trials summary after the shard line: %v (a damaged shard: re-run it): %w", f.part.Name, err, scenarios.ErrInvalid)
		}
		parts[i] = f.part
		parts[i].Done = sums[i].Counts.Trials
	}
	ordered, err := scenarios.CheckShards(parts, scenarios.Shard.BlockLen)
	if err != nil {
		return err
	}
	byName := map[string]int{}
	for i, f := range files {
		byName[f.part.Name] = i
	}
	var total scenarios.TrialCounts
	total.Detections = make([]int64, len(sums[0].Counts.Detections))
	for _, p := range ordered {
		if err := total.Add(sums[byName[p.Name]].Counts); err != nil {
			return fmt.Errorf("merge: %s: %v: %w", p.Name, err, scenarios.ErrInvalid)
		}
	}
	sum := sums[byName[ordered[0].Name]].WithCounts(total, ordered[0].Stamp.Total)
	write := func(w io.Writer) error { return writeTrials(w, format, sum, scenarios.SIUnits()) }
	if out == "" {
		if err := write(e.stdout); err != nil {
			return fmt.Errorf("merge: %w", err)
		}
	} else if err := writeFile(out, write); err != nil {
		return fmt.Errorf("merge: %w", err)
	}
	return nil
}
