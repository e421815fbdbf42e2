// Command gobench is the Go side of bench/run: it writes the shared inputs,
// times dsp.Correlator and scenarios.Evaluate inside the process, and
// writes the results that bench/ref.py cross-checks.
//
//	gobench gen -dir D -seed S -n N -m M          write D/x_N.cf64 and D/h_M.cf64
//	gobench compress -x F -h F -reps R [-workers W] [-cold] [-out F]
//	gobench evaluate -scene F -reps R [-out DIR]
//	gobench trials -scene F -n N -reps R [-workers W]
//
// Files are raw little-endian complex128 (cf64: re, im float64 pairs) or
// float64. Each timing command prints one JSON line: the per-repetition
// times in ms (after one untimed warm-up), the plan time and the peak RSS.
package main

import (
	"context"
	"encoding/binary"
	"encoding/json"
	"flag"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"runtime"
	"syscall"
	"time"

	"github.com/pulsewright/pulsewright/dsp"
	"github.com/pulsewright/pulsewright/scenarios"
)

func main() {
	if len(os.Args) < 2 {
		fail(fmt.Errorf("usage: gobench gen|compress|evaluate [flags]"))
	}
	fs := flag.NewFlagSet(os.Args[1], flag.ExitOnError)
	var err error
	switch os.Args[1] {
	case "gen":
		dir := fs.String("dir", "", "output directory")
		seed := fs.Uint64("seed", 1, "generator seed")
		n := fs.Int("n", 65536, "window samples")
		m := fs.Int("m", 5000, "reference samples")
		fs.Parse(os.Args[2:])
		err = gen(*dir, *seed, *n, *m)
	case "compress":
		x := fs.String("x", "", "window file (cf64)")
		h := fs.String("h", "", "reference file (cf64)")
		reps := fs.Int("reps", 5, "timed repetitions")
		workers := fs.Int("workers", runtime.GOMAXPROCS(0), "goroutines for the overlap-save blocks")
		cold := fs.Bool("cold", false, "build the plan inside every timed repetition")
		out := fs.String("out", "", "write the compressed window here (cf64)")
		fs.Parse(os.Args[2:])
		err = compress(*x, *h, *reps, *workers, *cold, *out)
	case "evaluate":
		scene := fs.String("scene", "", "scenario file")
		reps := fs.Int("reps", 5, "timed repetitions")
		out := fs.String("out", "", "write series and targets into this directory")
		fs.Parse(os.Args[2:])
		err = evaluate(*scene, *reps, *out)
	case "trials":
		scene := fs.String("scene", "", "scenario file")
		n := fs.Int("n", 1000, "trials per repetition")
		reps := fs.Int("reps", 5, "timed repetitions")
		workers := fs.Int("workers", runtime.GOMAXPROCS(0), "trials run at once")
		fs.Parse(os.Args[2:])
		err = trials(*scene, *n, *reps, *workers)
	default:
		err = fmt.Errorf("unknown command %q", os.Args[1])
	}
	if err != nil {
		fail(err)
	}
}

func fail(err error) {
	fmt.Fprintln(os.Stderr, "gobench:", err)
	os.Exit(1)
}

// gen writes x (n samples) and h (m samples) of independent complex
// Gaussian samples, unit power, from one PCG stream.
func gen(dir string, seed uint64, n, m int) error {
	rnd := rand.New(rand.NewPCG(seed, 0x9e3779b97f4a7c15))
	x := make([]complex128, n)
	for i := range x {
		x[i] = dsp.ComplexNormal(rnd)
	}
	h := make([]complex128, m)
	for i := range h {
		h[i] = dsp.ComplexNormal(rnd)
	}
	if err := writeCf64(filepath.Join(dir, fmt.Sprintf("x_%d.cf64", n)), x); err != nil {
		return err
	}
	return writeCf64(filepath.Join(dir, fmt.Sprintf("h_%d.cf64", m)), h)
}

type timing struct {
	TimesMS   []float64 `json:"times_ms"`
	CPUMS     []float64 `json:"cpu_ms"` // process CPU time (user+system, all threads) per repetition
	PlanMS    float64   `json:"plan_ms,omitempty"`
	MaxRSSKiB int64     `json:"maxrss_kib"`
	Info      string    `json:"info,omitempty"`
	Counts    any       `json:"counts,omitempty"` // trials: the counts of all repetitions
}

func compress(xf, hf string, reps, workers int, cold bool, out string) error {
	x, err := readCf64(xf)
	if err != nil {
		return err
	}
	h, err := readCf64(hf)
	if err != nil {
		return err
	}
	dst := make([]complex128, len(x))
	t0 := time.Now()
	p := dsp.NewCorrelatorWorkers(h, len(x), workers)
	var tm timing
	tm.PlanMS = ms(time.Since(t0))
	p.Apply(dst, x) // warm-up
	if out != "" {
		if err := writeCf64(out, dst); err != nil {
			return err
		}
	}
	for range reps {
		t, c := time.Now(), cpuTime()
		if cold {
			p = dsp.NewCorrelatorWorkers(h, len(x), workers)
		}
		p.Apply(dst, x)
		tm.TimesMS = append(tm.TimesMS, ms(time.Since(t)))
		tm.CPUMS = append(tm.CPUMS, ms(cpuTime()-c))
	}
	tm.Info = fmt.Sprintf("workers=%d", workers)
	return report(tm)
}

