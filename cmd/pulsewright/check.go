package main

import (
	"flag"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"github.com/pulsewright/pulsewright/scenarios"
)

// defaultBase is the origin of share links printed by the command line:
// the workbench's default address.
const defaultBase = "http://127.0.0.1:8750"

func newFlags(name string, e *env) *flag.FlagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(e.stderr)
	return fs
}

func parseFlags(fs *flag.FlagSet, args []string) ([]string, error) {
	// Allow flags after the positional argument: pulsewright link FILE --base X.
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			return nil, usageError{err.Error()}
		}
		if fs.NArg() == 0 {
			return pos, nil
		}
		pos = append(pos, fs.Arg(0))
		args = fs.Args()[1:]
	}
}

func (e *env) check(args []string) error {
	fs := newFlags("check", e)
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	s, err := e.oneScenario("check", pos)
	if err != nil {
		return err
	}
	return writeSummary(e.stdout, s)
}

// writeSummary prints the short canonical summary of a valid scenario.
func writeSummary(w io.Writer, s *scenarios.Scenario) error {
	canon, err := scenarios.Canonical(s)
	if err != nil {
		return err
	}
	r, wf, rx := s.Radar, s.Waveform, s.Receiver
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	name := s.Name
	if name == "" {
		name = "(unnamed)"
	}
	fmt.Fprintf(tw, "valid\t%s\n", name)
	fmt.Fprintf(tw, "waveform\t%s, τ %s, B %s, B·τ %.4g\n", waveDesc(wf), si(wf.PulseWidth(), "s"), si(wf.Bandwidth(), "Hz"), wf.PulseWidth()*wf.Bandwidth())
	fmt.Fprintf(tw, "radar\t%s, %s peak, %.4g dBi, NF %.3g dB, loss %.3g dB\n", si(r.CarrierHz, "Hz"), si(r.PeakPowerW, "W"), r.AntennaGainDBi, r.NoiseFigureDB, r.SystemLossDB)
	fmt.Fprintf(tw, "timing\tfs %s, PRI %s, %d pulse(s), window %.6g–%.6g m (%d samples)\n", si(r.SampleRateHz, "Hz"), si(r.PRIS, "s"), r.Pulses, r.WindowStartM, r.WindowStopM, s.WindowSamples())
	fmt.Fprintf(tw, "receiver\t%s filter, %s window, %s\n", rx.Filter, windowDesc(rx.Window), detectorDesc(rx.Detector))
	fmt.Fprintf(tw, "targets\t%s\n", targetsDesc(s.Targets))
	fmt.Fprintf(tw, "seed\t%d\n", s.Seed)
	fmt.Fprintf(tw, "canonical\t%s\n", canon)
	return tw.Flush()
}

func waveDesc(w scenarios.Waveform) string {
	switch w.Kind {
	case scenarios.KindLFM:
		return "lfm " + w.Sweep
	case scenarios.KindNLFM:
		return fmt.Sprintf("nlfm designed for %.3g dB", w.DesignSidelobeDB)
	case scenarios.KindRect:
		return "rect"
	case scenarios.KindMLS:
		return fmt.Sprintf("mls degree %d (%d chips, chip %s)", w.Degree, w.Chips(), si(w.ChipS, "s"))
	case scenarios.KindZadoffChu:
		return fmt.Sprintf("zadoff_chu %d root %d (chip %s)", w.Length, w.Root, si(w.ChipS, "s"))
	}
	return fmt.Sprintf("%s %d chips (chip %s)", w.Kind, w.Chips(), si(w.ChipS, "s"))
}

func windowDesc(w scenarios.Window) string {
	switch w.Kind {
	case scenarios.WindowTaylor:
		return fmt.Sprintf("taylor(n̄ %d, %.3g dB)", w.NBar, w.SidelobeDB)
	case scenarios.WindowChebyshev:
		return fmt.Sprintf("chebyshev(%.3g dB)", w.SidelobeDB)
	case scenarios.WindowKaiser:
		return fmt.Sprintf("kaiser(β %.3g)", w.Beta)
	case scenarios.WindowGaussian:
		return fmt.Sprintf("gaussian(σ %.3g)", w.Sigma)
	}
	return w.Kind
}

func detectorDesc(d scenarios.Detector) string {
	switch d.Kind {
	case scenarios.DetectorFixed:
		return fmt.Sprintf("fixed threshold, pfa %.3g", d.PFA)
	case scenarios.DetectorOS:
		return fmt.Sprintf("os_cfar pfa %.3g, %d guard, %d training, rank %d", d.PFA, d.GuardCells, d.TrainingCells, d.Rank)
	}
	return fmt.Sprintf("ca_cfar pfa %.3g, %d guard, %d training", d.PFA, d.GuardCells, d.TrainingCells)
}

func targetsDesc(ts []scenarios.Target) string {
	if len(ts) == 0 {
		return "none"
	}
	count := map[string]int{}
	for _, t := range ts {
		count[t.Kind]++
	}
	var parts []string
	for _, k := range []string{scenarios.TargetPoint, scenarios.TargetExtended, scenarios.TargetVolume} {
		if count[k] > 0 {
			parts = append(parts, fmt.Sprintf("%d %s", count[k], k))
		}
	}
	return fmt.Sprintf("%d (%s)", len(ts), strings.Join(parts, ", "))
}

// si formats v with an SI prefix and unit: 2e-5 s → "20 µs".
func si(v float64, unit string) string {
	prefixes := []struct {
		f float64
		p string
	}{{1e9, "G"}, {1e6, "M"}, {1e3, "k"}, {1, ""}, {1e-3, "m"}, {1e-6, "µ"}, {1e-9, "n"}, {1e-12, "p"}}
	a := v
	if a < 0 {
		a = -a
	}
	for _, p := range prefixes {
		if a >= p.f {
			return fmt.Sprintf("%.4g %s%s", v/p.f, p.p, unit)
		}
	}
	return fmt.Sprintf("%.4g %s", v, unit)
}

func (e *env) link(args []string) error {
	fs := newFlags("link", e)
	base := fs.String("base", defaultBase, "origin of the workbench the link opens (scheme://host:port)")
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	s, err := e.oneScenario("link", pos)
	if err != nil {
		return err
	}
	l, err := scenarios.Link(s)
	if err != nil {
		return err
	}
	fmt.Fprintln(e.stdout, strings.TrimRight(*base, "/")+l)
	return nil
}

func (e *env) demos(args []string) error {
	if len(args) != 0 {
		return usageError{"demos takes no arguments"}
	}
	ds, err := scenarios.Demos()
	if err != nil {
		return err
	}
	tw := tabwriter.NewWriter(e.stdout, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "NAME\tTITLE")
	for _, d := range ds {
		fmt.Fprintf(tw, "demo:%s\t%s\n", d.Name, d.Title)
	}
	return tw.Flush()
}
