package main

import (
	"encoding/json"
	"fmt"
	"io"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/pulsewright/pulsewright/scenarios"
)

func (e *env) eval(args []string) error {
	fs := newFlags("eval", e)
	format := fs.String("format", "json", "output format: json (the report format) or text (a readable table)")
	unitsFlag := unitsFlag(fs)
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	if *format != "json" && *format != "text" {
		return usageError{fmt.Sprintf("--format %q is not json or text", *format)}
	}
	u, err := parseUnitsFlag(*unitsFlag, *format == "text", "it applies to --format text; the JSON report keeps SI")
	if err != nil {
		return err
	}
	s, err := e.oneScenario("eval", pos)
	if err != nil {
		return err
	}
	res, err := scenarios.Evaluate(e.ctx, s)
	if err != nil {
		return fmt.Errorf("evaluate: %w", err)
	}
	if *format == "text" {
		return writeReportTextIn(e.stdout, &res.Report, u, scenarios.TypedIn(s))
	}
	enc := json.NewEncoder(e.stdout)
	enc.SetIndent("", "  ")
	return enc.Encode(res.Report)
}

// writeReportText prints a report as a table a person reads in a terminal,
// in SI.
func writeReportText(w io.Writer, r *scenarios.Report) error {
	return writeReportTextIn(w, r, scenarios.SIUnits(), scenarios.Typed{})
}

// writeReportTextIn is writeReportText with ranges, speeds and range rates
// in u (reasons and warnings restated; a value of typed, the scenario's
// own, reads back as typed).
func writeReportTextIn(w io.Writer, r *scenarios.Report, u scenarios.Units, typed scenarios.Typed) error {
	wf := r.Waveform
	fmt.Fprintf(w, "%s\n\n", r.Scenario)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "waveform\t%s, τ %s, B %s, B·τ %.4g, gain %s dB\n", wf.Kind, scenarios.SI(wf.PulseWidthS, "s"), scenarios.SI(wf.BandwidthHz, "Hz"), wf.TimeBandwidth, fx(wf.CompressionGainDB, 1))
	if wf.PSLRDB != nil && wf.ISLRDB != nil {
		fmt.Fprintf(tw, "sidelobes\tPSLR %s dB, ISLR %s dB\n", fx(*wf.PSLRDB, 2), fx(*wf.ISLRDB, 2))
	} else {
		fmt.Fprintf(tw, "sidelobes\tno sidelobes (the response falls monotonically from its peak)\n")
	}
	fmt.Fprintf(tw, "resolution\t%s at −3 dB, mismatch loss %s dB\n", u.Format(scenarios.QRange, wf.Mainlobe3dBM, 2), fx(wf.MismatchLossDB, 2))
	fmt.Fprintf(tw, "sampling\tstraddle loss %s dB worst, %s dB mean at this sample rate\n", fx(wf.StraddleLossMaxDB, 2), fx(wf.StraddleLossMeanDB, 2))
	if !u.IsSI() {
		fmt.Fprintf(tw, "units\tranges in %s, speeds in %s, range rates positive when %s (files and JSON: m, m/s, positive when opening)\n", u.Range, u.Speed, u.Rate)
	}
	fmt.Fprintf(tw, "ranges\tblind %s, unambiguous %s, unambiguous velocity ±%s\n", u.Format(scenarios.QRange, wf.BlindRangeM, 0), u.Format(scenarios.QRange, wf.UnambiguousRangeM, 0), u.Format(scenarios.QSpeed, wf.UnambiguousVelocityMPS, 2))
	if st := r.Stagger; st != nil {
		pris := make([]string, len(st.PRIS))
		for i, p := range st.PRIS {
			pris[i] = scenarios.SI(p, "s")
		}
		line := fmt.Sprintf("PRIs %s (mean %s, step Δ %s): first blind speed %s, %.2f × the mean PRI's %s",
			strings.Join(pris, " / "), scenarios.SI(st.MeanPRIS, "s"), scenarios.SI(st.StepS, "s"), u.Format(scenarios.QSpeed, st.FirstBlindSpeedMPS, 1),
			st.FirstBlindSpeedMPS/st.MeanPRIBlindSpeedMPS, u.Format(scenarios.QSpeed, st.MeanPRIBlindSpeedMPS, 1))
		if st.DeepestDipDB != nil {
			line += fmt.Sprintf("; deepest dip %s dB at %s", fx(*st.DeepestDipDB, 1), u.Format(scenarios.QSpeed, *st.DeepestDipMPS, 1))
		}
		fmt.Fprintf(tw, "stagger\t%s\n", line)
	}
	tw.Flush()
	fmt.Fprintln(w)
	tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintf(tw, "ID\tRANGE %s\tSNR dB\tDOPPLER Hz\tDOP LOSS dB\tSHIFT %s\tPD\tMARGIN dB\tTHR MARGIN dB\tSTATUS\t\n", u.Range, u.Range)
	for _, t := range r.Targets {
		thrMargin, pd, margin := "—", "—", "—"
		if t.ThresholdMarginDB != nil {
			thrMargin = fx(*t.ThresholdMarginDB, 1)
		}
		if t.Pd != nil {
			pd = scenarios.PdText(*t.Pd)
		}
		if t.MarginDB != nil {
			margin = fx(*t.MarginDB, 1)
		}
		status := t.Status
		status += scenarios.MaskedByWords(t.ID, t.MaskedBy)
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t\n", t.ID, u.Number(scenarios.QRange, t.RangeM, 1), fx(t.SNRDB, 1), fx(t.DopplerHz, 0), fx(t.DopplerLossDB, 2), u.Number(scenarios.QRange, t.RangeShiftM, 2), pd, margin, thrMargin, status)
	}
	tw.Flush()
	fmt.Fprintln(w)
	for _, t := range r.Targets {
		fmt.Fprintf(w, "%s: %s\n", t.ID, u.RestateTyped(t.Reason, typed))
	}
	for _, t := range r.Targets {
		if line := pdLine(t); line != "" {
			fmt.Fprintf(w, "%s: %s\n", t.ID, line)
		}
	}
	var clutter strings.Builder // its ranges restated in u
	writeClutterText(&clutter, r)
	io.WriteString(w, u.RestateTyped(clutter.String(), typed))
	writeScanText(w, r)
	for _, t := range r.Targets {
		if t.DetectionRangeM != nil {
			fmt.Fprintf(w, "%s: detection range for its RCS %s (where its SNR falls to the %s dB the required Pd needs, R⁴ law).\n",
				t.ID, siOr(u, *t.DetectionRangeM), fx(*t.SNRRequiredDB, 1))
		}
	}
	for _, warn := range r.Warnings {
		fmt.Fprintf(w, "warning: %s\n", u.RestateTyped(warn, typed))
	}
	if r.Schedule != nil {
		fmt.Fprintln(w)
		writeScheduleText(w, r.Schedule, u, typed)
	}
	eng := scenarios.RunningEngine()
	if r.Engine != nil {
		eng = *r.Engine
	}
	fmt.Fprintf(w, "\n%s\n", eng)
	return nil
}

