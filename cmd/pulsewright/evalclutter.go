package main

import (
	"fmt"
	"io"
	"strings"

	"github.com/pulsewright/pulsewright/scenarios"
)

// writeClutterText prints the clutter lines of a text report: each
// target's CNR and SCR, each clutter object's breakthrough, the scene's
// peak CNR and the detector's false-alarm rate (docs/detection.md §10).
func writeClutterText(w io.Writer, r *scenarios.Report) {
	for _, t := range r.Targets {
		var parts []string
		if t.CNRDB != nil {
			parts = append(parts, "CNR "+fx(*t.CNRDB, 1)+" dB")
		}
		if t.SCRDB != nil {
			parts = append(parts, "SCR "+fx(*t.SCRDB, 1)+" dB")
		}
		if t.CNRIntegratedDB != nil {
			parts = append(parts, "on the map CNR "+fx(*t.CNRIntegratedDB, 1)+" dB")
		}
		if t.SCRIntegratedDB != nil {
			parts = append(parts, "SCR "+fx(*t.SCRIntegratedDB, 1)+" dB")
		}
		if b := t.Breakthrough; b != nil {
			if b.Cells == 0 {
				parts = append(parts, "no breakthrough")
			} else {
				spans := make([]string, 0, len(b.Spans))
				for _, s := range b.Spans {
					spans = append(spans, fmt.Sprintf("%.0f–%.0f m", s.StartM, s.StopM))
				}
				parts = append(parts, fmt.Sprintf("%d false-alarm cells over %s", b.Cells, strings.Join(spans, ", ")))
			}
		}
		if len(parts) > 0 {
			fmt.Fprintf(w, "%s: %s\n", t.ID, strings.Join(parts, ", "))
		}
	}
	if c := r.Clutter; c != nil && c.CNRPeakDB != nil && c.CNRPeakRangeM != nil {
		fmt.Fprintf(w, "clutter: peak CNR %s dB at %.0f m, %d cells break through\n", fx(*c.CNRPeakDB, 1), *c.CNRPeakRangeM, c.BreakthroughCells)
	}
	if in := r.Integration; in != nil {
		fmt.Fprintf(w, "integration: %s\n", in.Note)
	}
	if fa := r.FalseAlarms; fa != nil {
		fmt.Fprintf(w, "false alarms from noise: %.3g per s (Pfa %.2g × %.0f independent cells of %d tested per %s)\n",
			fa.RatePerS, fa.PFA, fa.IndependentCells, fa.TestedCells, scenarios.SI(fa.LookS, "s"))
	}
}
