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
	unitsText := unitsFlag(fs)
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	u, err := parseUnitsFlag(*unitsText, true, "")
	if err != nil {
		return err
	}
	s, err := e.oneScenario("check", pos)
	if err != nil {
		return err
	}
	if s.ReadVersion != 0 {
		fmt.Fprintf(e.stdout, "read as format version %d from version %d\n", s.Version, s.ReadVersion)
		notes, err := scenarios.UpgradeNotes(e.ctx, s)
		if err != nil {
			return err
		}
		for _, n := range notes {
			fmt.Fprintf(e.stdout, "  %s\n", n)
		}
	}
	return writeSummaryIn(e.stdout, s, u)
}

// writeSummaryIn prints the short canonical summary of a valid scenario,
// the receive window in u's range unit; the canonical JSON keeps SI.
func writeSummaryIn(w io.Writer, s *scenarios.Scenario, u scenarios.Units) error {
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
	fmt.Fprintf(tw, "waveform\t%s, B·τ %.4g\n", wf.Describe(), wf.PulseWidth()*wf.Bandwidth())
	fmt.Fprintf(tw, "radar\t%s, %s peak, %.4g dBi, NF %.3g dB, loss %.3g dB\n", scenarios.SI(r.CarrierHz, "Hz"), scenarios.SI(r.PeakPowerW, "W"), r.AntennaGainDBi, r.NoiseFigureDB, r.SystemLossDB)
	pri := "PRI " + scenarios.SI(r.PRIS, "s")
	if r.Staggered() {
		p := make([]string, len(r.PRIStaggerS))
		for i, v := range r.PRIStaggerS {
			p[i] = scenarios.SI(v, "s")
		}
		pri = "PRIs " + strings.Join(p, " / ") + " in turn (stagger)"
	}
	fmt.Fprintf(tw, "timing\tfs %s, %s, %d pulse(s), window %.6g–%.6g %s (%d samples)\n", scenarios.SI(r.SampleRateHz, "Hz"), pri, r.Pulses,
		u.FromSI(scenarios.QRange, r.WindowStartM), u.FromSI(scenarios.QRange, r.WindowStopM), u.Range, s.WindowSamples())
	fmt.Fprintf(tw, "receiver\t%s filter, window %s, %s\n", rx.Filter, rx.Window.Describe(), rx.Detector.Describe())
	if s.NonCoherent() {
		fmt.Fprintf(tw, "integration\tnon-coherent: the %d detected pulses summed per range gate (no range–Doppler map)\n", s.Radar.Pulses)
	}
	fmt.Fprintf(tw, "targets\t%s\n", scenarios.DescribeTargets(s.Targets))
	fmt.Fprintf(tw, "seed\t%d\n", s.Seed)
	fmt.Fprintf(tw, "canonical\t%s\n", canon)
	return tw.Flush()
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