// fx formats v with prec decimals, never as a negative zero ("-0.00"
// for a value that rounds to zero).
func fx(v float64, prec int) string {
	t := strconv.FormatFloat(v, 'f', prec, 64)
	if strings.Trim(t, "-0.") == "" {
		return strings.TrimPrefix(t, "-")
	}
	return t
}

// pdLine is a target's probability of detection in words, or "" when the
// report has none. pd_alone is named for what it is, the Pd with the
// other targets removed (its own sidelobes kept), so that it is not read
// as the Pd "against noise alone" a masked target's reason quotes. A
// folded target's Pd is that of its ghost at the apparent range.
func pdLine(t scenarios.TargetReport) string {
	if t.Pd == nil {
		return ""
	}
	line := "Pd " + scenarios.PdText(*t.Pd)
	if t.Status == scenarios.StatusFolded {
		line = "Pd of its ghost at the apparent range " + scenarios.PdText(*t.Pd)
	}
	if t.PdAlone != nil && scenarios.PdText(*t.PdAlone) != scenarios.PdText(*t.Pd) {
		line += " in the scene, " + scenarios.PdText(*t.PdAlone) + " with the other targets removed"
	}
	if t.SNRRequiredDB != nil && t.MarginDB != nil {
		line += fmt.Sprintf("; the required Pd needs %s dB at its cell, margin %s dB", fx(*t.SNRRequiredDB, 1), fx(*t.MarginDB, 1))
	}
	return line + "."
}

// siOr formats a range in metres with an SI prefix ("17.09 km") in SI,
// else in the user's range unit.
func siOr(u scenarios.Units, m float64) string {
	if u.Range == "m" {
		return scenarios.SI(m, "m")
	}
	return u.Format(scenarios.QRange, m, 0)
}
