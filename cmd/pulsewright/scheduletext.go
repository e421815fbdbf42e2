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
func writeScheduleText(w io.Writer, s *scenarios.ScheduleReport, u scenarios.Units, typed scenarios.Typed) {
	fmt.Fprintf(w, "PRF schedule: %d CPIs, %d-of-%d", s.N, s.M, s.N)
	if s.UnambiguousRangeM != nil {
		fmt.Fprintf(w, ", combined unambiguous range %s", kmText(u, *s.UnambiguousRangeM))
	}
	if s.FirstBlindSpeedMPS != nil {
		fmt.Fprintf(w, ", first speed blind in every CPI %s", u.Format(scenarios.QSpeed, *s.FirstBlindSpeedMPS, 1))
	}
	fmt.Fprintln(w)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	for k, c := range s.CPIs {
		if c.PRIStaggerS != nil {
			pris := make([]string, len(c.PRIStaggerS))
			for i, p := range c.PRIStaggerS {
				pris[i] = scenarios.SI(p, "s")
			}
			fmt.Fprintf(tw, "CPI %d\tstagger %s\t%d pulses\tunambiguous %s\tfirst blind speed %s (stagger)\n", k+1, strings.Join(pris, " / "), c.Pulses, kmText(u, c.UnambiguousRangeM), u.Format(scenarios.QSpeed, c.BlindSpeedMPS, 1))
			continue
		}
		fmt.Fprintf(tw, "CPI %d\tPRI %s\t%d pulses\tunambiguous %s\tblind speed %s\n", k+1, scenarios.SI(c.PRIS, "s"), c.Pulses, kmText(u, c.UnambiguousRangeM), u.Format(scenarios.QSpeed, c.BlindSpeedMPS, 1))
	}
	tw.Flush()
	fmt.Fprintln(w)
	tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	head := []string{"ID"}
	for k := range s.CPIs {
		head = append(head, fmt.Sprintf("CPI %d", k+1))
	}
	head = append(head, "SEEN", fmt.Sprintf("%d-OF-%d", s.M, s.N), "PD", "RANGE "+kmUnit(u), "RATE "+u.Speed)
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
			if ct.CancelledBy() != "" {
				cell = "cancelled" // by the MTI canceller: the reason names it
			}
			if ct.ApparentRangeM != nil && ct.Detected {
				cell = fmt.Sprintf("%s @ %s", ct.Status, kmText(u, *ct.ApparentRangeM))
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
			rng = strings.TrimSuffix(kmText(u, *t.RangeM), " "+kmUnit(u))
		}
		if t.RangeRateMPS != nil {
			rate = u.Number(scenarios.QRate, *t.RangeRateMPS, 1)
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
		fmt.Fprintf(w, "%s (schedule): %s\n", t.ID, u.RestateTyped(t.Reason, typed))
	}
	for k, c := range s.CPIs {
		for _, warn := range c.Warnings {
			fmt.Fprintf(w, "warning (CPI %d): %s\n", k+1, u.RestateTyped(warn, typed))
		}
	}
}

// kmUnit is the unit the schedule's ranges are printed in: km in SI (a
// schedule's ranges run to hundreds of km), else the user's range unit.
func kmUnit(u scenarios.Units) string {
	if u.Range == "m" {
		return "km"
	}
	return u.Range
}

// kmText formats a range in metres in kmUnit(u): "60.11 km", "32.4568 nmi".
func kmText(u scenarios.Units, m float64) string {
	if u.Range == "m" {
		return fx(m/1000, 2) + " km"
	}
	return u.Format(scenarios.QRange, m, 0)
}