func evaluate(file string, reps int, out string) error {
	data, err := os.ReadFile(file)
	if err != nil {
		return err
	}
	s, err := scenarios.Decode(data)
	if err != nil {
		return err
	}
	ctx := context.Background()
	res, err := scenarios.Evaluate(ctx, s) // warm-up, and the checked result
	if err != nil {
		return err
	}
	if out != "" {
		if err := writeResult(out, res); err != nil {
			return err
		}
	}
	var tm timing
	for range reps {
		t, c := time.Now(), cpuTime()
		if _, err := scenarios.Evaluate(ctx, s); err != nil {
			return err
		}
		tm.TimesMS = append(tm.TimesMS, ms(time.Since(t)))
		tm.CPUMS = append(tm.CPUMS, ms(cpuTime()-c))
	}
	tm.Info = fmt.Sprintf("samples=%d targets=%d", len(res.Series.ProfileDB), len(res.Report.Targets))
	return report(tm)
}

// trials times Monte Carlo runs of n trials of the scenario
// (scenarios.Trials.Run, as "pulsewright trials" does) on workers
// goroutines: the scene prepared once (NewTrials, untimed, as the
// reference precomputes its noise-free echoes), each timed repetition a
// new run of the next n trials (a run sets up its workers' plans). It
// adds the trials per second of the median repetition and the counts of
// all repetitions (detections per target, false alarms over noise
// cells) for ref.py's cross-check.
func trials(file string, n, reps, workers int) error {
	data, err := os.ReadFile(file)
	if err != nil {
		return err
	}
	s, err := scenarios.Decode(data)
	if err != nil {
		return err
	}
	ctx := context.Background()
	tr, err := scenarios.NewTrials(ctx, s)
	if err != nil {
		return err
	}
	if _, err := tr.Run(ctx, 0, n, workers, nil); err != nil { // warm-up
		return err
	}
	var tm timing
	total := scenarios.TrialCounts{First: n, Detections: make([]int64, len(s.Targets))}
	for r := range reps {
		t, c := time.Now(), cpuTime()
		got, err := tr.Run(ctx, (r+1)*n, n, workers, nil)
		if err != nil {
			return err
		}
		tm.TimesMS = append(tm.TimesMS, ms(time.Since(t)))
		tm.CPUMS = append(tm.CPUMS, ms(cpuTime()-c))
		if err := total.Add(got); err != nil {
			return err
		}
	}
	ids := make([]string, len(s.Targets))
	for j, t := range s.Targets {
		ids[j] = t.ID
	}
	tm.Counts = map[string]any{"ids": ids, "trials": total.Trials, "detections": total.Detections,
		"false_alarms": total.FalseAlarms, "noise_cells": total.NoiseCells}
	tm.Info = fmt.Sprintf("workers=%d trials_per_rep=%d", workers, n)
	return report(tm)
}

// writeResult writes what ref.py evaluate cross-checks: the raw record
// the compression used (go_echo.cf64: the n gates' samples and the m−1
// recorded past the window's end, docs/detection.md §1; Series.Echo is
// the first n of them, the rest sit in its backing array), the plot
// series and the report's targets (every field, as the report has them).
func writeResult(dir string, res *scenarios.Result) error {
	se := res.Series
	if err := writeCf64(filepath.Join(dir, "go_echo.cf64"), se.Echo[:cap(se.Echo)]); err != nil {
		return err
	}
	for name, v := range map[string][]float64{"go_profile_db": se.ProfileDB, "go_clean_db": se.CleanDB, "go_threshold_db": se.ThresholdDB} {
		if err := writeF64(filepath.Join(dir, name+".f64"), v); err != nil {
			return err
		}
	}
	b, err := json.MarshalIndent(res.Report.Targets, "", " ")
	if err != nil {
		return err
	}
	return os.WriteFile(filepath.Join(dir, "go_targets.json"), b, 0o644)
}

func report(tm timing) error {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return err
	}
	tm.MaxRSSKiB = ru.Maxrss // KiB on Linux
	b, err := json.Marshal(tm)
	if err != nil {
		return err
	}
	fmt.Println(string(b))
	return nil
}

// cpuTime returns the process's user plus system CPU time.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	syscall.Getrusage(syscall.RUSAGE_SELF, &ru)
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

func ms(d time.Duration) float64 { return float64(d.Nanoseconds()) / 1e6 }

func writeCf64(name string, v []complex128) error {
	b := make([]byte, 16*len(v))
	for i, c := range v {
		binary.LittleEndian.PutUint64(b[16*i:], math.Float64bits(real(c)))
		binary.LittleEndian.PutUint64(b[16*i+8:], math.Float64bits(imag(c)))
	}
	return os.WriteFile(name, b, 0o644)
}

func writeF64(name string, v []float64) error {
	b := make([]byte, 8*len(v))
	for i, f := range v {
		binary.LittleEndian.PutUint64(b[8*i:], math.Float64bits(f))
	}
	return os.WriteFile(name, b, 0o644)
}

func readCf64(name string) ([]complex128, error) {
	b, err := os.ReadFile(name)
	if err != nil {
		return nil, err
	}
	if len(b)%16 != 0 {
		return nil, fmt.Errorf("%s: %d bytes is not a whole number of cf64 samples", name, len(b))
	}
	v := make([]complex128, len(b)/16)
	for i := range v {
		v[i] = complex(math.Float64frombits(binary.LittleEndian.Uint64(b[16*i:])),
			math.Float64frombits(binary.LittleEndian.Uint64(b[16*i+8:])))
	}
	return v, nil
}
