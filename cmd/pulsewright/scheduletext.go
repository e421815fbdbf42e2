package main

import (
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"github.com/pulsewright/pulsewright/scenarios"
)

// writeScheduleText prints a PRF schedule's per-CPI and combined results:
// one line per CPI, one table of the verdicts of every CPI and the M-of-N
// verdict with the unfolded range and range rate, then the reasons.
func writeScheduleText(w io.Writer, s *scenarios.ScheduleReport) {
	fmt.Fprintf(w, "PRF schedule: %d CPIs, %d-of-%d", s.N, s.M, s.N)
	if s.UnambiguousRangeM != nil {
		fmt.Fprintf(w, ", combined unambiguous range %.2f km", *s.UnambiguousRangeM/1000)
	}
	if s.FirstBlindSpeedMPS != nil {
		fmt.Fprintf(w, ", first speed blind in every CPI %.1f m/s", *s.FirstBlindSpeedMPS)
	}
	fmt.Fprintln(w)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	for k, c := range s.CPIs {
		fmt.Fprintf(tw, "CPI %d\tPRI %s\t%d pulses\tunambiguous %.2f km\tblind speed %.1f m/s\n", k+1, scenarios.SI(c.PRIS, "s"), c.Pulses, c.UnambiguousRangeM/1000, c.BlindSpeedMPS)
	}
	tw.Flush()
	fmt.Fprintln(w)
	tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	head := []string{"ID"}
	for k := range s.CPIs {
		head = append(head, fmt.Sprintf("CPI %d", k+1))
	}
	head = append(head, "SEEN", fmt.Sprintf("%d-OF-%d", s.M, s.N), "PD", "RANGE km", "RATE m/s")
	fmt.Fprintln(tw, strings.Join(head, "\t")+"\t")
	doppler := false
	for _, c := range s.CPIs {
		doppler = doppler || c.Pulses > 1
	}
	for j, t := range s.Targets {
		row := []string{t.ID}
		for _, c := range s.CPIs {
			ct := c.Targets[j]
			cell := ct.Status
			if ct.ApparentRangeM != nil && ct.Detected {
				cell = fmt.Sprintf("%s @ %.2f km", ct.Status, *ct.ApparentRangeM/1000)
			}
			row = append(row, cell)
		}
		verdict := "missed"
		if t.Detected {
			verdict = "detected"
		}
		clutter := true
		for _, c := range s.CPIs {
			clutter = clutter && c.Targets[j].Status == scenarios.StatusClutter
		}
		pd, rng, rate := "—", "unresolved", "unresolved"
		if t.Pd != nil {
			pd = scenarios.PdText(*t.Pd)
		}
		if t.RangeM != nil {
			rng = fx(*t.RangeM/1000, 2)
		}
		if t.RangeRateMPS != nil {
			rate = fx(*t.RangeRateMPS, 1)
		} else if !doppler {
			rate = "—" // no CPI measures Doppler
		}
		if clutter { // not a target: nothing to detect or unfold
			verdict, rng, rate = "clutter", "—", "—"
		}
		row = append(row, fmt.Sprintf("%d/%d", t.DetectedIn, s.N), verdict, pd, rng, rate)
		fmt.Fprintln(tw, strings.Join(row, "\t")+"\t")
	}
	tw.Flush()
	fmt.Fprintln(w)
	for _, t := range s.Targets {
		fmt.Fprintf(w, "%s (schedule): %s\n", t.ID, t.Reason)
	}
	for k, c := range s.CPIs {
		for _, warn := range c.Warnings {
			fmt.Fprintf(w, "warning (CPI %d): %s\n", k+1, warn)
		}
	}
}
